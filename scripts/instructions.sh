#!/usr/bin/env bash
# Counts the instructions of one solve of the benchmark's 40-load job and of one 500-point sweep
# of it, with valgrind's callgrind: the loop of core/examples/solve_loop.rs runs N and 2N times,
# and the difference over N leaves out building the job and starting the process. Unlike a
# criterion median, the count does not move with what else the host runs, so solver work is
# judged by it (DEVELOPERS.md, "Where the solver's time goes"). Needs valgrind (Debian package
# valgrind); not part of the test command.
#   scripts/instructions.sh            solve (N = 2000) and sweep (N = 10)
set -euo pipefail
cd "$(dirname "$0")/.."
command -v valgrind >/dev/null || { echo "instructions: needs valgrind (apt-get install valgrind)" >&2; exit 1; }
cargo build -q --profile bench --example solve_loop -p tapline-core
bin=target/release/examples/solve_loop
out=$(mktemp -d)
trap 'rm -rf "$out"' EXIT
count() { # what n -> instructions of the whole run
  valgrind --tool=callgrind --callgrind-out-file="$out/cg" "$bin" "$1" "$2" 2>&1 \
    | sed -n 's/.*Collected : *\([0-9]*\).*/\1/p'
}
for pair in "solve 2000" "sweep 10"; do
  set -- $pair
  a=$(count "$1" "$2")
  b=$(count "$1" $((2 * $2)))
  echo "$1: $(( (b - a) / $2 )) instructions each"
done
