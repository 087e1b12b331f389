"""Shellwright in Python: electron configurations, ions, oxidation states
and idealised spin states and moments, in process or from a shellwrightd
server.

    import shellwright
    shellwright.describe("Fe3+")["unpaired_electrons"]     # 5
    report = shellwright.analyze("La0.7Sr0.3MnO3")          # a dict
    for report in shellwright.analyze_many(["Fe2O3", {"formula": "NiO"}]):
        ...
    df = shellwright.annotate(df, formula="formula")        # pandas
    with shellwright.Client("localhost:50051") as client:   # same calls
        client.analyze("LiFePO4")

Every answer is a plain dict with exactly the keys and values of the
CLI's JSON (`shellwright atom --json`, `shellwright compound --json`,
`shellwright check`'s JSON lines). Moments and spin states are idealised
estimates (spin-only or free-ion values for the assigned states), not
measurements. See docs/python.md.
"""

from shellwright._records import analyze, analyze_many, describe
from shellwright.client import Client
from shellwright.frames import annotate

__all__ = ["Client", "analyze", "analyze_many", "annotate", "describe"]
