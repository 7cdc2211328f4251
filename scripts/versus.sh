#!/usr/bin/env bash
# The engine beside ngspice on the same generated networks in one run: time per network of each,
# their ratio and the largest disagreement. Optimised for speed, as the benchmarks are.
set -euo pipefail
cd "$(dirname "$0")/.."
cargo test --profile bench -p tapline-core --test spice -- --ignored --nocapture versus_ngspice 2>&1 \
  | grep -E "^60 generated networks|test result"
