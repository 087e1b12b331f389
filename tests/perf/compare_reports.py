#!/usr/bin/env python3
"""Compares `check` reports of two builds byte for byte.

For a change meant to leave every output as it was (a speed change): runs
`shellwright check` of both builds over the same record sets, as JSONL with
0 and 2 alternatives and as CSV with 0, and reports the first difference.

Record sets: the composition benchmark's 20,000 distinct formulas (from
`composition_instructions --print`, when that driver is built), 23,000
rows of tests/perf/make_records.py, the regression corpus, the demo
registry, and 3,000 finely divided records (three- to five-decimal
fractions of two to eight metals with an anion) generated here.

    python3 tests/perf/compare_reports.py --new build --old /tmp/base/build

Exit status 0 when every report is identical, 1 otherwise.
"""
import argparse
import hashlib
import os
import random
import subprocess
import sys
import tempfile

ROOT = os.path.dirname(os.path.dirname(os.path.dirname(
    os.path.abspath(__file__))))


def finely_divided(n):
    rng = random.Random(20261204)
    metals = ["Li", "Na", "Mg", "Al", "Ti", "V", "Cr", "Mn", "Fe", "Co", "Ni",
              "Cu", "Zn", "Sr", "Y", "Nb", "Mo", "Ru", "Sn", "Ba", "La", "Ce",
              "Pr", "Nd", "Sm", "Gd", "W", "Pb", "Bi"]
    anions = ["O", "O", "O", "S", "F", "Cl", "N", "Se"]
    rows = ["id,formula"]
    for i in range(n):
        k = rng.randint(2, 8)
        digits = rng.randint(3, 5)
        f = "".join("%s%.*f" % (m, digits, rng.uniform(0.001, 2.0))
                    for m in rng.sample(metals, k))
        f += "%s%.*f" % (rng.choice(anions), digits, rng.uniform(0.5, 8.0))
        rows.append("f%05d,%s" % (i, f))
    return "\n".join(rows) + "\n"


def record_sets(tmp, new_build):
    sets = []
    driver = os.path.join(new_build, "tests", "engine",
                          "composition_instructions")
    if os.access(driver, os.X_OK):
        formulas = subprocess.run([driver, "--print", "--count", "0"],
                                  check=True, capture_output=True,
                                  text=True).stdout.splitlines()
        path = os.path.join(tmp, "benchmark.csv")
        with open(path, "w", encoding="utf-8") as out:
            out.write("id,formula\n")
            for i, f in enumerate(formulas):
                out.write('b%05d,"%s"\n' % (i, f))
        sets.append(("benchmark formulas", path))
    else:
        print("no %s: benchmark formulas skipped" % driver, file=sys.stderr)
    path = os.path.join(tmp, "records.csv")
    with open(path, "w", encoding="utf-8") as out:
        subprocess.run([sys.executable,
                        os.path.join(ROOT, "tests/perf/make_records.py"),
                        "23000"], check=True, stdout=out)
    sets.append(("make_records 23000", path))
    sets.append(("regression corpus",
                 os.path.join(ROOT, "tests/regression/corpus.csv")))
    sets.append(("demo registry",
                 os.path.join(ROOT, "data/demo/sample_registry.csv")))
    path = os.path.join(tmp, "fine.csv")
    with open(path, "w", encoding="utf-8") as out:
        out.write(finely_divided(3000))
    sets.append(("finely divided", path))
    return sets


def run(build, records, out, out_format, alternatives):
    cmd = ["nice", "-n", "15", os.path.join(build, "clients", "shellwright"),
           "check", records, "--out", out, "--out-format", out_format,
           "--alternatives", str(alternatives), "--no-progress"]
    subprocess.run(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    with open(out, "rb") as f:
        return f.read()


def first_difference(a, b):
    la, lb = a.splitlines(), b.splitlines()
    for i, (x, y) in enumerate(zip(la, lb)):
        if x != y:
            return "line %d:\n  new: %s\n  old: %s" % (
                i + 1, x[:400].decode("utf-8", "replace"),
                y[:400].decode("utf-8", "replace"))
    return "line counts %d against %d" % (len(la), len(lb))


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--new", default=os.path.join(ROOT, "build"),
                    help="build tree of the change (default: build)")
    ap.add_argument("--old", required=True,
                    help="build tree to compare against")
    args = ap.parse_args()
    same = True
    with tempfile.TemporaryDirectory() as tmp:
        for name, records in record_sets(tmp, args.new):
            for out_format, alternatives in (("jsonl", 0), ("jsonl", 2),
                                             ("csv", 0)):
                a = run(args.new, records, os.path.join(tmp, "new"),
                        out_format, alternatives)
                b = run(args.old, records, os.path.join(tmp, "old"),
                        out_format, alternatives)
                label = "%s, %s, %d alternatives" % (name, out_format,
                                                     alternatives)
                if a == b and a:
                    print("identical  %s (%d bytes, %s)" % (
                        label, len(a), hashlib.sha256(a).hexdigest()[:12]))
                else:
                    same = False
                    print("DIFFERENT  %s: %s" % (label,
                                                 first_difference(a, b)))
    return 0 if same else 1


if __name__ == "__main__":
    sys.exit(main())
