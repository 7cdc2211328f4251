#!/usr/bin/env bash
# Sets up what is missing and runs every check: formatting, lints, the Rust unit, integration,
# property and reference tests (including the ngspice cross-check), the OpenDSS cross-check, the
# release WebAssembly build, the size budget, the start-up check and the browser tests in headless
# Chromium.
set -euo pipefail
cd "$(dirname "$0")/.."
scripts/setup.sh test
source scripts/env.sh
step() { printf '\n\033[1m== %s ==\033[0m\n' "$*"; }

step "format"
cargo fmt --all -- --check
step "lints"
cargo clippy --workspace --all-targets --locked -- -D warnings
step "Rust tests (engine, command line, app logic)"
cargo test --workspace --locked
step "OpenDSS cross-check (dss-python, in process)"
tests/opendss/run.sh
step "fuzzing, short run (cargo-fuzz on nightly)"
if rustup toolchain list | grep -q '^nightly' && command -v cargo-fuzz >/dev/null; then
  scripts/fuzz.sh short
else
  echo "skipped: the nightly toolchain is not on this machine"
fi
step "build scripts (the post-build step's short binding names)"
node --test tests/build/
step "release build"
trunk build --release --offline
step "size"
scripts/size-check.sh
step "start-up (offline cold starts, CPU slowed 4x)"
node scripts/startup-check.mjs
step "browser tests (headless Chromium, phone size)"
node --test tests/browser/
