#!/usr/bin/env python3
"""How many measured moments fall outside their expected range, before and
after a change to the moment model (issue: "the moment check must
discriminate").

Runs `shellwright check` from two builds over the same record files and
prints, per file, the records that carry a measured moment, how many each
build rejects with moment_out_of_range, and the records whose verdict
changed, with both builds' expected ranges.

    python3 tests/regression/moment_discrimination.py \\
        --before /path/to/old/build/clients/shellwright \\
        --after build/clients/shellwright \\
        data/demo/sample_registry.csv tests/regression/corpus.csv
"""
import argparse
import csv
import io
import subprocess
import sys


def reports(binary, path):
    r = subprocess.run([binary, "check", path, "--out", "-", "--out-format",
                        "csv", "--no-progress"],
                       stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    if r.returncode not in (0, 1):
        sys.exit("%s check %s exited with %d: %s" %
                 (binary, path, r.returncode, r.stderr.decode()))
    rows = list(csv.DictReader(io.StringIO(r.stdout.decode("utf-8"))))
    return {row["row"]: row for row in rows}


def measured_rows(path):
    with open(path, newline="", encoding="utf-8") as f:
        out = {}
        for i, row in enumerate(csv.DictReader(f), start=2):
            keys = {k.strip().lower(): v for k, v in row.items() if k}
            if (keys.get("measured_moment") or "").strip():
                out[str(i)] = keys
        return out


def rejected(row):
    return "moment_out_of_range" in row.get("diagnostic_codes", "")


def main():
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--before", required=True)
    p.add_argument("--after", required=True)
    p.add_argument("--list", type=int, default=40,
                   help="changed records to list per file (default 40)")
    p.add_argument("files", nargs="+")
    args = p.parse_args()
    for path in args.files:
        measured = measured_rows(path)
        before = reports(args.before, path)
        after = reports(args.after, path)
        out_before = [r for r in measured if rejected(before.get(r, {}))]
        out_after = [r for r in measured if rejected(after.get(r, {}))]
        print("%s: %d records with a measured moment; outside their range: "
              "%d before, %d after" % (path, len(measured), len(out_before),
                                       len(out_after)))
        changed = [r for r in measured
                   if rejected(before.get(r, {})) != rejected(after.get(r, {}))]
        print("  verdict changed for %d:" % len(changed))
        for r in changed[:args.list]:
            b, a = before.get(r, {}), after.get(r, {})
            print("    row %s %-28s measured %-6s before %s-%s %s, after "
                  "%s-%s %s" % (
                      r, a.get("formula", "")[:28],
                      measured[r].get("measured_moment", ""),
                      b.get("expected_moment_low", ""),
                      b.get("expected_moment_high", ""),
                      "out" if rejected(b) else "in",
                      a.get("expected_moment_low", ""),
                      a.get("expected_moment_high", ""),
                      "out" if rejected(a) else "in"))


if __name__ == "__main__":
    main()
