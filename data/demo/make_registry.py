#!/usr/bin/env python3
"""Generate the invented sample registry of the Quenmoor Ceramics & Magnetism
Group (a fictional research group) as CSV on stdout.

    python3 data/demo/make_registry.py > data/demo/sample_registry.csv
    python3 data/demo/make_registry.py --summary > /dev/null   # counts on stderr
    python3 data/demo/make_registry.py --manifest   # id,category,detail of defects

Deterministic (fixed seed, standard library only). Every value is invented.

Output: a header plus 3000 data lines (2997 written through csv.writer and
3 broken lines written raw at the very end). About 10% of the lines carry
exactly one deliberate defect each; the categories and their exact counts
(the generator asserts them) are:

  category                    count  what it looks like
  unknown_element               55   typos that leave an unknown symbol:
                                     Fe2o3, NaCL, Xx2O3, PR6O11, CoCreFMnNi,
                                     liNi0.55Co0.19Mn0.26O2
  zero_count                     8   letter O typed as digit zero: NiO -> Ni0
  unbalanced_brackets           40   Fe2O3), Ca3(PO4, K3[Fe(CN)6, Mn(OH]2,
                                     (Lu2O3
  unbalanceable_charge          35   NaF2, KF3, LiF2, CaCl, BaF3, ...: no
                                     assignment of known oxidation states
                                     sums to zero
  hydrate_period                25   CuSO4.5H2O ('.' typed for the dot '·'):
                                     parses as O4.5 + H2O; the two with a
                                     bare H2O (..SO4.H2O) do not parse at all
  wrong_declared_states         40   32 x a wrong state that breaks the
                                     charge sum (Fe:2 in Fe2O3); 8 x a
                                     declared element absent from the formula
  implausible_moment            35   measured_moment far above the free-ion
                                     estimate (e.g. 25.0 for NiO)
  empty_formula                 15   formula field empty
  illegal_characters            25   Fe2O3!, LaMnO3~, La0.75S!r0.25CrO3 (one
                                     of !?#%&$@=~^;/ ; never a space)
  malformed_optional_field      16   bad geometry/spin value, bad
                                     declared_states syntax, non-numeric
                                     moment, negative tolerance, bad charge
  wrong_column_count (mid)       2   one 8-field and one 10-field row, both
                                     still valid CSV
  raw_broken_tail                3   last three lines, written raw:
                                     10 fields, 5 fields, and (very last
                                     line) an unterminated quoted field
  total                        299

Approximate contents of the clean rows (2701): declared_states on ~380,
geometry/spin_state on ~140, measured_moment on ~520 (tolerance on ~380),
charge on ~28 molecular ions; about 80% of the formula strings are distinct
(the rest are repeat batches of common compounds). With --manifest the
script prints "id,category,detail" for every defective line instead of the
registry, for use as expected results in tests.

Rows outside these categories are clean: parseable formulas, declared states
that balance the charge column (or partial declarations that leave a
mixed-valence element open), moments within tolerance of the free-ion /
crystal-field estimate.
"""

import csv
import math
import os
import random
import sys

SEED = 20240611
N_WRITER_ROWS = 2997          # rows written through csv.writer
ID_PREFIX = "QMG"
HEADER = ["id", "formula", "charge", "declared_states", "geometry",
          "spin_state", "measured_moment", "moment_tolerance", "notes"]

DEFECT_COUNTS = {
    "unknown_element": 55,
    "zero_count": 8,
    "unbalanced_brackets": 40,
    "unbalanceable_charge": 35,
    "hydrate_period": 25,
    "wrong_declared_states": 40,
    "implausible_moment": 35,
    "empty_formula": 15,
    "illegal_characters": 25,
    "malformed_optional_field": 16,
    "wrong_column_count": 2,
}
N_RAW_TAIL = 3

TARGET_DECLARED = 450   # ~15% (includes the wrong ones)
TARGET_SETTINGS = 150   # ~5%
TARGET_MOMENTS = 600    # ~20% (includes the implausible ones)

# ---------------------------------------------------------------- elements

ELEMENTS = set("""
H He Li Be B C N O F Ne Na Mg Al Si P S Cl Ar K Ca Sc Ti V Cr Mn Fe Co Ni Cu
Zn Ga Ge As Se Br Kr Rb Sr Y Zr Nb Mo Tc Ru Rh Pd Ag Cd In Sn Sb Te I Xe Cs
Ba La Ce Pr Nd Pm Sm Eu Gd Tb Dy Ho Er Tm Yb Lu Hf Ta W Re Os Ir Pt Au Hg Tl
Pb Bi Po At Rn Fr Ra Ac Th Pa U Np Pu Am Cm Bk Cf Es Fm Md No Lr Rf Db Sg Bh
Hs Mt Ds Rg Cn Nh Fl Mc Lv Ts Og""".split())

# Group number of the d-block elements used (d count = group - state).
D_GROUP = {"Sc": 3, "Ti": 4, "V": 5, "Cr": 6, "Mn": 7, "Fe": 8, "Co": 9,
           "Ni": 10, "Cu": 11, "Zn": 12, "Y": 3, "Zr": 4, "Nb": 5, "Mo": 6,
           "Ag": 11, "Cd": 12, "W": 6, "Pt": 10, "Au": 11}
THREE_D = {"Sc", "Ti", "V", "Cr", "Mn", "Fe", "Co", "Ni", "Cu", "Zn"}
LANTHANIDES = ["La", "Ce", "Pr", "Nd", "Pm", "Sm", "Eu", "Gd", "Tb", "Dy",
               "Ho", "Er", "Tm", "Yb", "Lu"]
# Free-ion g_J*sqrt(J(J+1)) by 4f count (Hund's rules ground level).
F_MOMENT = [0.0, 2.54, 3.58, 3.62, 2.68, 0.85, 0.0, 7.94, 9.72, 10.65,
            10.61, 9.58, 7.56, 4.54, 0.0]

HS_UNPAIRED = [0, 1, 2, 3, 4, 5, 4, 3, 2, 1, 0]
LS_OCT_UNPAIRED = [0, 1, 2, 3, 2, 1, 0, 1, 2, 1, 0]
SQ_PLANAR_UNPAIRED = {7: 1, 8: 0, 9: 1, 10: 0}


class FormulaError(Exception):
    def __init__(self, kind):
        super().__init__(kind)
        self.kind = kind


def parse_formula(text):
    """Element -> count (float). Raises FormulaError(kind), kind one of
    empty, illegal_char, unknown_element, brackets, zero_count, syntax."""
    if text == "":
        raise FormulaError("empty")
    total = {}
    parts, depth, cur = [], 0, ""
    for ch in text:
        if ch in "([":
            depth += 1
        elif ch in ")]":
            depth -= 1
        if ch in "·*" and depth == 0:
            parts.append(cur)
            cur = ""
        else:
            cur += ch
    parts.append(cur)
    for part in parts:
        if part == "":
            raise FormulaError("syntax")
        pos, mult = 0, 1.0
        if part[0].isdigit():
            mult, pos = _number(part, 0)
        counts, pos = _groups(part, pos, None)
        if pos != len(part):
            raise FormulaError("syntax")
        for el, n in counts.items():
            total[el] = total.get(el, 0.0) + n * mult
    return total


def _number(s, pos):
    start = pos
    while pos < len(s) and s[pos].isdigit():
        pos += 1
    if pos < len(s) and s[pos] == "." and pos + 1 < len(s) and s[pos + 1].isdigit():
        pos += 1
        while pos < len(s) and s[pos].isdigit():
            pos += 1
    value = float(s[start:pos])
    if value == 0:
        raise FormulaError("zero_count")
    return value, pos


def _groups(s, pos, closer):
    counts = {}
    while pos < len(s):
        ch = s[pos]
        if ch in ")]":
            if closer is None or ch != closer:
                raise FormulaError("brackets")
            return counts, pos
        if ch in "([":
            inner, pos = _groups(s, pos + 1, ")" if ch == "(" else "]")
            if pos >= len(s):
                raise FormulaError("brackets")
            pos += 1
            n = 1.0
            if pos < len(s) and s[pos].isdigit():
                n, pos = _number(s, pos)
            for el, c in inner.items():
                counts[el] = counts.get(el, 0.0) + c * n
            continue
        if ch.isupper():
            sym = ch
            pos += 1
            if pos < len(s) and s[pos].islower():
                sym += s[pos]
                pos += 1
            if sym not in ELEMENTS:
                raise FormulaError("unknown_element")
            n = 1.0
            if pos < len(s) and s[pos].isdigit():
                n, pos = _number(s, pos)
            if pos < len(s) and s[pos] == ".":
                raise FormulaError("syntax")
            counts[sym] = counts.get(sym, 0.0) + n
            continue
        if ch.islower():
            raise FormulaError("unknown_element")
        if ch.isdigit() or ch == ".":
            raise FormulaError("syntax")
        raise FormulaError("illegal_char")
    if closer is not None:
        raise FormulaError("brackets")
    return counts, pos


