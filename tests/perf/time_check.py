#!/usr/bin/env python3
"""Times `shellwright check` on a mostly-distinct input; figures for
docs/performance.md.

Runs each output configuration REPEAT times and prints the median wall
time, rows per second, CPU seconds per row and the largest peak RSS seen.
The input comes from tests/perf/make_records.py (generated once, kept in
the work directory).

To compare builds in one run (before and after a change), give --bin once
per binary: the runs alternate between them, so that a busy or quiet spell
of the machine falls on both, and the table gets one row per binary and
their ratio.

    python3 tests/perf/time_check.py [--rows 1000000] [--repeat 5]
        [--bin build/clients/shellwright [--bin /tmp/old/shellwright]]
        [--workdir /tmp/shellwright-perf] [--only "JSONL to /dev/null"]
"""
import argparse
import os
import statistics
import subprocess
import sys
import time

HERE = os.path.dirname(os.path.abspath(__file__))


def run(cmd):
    """Runs cmd; returns (wall seconds, CPU seconds, peak RSS in KB)."""
    start = time.monotonic()
    proc = subprocess.Popen(cmd, stdout=subprocess.DEVNULL,
                            stderr=subprocess.DEVNULL)
    _, status, usage = os.wait4(proc.pid, 0)
    wall = time.monotonic() - start
    code = os.waitstatus_to_exitcode(status)
    if code not in (0, 1):  # 1: some rows invalid, which is expected.
        sys.exit("%s exited with %d" % (" ".join(cmd), code))
    return wall, usage.ru_utime + usage.ru_stime, usage.ru_maxrss


def remove_outputs(workdir):
    for name in ("out.csv", "out.jsonl"):
        path = os.path.join(workdir, name)
        if os.path.exists(path):
            os.remove(path)


def main():
    p = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    p.add_argument("--rows", type=int, default=1000000)
    p.add_argument("--repeat", type=int, default=5)
    p.add_argument("--bin", action="append",
                   help="shellwright binary; repeat to compare builds "
                   "(default build/clients/shellwright)")
    p.add_argument("--only", action="append",
                   help="run only this output configuration (repeatable)")
    p.add_argument("--workdir", default="/tmp/shellwright-perf")
    args = p.parse_args()
    os.makedirs(args.workdir, exist_ok=True)
    records = os.path.join(args.workdir, "records-%d.csv" % args.rows)
    if not os.path.exists(records):
        with open(records + ".tmp", "w") as out:
            subprocess.run([sys.executable,
                            os.path.join(HERE, "make_records.py"),
                            str(args.rows)], stdout=out, check=True)
        os.rename(records + ".tmp", records)
    outputs = [
        ("JSONL to /dev/null", ["--out", "/dev/null", "--out-format", "jsonl"]),
        ("CSV to /dev/null", ["--out", "/dev/null", "--out-format", "csv"]),
        ("CSV to a file", ["--out", os.path.join(args.workdir, "out.csv")]),
        ("JSONL to a file", ["--out", os.path.join(args.workdir, "out.jsonl")]),
    ]
    bins = args.bin or ["build/clients/shellwright"]
    if args.only:
        outputs = [o for o in outputs if o[0] in args.only]
    many = len(bins) > 1
    print("| output |%s median wall, %d rows | rows/s | CPU µs/row | "
          "peak RSS |%s" % (" binary |" if many else "", args.rows,
                            " ratio |" if many else ""))
    print("| --- |%s ---: | ---: | ---: | ---: |%s" % (
        " --- |" if many else "", " ---: |" if many else ""))
    for name, extra in outputs:
        walls = {b: [] for b in bins}
        cpus = {b: [] for b in bins}
        peak = {b: 0 for b in bins}
        for _ in range(args.repeat):
            for b in bins:
                # A fresh file each time: truncating the last run's output
                # would charge freeing its pages to this run.
                remove_outputs(args.workdir)
                wall, cpu, rss = run([b, "check", records, "--no-progress"]
                                     + extra)
                walls[b].append(wall)
                cpus[b].append(cpu)
                peak[b] = max(peak[b], rss)
        first = statistics.median(walls[bins[0]])
        for b in bins:
            wall = statistics.median(walls[b])
            print("| %s |%s %.2f s | %.0fk | %.2f | %.0f MB |%s" % (
                name, " %s |" % b if many else "", wall,
                args.rows / wall / 1000,
                statistics.median(cpus[b]) / args.rows * 1e6, peak[b] / 1024,
                " %.2f |" % (first / wall) if many else ""))
        sys.stdout.flush()
    remove_outputs(args.workdir)

if __name__ == "__main__":
    main()
