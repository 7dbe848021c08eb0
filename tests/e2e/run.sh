#!/usr/bin/env bash
# End-to-end tests of `stoik lsp` with real clients. CI calls this script.
#
# Environment:
#   STOIK_BIN  the server binary (default: target/debug/stoik, built first
#              with `cargo build` when missing)
#   VENV       a virtualenv with pytest-lsp==1.0.1 installed
#              (default: .venv-e2e; created and filled when missing)
#   NVIM       the Neovim binary (default: nvim; Debian's neovim 0.7.2 works)
#   EMACS      the Emacs binary (default: emacs; needs eglot, Debian's
#              emacs-nox + elpa-eglot); skipped with a note when absent
#              unless REQUIRE_EMACS=1
# Exits non-zero when any client test fails.
set -euo pipefail

HERE="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
ROOT="$(cd "$HERE/../.." && pwd)"
STOIK_BIN="${STOIK_BIN:-$ROOT/target/debug/stoik}"
VENV="${VENV:-$ROOT/.venv-e2e}"
NVIM="${NVIM:-nvim}"
EMACS="${EMACS:-emacs}"

if [ ! -x "$STOIK_BIN" ]; then
  (cd "$ROOT" && cargo build --bin stoik)
fi
export STOIK_BIN

if [ ! -x "$VENV/bin/python" ]; then
  python3 -m venv "$VENV"
  "$VENV/bin/pip" install -q pytest-lsp==1.0.1
fi

status=0
work="$(mktemp -d)"
trap 'rm -rf "$work"' EXIT

echo "== pytest-lsp"
if ! (cd "$HERE" && "$VENV/bin/python" -m pytest -q -p no:cacheprovider test_pytest_lsp.py); then
  status=1
fi

echo "== neovim ($("$NVIM" --version | head -n1))"
mkdir -p "$work/nvim"
cp "$HERE/demo.stoik" "$work/nvim/"
: > "$work/nvim/stoik.toml"
if ! WORK="$work/nvim" timeout 120 "$NVIM" --headless -u NONE -c "luafile $HERE/test_nvim.lua"; then
  echo "neovim test failed"
  status=1
fi

echo "== emacs"
if command -v "$EMACS" > /dev/null; then
  mkdir -p "$work/emacs"
  cp "$HERE/demo.stoik" "$work/emacs/"
  : > "$work/emacs/stoik.toml"
  if ! WORK="$work/emacs" timeout 120 "$EMACS" --batch -l "$HERE/test_eglot.el"; then
    echo "emacs test failed"
    status=1
  fi
elif [ "${REQUIRE_EMACS:-0}" = 1 ]; then
  echo "emacs not found and REQUIRE_EMACS=1"
  status=1
else
  echo "emacs not found; skipped"
fi

exit "$status"
