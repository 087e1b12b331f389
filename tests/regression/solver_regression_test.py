#!/usr/bin/env python3
"""Regression test: `shellwright check` on tests/regression/corpus.csv gives
the reports recorded in tests/regression/expected/.

The expected files are the output of commit 7cc72f0 (before the solver and
report-writing speed-ups), not outside values: the CSV report in full, and a
SHA-256 prefix (64 bits) per JSONL report line (the JSONL lines, alternatives and ions
included, are 1.7 MB). A difference means the analysis changed; if the
change is intended, regenerate with

    python3 tests/regression/solver_regression_test.py --regenerate

and say why in the commit.
"""
import hashlib
import os
import subprocess
import sys

HERE = os.path.dirname(os.path.abspath(__file__))
BIN = os.path.join(os.environ.get("SHELLWRIGHT_BIN_DIR",
                                  os.path.join(HERE, "..", "..", "build")),
                   "clients", "shellwright")
CORPUS = os.path.join(HERE, "corpus.csv")
EXPECTED_CSV = os.path.join(HERE, "expected", "reports.csv")
EXPECTED_HASHES = os.path.join(HERE, "expected", "reports.jsonl.sha256")


def check(out_format):
    r = subprocess.run([BIN, "check", CORPUS, "--out", "-", "--out-format",
                        out_format, "--no-progress"],
                       stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    if r.returncode not in (0, 1):
        sys.exit("check exited with %d: %s" % (r.returncode, r.stderr))
    return r.stdout.decode("utf-8")


def hashes(jsonl):
    out = []
    for line in jsonl.splitlines():
        row = line.split('"row":', 1)[1].split(",", 1)[0]
        out.append("%s %s" % (row, hashlib.sha256(line.encode()).hexdigest()[:16]))
    return out


def main():
    csv_text, jsonl_text = check("csv"), check("jsonl")
    got_hashes = hashes(jsonl_text)
    if "--regenerate" in sys.argv:
        os.makedirs(os.path.dirname(EXPECTED_CSV), exist_ok=True)
        with open(EXPECTED_CSV, "w", encoding="utf-8") as f:
            f.write(csv_text)
        with open(EXPECTED_HASHES, "w") as f:
            f.write("\n".join(got_hashes) + "\n")
        return 0
    with open(EXPECTED_CSV, encoding="utf-8") as f:
        want_csv = f.read().splitlines()
    with open(EXPECTED_HASHES) as f:
        want_hashes = f.read().split("\n")[:-1]
    failures = []
    got_csv = csv_text.splitlines()
    if len(got_csv) != len(want_csv):
        failures.append("CSV: %d lines, expected %d" %
                        (len(got_csv), len(want_csv)))
    for got, want in zip(got_csv, want_csv):
        if got != want:
            failures.append("CSV line differs:\n  got  %s\n  want %s" %
                            (got, want))
    if len(got_hashes) != len(want_hashes):
        failures.append("JSONL: %d lines, expected %d" %
                        (len(got_hashes), len(want_hashes)))
    lines = jsonl_text.splitlines()
    for i, (got, want) in enumerate(zip(got_hashes, want_hashes)):
        if got != want:
            failures.append("JSONL report for row %s differs: %s" %
                            (want.split()[0], lines[i][:400]))
    for f in failures[:10]:
        print(f)
    if failures:
        print("%d differences" % len(failures))
        return 1
    print("%d reports match" % len(lines))
    return 0


if __name__ == "__main__":
    sys.exit(main())
