#!/usr/bin/python3
"""The in-process engine from Python (clients/python/shellwright): answers
equal to the CLI's JSON, one report per record in input order, and bad
input as exceptions or error reports, never a crash.

Run by ctest with PYTHONPATH at the package built in the build tree and
SHELLWRIGHT_BIN_DIR at the build tree (for the CLI).
"""

import json
import math
import os
import subprocess
import threading
import unittest

import shellwright

CLI = os.path.join(os.environ.get("SHELLWRIGHT_BIN_DIR", "build"),
                   "clients", "shellwright")


def cli_json(*args):
    out = subprocess.run([CLI, *args, "--json"], capture_output=True,
                         text=True, timeout=60)
    return json.loads(out.stdout)


class DescribeTest(unittest.TestCase):

    def test_fe3_plus_has_five_unpaired_electrons(self):
        # High-spin d5 (Greenwood and Earnshaw, Chemistry of the Elements,
        # from memory).
        self.assertEqual(shellwright.describe("Fe3+")["unpaired_electrons"], 5)

    def test_equals_the_cli_json(self):
        cases = [("Fe3+", {}, []), ("Gd", {}, []), ("26", {}, []),
                 ("Co3+", {"geometry": "octahedral"},
                  ["--geometry", "octahedral"]),
                 ("Co3+", {"geometry": "octahedral", "spin_state": "high"},
                  ["--geometry", "octahedral", "--spin-state", "high"])]
        for spec, kwargs, flags in cases:
            with self.subTest(spec=spec, kwargs=kwargs):
                expected = cli_json("atom", spec, *flags)
                if spec.isdigit():
                    spec = int(spec)
                self.assertEqual(shellwright.describe(spec, **kwargs),
                                 expected)

    def test_engine_message_as_value_error(self):
        with self.assertRaisesRegex(ValueError,
                                    r"^spec: unknown element 'Xx'"):
            shellwright.describe("Xx")
        with self.assertRaisesRegex(ValueError, r"^geometry: .*'cubic'"):
            shellwright.describe("Fe3+", geometry="cubic")

    def test_wrong_types_are_type_errors(self):
        for bad in (None, 2.5, b"Fe", True):
            with self.subTest(spec=bad), self.assertRaisesRegex(
                    TypeError, r"^spec: expected str or int"):
                shellwright.describe(bad)
        with self.assertRaisesRegex(TypeError, r"^charge: expected int"):
            shellwright.describe("Fe", charge="3")


