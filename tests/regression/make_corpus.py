#!/usr/bin/env python3
"""Writes the solver regression corpus (tests/regression/corpus.csv).

Seeded, synthetic records aimed at the oxidation-state search: the
benchmark families with random fractions, reduced oxides of several
multivalent metals, unbalanced and charged formulas, declared states
(some uncommon or contradictory), H/N/Cl mixtures that need the other
electronegativity thresholds, geometry and spin settings, measured
moments, and 0-5 alternatives. Synthetic test input only, no real
samples.

    python3 tests/regression/make_corpus.py > tests/regression/corpus.csv
"""
import random
import sys


def main():
    rng = random.Random(7)
    metals = ["Ti", "V", "Cr", "Mn", "Fe", "Co", "Ni", "Cu", "Nb", "Mo", "W",
              "Ru", "Sn", "Ce", "Pr", "Eu", "Pb", "Bi", "Sb", "Tl"]
    a_site = ["La", "Pr", "Nd", "Sm", "Gd", "Y"]
    dopant = ["Sr", "Ca", "Ba"]
    anions = ["O", "S", "F", "Cl", "N", "Se"]
    out = sys.stdout
    out.write("id,formula,charge,declared_states,geometry,spin_state,"
              "measured_moment,max_alternatives\n")
    for i in range(800):
        kind = i % 8
        charge = declared = geometry = spin = moment = ""
        alternatives = str(rng.randrange(0, 6)) if rng.random() < 0.4 else ""
        if kind == 0:  # Perovskites with A-site doping.
            x = rng.randint(1, 60) / 100
            f = "%s%.2f%s%.2f%sO%s" % (rng.choice(a_site), 1 - x,
                                      rng.choice(dopant), x,
                                      rng.choice(metals[:8]),
                                      rng.choice(["3", "2.9", "2.75", "3.1"]))
        elif kind == 1:  # Reduced or oxidised multi-metal oxides.
            k = rng.randint(2, 8)
            f = "".join(rng.sample(metals, k))
            f += "O%.2f" % (rng.uniform(0.5, 3.0) * k)
        elif kind == 2:  # Binary and ternary salts, some unbalanced.
            m = rng.choice(metals)
            a = rng.choice(anions)
            f = "%s%d%s%d" % (m, rng.randint(1, 4), a, rng.randint(1, 7))
            if rng.random() < 0.3:
                charge = str(rng.choice([-3, -2, -1, 1, 2]))
        elif kind == 3:  # Declared states, right, uncommon or contradictory.
            m = rng.choice(metals[:8])
            f = "%s%dO%d" % (m, rng.randint(1, 3), rng.randint(1, 5))
            declared = "%s:%d" % (m, rng.randint(-1, 7))
            if rng.random() < 0.5:
                declared += ",O:%d" % rng.choice([-2, -1])
        elif kind == 4:  # H/N/Cl mixtures and oxyanions.
            f = rng.choice(["NH4Cl", "NH4NO3", "(NH4)2SO4", "HClO4", "NaClO3",
                            "KH2PO4", "NH2OH", "N2H4", "HNO2", "ClF3",
                            "NCl3", "SOCl2", "POCl3", "(NH4)3PO4"])
            if rng.random() < 0.3:
                f += "·%dH2O" % rng.randint(1, 6)
        elif kind == 5:  # Spinels and layered oxides with settings.
            m = rng.choice(metals[:8])
            y = rng.randint(1, 99) / 100
            f = "%sFe%.2fAl%.2fO4" % (m, 2 - y, y)
            if rng.random() < 0.5:
                geometry = "%s:%s" % (m, rng.choice(
                    ["octahedral", "tetrahedral", "square_planar"]))
            if rng.random() < 0.5:
                spin = "%s:%s" % (m, rng.choice(["high", "low", "auto"]))
        elif kind == 6:  # Alloys and mixed-valence fractions.
            k = rng.randint(2, 5)
            f = "".join("%s%.2f" % (m, rng.randint(5, 60) / 100)
                        for m in rng.sample(metals, k))
            if rng.random() < 0.5:
                f += "O%.2f" % rng.uniform(0.2, 2 * k)
        else:  # Moments to check.
            f = rng.choice(["Fe3O4", "Gd2O3", "MnO", "CoO", "NiO", "CuSO4·5H2O",
                            "K3[Fe(CN)6]", "Co3O4", "LiCoO2", "EuO"])
            moment = "%.2f" % rng.uniform(0, 12)
        out.write("c%04d,%s,%s,\"%s\",\"%s\",\"%s\",%s,%s\n" % (
            i, f, charge, declared, geometry, spin, moment, alternatives))


if __name__ == "__main__":
    main()
