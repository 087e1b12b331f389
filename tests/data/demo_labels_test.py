#!/usr/bin/env python3
"""The demo registry's intended labels against `shellwright check`.

data/demo/make_registry.py plants defects and lists them (--manifest:
id,category,detail). This test regenerates the registry and requires:
  - the committed data/demo/sample_registry.csv to be the generator's output;
  - every row the generator meant to be clean to be valid;
  - every planted defect to be caught: an invalid report, or for a
    period-for-dot hydrate typo the possible_hydrate_typo warning (or a
    malformed_formula that says to write the hydrate dot);
  - the README to name only files that .ci/demo uses.
Run by ctest; SHELLWRIGHT_BIN_DIR points at the build tree.
"""

import csv
import io
import json
import os
import subprocess
import sys

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.join(HERE, "..", "..")
DEMO = os.path.join(ROOT, "data", "demo")
BIN = os.path.join(os.environ.get("SHELLWRIGHT_BIN_DIR",
                                  os.path.join(ROOT, "build")),
                   "clients", "shellwright")


def generator(*args):
    return subprocess.run(
        [sys.executable, os.path.join(DEMO, "make_registry.py"), *args],
        check=True, capture_output=True, text=True).stdout


def main():
    failures = []
    registry = os.path.join(DEMO, "sample_registry.csv")
    with open(registry, encoding="utf-8", newline="") as f:
        if f.read() != generator():
            failures.append("sample_registry.csv is not make_registry.py's "
                            "output: regenerate it (data/demo/README.md)")
    manifest = {row["id"]: row["category"]
                for row in csv.DictReader(io.StringIO(generator("--manifest")))}
    if len(manifest) < 200:
        failures.append("manifest lists only %d defects" % len(manifest))
    run = subprocess.run([BIN, "check", registry, "--out", "-", "--quiet"],
                         capture_output=True, text=True)
    if run.returncode not in (0, 1):
        failures.append("check exited %d: %s" % (run.returncode, run.stderr))
    seen = set()
    clean = 0
    for line in run.stdout.splitlines():
        report = json.loads(line)
        rid = report["id"]
        seen.add(rid)
        category = manifest.get(rid)
        codes = {(d["severity"], d["code"]) for d in report["diagnostics"]}
        errors = [d["message"] for d in report["diagnostics"]
                  if d["severity"] == "error"]
        if category is None:
            clean += 1
            if rid and not report["valid"]:
                failures.append("%s (%s) meant clean, got: %s"
                                % (rid, report["formula"], "; ".join(errors)))
        elif category == "hydrate_period":
            caught = ("warning", "possible_hydrate_typo") in codes or any(
                "hydrate" in m and "\u00b7" in m for m in errors)
            if not caught:
                failures.append("%s (%s): hydrate typo not flagged"
                                % (rid, report["formula"]))
        elif report["valid"]:
            failures.append("%s (%s): planted %s not caught"
                            % (rid, report["formula"], category))
    # Rows whose id the defect itself destroyed have no id in the report.
    missing = [rid for rid in manifest if rid not in seen and
               manifest[rid] not in ("raw_broken_tail", "wrong_column_count",
                                     "empty_formula")]
    if missing:
        failures.append("defects with no report: %s" % missing[:5])
    if clean < 2000:
        failures.append("only %d clean rows were checked" % clean)
    with open(os.path.join(DEMO, "README.md"), encoding="utf-8") as f:
        readme = f.read()
    with open(os.path.join(ROOT, ".ci", "demo"), encoding="utf-8") as f:
        demo_script = f.read()
    for name in ("sample_registry.csv", "species.txt"):
        if name in readme and name not in demo_script:
            failures.append("README names %s, which .ci/demo does not use"
                            % name)
    for failure in failures[:40]:
        print(failure)
    if failures:
        print("%d failures" % len(failures))
        return 1
    print("%d defects caught, %d clean rows valid" % (len(manifest), clean))
    return 0


if __name__ == "__main__":
    sys.exit(main())
