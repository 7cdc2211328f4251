#!/usr/bin/env bash
# Runs the fuzz targets in fuzz/ with cargo-fuzz on the nightly toolchain.
#   scripts/fuzz.sh short   about 20 seconds per target (the test command runs this)
#   scripts/fuzz.sh long    10 million executions per target (the campaign the README records),
#                           built without AddressSanitizer: the code fuzzed is safe Rust, the oracle's
#                           assertions are what it looks for, and the sanitizer slows each run 6x
#   scripts/fuzz.sh MODE TARGET...   only the targets named
# Any crash, panic, assertion of the oracle or input slower than 10 s fails the run; libFuzzer
# writes the input to fuzz/artifacts/<target>/, and each becomes a unit test.
set -euo pipefail
cd "$(dirname "$0")/../fuzz"
mode="${1:-short}"
targets=(job_bytes job_shaped readings_shaped panel_shaped)
if [ "$#" -gt 1 ]; then
  targets=("${@:2}")
fi
for t in "${targets[@]}"; do
  mkdir -p "corpus/$t"
  case "$mode" in
    short) limit=(-max_total_time=20); build=() ;;
    long) limit=(-runs=10000000); build=(-s none) ;;
    *) echo "fuzz.sh: short or long" >&2; exit 2 ;;
  esac
  echo "== fuzz $t ($mode) =="
  log="$(mktemp)"
  status=0
  cargo +nightly fuzz run "${build[@]}" "$t" "corpus/$t" -- "${limit[@]}" -timeout=10 -dict=dict/job.dict \
    -print_final_stats=1 >"$log" 2>&1 || status=$?
  # Only the summary lines; libFuzzer's own exit status is what counts.
  grep -E "stat::number_of_executed_units|^Done|SUMMARY|ERROR|panicked|is null|is " "$log" | head -20 || true
  rm -f "$log"
  if [ "$status" -ne 0 ]; then
    echo "fuzz: $t failed; the input is in fuzz/artifacts/$t/" >&2
    exit 1
  fi
done