# ------------------------------------------------------------- formatting

def amt(hundredths):
    """Hundredths -> subscript text: 100 -> '', 30 -> '0.3', 185 -> '1.85'."""
    if hundredths == 100:
        return ""
    whole, frac = divmod(hundredths, 100)
    if frac == 0:
        return str(whole)
    return ("%d.%02d" % (whole, frac)).rstrip("0")


def split_hundredths(rng, k, total=100, minimum=5):
    """k positive integers >= minimum summing to total."""
    spare = total - k * minimum
    cuts = sorted(rng.randint(0, spare) for _ in range(k - 1))
    bounds = [0] + cuts + [spare]
    return [minimum + bounds[i + 1] - bounds[i] for i in range(k)]


class Rec:
    """A registry record before optional fields and defects are applied."""

    def __init__(self, formula, states=None, partial=False, charge=None,
                 moment=True, needs=None, setopts=None, family=""):
        self.formula = formula
        self.states = states        # element -> integer state, or None
        self.partial = partial      # states cover only some elements
        self.charge = charge        # None = neutral
        self.moment = moment        # a free-ion estimate is meaningful
        self.needs = needs          # {el: (geometry, spin)} required for it
        self.setopts = setopts      # [(geometry dict, spin dict), ...]
        self.family = family
        self.geometry, self.spin = {}, {}
        self.declared = None        # declared_states text
        self.measured, self.tolerance = "", ""
        self.notes = ""
        self.counts = parse_formula(formula)
        if states is not None and not partial:
            assert set(states) == set(self.counts), formula
            balance = sum(self.counts[e] * s for e, s in states.items())
            assert abs(balance - (charge or 0)) < 1e-6, (formula, balance)
        if setopts is None:
            self.setopts = default_setopts(self)

    def element_order(self):
        return list(self.counts)


def d_count(el, state):
    return D_GROUP[el] - state


def default_setopts(rec):
    if rec.states is None or rec.partial or not rec.moment or rec.needs:
        return []
    tms = [e for e in rec.counts if e in THREE_D and 0 < d_count(e, rec.states[e]) < 10]
    if not tms:
        return []
    e = tms[0]
    opts = [({e: "octahedral"}, {}), ({e: "octahedral"}, {e: "high"}),
            ({e: "octahedral"}, {e: "auto"}), ({e: "free"}, {}),
            ({e: "octahedral"}, {e: "high"})]
    if len(tms) > 1:
        f = tms[1]
        opts.append(({e: "octahedral", f: "octahedral"}, {}))
        opts.append(({e: "octahedral", f: "octahedral"}, {e: "high", f: "high"}))
    return opts


def unpaired(el, state, geometry, spin):
    d = d_count(el, state)
    if d <= 0 or d >= 10:
        return 0
    if geometry == "square_planar":
        return SQ_PLANAR_UNPAIRED[d]
    if geometry == "octahedral":
        if spin == "low" or (spin in ("auto", None) and el not in THREE_D):
            return LS_OCT_UNPAIRED[d]
        return HS_UNPAIRED[d]
    return HS_UNPAIRED[d]      # free ion or tetrahedral: high spin


def estimate(rec):
    """Free-ion / crystal-field moment per formula unit, or None."""
    if rec.states is None or rec.partial or not rec.moment:
        return None
    if rec.needs:
        for el, (g, s) in rec.needs.items():
            if rec.geometry.get(el) != g or rec.spin.get(el) != s:
                return None
    total = 0.0
    for el, n in rec.counts.items():
        st = rec.states[el]
        if el in LANTHANIDES:
            f = LANTHANIDES.index(el) + 57 - 54 - st
            if f in (4, 5, 6):
                return None     # Pm, Sm, Eu(3+): free-ion value misleads
            mu = F_MOMENT[f]
        elif el in D_GROUP:
            d = d_count(el, st)
            if el not in THREE_D and 0 < d < 10 and el not in rec.geometry:
                return None     # 4d/5d ion without a ligand field: skip
            u = unpaired(el, st, rec.geometry.get(el), rec.spin.get(el))
            mu = math.sqrt(u * (u + 2))
        else:
            mu = 0.0
        total += n * mu * mu
    return math.sqrt(total)


# ------------------------------------------------------------- families

def S(text):
    """'Fe:3 O:-2' -> {'Fe': 3, 'O': -2}."""
    out = {}
    for tok in text.split():
        el, st = tok.split(":")
        out[el] = int(st)
    return out


OCT_LS = "octahedral", "low"

SIMPLE = [
    ("Fe2O3", "Fe:3 O:-2"), ("FeO", "Fe:2 O:-2"), ("NiO", "Ni:2 O:-2"),
    ("CoO", "Co:2 O:-2"), ("MnO", "Mn:2 O:-2"), ("MnO2", "Mn:4 O:-2"),
    ("Cr2O3", "Cr:3 O:-2"), ("CuO", "Cu:2 O:-2"), ("Cu2O", "Cu:1 O:-2"),
    ("ZnO", "Zn:2 O:-2"), ("TiO2", "Ti:4 O:-2"), ("Ti2O3", "Ti:3 O:-2"),
    ("V2O5", "V:5 O:-2"), ("VO2", "V:4 O:-2"), ("V2O3", "V:3 O:-2"),
    ("Al2O3", "Al:3 O:-2"), ("MgO", "Mg:2 O:-2"), ("CaO", "Ca:2 O:-2"),
    ("SiO2", "Si:4 O:-2"), ("SnO2", "Sn:4 O:-2"), ("ZrO2", "Zr:4 O:-2"),
    ("NaCl", "Na:1 Cl:-1"), ("KCl", "K:1 Cl:-1"), ("KBr", "K:1 Br:-1"),
    ("LiF", "Li:1 F:-1"), ("CsCl", "Cs:1 Cl:-1"), ("CaF2", "Ca:2 F:-1"),
    ("MgF2", "Mg:2 F:-1"), ("BaF2", "Ba:2 F:-1"), ("FeCl2", "Fe:2 Cl:-1"),
    ("FeCl3", "Fe:3 Cl:-1"), ("CoCl2", "Co:2 Cl:-1"), ("NiCl2", "Ni:2 Cl:-1"),
    ("MnCl2", "Mn:2 Cl:-1"), ("CuCl2", "Cu:2 Cl:-1"), ("CrCl3", "Cr:3 Cl:-1"),
    ("MnF2", "Mn:2 F:-1"), ("FeF2", "Fe:2 F:-1"), ("CoF2", "Co:2 F:-1"),
    ("NiF2", "Ni:2 F:-1"), ("BaTiO3", "Ba:2 Ti:4 O:-2"),
    ("SrTiO3", "Sr:2 Ti:4 O:-2"), ("CaTiO3", "Ca:2 Ti:4 O:-2"),
    ("LaAlO3", "La:3 Al:3 O:-2"), ("LaFeO3", "La:3 Fe:3 O:-2"),
    ("LaMnO3", "La:3 Mn:3 O:-2"), ("LaCrO3", "La:3 Cr:3 O:-2"),
    ("YMnO3", "Y:3 Mn:3 O:-2"), ("PbTiO3", "Pb:2 Ti:4 O:-2"),
    ("KNbO3", "K:1 Nb:5 O:-2"), ("LiNbO3", "Li:1 Nb:5 O:-2"),
    ("ZnS", "Zn:2 S:-2"), ("Ag2O", "Ag:1 O:-2"), ("PbO", "Pb:2 O:-2"),
    ("Bi2O3", "Bi:3 O:-2"), ("Ga2O3", "Ga:3 O:-2"), ("In2O3", "In:3 O:-2"),
    ("WO3", "W:6 O:-2"), ("MoO3", "Mo:6 O:-2"), ("CuCl", "Cu:1 Cl:-1"),
    ("AgCl", "Ag:1 Cl:-1"), ("Li2O", "Li:1 O:-2"), ("Na2O", "Na:1 O:-2"),
]
SIMPLE_SPECIAL = [
    # (formula, states, moment, needs, setopts)
    ("FeS2", "Fe:2 S:-1", True, {"Fe": OCT_LS}, [({"Fe": "octahedral"}, {"Fe": "low"})]),
    ("MoS2", "Mo:4 S:-2", False, None, []),
]

LAYERED_FIXED = [
    ("LiCoO2", "Li:1 Co:3 O:-2", {"Co": OCT_LS}),
    ("LiNiO2", "Li:1 Ni:3 O:-2", {"Ni": OCT_LS}),
    ("NaCoO2", "Na:1 Co:3 O:-2", {"Co": OCT_LS}),
    ("LiMnO2", "Li:1 Mn:3 O:-2", None),
    ("LiFeO2", "Li:1 Fe:3 O:-2", None),
    ("LiCrO2", "Li:1 Cr:3 O:-2", None),
    ("LiNi0.5Mn0.5O2", "Li:1 Ni:2 Mn:4 O:-2", None),
]

