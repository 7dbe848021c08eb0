#!/usr/bin/env bash
# Whole-process timing: `stoik check` on generated libraries of 10^4, 10^5
# and 10^6 reactions against reading and lexing the same bytes, with peak
# memory (GNU time). With RUNS=n the two are timed in alternation n times
# (lex, check, lex, check, ...) and the medians are shown, since this
# machine kind's speed drifts within minutes. Run from the repository root:
#   cargo build --release --bin stoik --example generate_library --example lex_only
#   [RUNS=9] benches/compare.sh [SIZES...]
set -euo pipefail
bin=target/release
sizes=${*:-10000 100000 1000000}
runs=${RUNS:-1}
median() { sort -g | awk '{ v[NR] = $1 } END { print (NR % 2) ? v[(NR + 1) / 2] : (v[NR / 2] + v[NR / 2 + 1]) / 2 }'; }
printf '%-9s %10s %10s %10s %8s %10s\n' reactions MB lex_s check_s ratio peak_MB
for n in $sizes; do
  dir=$(mktemp -d)
  "$bin/examples/generate_library" "$dir" "$n" 0.01 4 2>/dev/null
  mb=$(du -sm "$dir" | cut -f1)
  lexes=()
  checks=()
  peaks=()
  for _ in $(seq "$runs"); do
    lexes+=("$( { /usr/bin/time -f '%e' "$bin/examples/lex_only" "$dir"/*.stoik >/dev/null; } 2>&1 | tail -1)")
    out=$( { /usr/bin/time -f '%e %M' "$bin/stoik" check "$dir" --format json >/dev/null || true; } 2>&1 | tail -1)
    checks+=("${out% *}")
    peaks+=("$(( ${out#* } / 1024 ))")
  done
  lex=$(printf '%s\n' "${lexes[@]}" | median)
  check=$(printf '%s\n' "${checks[@]}" | median)
  peak=$(printf '%s\n' "${peaks[@]}" | sort -g | tail -1)
  ratio=$(awk -v a="$check" -v b="$lex" 'BEGIN { if (b > 0) printf "%.1f", a / b; else print "-" }')
  printf '%-9s %10s %10s %10s %8s %10s\n' "$n" "$mb" "$lex" "$check" "$ratio" "$peak"
  rm -rf "$dir"
done
