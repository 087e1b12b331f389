#!/usr/bin/env python3
"""Writes N mostly-distinct composition records as CSV for timing `check`.

Families: perovskites with A-site doping, layered Li oxides, substituted
spinels, hydrates, high-entropy rock-salt oxides and high-entropy alloys,
all with random two-decimal fractions, so nearly every row is a different
composition. Deterministic (fixed seed; a second argument sets another,
as .ci/pgo-train does, so that training and timing inputs differ).
Synthetic benchmark input only.

    python3 tests/perf/make_records.py 1000000 > /tmp/records.csv
    python3 tests/perf/make_records.py 200000 7 > /tmp/training.csv
"""
import random
import sys


def main():
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 1000000
    seed = int(sys.argv[2]) if len(sys.argv) > 2 else 20261202
    rng = random.Random(seed)
    a_site = ["La", "Pr", "Nd", "Sm", "Gd", "Y"]
    dopant = ["Sr", "Ca", "Ba"]
    b_site = ["Mn", "Fe", "Co", "Ni", "Cr", "Ti"]
    tm = ["Mg", "Co", "Ni", "Cu", "Zn", "Fe", "Mn", "Cr"]
    alloy = ["Al", "Co", "Cr", "Fe", "Ni", "Mn", "Cu", "Ti", "V"]
    hydrates = ["CuSO4·5H2O", "FeSO4·7H2O", "CoCl2·6H2O", "NiSO4·6H2O"]
    out = sys.stdout
    out.write("id,formula,measured_moment\n")
    for i in range(n):
        family = rng.randrange(6)
        if family == 0:
            x = rng.randint(1, 60) / 100
            f = "%s%.2f%s%.2f%sO3" % (rng.choice(a_site), 1 - x,
                                      rng.choice(dopant), x, rng.choice(b_site))
        elif family == 1:
            a = rng.randint(30, 90)
            b = (100 - a) // 2
            f = "LiNi%.2fCo%.2fMn%.2fO2" % (a / 100, b / 100, (100 - a - b) / 100)
        elif family == 2:
            y = rng.randint(1, 99) / 100
            f = "%sFe%.2fAl%.2fO4" % (rng.choice(tm), 2 - y, y)
        elif family == 3:
            f = rng.choice(hydrates) if rng.random() < 0.5 else \
                "Li%.2fCoO2" % (rng.randint(1, 99) / 100)
        elif family == 4:
            shares = [rng.randint(10, 19) for _ in range(4)]
            metals = rng.sample(tm[:4] + tm[5:], 4)
            f = "(" + "".join("%s%.2f" % (m, s / 100) for m, s in
                              zip(metals, shares))
            f += "Zn%.2f)O" % ((100 - sum(shares)) / 100)
        else:
            metals = rng.sample(alloy, 5)
            f = "".join("%s%.2f" % (m, rng.randint(5, 40) / 100) for m in metals)
        moment = "%.2f" % rng.uniform(0, 6) if rng.random() < 0.2 else ""
        out.write("r%07d,%s,%s\n" % (i, f, moment))


if __name__ == "__main__":
    main()