SPINEL_FIXED = [
    ("Fe3O4", None), ("Co3O4", None), ("Mn3O4", None), ("NiCo2O4", None),
    ("CoFe2O4", "Co:2 Fe:3 O:-2"), ("NiFe2O4", "Ni:2 Fe:3 O:-2"),
    ("MnFe2O4", "Mn:2 Fe:3 O:-2"), ("ZnFe2O4", "Zn:2 Fe:3 O:-2"),
    ("MgFe2O4", "Mg:2 Fe:3 O:-2"), ("CuFe2O4", "Cu:2 Fe:3 O:-2"),
    ("MgAl2O4", "Mg:2 Al:3 O:-2"), ("ZnAl2O4", "Zn:2 Al:3 O:-2"),
    ("FeCr2O4", "Fe:2 Cr:3 O:-2"), ("CoCr2O4", "Co:2 Cr:3 O:-2"),
    ("ZnCr2O4", "Zn:2 Cr:3 O:-2"), ("NiCr2O4", "Ni:2 Cr:3 O:-2"),
    ("LiNi0.5Mn1.5O4", "Li:1 Ni:2 Mn:4 O:-2"),
]

GARNET_FIXED = [
    ("Y3Fe5O12", "Y:3 Fe:3 O:-2"), ("Gd3Ga5O12", "Gd:3 Ga:3 O:-2"),
    ("Y3Al5O12", "Y:3 Al:3 O:-2"), ("Gd3Fe5O12", "Gd:3 Fe:3 O:-2"),
    ("Tb3Ga5O12", "Tb:3 Ga:3 O:-2"), ("Dy3Al5O12", "Dy:3 Al:3 O:-2"),
    ("Lu3Al5O12", "Lu:3 Al:3 O:-2"), ("Er3Ga5O12", "Er:3 Ga:3 O:-2"),
]

W = "O:-2 H:1"
HYDRATES = [   # '{s}' is the hydrate separator
    ("CuSO4{s}5H2O", "Cu:2 S:6 " + W), ("FeSO4{s}7H2O", "Fe:2 S:6 " + W),
    ("CoCl2{s}6H2O", "Co:2 Cl:-1 " + W), ("NiSO4{s}6H2O", "Ni:2 S:6 " + W),
    ("MgSO4{s}7H2O", "Mg:2 S:6 " + W), ("NiCl2{s}6H2O", "Ni:2 Cl:-1 " + W),
    ("MnCl2{s}4H2O", "Mn:2 Cl:-1 " + W), ("CuCl2{s}2H2O", "Cu:2 Cl:-1 " + W),
    ("ZnSO4{s}7H2O", "Zn:2 S:6 " + W), ("CoSO4{s}7H2O", "Co:2 S:6 " + W),
    ("FeCl3{s}6H2O", "Fe:3 Cl:-1 " + W), ("MnSO4{s}H2O", "Mn:2 S:6 " + W),
    ("CaSO4{s}2H2O", "Ca:2 S:6 " + W), ("CaSO4{s}0.5H2O", "Ca:2 S:6 " + W),
    ("Na2CO3{s}10H2O", "Na:1 C:4 " + W), ("Na2SO4{s}10H2O", "Na:1 S:6 " + W),
    ("Fe(NO3)3{s}9H2O", "Fe:3 N:5 " + W), ("Ni(NO3)2{s}6H2O", "Ni:2 N:5 " + W),
    ("Co(NO3)2{s}6H2O", "Co:2 N:5 " + W), ("Cu(NO3)2{s}3H2O", "Cu:2 N:5 " + W),
    ("KAl(SO4)2{s}12H2O", "K:1 Al:3 S:6 " + W),
    ("KCr(SO4)2{s}12H2O", "K:1 Cr:3 S:6 " + W),
    ("Gd2(SO4)3{s}8H2O", "Gd:3 S:6 " + W),
    ("(NH4)2Fe(SO4)2{s}6H2O", "N:-3 H:1 Fe:2 S:6 O:-2"),
    ("(NH4)2Ni(SO4)2{s}6H2O", "N:-3 H:1 Ni:2 S:6 O:-2"),
    ("NH4Fe(SO4)2{s}12H2O", "N:-3 H:1 Fe:3 S:6 O:-2"),
    ("[Cu(NH3)4]SO4{s}H2O", "Cu:2 N:-3 H:1 S:6 O:-2"),
    ("CrCl3{s}6H2O", "Cr:3 Cl:-1 " + W), ("BaCl2{s}2H2O", "Ba:2 Cl:-1 " + W),
]
# Hydrates whose water count is an integer (usable for the '.' typo).
HYDRATE_INT = [h for h in HYDRATES if "0.5H2O" not in h[0]]

SULFPHOS_FIXED = [
    ("LiFePO4", "Li:1 Fe:2 P:5 O:-2"), ("LiMnPO4", "Li:1 Mn:2 P:5 O:-2"),
    ("LiCoPO4", "Li:1 Co:2 P:5 O:-2"), ("LiNiPO4", "Li:1 Ni:2 P:5 O:-2"),
    ("NaFePO4", "Na:1 Fe:2 P:5 O:-2"), ("FePO4", "Fe:3 P:5 O:-2"),
    ("FeSO4", "Fe:2 S:6 O:-2"), ("CuSO4", "Cu:2 S:6 O:-2"),
    ("NiSO4", "Ni:2 S:6 O:-2"), ("CoSO4", "Co:2 S:6 O:-2"),
    ("MnSO4", "Mn:2 S:6 O:-2"), ("ZnSO4", "Zn:2 S:6 O:-2"),
    ("Fe2(SO4)3", "Fe:3 S:6 O:-2"), ("Cr2(SO4)3", "Cr:3 S:6 O:-2"),
    ("Li3V2(PO4)3", "Li:1 V:3 P:5 O:-2"), ("Na3V2(PO4)3", "Na:1 V:3 P:5 O:-2"),
    ("Li2FeSiO4", "Li:1 Fe:2 Si:4 O:-2"), ("Ca3(PO4)2", "Ca:2 P:5 O:-2"),
]

NESTED = [
    # (formula, states, needs, setopts)
    ("Ca3(PO4)2", "Ca:2 P:5 O:-2", None, None),
    ("Mg3(PO4)2", "Mg:2 P:5 O:-2", None, None),
    ("Fe3(PO4)2", "Fe:2 P:5 O:-2", None, None),
    ("Al2(SO4)3", "Al:3 S:6 O:-2", None, None),
    ("Ca5(PO4)3(OH)", "Ca:2 P:5 O:-2 H:1", None, None),
    ("Cu2(OH)2CO3", "Cu:2 O:-2 H:1 C:4", None, None),
    ("Ni(OH)2", "Ni:2 O:-2 H:1", None, None),
    ("Co(OH)2", "Co:2 O:-2 H:1", None, None),
    ("Fe(OH)3", "Fe:3 O:-2 H:1", None, None),
    ("Cu(OH)2", "Cu:2 O:-2 H:1", None, None),
    ("Mn(OH)2", "Mn:2 O:-2 H:1", None, None),
    ("Ba(NO3)2", "Ba:2 N:5 O:-2", None, None),
    ("(NH4)3PO4", "N:-3 H:1 P:5 O:-2", None, None),
    ("[Co(NH3)6]Cl3", "Co:3 N:-3 H:1 Cl:-1", {"Co": OCT_LS},
     [({"Co": "octahedral"}, {"Co": "low"})]),
    ("[Co(NH3)5Cl]Cl2", "Co:3 N:-3 H:1 Cl:-1", {"Co": OCT_LS},
     [({"Co": "octahedral"}, {"Co": "low"})]),
    ("K3[Fe(CN)6]", "K:1 Fe:3 C:2 N:-3", {"Fe": OCT_LS},
     [({"Fe": "octahedral"}, {"Fe": "low"})]),
    ("K4[Fe(CN)6]", "K:1 Fe:2 C:2 N:-3", {"Fe": OCT_LS},
     [({"Fe": "octahedral"}, {"Fe": "low"})]),
    ("K3[Co(CN)6]", "K:1 Co:3 C:2 N:-3", {"Co": OCT_LS},
     [({"Co": "octahedral"}, {"Co": "low"})]),
    ("[Ni(NH3)6]Cl2", "Ni:2 N:-3 H:1 Cl:-1", None, None),
    ("[Cr(H2O)6]Cl3", "Cr:3 H:1 O:-2 Cl:-1", None, None),
    ("[Fe(H2O)6]Cl3", "Fe:3 H:1 O:-2 Cl:-1", None, None),
    ("[Ni(H2O)6]SO4", "Ni:2 H:1 O:-2 S:6", None, None),
    ("K2[Ni(CN)4]", "K:1 Ni:2 C:2 N:-3", {"Ni": ("square_planar", "low")},
     [({"Ni": "square_planar"}, {"Ni": "low"}), ({"Ni": "square_planar"}, {"Ni": "auto"})]),
    ("K2[PtCl4]", "K:1 Pt:2 Cl:-1", {"Pt": ("square_planar", "low")},
     [({"Pt": "square_planar"}, {"Pt": "low"})]),
    ("K2[CoCl4]", "K:1 Co:2 Cl:-1", None,
     [({"Co": "tetrahedral"}, {}), ({"Co": "tetrahedral"}, {"Co": "high"})]),
    ("Fe4[Fe(CN)6]3", None, None, None),
]

