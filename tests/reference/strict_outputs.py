"""Reads every file of a tocsin output directory as a strict consumer would.

Usage: strict_outputs.py DIRECTORY EXPECTED_NAMES

Every file must be UTF-8 (strict: no invalid bytes, no encoded surrogates);
every .json must parse with the standard library's json module refusing the
non-standard NaN, Infinity and -Infinity and repeated keys; every .csv must
parse with the csv module, every row as long as its header. EXPECTED_NAMES
holds lines "both<TAB>NAME" or "json<TAB>NAME" (UTF-8): each name must come
back unchanged as a JSON string value, and for "both" also as a CSV field,
somewhere in the outputs. Prints "ok ..." and exits 0,
or prints each problem and exits 1.
"""
import csv
import io
import json
import os
import sys


def refuse_constant(name):
    raise ValueError("non-standard JSON constant " + name)


def refuse_repeated_keys(pairs):
    keys = [k for k, _ in pairs]
    if len(keys) != len(set(keys)):
        raise ValueError("repeated key in an object: " + repr(keys))
    return dict(pairs)


def strings_in(value, found):
    if isinstance(value, str):
        found.add(value)
    elif isinstance(value, list):
        for v in value:
            strings_in(v, found)
    elif isinstance(value, dict):
        for k, v in value.items():
            found.add(k)
            strings_in(v, found)


def main():
    directory, expected_path = sys.argv[1], sys.argv[2]
    with open(expected_path, encoding="utf-8") as f:
        expected = [line.rstrip("\n").split("\t", 1) for line in f if line.rstrip("\n")]
    problems = []
    json_strings, csv_fields = set(), set()
    counts = {"json": 0, "csv": 0, "other": 0}
    for name in sorted(os.listdir(directory)):
        with open(os.path.join(directory, name), "rb") as f:
            raw = f.read()
        try:
            text = raw.decode("utf-8", errors="strict")
        except UnicodeDecodeError as e:
            problems.append(f"{name}: not UTF-8: {e}")
            continue
        if name.endswith(".json"):
            counts["json"] += 1
            try:
                strings_in(json.loads(text, parse_constant=refuse_constant,
                                      object_pairs_hook=refuse_repeated_keys), json_strings)
            except ValueError as e:
                problems.append(f"{name}: not strict JSON: {e}")
        elif name.endswith(".csv"):
            counts["csv"] += 1
            try:
                rows = list(csv.reader(io.StringIO(text, newline=""), strict=True))
            except csv.Error as e:
                problems.append(f"{name}: not CSV: {e}")
                continue
            if not rows:
                problems.append(f"{name}: no header")
                continue
            for number, row in enumerate(rows[1:], start=2):
                if len(row) != len(rows[0]):
                    problems.append(f"{name}: row {number} has {len(row)} fields, the header {len(rows[0])}")
                csv_fields.update(row)
        else:
            counts["other"] += 1
    for where, n in expected:
        if n not in json_strings:
            problems.append(f"name {n!r} is no JSON string value in any output")
        if where == "both" and n not in csv_fields:
            problems.append(f"name {n!r} is no CSV field in any output")
    for p in problems:
        print(p)
    if problems:
        sys.exit(1)
    print(f"ok: {counts['json']} JSON, {counts['csv']} CSV and {counts['other']} other files")


if __name__ == "__main__":
    main()
