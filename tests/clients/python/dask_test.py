#!/usr/bin/python3
"""shellwright.dask.annotate on a real distributed.LocalCluster (2 worker
processes, loopback only): a 200k-row frame in 8 partitions gives, row for
row, the frame that shellwright.annotate gives in one process.

Run by ctest with PYTHONPATH at the package built in the build tree (the
worker processes inherit it). Takes about a minute on 2 busy cores.
"""

import random
import unittest

import dask.dataframe as dd
import distributed
import pandas as pd

import shellwright
import shellwright.dask

ROWS = 200_000


def make_frame(rows):
    """Mostly distinct formulas (as tests/perf/make_records.py makes them),
    a few malformed cells, and moments; deterministic."""
    rng = random.Random(15)
    formulas, moments = [], []
    for i in range(rows):
        x = rng.randint(1, 60) / 100
        kind = i % 5
        if kind == 0:
            f = f"La{1 - x:.2f}Sr{x:.2f}{rng.choice(['Mn', 'Co', 'Fe'])}O3"
        elif kind == 1:
            f = f"LiNi{x:.2f}Co{(1 - x) / 2:.2f}Mn{(1 - x) / 2:.2f}O2"
        elif kind == 2:
            f = f"{rng.choice(['Ni', 'Zn', 'Mg'])}Fe{2 - x:.2f}Al{x:.2f}O4"
        elif kind == 3:
            f = rng.choice(["CuSO4·5H2O", "Xx2O3", "", None, "Fe2O"])
        else:
            f = f"Al{x:.2f}Co{1 - x:.2f}CrFeNi"
        formulas.append(f)
        moments.append(rng.choice([float("nan"), 4.9, 5.9]))
    return pd.DataFrame({"id": [f"r{i}" for i in range(rows)],
                         "formula": formulas, "measured_moment": moments})


class DaskTest(unittest.TestCase):

    def test_local_cluster_equals_single_process(self):
        df = make_frame(ROWS)
        single = shellwright.annotate(df, id="id",
                                      measured_moment="measured_moment")
        with distributed.LocalCluster(
                n_workers=2, threads_per_worker=1, processes=True,
                host="127.0.0.1", dashboard_address=None,
                silence_logs=50) as cluster, \
                distributed.Client(cluster) as client:
            self.assertEqual(len(client.scheduler_info()["workers"]), 2)
            ddf = dd.from_pandas(df, npartitions=8)
            lazy = shellwright.dask.annotate(
                ddf, id="id", measured_moment="measured_moment")
            self.assertEqual(list(lazy.columns), list(single.columns))
            result = lazy.compute()
        self.assertEqual(len(result), ROWS)
        self.assertEqual(list(result.index), list(single.index))
        self.assertEqual(result["row"].tolist(), list(range(1, ROWS + 1)))
        pd.testing.assert_frame_equal(result, single)
        self.assertGreater((~single["valid"]).sum(), 0)


if __name__ == "__main__":
    unittest.main()