RARE_FIXED = [
    ("Gd2O3", "Gd:3 O:-2"), ("Dy2O3", "Dy:3 O:-2"), ("EuO", "Eu:2 O:-2"),
    ("CeO2", "Ce:4 O:-2"), ("Nd2O3", "Nd:3 O:-2"), ("Sm2O3", "Sm:3 O:-2"),
    ("Er2O3", "Er:3 O:-2"), ("Ho2O3", "Ho:3 O:-2"), ("Yb2O3", "Yb:3 O:-2"),
    ("La2O3", "La:3 O:-2"), ("Pr2O3", "Pr:3 O:-2"), ("Tb2O3", "Tb:3 O:-2"),
    ("Tm2O3", "Tm:3 O:-2"), ("Lu2O3", "Lu:3 O:-2"), ("Eu2O3", "Eu:3 O:-2"),
    ("GdCl3", "Gd:3 Cl:-1"), ("DyF3", "Dy:3 F:-1"), ("NdF3", "Nd:3 F:-1"),
    ("GdF3", "Gd:3 F:-1"), ("ErCl3", "Er:3 Cl:-1"), ("EuS", "Eu:2 S:-2"),
    ("CeF3", "Ce:3 F:-1"), ("GdFeO3", "Gd:3 Fe:3 O:-2"),
    ("DyFeO3", "Dy:3 Fe:3 O:-2"), ("Nd2Fe17", None), ("SmCo5", None),
    ("Sm2Co17", None), ("Pr6O11", None), ("Tb4O7", None),
]

IONS = [
    ("SO4", -2, "S:6 O:-2", None, None), ("NH4", 1, "N:-3 H:1", None, None),
    ("[Fe(CN)6]", -3, "Fe:3 C:2 N:-3", {"Fe": OCT_LS},
     [({"Fe": "octahedral"}, {"Fe": "low"})]),
    ("[Fe(CN)6]", -4, "Fe:2 C:2 N:-3", {"Fe": OCT_LS},
     [({"Fe": "octahedral"}, {"Fe": "low"})]),
    ("PO4", -3, "P:5 O:-2", None, None), ("NO3", -1, "N:5 O:-2", None, None),
    ("CO3", -2, "C:4 O:-2", None, None), ("MnO4", -1, "Mn:7 O:-2", None, None),
    ("CrO4", -2, "Cr:6 O:-2", None, None), ("Cr2O7", -2, "Cr:6 O:-2", None, None),
    ("[Co(NH3)6]", 3, "Co:3 N:-3 H:1", {"Co": OCT_LS},
     [({"Co": "octahedral"}, {"Co": "low"})]),
    ("OH", -1, "O:-2 H:1", None, None), ("ClO4", -1, "Cl:7 O:-2", None, None),
    ("[CuCl4]", -2, "Cu:2 Cl:-1", None, None),
    ("[Ni(CN)4]", -2, "Ni:2 C:2 N:-3", {"Ni": ("square_planar", "low")},
     [({"Ni": "square_planar"}, {"Ni": "low"})]),
    ("[Fe(H2O)6]", 3, "Fe:3 H:1 O:-2", None, None),
    ("H3O", 1, "H:1 O:-2", None, None),
]

ELEMENT_FORMS = ["O2", "C", "Fe", "Si", "N2", "Cu", "Ni", "Co", "Gd", "Al",
                 "Ti", "S8", "P4", "H2", "Cr", "Mn", "Zn", "Ge", "Cl2", "Ar"]

ALLOY_METALS = ["Al", "Co", "Cr", "Fe", "Ni", "Mn", "Cu", "Ti", "V"]
ALLOY_FIXED = ["Fe0.7Ni0.3", "AlCoCrFeNi", "CoCrFeMnNi", "Ni3Al", "FeAl",
               "TiAl", "Ni3Fe", "FeCo", "Fe0.64Ni0.36", "Cu0.55Ni0.45"]

# Formulas with no assignment of known oxidation states summing to zero.
UNBALANCEABLE = ["NaF2", "KF3", "LiF2", "CaF3", "MgF3", "SrF3", "BaF", "BaF3",
                 "CsF2", "RbF2", "ZnF3", "AlF4", "LiF3", "CaCl", "SrCl",
                 "BaCl", "NaF3", "KF2", "LiCl2", "CsCl2"]
SMALL_OX = {"Li": [1], "Na": [-1, 1], "K": [-1, 1], "Rb": [-1, 1],
            "Cs": [-1, 1], "Mg": [1, 2], "Ca": [2], "Sr": [2], "Ba": [2],
            "Zn": [1, 2], "Al": [1, 2, 3], "F": [-1],
            "Cl": [-1, 1, 3, 4, 5, 6, 7]}


def can_balance(counts):
    sums = {0}
    for el, n in counts.items():
        for _ in range(int(n)):
            sums = {a + b for a in sums for b in SMALL_OX[el]}
    return 0 in sums


def fixed(entry_formula, states, **kw):
    return Rec(entry_formula, S(states) if states else None, **kw)


SOLID_SOLUTIONS = [
    # (A, B, anion part, total hundredths, states)
    ("Ni", "Mg", "O", 100, "Ni:2 Mg:2 O:-2"), ("Co", "Mg", "O", 100, "Co:2 Mg:2 O:-2"),
    ("Mn", "Mg", "O", 100, "Mn:2 Mg:2 O:-2"), ("Fe", "Mg", "O", 100, "Fe:2 Mg:2 O:-2"),
    ("Ni", "Co", "O", 100, "Ni:2 Co:2 O:-2"), ("Zn", "Mn", "O", 100, "Zn:2 Mn:2 O:-2"),
    ("Zn", "Co", "O", 100, "Zn:2 Co:2 O:-2"), ("Fe", "Cr", "O3", 200, "Fe:3 Cr:3 O:-2"),
    ("Al", "Cr", "O3", 200, "Al:3 Cr:3 O:-2"), ("Fe", "Al", "O3", 200, "Fe:3 Al:3 O:-2"),
    ("Ti", "Sn", "O2", 100, "Ti:4 Sn:4 O:-2"), ("K", "Rb", "Cl", 100, "K:1 Rb:1 Cl:-1"),
    ("Ca", "Sr", "F2", 100, "Ca:2 Sr:2 F:-1"), ("Mn", "Zn", "F2", 100, "Mn:2 Zn:2 F:-1"),
    ("Fe", "Mg", "Cl2", 100, "Fe:2 Mg:2 Cl:-1"), ("Co", "Ni", "Cl2", 100, "Co:2 Ni:2 Cl:-1"),
]


def fam_simple(rng):
    if rng.random() < 0.65:
        a, b, anion, tot, st = rng.choice(SOLID_SOLUTIONS)
        x = rng.randint(3, tot - 3)
        return Rec("%s%s%s%s%s" % (a, amt(tot - x), b, amt(x), anion), S(st), family="simple")
    if rng.random() < 0.12:
        an, bn = rng.choice([("Cl", "Br"), ("Cl", "I"), ("Br", "I")])
        cat = rng.choice(["Na", "K", "Rb", "Cs"])
        x = rng.randint(3, 97)
        return Rec("%s%s%s%s%s" % (cat, an, amt(100 - x), bn, amt(x)),
                   {cat: 1, an: -1, bn: -1}, family="simple")
    if rng.random() < 0.04:
        f, st, mom, needs, opts = rng.choice(SIMPLE_SPECIAL)
        return Rec(f, S(st), moment=mom, needs=needs, setopts=opts, family="simple")
    f, st = rng.choice(SIMPLE)
    return Rec(f, S(st), family="simple")


def fam_nonstoich(rng):
    kind = rng.randrange(6)
    if kind == 0:
        f = "Fe%sO" % amt(rng.randint(83, 97))
    elif kind == 1:
        f = "Ni%sO" % amt(rng.randint(95, 99))
    elif kind == 2:
        f = "Co%sO" % amt(rng.randint(94, 99))
    elif kind == 3:
        f = "TiO%s" % amt(rng.randint(190, 199))
    elif kind == 4:
        f = "CeO%s" % amt(rng.randint(180, 199))
    else:
        f = "WO%s" % amt(rng.randint(272, 299))
    return Rec(f, family="nonstoich")


