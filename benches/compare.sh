#!/usr/bin/env bash
# Whole-process timing: `stoik check` on generated libraries of 10^4, 10^5
# and 10^6 reactions against reading and lexing the same bytes, with peak
# memory (GNU time). Run from the repository root:
#   cargo build --release --bin stoik --example generate_library --example lex_only
#   benches/compare.sh [SIZES...]
set -euo pipefail
bin=target/release
sizes=${*:-10000 100000 1000000}
printf '%-9s %10s %10s %10s %8s %10s\n' reactions MB lex_s check_s ratio peak_MB
for n in $sizes; do
  dir=$(mktemp -d)
  "$bin/examples/generate_library" "$dir" "$n" 0.01 4 2>/dev/null
  mb=$(du -sm "$dir" | cut -f1)
  lex=$( { /usr/bin/time -f '%e' "$bin/examples/lex_only" "$dir"/*.stoik >/dev/null; } 2>&1 | tail -1)
  out=$( { /usr/bin/time -f '%e %M' "$bin/stoik" check "$dir" --format json >/dev/null || true; } 2>&1 | tail -1)
  check=${out% *}
  peak=$(( ${out#* } / 1024 ))
  ratio=$(awk -v a="$check" -v b="$lex" 'BEGIN { if (b > 0) printf "%.1f", a / b; else print "-" }')
  printf '%-9s %10s %10s %10s %8s %10s\n' "$n" "$mb" "$lex" "$check" "$ratio" "$peak"
  rm -rf "$dir"
done
