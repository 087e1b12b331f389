#!/usr/bin/python3
"""Times the Python package on the mostly-distinct input of `check`
(tests/perf/make_records.py): figures for docs/performance.md.

Each measurement runs REPEAT times, each in a fresh interpreter (so that
peak memory is its own), alternating with `shellwright check` on the same
rows (JSONL to /dev/null) as a reference for how busy the machine is; it
prints medians and the ratio to check.

  - analyze_many: the rows as dicts {id, formula, measured_moment}, every
    report consumed; records/s.
  - annotate: a DataFrame of the rows (read with pandas, not timed);
    rows/s and peak RSS (whole process, and above the loaded frame).
  - dask: shellwright.dask.annotate on a 2-worker distributed.LocalCluster
    (loopback; cluster start not timed) beside shellwright.annotate in one
    process, on DASK_ROWS rows in 8 partitions, results gathered.

Run with Debian's interpreter and the package on PYTHONPATH:

    PYTHONPATH=build/python /usr/bin/python3 tests/perf/time_python.py \\
        [--rows 1000000] [--dask-rows 500000] [--repeat 3] \\
        [--bin build/clients/shellwright] [--workdir /tmp/shellwright-perf]
"""
import argparse
import json
import os
import resource
import statistics
import subprocess
import sys
import time

HERE = os.path.dirname(os.path.abspath(__file__))


def peak_rss_mb():
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024


def child(kind, path, rows):
    """One measurement in this (fresh) interpreter; prints JSON."""
    import pandas as pd

    import shellwright
    df = pd.read_csv(path, nrows=rows, keep_default_na=False,
                     na_values={"measured_moment": [""]})
    out = {"rows": len(df)}
    if kind == "analyze_many":
        records = df.to_dict("records")
        start = time.perf_counter()
        n = 0
        for _ in shellwright.analyze_many(records):
            n += 1
        out["seconds"] = time.perf_counter() - start
        assert n == len(df)
    elif kind == "annotate":
        before = peak_rss_mb()
        start = time.perf_counter()
        result = shellwright.annotate(df, id="id",
                                      measured_moment="measured_moment")
        out["seconds"] = time.perf_counter() - start
        assert len(result) == len(df)
        out["peak_mb"] = peak_rss_mb()
        out["above_frame_mb"] = out["peak_mb"] - before
    elif kind == "dask":
        import dask.dataframe as dd
        import distributed

        import shellwright.dask
        start = time.perf_counter()
        single = shellwright.annotate(df, id="id",
                                      measured_moment="measured_moment")
        out["single_seconds"] = time.perf_counter() - start
        with distributed.LocalCluster(
                n_workers=2, threads_per_worker=1, processes=True,
                host="127.0.0.1", dashboard_address=None,
                silence_logs=50) as cluster, distributed.Client(cluster):
            ddf = dd.from_pandas(df, npartitions=8)
            start = time.perf_counter()
            result = shellwright.dask.annotate(
                ddf, id="id", measured_moment="measured_moment").compute()
            out["seconds"] = time.perf_counter() - start
        assert len(result) == len(single)
    print(json.dumps(out))


def measure(kind, path, rows):
    out = subprocess.run([sys.executable, __file__, "--child", kind,
                          "--input", path, "--rows", str(rows)],
                         capture_output=True, text=True, check=True)
    return json.loads(out.stdout.strip().splitlines()[-1])


def time_check(binary, path, rows):
    with open(path, "rb") as f:
        head = b"".join(f.readline() for _ in range(rows + 1))
    start = time.perf_counter()
    done = subprocess.run([binary, "check", "-", "--format", "csv",
                           "--out-format", "jsonl", "--out", "/dev/null",
                           "--no-progress"], input=head, capture_output=True)
    if done.returncode not in (0, 1):  # 1: some records invalid.
        raise RuntimeError(done.stderr.decode())
    return rows / (time.perf_counter() - start)


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("--rows", type=int, default=1_000_000)
    parser.add_argument("--dask-rows", type=int, default=500_000)
    parser.add_argument("--repeat", type=int, default=3)
    parser.add_argument("--bin", default="build/clients/shellwright")
    parser.add_argument("--workdir", default="/tmp/shellwright-perf")
    parser.add_argument("--only", action="append")
    parser.add_argument("--child")
    parser.add_argument("--input")
    args = parser.parse_args()
    if args.child:
        child(args.child, args.input, args.rows)
        return
    os.makedirs(args.workdir, exist_ok=True)
    path = os.path.join(args.workdir, f"records-{args.rows}.csv")
    if not os.path.exists(path):
        with open(path, "w") as f:
            subprocess.run([sys.executable,
                            os.path.join(HERE, "make_records.py"),
                            str(args.rows)], stdout=f, check=True)
    for kind, rows in (("analyze_many", args.rows), ("annotate", args.rows),
                       ("dask", args.dask_rows)):
        if args.only and kind not in args.only:
            continue
        runs, checks = [], []
        for _ in range(args.repeat):
            runs.append(measure(kind, path, rows))
            checks.append(time_check(args.bin, path, rows))
        rate = statistics.median(rows / r["seconds"] for r in runs)
        check = statistics.median(checks)
        line = (f"{kind}: {rows} rows, median {rate:,.0f} rows/s; check "
                f"{check:,.0f} rows/s in the same run (ratio "
                f"{rate / check:.2f})")
        if kind == "annotate":
            line += (f"; peak RSS {max(r['peak_mb'] for r in runs):,.0f} MB"
                     f" ({max(r['above_frame_mb'] for r in runs):,.0f} MB "
                     f"above the loaded frame)")
        if kind == "dask":
            single = statistics.median(rows / r["single_seconds"]
                                       for r in runs)
            line += (f"; single process {single:,.0f} rows/s (dask / "
                     f"single {rate / single:.2f})")
        print(line, flush=True)


if __name__ == "__main__":
    main()