def fam_perovskite(rng):
    kind = rng.randrange(9) if rng.random() > 0.05 else 9
    x = rng.randint(5, 60)
    if kind <= 3:   # A-site doped manganite / cobaltite / ferrite / chromite
        a = rng.choice(["La", "La", "La", "Pr", "Nd", "Sm"])
        d = rng.choice(["Sr", "Ca", "Ba"])
        b = rng.choice(["Mn", "Mn", "Co", "Fe", "Cr"])
        f = "%s%s%s%s%sO3" % (a, amt(100 - x), d, amt(x), b)
        return Rec(f, {a: 3, d: 2, "O": -2}, partial=True, family="perovskite")
    if kind == 4:   # LSCF-type double doping
        y = rng.randint(10, 90)
        f = "La%sSr%sCo%sFe%sO3" % (amt(100 - x), amt(x), amt(100 - y), amt(y))
        return Rec(f, {"La": 3, "Sr": 2, "O": -2}, partial=True, family="perovskite")
    if kind == 5:   # SrTi1-xFexO3
        y = rng.randint(2, 50)
        f = "SrTi%sFe%sO3" % (amt(100 - y), amt(y))
        return Rec(f, {"Sr": 2, "O": -2}, partial=True, family="perovskite")
    if kind == 6:   # BST, BCT: fully fixed valence
        d = rng.choice(["Sr", "Ca"])
        f = "Ba%s%s%sTiO3" % (amt(100 - x), d, amt(x))
        return Rec(f, {"Ba": 2, d: 2, "Ti": 4, "O": -2}, family="perovskite")
    if kind == 7:   # BaTi1-xZrxO3
        f = "BaTi%sZr%sO3" % (amt(100 - x), amt(x))
        return Rec(f, {"Ba": 2, "Ti": 4, "Zr": 4, "O": -2}, family="perovskite")
    if kind == 8:   # LaMn1-xFexO3 / LaFe1-xCrxO3 (all 3+)
        b, c = rng.choice([("Mn", "Fe"), ("Fe", "Cr"), ("Mn", "Cr"), ("Mn", "Co")])
        f = "La%s%s%s%sO3" % (b, amt(100 - x), c, amt(x))
        mom = "Co" not in (b, c)
        return Rec(f, {"La": 3, b: 3, c: 3, "O": -2}, moment=mom, family="perovskite")
    f, st = rng.choice([s for s in SIMPLE if s[0].endswith("O3") and len(S(s[1])) == 3])
    return Rec(f, S(st), family="perovskite")


def fam_layered(rng):
    kind = rng.randrange(7) if rng.random() > 0.1 else 9
    if kind <= 4:   # NMC with random fractions summing to 1
        ni, co, mn = split_hundredths(rng, 3, minimum=5)
        if rng.random() < 0.08:
            ni, co, mn = rng.choice([(33, 33, 34), (50, 20, 30), (60, 20, 20),
                                     (80, 10, 10), (90, 5, 5)])
        f = "LiNi%sCo%sMn%sO2" % (amt(ni), amt(co), amt(mn))
        return Rec(f, {"Li": 1, "O": -2}, partial=True, family="layered")
    if kind == 5:   # delithiated LixCoO2 / sodium cobaltate
        a = rng.choice(["Li", "Li", "Na"])
        x = rng.randint(30, 99) if a == "Li" else rng.randint(50, 90)
        f = "%s%sCoO2" % (a, amt(x))
        return Rec(f, {a: 1, "O": -2}, partial=True, family="layered")
    if kind == 6:   # NCA (all 3+)
        ni = rng.randint(70, 88)
        co = rng.randint(5, 95 - ni)
        al = 100 - ni - co
        f = "LiNi%sCo%sAl%sO2" % (amt(ni), amt(co), amt(al))
        return Rec(f, {"Li": 1, "Ni": 3, "Co": 3, "Al": 3, "O": -2},
                   moment=False, family="layered")
    f, st, needs = rng.choice(LAYERED_FIXED)
    opts = [({el: g}, {el: s}) for el, (g, s) in needs.items()] if needs else None
    return Rec(f, S(st), needs=needs, setopts=opts, family="layered")


def fam_spinel(rng):
    kind = rng.randrange(6) if rng.random() > 0.15 else 9
    x = rng.randint(5, 95)
    if kind <= 2:
        a = rng.choice(["Co", "Ni", "Mn", "Mg", "Cu"])
        f = "%s%sZn%sFe2O4" % (a, amt(100 - x), amt(x))
        return Rec(f, {a: 2, "Zn": 2, "Fe": 3, "O": -2}, family="spinel")
    if kind == 3:
        y = rng.randint(5, 150)
        f = "CoFe%sAl%sO4" % (amt(200 - y), amt(y))
        return Rec(f, {"Co": 2, "Fe": 3, "Al": 3, "O": -2}, family="spinel")
    if kind == 4:
        f = "Mg%sCo%sAl2O4" % (amt(100 - x), amt(x))
        return Rec(f, {"Mg": 2, "Co": 2, "Al": 3, "O": -2},
                   setopts=[({"Co": "tetrahedral"}, {})], family="spinel")
    if kind == 5:
        y = rng.randint(5, 60)
        f = "LiNi%sMn%sO4" % (amt(y), amt(200 - y))
        return Rec(f, {"Li": 1, "O": -2}, partial=True, family="spinel")
    f, st = rng.choice(SPINEL_FIXED)
    if st is None:
        return Rec(f, family="spinel")
    return Rec(f, S(st), family="spinel")


def fam_garnet(rng):
    kind = rng.randrange(4) if rng.random() > 0.2 else 5
    if kind == 0:
        x = rng.randint(5, 295)
        f = "Y%sGd%sFe5O12" % (amt(300 - x), amt(x))
        return Rec(f, {"Y": 3, "Gd": 3, "Fe": 3, "O": -2}, family="garnet")
    if kind == 1:
        y = rng.randint(5, 250)
        f = "Y3Fe%sGa%sO12" % (amt(500 - y), amt(y))
        return Rec(f, {"Y": 3, "Fe": 3, "Ga": 3, "O": -2}, family="garnet")
    if kind == 2:
        x = rng.randint(5, 150)
        f = "Y%sBi%sFe5O12" % (amt(300 - x), amt(x))
        return Rec(f, {"Y": 3, "Bi": 3, "Fe": 3, "O": -2}, family="garnet")
    if kind == 3:
        x = rng.randint(5, 295)
        f = "Gd%sY%sGa5O12" % (amt(300 - x), amt(x))
        return Rec(f, {"Gd": 3, "Y": 3, "Ga": 3, "O": -2}, family="garnet")
    f, st = rng.choice(GARNET_FIXED)
    return Rec(f, S(st), family="garnet")


def hydrate_rec(entry, sep):
    f, st = entry
    return Rec(f.replace("{s}", sep), S(st), family="hydrate")


MIXED_HYDRATES = [("Ni", "Co", "SO4{s}6H2O", "S:6"), ("Co", "Zn", "SO4{s}7H2O", "S:6"),
                  ("Fe", "Mg", "SO4{s}7H2O", "S:6"), ("Cu", "Zn", "SO4{s}5H2O", "S:6"),
                  ("Ni", "Mg", "SO4{s}6H2O", "S:6"), ("Co", "Ni", "Cl2{s}6H2O", "Cl:-1")]


def fam_hydrate(rng):
    sep = "·" if rng.random() < 0.7 else "*"
    if rng.random() < 0.45:   # mixed-cation solid solution hydrates
        a, b, rest, anion = rng.choice(MIXED_HYDRATES)
        x = rng.randint(3, 97)
        f = "%s%s%s%s%s" % (a, amt(100 - x), b, amt(x), rest.replace("{s}", sep))
        st = {a: 2, b: 2}
        st.update(S(anion + " O:-2 H:1"))
        return Rec(f, st, family="hydrate")
    return hydrate_rec(rng.choice(HYDRATES), sep)


def fam_sulfphos(rng):
    if rng.random() < 0.7:
        a, b = rng.choice([("Fe", "Mn"), ("Fe", "Co"), ("Mn", "Fe"), ("Fe", "Ni")])
        x = rng.randint(5, 95)
        f = "Li%s%s%s%sPO4" % (a, amt(100 - x), b, amt(x))
        return Rec(f, {"Li": 1, a: 2, b: 2, "P": 5, "O": -2}, family="sulfphos")
    f, st = rng.choice(SULFPHOS_FIXED)
    return Rec(f, S(st), family="sulfphos")


def fam_nested(rng):
    f, st, needs, opts = rng.choice(NESTED)
    if st is None:
        return Rec(f, family="nested")
    rec = Rec(f, S(st), needs=needs, setopts=opts, family="nested")
    return rec