class AnalyzeTest(unittest.TestCase):

    FORMULAS = ["La0.7Sr0.3MnO3", "Fe3O4", "CuSO4·5H2O", "LiFePO4",
                "Xx2O3", "Fe2O", "", "Co2MnAl", "SmCo5", "Pd"]

    def test_equals_compound_json(self):
        for formula in self.FORMULAS:
            with self.subTest(formula=formula):
                self.assertEqual(
                    shellwright.analyze(formula),
                    cli_json("compound", formula, "--alternatives", "0"))
                self.assertEqual(
                    shellwright.analyze(formula, max_alternatives=2),
                    cli_json("compound", formula))

    def test_record_fields(self):
        report = shellwright.analyze("Fe3O4", id="s1", charge=0,
                                     declared_states="Fe:3,O:-2",
                                     measured_moment=float("nan"))
        self.assertEqual(report["id"], "s1")
        self.assertEqual(
            report, cli_json("compound", "Fe3O4", "--declared", "Fe:3,O:-2",
                             "--alternatives", "0") | {"id": "s1"})

    def test_metallic_moment_estimate(self):
        # M = Z_t - 24 = 28 - 24 (Slater-Pauling rule for Heusler
        # compounds; measured 4.01 μB, Webster, J. Phys. Chem. Solids 32,
        # 1221 (1971), from memory).
        report = shellwright.analyze("Co2MnAl")
        self.assertEqual(report["moment_model"], "slater_pauling_full_heusler")
        self.assertTrue(report["saturation_moment_estimated"])
        self.assertEqual(report["saturation_moment_per_formula_unit"], 4)
        self.assertEqual(report["total_valence_electrons"], 28)
        none = shellwright.analyze("Pd")
        self.assertEqual(none["moment_model"], "none")
        self.assertFalse(none["saturation_moment_estimated"])
        self.assertIn("no estimate", none["moment_note"])

    def test_ferrimagnet_saturation_moment(self):
        # Fe3O4, an inverse spinel: |(Fe2+ 4 + Fe3+ 5) - Fe3+ 5| = 4 μB per
        # formula unit against about 4.1 measured (Smit and Wijn, Ferrites,
        # from memory).
        report = shellwright.analyze("Fe3O4", measured_saturation_moment=4.1,
                                     temperature=300.0)
        self.assertTrue(report["valid"])
        self.assertEqual(report["structure_family"], "spinel")
        self.assertEqual(report["saturation_moment_model"], "sublattice_neel")
        self.assertEqual(report["saturation_moment_per_formula_unit"], 4)
        self.assertEqual(sorted(i["site"] for i in report["ions"]
                                if i["element"] == "Fe"),
                         ["A (tetrahedral)", "B (octahedral)",
                          "B (octahedral)"])
        # The ferromagnetic sum of the free ions, 14 μB, is rejected.
        bad = shellwright.analyze("Fe3O4", measured_saturation_moment=14.0)
        self.assertFalse(bad["valid"])
        self.assertIn("moment_out_of_range",
                      [d["code"] for d in bad["diagnostics"]])
        # The family can be turned off.
        off = shellwright.analyze("Fe3O4", structure_family="none")
        self.assertEqual(off["structure_family"], "")
        self.assertFalse(off["saturation_moment_estimated"])

    def test_van_vleck_moment(self):
        # Eu3+ carries about 3.4 μB at room temperature (Kittel, table of
        # effective magneton numbers, from memory) though 7F0 has none.
        eu = [i for i in shellwright.analyze("Eu2O3")["ions"]
              if i["element"] == "Eu"][0]
        self.assertEqual(eu["moment_basis"], "van_vleck")
        self.assertAlmostEqual(eu["moment"], 3.4, delta=0.2)

    def test_invalid_formula_is_a_report_not_an_exception(self):
        report = shellwright.analyze("Xx2O3")
        self.assertFalse(report["valid"])
        self.assertEqual(report["diagnostics"][0]["code"], "unknown_element")
        self.assertIn("unknown element 'Xx' at column 1",
                      report["diagnostics"][0]["message"])

    def test_ligand_abbreviations(self):
        # [Co(en)3]3+ low spin, diamagnetic (Greenwood and Earnshaw,
        # Chemistry of the Elements, 2nd ed., from memory); the abbreviated
        # record reports as its written-out twin, formula text aside.
        short = shellwright.analyze("[Co(en)3]Cl3")
        full = shellwright.analyze("[Co(C2H8N2)3]Cl3")
        self.assertTrue(short["valid"])
        self.assertEqual(short["formula"], "[Co(en)3]Cl3")
        self.assertEqual(short["unpaired_per_formula_unit"], 0)
        for report in (short, full):
            del report["formula"]
        self.assertEqual(short, full)
        bad = shellwright.analyze("[Co(enn)3]Cl3")
        self.assertFalse(bad["valid"])
        self.assertIn("unknown ligand abbreviation 'enn' at column 5",
                      bad["diagnostics"][0]["message"])

    def test_bad_arguments_raise(self):
        with self.assertRaisesRegex(TypeError, r"^formula: expected str, "
                                               r"got int 42"):
            shellwright.analyze(42)
        for missing in (None, float("nan")):
            with self.assertRaisesRegex(ValueError, r"^formula: missing"):
                shellwright.analyze(missing)
        with self.assertRaisesRegex(ValueError, r"^formula: bytes are not "
                                                r"valid UTF-8 \(at byte 2\)"):
            shellwright.analyze(b"Fe\xff")
        with self.assertRaisesRegex(ValueError, r"^formula: not valid "
                                                r"Unicode"):
            shellwright.analyze("Fe\udcff")
        with self.assertRaisesRegex(TypeError, r"^unknown record field "
                                               r"'colour'"):
            shellwright.analyze("Fe2O3", colour="red")
        with self.assertRaisesRegex(TypeError, r"^charge: expected an "
                                               r"integer, got str"):
            shellwright.analyze("Fe2O3", charge="1")
        with self.assertRaisesRegex(ValueError, r"^charge: .* out of range"):
            shellwright.analyze("Fe2O3", charge=2**40)
        with self.assertRaisesRegex(ValueError, r"^charge: expected an "
                                                r"integer, got float 1.5"):
            shellwright.analyze("Fe2O3", charge=1.5)

    def test_utf8_bytes_are_text(self):
        self.assertEqual(shellwright.analyze("CuSO4·5H2O".encode()),
                         shellwright.analyze("CuSO4·5H2O"))


