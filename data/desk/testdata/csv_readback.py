#!/usr/bin/env python3
"""Reads a CSV export of baleassay with Python's csv module, independently
of Go's encoding/csv, and prints it as JSON for the Go test to compare:

    {"header": [...], "raw": [[field, ...], ...], "typed": [{column: value}, ...]}

"raw" holds every field as the csv module read it (line breaks inside a
field normalised to LF). "typed" converts by the column's unit suffix:
times (_utc) to Unix milliseconds via datetime.fromisoformat, numbers
(_kg, _m, _pct, _deg, _kg_per_m3, _kg_per_t, _point, _pieces and the count
columns) with float(), true/false to booleans, an empty field to null.
Usage: csv_readback.py FILE.csv
"""
import csv
import datetime
import json
import sys

NUMBER_SUFFIXES = ("_kg", "_m", "_pct", "_deg", "_kg_per_m3", "_kg_per_t", "_point", "_pieces")
COUNTS = {"pulls", "bales", "audited", "pass", "undecided", "fail", "no_verdict", "no_pulls", "unassessed", "hazard_bales"}
BOOLS = {"hazard_found", "label_clash", "conflicted"}


def typed(column, value):
    if value == "":
        return None
    if column.endswith("_utc"):
        t = datetime.datetime.fromisoformat(value)
        if t.utcoffset() != datetime.timedelta(0):
            raise SystemExit("%s: %r is not UTC" % (column, value))
        return round(t.timestamp() * 1000)
    if column.endswith(NUMBER_SUFFIXES) or column in COUNTS:
        if "," in value or "e" in value.lower():
            raise SystemExit("%s: %r is not a plain dot-decimal number" % (column, value))
        return float(value)
    if column in BOOLS:
        if value not in ("true", "false"):
            raise SystemExit("%s: %r is not true or false" % (column, value))
        return value == "true"
    return value


def main(path):
    with open(path, newline="", encoding="utf-8") as f:
        reader = csv.reader(f, strict=True)
        header = next(reader)
        raw, rows = [], []
        for rec in reader:
            if len(rec) != len(header):
                raise SystemExit("line %d: %d fields, the header has %d" % (reader.line_num, len(rec), len(header)))
            rec = [v.replace("\r\n", "\n") for v in rec]
            raw.append(rec)
            rows.append({k: typed(k, v) for k, v in zip(header, rec)})
    json.dump({"header": header, "raw": raw, "typed": rows}, sys.stdout)


if __name__ == "__main__":
    main(sys.argv[1])