def fam_rare(rng):
    kind = rng.randrange(4) if rng.random() > 0.35 else 9
    if kind == 3:   # mixed rare-earth orthoferrite
        a, b = rng.sample(["La", "Gd", "Dy", "Nd", "Er", "Y", "Tb", "Ho"], 2)
        x = rng.randint(5, 95)
        f = "%s%s%s%sFeO3" % (a, amt(100 - x), b, amt(x))
        return Rec(f, {a: 3, b: 3, "Fe": 3, "O": -2}, family="rare_earth")
    if kind <= 1:   # doped ceria / zirconia, oxygen content charge-balanced
        host, dop = rng.choice([("Ce", "Gd"), ("Ce", "Sm"), ("Ce", "Y"),
                                ("Zr", "Y"), ("Ce", "Nd")])
        x = 2 * rng.randint(3, 20)
        f = "%s%s%s%sO%s" % (host, amt(100 - x), dop, amt(x), amt(200 - x // 2))
        return Rec(f, {host: 4, dop: 3, "O": -2}, family="rare_earth")
    if kind == 2:   # mixed sesquioxide
        a, b = rng.choice([("Gd", "Y"), ("Dy", "Y"), ("Er", "Y"), ("Gd", "La")])
        x = rng.randint(5, 195)
        f = "%s%s%s%sO3" % (a, amt(x), b, amt(200 - x))
        return Rec(f, {a: 3, b: 3, "O": -2}, family="rare_earth")
    f, st = rng.choice(RARE_FIXED)
    if st is None:
        return Rec(f, family="rare_earth")
    return Rec(f, S(st), family="rare_earth")


def fam_heo(rng):
    kind = rng.randrange(1, 10) if rng.random() > 0.04 else 0
    if kind == 0:
        return Rec("(Mg0.2Co0.2Ni0.2Cu0.2Zn0.2)O",
                   {"Mg": 2, "Co": 2, "Ni": 2, "Cu": 2, "Zn": 2, "O": -2}, family="heo")
    if kind <= 5:   # rock salt, 5 (sometimes 6) divalent cations
        k = 6 if rng.random() < 0.15 else 5
        cats = rng.sample(["Mg", "Co", "Ni", "Cu", "Zn", "Fe", "Mn"], k)
        fr = [100 // k] * k if rng.random() < 0.25 else split_hundredths(rng, k, minimum=8)
        fr[-1] = 100 - sum(fr[:-1])
        f = "(" + "".join(c + amt(v) for c, v in zip(cats, fr)) + ")O"
        st = {c: 2 for c in cats}
        st["O"] = -2
        return Rec(f, st, family="heo")
    if kind <= 7:   # fluorite, Ce4+ with four trivalent cations
        others = rng.sample(["La", "Pr", "Sm", "Y", "Gd", "Nd"], 4)
        fr = split_hundredths(rng, 5, minimum=10)
        if fr[0] % 2:
            fr[0] += 1
            fr[1] -= 1
        ox = 150 + fr[0] // 2
        f = "(Ce%s" % amt(fr[0]) + "".join(c + amt(v) for c, v in zip(others, fr[1:]))
        f += ")O%s" % amt(ox)
        st = {"Ce": 4}
        st.update({c: 3 for c in others})
        st["O"] = -2
        return Rec(f, st, family="heo")
    if kind == 8:   # spinel HEO, mixed valence
        cats = sorted(rng.sample(["Co", "Cr", "Fe", "Mn", "Ni", "Cu", "Zn", "Mg"], 5))
        f = "(" + "".join(c + "0.2" for c in cats) + ")3O4"
        return Rec(f, family="heo")
    cats = sorted(rng.sample(["Co", "Cr", "Fe", "Mn", "Ni", "Al"], 5))
    fr = split_hundredths(rng, 5, minimum=10)
    f = "La(" + "".join(c + amt(v) for c, v in zip(cats, fr)) + ")O3"
    st = {"La": 3}
    st.update({c: 3 for c in cats})
    st["O"] = -2
    return Rec(f, st, moment=False, family="heo")


def fam_alloy(rng):
    kind = rng.randrange(1, 10) if rng.random() > 0.04 else 0
    if kind == 0:
        f = rng.choice(ALLOY_FIXED)
    elif kind <= 2:  # binary
        a, b = rng.choice([("Fe", "Ni"), ("Fe", "Co"), ("Ni", "Cu"), ("Co", "Cr"),
                           ("Fe", "Cr"), ("Ti", "Al"), ("Ni", "Cr"), ("Fe", "Mn")])
        x = rng.randint(5, 95)
        f = "%s%s%s%s" % (a, amt(100 - x), b, amt(x))
    elif kind <= 3:  # equimolar 3-6 element, alphabetical
        k = rng.randint(3, 6)
        f = "".join(sorted(rng.sample(ALLOY_METALS, k)))
    elif kind <= 5:  # Alx-type series
        base = sorted(rng.sample([m for m in ALLOY_METALS if m != "Al"], rng.randint(3, 5)))
        f = "Al%s" % amt(rng.randint(1, 20) * 10 if rng.random() < 0.5 else rng.randint(5, 200))
        f += "".join(base)
    else:            # fractional 3-6 element
        k = rng.randint(3, 6)
        els = rng.sample(ALLOY_METALS, k)
        if rng.random() < 0.5:
            els.sort()
        fr = split_hundredths(rng, k, minimum=5)
        f = "".join(e + amt(v) for e, v in zip(els, fr))
    rec = Rec(f, family="alloy")
    rec.states = {e: 0 for e in rec.counts}
    rec.moment = False
    return rec


def fam_element(rng):
    f = rng.choice(ELEMENT_FORMS)
    rec = Rec(f, family="element")
    rec.states = {e: 0 for e in rec.counts}
    rec.moment = False
    return rec


def fam_ion(rng):
    f, q, st, needs, opts = rng.choice(IONS)
    return Rec(f, S(st), charge=q, needs=needs, setopts=opts, family="ion")


FAMILIES = [
    (fam_simple, 12), (fam_nonstoich, 3), (fam_perovskite, 16),
    (fam_layered, 10), (fam_spinel, 8), (fam_garnet, 4), (fam_hydrate, 5),
    (fam_sulfphos, 5), (fam_nested, 2.5), (fam_rare, 7), (fam_heo, 7),
    (fam_alloy, 15), (fam_element, 1), (fam_ion, 1),
]


def random_rec(rng):
    fams, weights = zip(*FAMILIES)
    return rng.choices(fams, weights)[0](rng)


# ------------------------------------------------------------- notes

def make_notes(rng, rec):
    r = rng.random()
    if r < 0.22:
        return ""
    t = rng.choice([900, 950, 1000, 1050, 1100, 1150, 1200, 1250, 1300, 1350, 1400])
    deg = "°C" if rng.random() < 0.15 else "C"
    process = {
        "alloy": ["arc-melted, flipped %dx" % rng.randint(3, 6),
                  "induction melted", "homogenised %d %s, %d h" % (t, deg, rng.randint(6, 72)),
                  "cold rolled %d%%" % rng.randint(20, 80), "ball-milled %d h" % rng.randint(2, 40)],
        "hydrate": ["recrystallised from water", "as received", "stored in desiccator",
                    "hygroscopic, weighed in glovebox", "grown by slow evaporation"],
        "ion": ["reference solution %d mM" % rng.choice([1, 5, 10, 50]),
                "counter-ion not recorded", "from titration stock"],
        "nested": ["precipitated from solution", "recrystallised from water",
                   "dried at %d %s" % (rng.choice([60, 80, 110]), deg), "as received",
                   "washed with ethanol, dried in air", "grown by slow evaporation"],
        "element": ["as received", "reference sample", "offcut from target stock",
                    "stored under argon", "calibration standard"],
    }.get(rec.family, [
        "sintered %d %s" % (t, deg), "annealed %d %s in air" % (t - 300, deg),
        "calcined %d %s, %d h" % (t - 400, deg, rng.randint(2, 24)),
        "sol-gel route", "solid-state route", "hydrothermal %d %s" % (rng.choice([160, 180, 200, 220]), deg),
        "quenched from %d %s" % (t, deg), "thin film on substrate S%d" % rng.randint(1, 40),
        "single crystal, floating zone", "pellet pressed at %d MPa" % rng.choice([100, 200, 300]),
        "annealed in O2 flow", "reduced in 5% H2/Ar",
    ])
    extra = [
        "batch %d" % rng.randint(1, 60), "furnace F%d" % rng.randint(1, 6),
        "XRD: single phase", "XRD: minor secondary phase", "VSM run %d" % rng.randint(1, 400),
        "SQUID run %d" % rng.randint(1, 250), "re-measured after drift",
        "see lab book %d p. %d" % (rng.randint(1, 19), rng.randint(1, 200)),
        'labelled "%s%d" on vial' % (rng.choice("ABCDEFGH"), rng.randint(1, 99)),
        "powder, %s" % rng.choice(["black", "brown", "grey", "green", "white", "blue", "red-brown"]),
        "operator %d" % rng.randint(1, 9), "shared with crystallography bench",
    ]
    if rec.measured:
        extra.append("moment at %d K" % rng.choice([300, 300, 300, 200, 250, 350]))
    pieces = [rng.choice(process)] + rng.sample(extra, rng.choice([0, 1, 1, 2]))
    return (", " if rng.random() < 0.8 else "; ").join(pieces)


# ------------------------------------------------------------- fields

def fmt_states(d, order):
    return ",".join("%s:%d" % (e, d[e]) for e in order if e in d) + \
        "".join(",%s:%d" % (e, v) for e, v in d.items() if e not in order)


def fmt_map(d, order):
    return ",".join("%s:%s" % (e, d[e]) for e in order if e in d)


TOLERANCES = ["0.5", "0.5", "0.5", "0.5", "0.3", "1.0", "0.2", "0.8", "", "", ""]


def set_moment(rng, rec, est):
    tol = rng.choice(TOLERANCES)
    if est < 0.05:
        m = rng.randint(0, 5) / 100.0
        rec.measured, rec.tolerance = "%.2f" % m, tol
        return
    limit = 0.8 * float(tol) if tol else 0.25
    dev = est * rng.uniform(-0.03, 0.07)
    dev = max(-limit, min(limit, dev))
    m = est + dev
    if tol and float(tol) >= 0.5 and rng.random() < 0.5:
        rec.measured = "%.1f" % m
    else:
        rec.measured = "%.2f" % m
    rec.tolerance = tol


# ------------------------------------------------------------- defects

INVENTED_SYMBOLS = ["Xx", "Qa", "Jn", "Zq", "Ey", "Aa", "Bz", "Tx", "Mx", "Wo"]
ILLEGAL = list("!?#%&$@=~^;/")


def element_spans(f):
    spans, i = [], 0
    while i < len(f):
        if f[i].isupper():
            j = i + 1
            if j < len(f) and f[j].islower():
                j += 1
            spans.append((i, j))
            i = j
        else:
            i += 1
    return spans


def typo(rng, f):
    for _ in range(100):
        spans = element_spans(f)
        i, j = rng.choice(spans)
        sym = f[i:j]
        op = rng.randrange(4)
        if op == 0:
            new = sym[0].lower() + sym[1:]
        elif op == 1 and len(sym) == 2:
            new = sym.upper()
        elif op == 2:
            new = rng.choice(INVENTED_SYMBOLS)
        elif op == 3 and len(sym) == 2:
            new = sym[1] + sym[0]
        else:
            continue
        g = f[:i] + new + f[j:]
        try:
            parse_formula(g)
        except FormulaError as e:
            if e.kind == "unknown_element":
                return g
    raise AssertionError("no typo for " + f)


def break_brackets(rng, f):
    for _ in range(100):
        op = rng.randrange(5)
        if op == 0:
            g = f + ")"
        elif op == 1:
            g = "(" + f
        elif op == 2 and (")" in f or "]" in f):
            k = max(f.rfind(")"), f.rfind("]"))
            g = f[:k] + f[k + 1:]
        elif op == 3 and ("(" in f or "[" in f):
            k = min(x for x in (f.find("("), f.find("[")) if x >= 0)
            g = f[:k] + f[k + 1:]
        elif op == 4 and ")" in f:
            k = f.rfind(")")
            g = f[:k] + "]" + f[k + 1:]
        else:
            continue
        try:
            parse_formula(g)
        except FormulaError as e:
            if e.kind == "brackets":
                return g
    raise AssertionError("no bracket defect for " + f)


def add_illegal(rng, f):
    for _ in range(100):
        c = rng.choice(ILLEGAL)
        if rng.random() < 0.6:
            g = f + c
        else:
            k = rng.randint(1, len(f) - 1)
            g = f[:k] + c + f[k:]
        try:
            parse_formula(g)
        except FormulaError as e:
            if e.kind == "illegal_char":
                return g
    raise AssertionError("no illegal-character defect for " + f)


ZERO_CANDIDATES = ["NiO", "CoO", "MnO", "CuO", "ZnO", "MgO", "FeO", "CaO"]


def wrong_states(rng, rec, absent):
    st = dict(rec.states)
    if absent:
        extra = rng.choice([e for e in ["Fe", "Co", "Ni", "Mn", "Cr", "Cu", "Ti"]
                            if e not in rec.counts])
        st[extra] = rng.choice([2, 3])
        return st
    candidates = [e for e in st if e not in ("O", "H")] or list(st)
    el = rng.choice(candidates)
    st[el] += rng.choice([-1, 1, 1, -2])
    if st[el] == 0:
        st[el] = rec.states[el] + 1
    bal = sum(rec.counts[e] * s for e, s in st.items())
    assert abs(bal - (rec.charge or 0)) > 1e-6
    return st


MALFORMED_KINDS = ["geometry_value", "spin_value", "declared_syntax",
                   "moment_text", "negative_tolerance", "charge_text"]


def main():
    summary = "--summary" in sys.argv[1:]
    manifest = "--manifest" in sys.argv[1:]
    rng = random.Random(SEED)

    cats = []
    for name, n in DEFECT_COUNTS.items():
        cats += [name] * n
    cats += [None] * (N_WRITER_ROWS - len(cats))
    rng.shuffle(cats)

    forced = {
        "unknown_element": ["Fe2o3", "NaCL", "Xx2O3"],
        "unbalanced_brackets": ["Fe2O3)", "Ca3(PO4", "K3[Fe(CN)6"],
        "hydrate_period": ["CuSO4.5H2O"],
        "illegal_characters": ["Fe2O3!"],
    }
    forced_base = {"unknown_element": ["Fe2O3", "NaCl", "Fe2O3"],
                   "unbalanced_brackets": ["Fe2O3", "Ca3(PO4)2", "K3[Fe(CN)6]"],
                   "hydrate_period": ["CuSO4·5H2O"], "illegal_characters": ["Fe2O3"]}
    seen = {k: 0 for k in DEFECT_COUNTS}

    def lookup(formula):
        for fam, name in ((SIMPLE, "simple"), (SULFPHOS_FIXED, "sulfphos"),
                          (RARE_FIXED, "rare_earth"), (GARNET_FIXED, "garnet")):
            for f, st in fam:
                if f == formula and st:
                    return Rec(f, S(st), family=name)
        for f, st, needs, opts in NESTED:
            if f == formula:
                return Rec(f, S(st), needs=needs, setopts=opts, family="nested")
        for h in HYDRATES:
            if h[0].replace("{s}", "·") == formula:
                return hydrate_rec(h, "·")
        raise KeyError(formula)

    # Pass 1: base records.
    recs = []
    for cat in cats:
        k = seen.get(cat, 0)
        if cat in forced_base and k < len(forced_base[cat]):
            rec = lookup(forced_base[cat][k])
        elif cat == "hydrate_period":
            rec = hydrate_rec(rng.choice(HYDRATE_INT), "·")
        elif cat == "unbalanced_brackets" and rng.random() < 0.5:
            rec = rng.choice([fam_nested, fam_heo, fam_sulfphos])(rng)
            while "(" not in rec.formula and "[" not in rec.formula:
                rec = fam_nested(rng)
        elif cat == "wrong_declared_states" and k == 0:
            rec = lookup("Fe2O3")
        elif cat == "wrong_declared_states":
            rec = random_rec(rng)
            while rec.states is None or rec.partial or rec.family in ("alloy", "element"):
                rec = random_rec(rng)
        elif cat == "implausible_moment" and k == 0:
            rec = lookup("NiO")
        elif cat == "implausible_moment":
            rec = random_rec(rng)
            while estimate(rec) is None:
                rec = random_rec(rng)
        elif cat == "zero_count":
            rec = lookup(ZERO_CANDIDATES[k % len(ZERO_CANDIDATES)])
        else:
            rec = random_rec(rng)
        if cat is not None:
            seen[cat] = k + 1
        rec.cat = cat
        recs.append(rec)

    # Make sure the textbook examples exist as clean rows (spread out).
    showcase = ["Gd2O3", "Fe2O3", "MnO", "NiO", "CuSO4·5H2O", "Y3Fe5O12",
                "FeSO4·7H2O", "Fe2O3", "MnO", "Gd2O3"]
    clean_idx = [i for i, r in enumerate(recs) if r.cat is None]
    step = len(clean_idx) // len(showcase)
    for n, f in enumerate(showcase):
        recs[clean_idx[n * step + step // 2]] = lookup(f)
        recs[clean_idx[n * step + step // 2]].cat = None

    # Rows whose optional fields are generated normally (clean rows and rows
    # whose only defect is in the formula text).
    formula_only = {None, "unknown_element", "zero_count", "unbalanced_brackets",
                    "hydrate_period", "illegal_characters"}
    normal = [i for i, r in enumerate(recs) if r.cat in formula_only]

    # Pass 2a: geometry / spin settings (~5%).
    # Complexes whose estimate depends on the ligand field (low-spin d6,
    # square-planar d8, ...) get settings most of the time; the rest of the
    # quota goes to ordinary high-spin compounds.
    needy = [i for i in normal if recs[i].setopts and recs[i].needs and rng.random() < 0.7]
    cand = [i for i in normal if recs[i].setopts and not recs[i].needs]
    for i in needy + rng.sample(cand, TARGET_SETTINGS - len(needy)):
        g, s = rng.choice(recs[i].setopts)
        recs[i].geometry, recs[i].spin = dict(g), dict(s)

    # Pass 2b: declared states (~15% including the wrong ones).
    n_wrong = DEFECT_COUNTS["wrong_declared_states"]
    cand = [i for i in normal if recs[i].states is not None and
            (recs[i].family not in ("alloy", "element") or rng.random() < 0.25)]
    for i in rng.sample(cand, TARGET_DECLARED - n_wrong):
        r = recs[i]
        r.declared = fmt_states(r.states, r.element_order())

    # Pass 2c: measured moments (~20% including the implausible ones).
    n_bad = DEFECT_COUNTS["implausible_moment"]
    first = [i for i in normal if recs[i].cat is None and recs[i].formula in showcase
             and estimate(recs[i]) is not None]
    cand = [i for i in normal if estimate(recs[i]) is not None and i not in first]
    for i in first + rng.sample(cand, TARGET_MOMENTS - n_bad - len(first)):
        set_moment(rng, recs[i], estimate(recs[i]))
    # The validator does not yet read S2 in FeS2 as one disulfide unit (it
    # counts two S- radicals), so a clean FeS2 row carries no moment (no
    # draw: the other rows stay as they were).
    for r in recs:
        if r.formula == "FeS2" and r.cat is None:
            r.measured, r.tolerance = "", ""

    # Pass 3: defects.
    mal_k = 0
    wrong_k = 0
    imp_k = 0
    unb = list(UNBALANCEABLE)
    rng.shuffle(unb)
    unb = ["NaF2", "KF3", "LiF2"] + [u for u in unb if u not in ("NaF2", "KF3", "LiF2")]
    unb_k = 0
    seen = {k: 0 for k in DEFECT_COUNTS}
    for r in recs:
        cat = r.cat
        if cat is None:
            continue
        k = seen[cat]
        seen[cat] += 1
        if cat in forced and k < len(forced[cat]):
            r.formula = forced[cat][k]
        elif cat == "unknown_element":
            r.formula = typo(rng, r.formula)
        elif cat == "zero_count":
            r.formula = r.formula[:-1] + "0"
        elif cat == "unbalanced_brackets":
            r.formula = break_brackets(rng, r.formula)
        elif cat == "hydrate_period":
            r.formula = r.formula.replace("·", ".")
        elif cat == "illegal_characters":
            r.formula = add_illegal(rng, r.formula)
        elif cat == "unbalanceable_charge":
            f = unb[unb_k % len(unb)]
            unb_k += 1
            r.formula, r.charge, r.declared = f, None, None
            r.geometry, r.spin, r.measured, r.tolerance = {}, {}, "", ""
            r.family = "simple"
        elif cat == "empty_formula":
            r.formula, r.charge, r.declared = "", None, None
            r.geometry, r.spin = {}, {}
            if k % 3 == 0:
                r.measured, r.tolerance = "%.2f" % rng.uniform(1, 8), "0.5"
        elif cat == "wrong_declared_states":
            if wrong_k == 0:
                st = {"Fe": 2, "O": -2}
            else:
                st = wrong_states(rng, r, absent=(wrong_k % 5 == 4))
            r.detail = "absent_element" if wrong_k % 5 == 4 else "wrong_state"
            wrong_k += 1
            r.declared = fmt_states(st, r.element_order())
        elif cat == "implausible_moment":
            est = estimate(r)
            if imp_k == 0:
                r.measured, r.tolerance = "25.0", "0.5"
            else:
                m = est + rng.uniform(8, 20) if est > 0.05 else rng.uniform(4, 12)
                r.measured = "%.1f" % m if rng.random() < 0.5 else "%.2f" % m
                r.tolerance = rng.choice(TOLERANCES)
            imp_k += 1
        elif cat == "malformed_optional_field":
            kind = MALFORMED_KINDS[mal_k % len(MALFORMED_KINDS)]
            mal_k += 1
            r.detail = kind
            tm = [e for e in r.counts if e in THREE_D] or [r.element_order()[0]]
            e = tm[0]
            if kind == "geometry_value":
                r.geometry = {e: rng.choice(["octahedron", "Oct", "trigonal", "planar"])}
                r.spin = {}
            elif kind == "spin_value":
                r.geometry = {e: "octahedral"}
                r.spin = {e: rng.choice(["medium", "intermediate", "hs", "HIGH"])}
            elif kind == "declared_syntax":
                el = r.element_order()
                r.declared = rng.choice([
                    ",".join("%s%+d" % (x, 3 if x != "O" else -2) for x in el),
                    ";".join("%s=%d" % (x, 2) for x in el),
                    "%s:III" % el[0],
                    " ".join("%s:%d" % (x, 1) for x in el)])
            elif kind == "moment_text":
                r.measured = rng.choice(["5.9 uB", "n/a", "~4.8", "2,85", "high"])
                r.tolerance = "0.5"
            elif kind == "negative_tolerance":
                r.measured, r.tolerance = "%.2f" % rng.uniform(1, 6), "-0.5"
            elif kind == "charge_text":
                r.charge = rng.choice(["2-", "+-1", "neutral", "1.5"])
        elif cat == "wrong_column_count":
            pass

    # Sanity checks on the clean rows.
    for r in recs:
        if r.cat is None:
            parse_formula(r.formula)
            est = estimate(r)
            if r.measured:
                assert est is not None
                lim = float(r.tolerance) if r.tolerance else 0.3
                assert abs(float(r.measured) - est) <= lim + 1e-9, (r.formula, r.measured, est)
    for u in UNBALANCEABLE:
        assert not can_balance(parse_formula(u)), u
    assert all(seen[k] == DEFECT_COUNTS[k] for k in DEFECT_COUNTS), seen

    # Write.
    out = sys.stdout
    out.reconfigure(encoding="utf-8", newline="\n")
    w = csv.writer(out, lineterminator="\n")
    mw = None
    if manifest:   # id,category,detail for every defective line, no registry
        mw, w = w, csv.writer(open(os.devnull, "w", encoding="utf-8"), lineterminator="\n")
        mw.writerow(["id", "category", "detail"])
    w.writerow(HEADER)
    number = 0
    wcc_k = 0
    for r in recs:
        number += 1 if rng.random() > 0.03 else rng.randint(2, 4)
        r.notes = make_notes(rng, r)
        charge = "" if r.charge is None else str(r.charge)
        order = r.element_order() if r.formula else []
        geometry = fmt_map(r.geometry, order) if r.geometry else ""
        spin = fmt_map(r.spin, order) if r.spin else ""
        row = ["%s-%06d" % (ID_PREFIX, number), r.formula, charge, r.declared or "",
               geometry, spin, r.measured, r.tolerance, r.notes]
        if r.cat == "wrong_column_count":
            if wcc_k == 0:
                row = row[:8]                       # notes field missing
            else:
                row = row[:8] + ["sintered 1250 C", " batch 31"]  # split note
            r.detail = "%d fields" % len(row)
            wcc_k += 1
        if mw and r.cat:
            mw.writerow([row[0], r.cat, getattr(r, "detail", "")])
        w.writerow(row)
    out.flush()

    # Raw broken tail: not through csv.writer.
    tail = []
    number += 1
    tail.append("%s-%06d,NiO,,,,,2.85,0.5,sintered 1300 C,batch 9" % (ID_PREFIX, number))
    number += 1
    tail.append("%s-%06d,CoO,,,3.9" % (ID_PREFIX, number))
    number += 1
    tail.append('%s-%06d,Fe2O3,,"Fe:3,O:-2",,,8.41,0.5,"annealed 900 C, batch 12'
                % (ID_PREFIX, number))
    if mw:
        for line, detail in zip(tail, ["10 fields", "5 fields", "unterminated quote"]):
            mw.writerow([line.split(",")[0], "raw_broken_tail", detail])
    else:
        out.write("\n".join(tail) + "\n")

    if summary:
        fams = {}
        for r in recs:
            fams[r.family] = fams.get(r.family, 0) + 1
        clean = [r for r in recs if r.cat is None]
        err = sys.stderr
        print("writer rows: %d, raw tail lines: %d" % (len(recs), N_RAW_TAIL), file=err)
        print("defects:", {k: v for k, v in seen.items()}, "raw_broken_tail:", N_RAW_TAIL, file=err)
        print("families:", dict(sorted(fams.items())), file=err)
        print("declared:", sum(1 for r in recs if r.declared),
              "settings:", sum(1 for r in recs if r.geometry or r.spin),
              "moments:", sum(1 for r in recs if r.measured),
              "charged:", sum(1 for r in recs if r.charge is not None), file=err)
        print("distinct formulas among clean rows: %d of %d"
              % (len({r.formula for r in clean}), len(clean)), file=err)


if __name__ == "__main__":
    main()
