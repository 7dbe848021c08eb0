#!/usr/bin/env bash
# Lay out the seed corpus of every fuzz target under fuzz/corpus/TARGET from
# the notation files the repository already has: the examples, the test
# fixtures, the grammar's examples, the formatter's cases and the kept crash
# inputs. Each file also goes in with CRLF and lone-CR line ends, so that the
# fuzzers start from all three line-end styles. The corpus is not committed
# (fuzz/corpus is ignored); run this again at any time, it only adds files.
#
#   fuzz/seed.sh            # every target
#   fuzz/seed.sh checker    # one target
set -euo pipefail
cd "$(dirname "$0")/.."
targets=("$@")
if [ ${#targets[@]} -eq 0 ]; then
  targets=(lexer parser checker format_roundtrip positions)
fi
mapfile -t files < <(find examples tests/fixtures grammar/examples tests/format tests/fuzz_regressions \
  -type f \( -name '*.stoik' -o -name '*.txt' \) 2>/dev/null | sort)
for t in "${targets[@]}"; do
  dir="fuzz/corpus/$t"
  mkdir -p "$dir"
  for f in "${files[@]}"; do
    name=$(printf '%s' "$f" | tr '/' '_')
    cp "$f" "$dir/$name"
    sed 's/$/\r/' "$f" > "$dir/$name.crlf"
    tr '\n' '\r' < "$f" > "$dir/$name.cr"
  done
done
echo "seeded ${#targets[@]} target(s) with ${#files[@]} files in 3 line-end styles each"
