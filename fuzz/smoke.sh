#!/usr/bin/env bash
# A short fuzz run for CI: installs cargo-fuzz when it is missing, seeds the
# corpus from the repository's notation files, builds every target and runs
# each one for a few seconds. Any crash, timeout or memory blow-up fails the
# script, and libFuzzer leaves the input in fuzz/artifacts/TARGET/.
#
#   fuzz/smoke.sh               # 25 s per target
#   FUZZ_SECONDS=600 fuzz/smoke.sh checker
#
# Only the stable toolchain is needed: RUSTC_BOOTSTRAP=1 lets it take the
# sanitizer flags cargo-fuzz passes.
set -euo pipefail
cd "$(dirname "$0")/.."
seconds=${FUZZ_SECONDS:-25}
targets=("$@")
if [ ${#targets[@]} -eq 0 ]; then
  targets=(lexer parser checker format_roundtrip positions)
fi
export RUSTC_BOOTSTRAP=1
start=$(date +%s)
if ! cargo fuzz --version >/dev/null 2>&1; then
  echo "-- installing cargo-fuzz"
  cargo install cargo-fuzz --version 0.13.2 --locked
fi
echo "-- cargo-fuzz ready ($(( $(date +%s) - start ))s)"
fuzz/seed.sh "${targets[@]}"
cargo fuzz build
echo "-- targets built ($(( $(date +%s) - start ))s)"
mkdir -p fuzz/logs
for t in "${targets[@]}"; do
  log="fuzz/logs/$t.log"
  # A fixed seed makes the mutations the same from run to run, so CI does
  # not turn red on the luck of the draw; long runs pass their own.
  if ! cargo fuzz run "$t" -- -seed="${FUZZ_SEED:-1}" -max_total_time="$seconds" -timeout=10 -rss_limit_mb=2048 \
      -dict=fuzz/stoik.dict -print_final_stats=1 >"$log" 2>&1; then
    tail -n 60 "$log"
    echo "fuzz target $t failed; the input is in fuzz/artifacts/$t/"
    exit 1
  fi
  runs=$(grep -E '^Done [0-9]+ runs' "$log" | tail -1)
  cov=$(grep -E '^#[0-9]+' "$log" | tail -1 | grep -oE 'cov: [0-9]+ ft: [0-9]+' || true)
  echo "fuzz $t: ${runs:-?}, ${cov:-?}"
done
echo "-- fuzz smoke passed in $(( $(date +%s) - start ))s"
