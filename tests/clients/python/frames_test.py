#!/usr/bin/python3
"""shellwright.annotate (pandas): the demo registry annotated row by row
with the values of `shellwright check`'s JSON lines, and bad cells as
per-row error reports.

Run by ctest with PYTHONPATH at the package built in the build tree and
SHELLWRIGHT_BIN_DIR / SHELLWRIGHT_SOURCE_DIR set.
"""

import csv
import json
import math
import os
import subprocess
import tempfile
import unittest

import numpy as np
import pandas as pd

import shellwright

BIN_DIR = os.environ.get("SHELLWRIGHT_BIN_DIR", "build")
SOURCE_DIR = os.environ.get("SHELLWRIGHT_SOURCE_DIR", ".")
CLI = os.path.join(BIN_DIR, "clients", "shellwright")
REGISTRY = os.path.join(SOURCE_DIR, "data", "demo", "sample_registry.csv")
NUMERIC = ("charge", "measured_moment", "moment_tolerance")


def number_or_text(text):
    """A CSV cell of a numeric column: empty -> NaN (not given), a number,
    or the text itself (the row's report is then malformed_record)."""
    if text == "":
        return math.nan
    for kind in (int, float):
        try:
            return kind(text)
        except ValueError:
            pass
    return text


def read_registry(path):
    """The registry as a DataFrame, one row per line that has the header's
    fields (as `check` reads lines: one record per physical line), with its
    line number in `line`. Returns (frame, numbers of the lines left out).
    """
    rows, skipped = [], []
    with open(path, encoding="utf-8", newline="") as f:
        header = next(csv.reader([f.readline()]))
        for number, line in enumerate(f, start=2):
            try:
                fields = next(csv.reader([line], strict=True))
            except csv.Error:
                fields = None
            if fields is None or len(fields) != len(header):
                skipped.append(number)
                continue
            rows.append(fields + [number])
    df = pd.DataFrame(rows, columns=header + ["line"])
    for column in NUMERIC:
        df[column] = [number_or_text(v) for v in df[column]]
    return df, skipped


def check_reports(path):
    with tempfile.TemporaryDirectory() as tmp:
        out = os.path.join(tmp, "reports.jsonl")
        subprocess.run([CLI, "check", path, "--out", out],
                       capture_output=True, timeout=120)
        with open(out, encoding="utf-8") as f:
            return [json.loads(line) for line in f]


class DemoRegistryTest(unittest.TestCase):

    def test_annotate_equals_check_jsonl(self):
        df, skipped = read_registry(REGISTRY)
        fields = {c: c for c in df.columns if c not in ("notes", "line")}
        fields["row"] = "line"
        out = shellwright.annotate(df, **fields)
        expected = {r["row"]: r for r in check_reports(REGISTRY)}

        self.assertEqual(len(out), len(df))
        self.assertEqual(list(out.index), list(df.index))
        self.assertEqual(len(df) + len(skipped), len(expected))
        for number in skipped:  # Lines no frame can hold as a row.
            self.assertEqual(expected[number]["diagnostics"][0]["code"],
                             "malformed_record")
        compared = malformed = 0
        for row in out.to_dict("records"):
            want = expected[row["line"]]
            got = {key: row[key] for key in want}
            if want["diagnostics"] and \
                    want["diagnostics"][0]["code"] == "malformed_record":
                # Same verdict and code; the wording names a column
                # (check) or a record field (annotate).
                malformed += 1
                self.assertEqual(got["diagnostics"][0]["code"],
                                 "malformed_record", row)
                self.assertFalse(got["valid"])
                continue
            self.assertEqual(got, want)
            compared += 1
        self.assertGreater(compared, 2900)
        self.assertGreater(malformed, 0)

    def test_columns_and_types(self):
        df = pd.DataFrame({"formula": ["Fe2O3", "NiO"], "x": [1, 2]},
                          index=[10, 20])
        out = shellwright.annotate(df)
        self.assertEqual(list(out.index), [10, 20])
        self.assertEqual(list(out["x"]), [1, 2])
        self.assertEqual(list(out["formula"]), ["Fe2O3", "NiO"])
        self.assertEqual(out["valid"].dtype, np.bool_)
        self.assertEqual(out["score"].dtype, np.float64)
        self.assertEqual(out["row"].tolist(), [1, 2])
        self.assertEqual(out.loc[10, "oxidation_states"],
                         shellwright.analyze("Fe2O3")["oxidation_states"])
        report = shellwright.analyze("NiO", row=2)
        for key, value in report.items():
            self.assertEqual(out.loc[20, key], value, key)

        prefixed = shellwright.annotate(df, prefix="sw_")
        self.assertIn("sw_formula", prefixed.columns)
        self.assertEqual(prefixed["sw_valid"].tolist(), [True, True])

        empty = shellwright.annotate(df.iloc[:0])
        self.assertEqual(list(empty.columns), list(out.columns))
        self.assertEqual(len(empty), 0)
        self.assertEqual(empty["score"].dtype, np.float64)

    def test_bad_cells_are_error_reports(self):
        df = pd.DataFrame({
            "formula": ["Fe2O3", None, math.nan, b"Fe\xff", 42, "NiO", "NiO"],
            "charge": [0, 0, 0, 0, 0, "two", 1.5]})
        out = shellwright.annotate(df, charge="charge")
        self.assertEqual(len(out), len(df))
        self.assertEqual(out["valid"].tolist(),
                         [True, False, False, False, False, False, False])
        messages = [r[0]["message"] if r else "" for r in out["diagnostics"]]
        self.assertEqual(messages[1], "row 2: formula: missing (None)")
        self.assertEqual(messages[2], "row 3: formula: missing (float nan)")
        self.assertIn("formula: bytes are not valid UTF-8", messages[3])
        self.assertIn("formula: expected str, got int 42", messages[4])
        self.assertIn("charge: expected an integer, got str 'two'",
                      messages[5])
        self.assertIn("charge: expected an integer, got float 1.5",
                      messages[6])

    def test_bad_arguments_raise(self):
        df = pd.DataFrame({"formula": ["Fe2O3"], "valid": [1]})
        with self.assertRaisesRegex(ValueError, r"'valid'.*prefix="):
            shellwright.annotate(df)
        with self.assertRaisesRegex(KeyError, r"formula: no column 'f'"):
            shellwright.annotate(df, formula="f")
        with self.assertRaisesRegex(TypeError, r"unknown record field 'bad'"):
            shellwright.annotate(df, prefix="p_", bad="formula")
        with self.assertRaisesRegex(TypeError, r"expected a pandas DataFrame"):
            shellwright.annotate([{"formula": "NiO"}])


if __name__ == "__main__":
    unittest.main()