class AnalyzeManyTest(unittest.TestCase):

    def test_one_report_per_record_in_input_order(self):
        formulas = [f"La{x / 100:.2f}Sr{1 - x / 100:.2f}MnO3"
                    for x in range(1, 100)] * 30
        for jobs in (1, 2, 3):
            with self.subTest(jobs=jobs):
                reports = list(shellwright.analyze_many(iter(formulas),
                                                        jobs=jobs))
                self.assertEqual(len(reports), len(formulas))
                self.assertEqual([r["formula"] for r in reports], formulas)
                self.assertEqual([r["row"] for r in reports],
                                 list(range(1, len(formulas) + 1)))
        single = shellwright.analyze(formulas[5])
        self.assertEqual(reports[5], single | {"row": 6})

    def test_mappings_and_alternatives(self):
        reports = list(shellwright.analyze_many(
            [{"formula": "Fe3O4", "id": "a", "row": 70},
             {"formula": "Fe3O4", "max_alternatives": 0}, "Fe3O4"],
            alternatives=2))
        self.assertEqual(reports[0],
                         cli_json("compound", "Fe3O4") | {"id": "a",
                                                          "row": 70})
        self.assertEqual(reports[1]["alternatives"], [])
        self.assertEqual(reports[2]["row"], 3)
        with self.assertRaisesRegex(ValueError, r"^alternatives: must be"):
            shellwright.analyze_many([], alternatives=6)
        with self.assertRaisesRegex(ValueError, r"^jobs: must be"):
            shellwright.analyze_many([], jobs=0)

    def test_malformed_records_get_error_reports(self):
        items = ["Fe2O3", 42, None, float("nan"), b"Fe\xff", {"formula": 3},
                 {"formula": "NiO", "colour": "red"}, {"id": "x"}, "NiO"]
        reports = list(shellwright.analyze_many(items))
        self.assertEqual(len(reports), len(items))
        self.assertTrue(reports[0]["valid"])
        self.assertTrue(reports[-1]["valid"])
        expected = ["expected a formula (str) or a mapping",
                    "formula: missing", "formula: missing",
                    "formula: bytes are not valid UTF-8",
                    "formula: expected str, got int 3",
                    "unknown record field 'colour'",
                    "record: no 'formula' field"]
        for report, text in zip(reports[1:-1], expected):
            with self.subTest(row=report["row"]):
                self.assertFalse(report["valid"])
                (diagnostic,) = report["diagnostics"]
                self.assertEqual(diagnostic["code"], "malformed_record")
                self.assertIn(f"row {report['row']}: ", diagnostic["message"])
                self.assertIn(text, diagnostic["message"])
        self.assertEqual(reports[7]["id"], "x")

    def test_an_error_in_the_iterable_propagates(self):
        def records():
            yield "Fe2O3"
            raise RuntimeError("source broke")
        with self.assertRaisesRegex(RuntimeError, "source broke"):
            list(shellwright.analyze_many(records()))

    def test_abandoned_iterator_and_threads(self):
        it = shellwright.analyze_many(["NiO"] * 10000, jobs=2)
        next(it)
        del it  # Stops its workers.
        results = []

        def work():
            results.append(sum(r["valid"] for r in
                               shellwright.analyze_many(["NiO"] * 3000)))
        threads = [threading.Thread(target=work) for _ in range(3)]
        for t in threads:
            t.start()
        for t in threads:
            t.join()
        self.assertEqual(results, [3000] * 3)

    def test_dicts_are_independent(self):
        a, b = shellwright.analyze_many(["Fe2O3", "Fe2O3"])
        a["oxidation_states"][0]["state"] = 99
        self.assertEqual(b["oxidation_states"][0]["state"], 3)
        self.assertTrue(math.isclose(b["oxidation_states"][0]["count"], 2))


if __name__ == "__main__":
    unittest.main()
