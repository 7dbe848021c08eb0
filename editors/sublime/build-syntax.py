#!/usr/bin/env python3
"""Writes stoik.tmLanguage (the property-list form Sublime Text reads) from
the project's one TextMate grammar, editors/textmate/stoik.tmLanguage.json.

    python3 build-syntax.py [TARGET_DIR]

TARGET_DIR defaults to this folder; give your Sublime Text Packages/User
folder to install it there directly.
"""
import json
import pathlib
import plistlib
import sys

HERE = pathlib.Path(__file__).resolve().parent
SOURCE = HERE.parent / "textmate" / "stoik.tmLanguage.json"


def main() -> None:
    target = pathlib.Path(sys.argv[1]) if len(sys.argv) > 1 else HERE
    grammar = json.loads(SOURCE.read_text(encoding="utf-8"))
    grammar.pop("$schema", None)  # A JSON-only key; plists have no use for it.
    out = target / "stoik.tmLanguage"
    with out.open("wb") as handle:
        plistlib.dump(grammar, handle)
    print(f"wrote {out}")


if __name__ == "__main__":
    main()
