#!/usr/bin/env python3
"""Times `shellwright check` on a mostly-distinct input; figures for
docs/performance.md.

Runs each output configuration REPEAT times and prints the median wall
time, rows per second, CPU seconds per row and the largest peak RSS seen.
The input comes from tests/perf/make_records.py (generated once, kept in
the work directory).

    python3 tests/perf/time_check.py [--rows 1000000] [--repeat 5]
        [--bin build/clients/shellwright] [--workdir /tmp/shellwright-perf]
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
    p.add_argument("--bin", default="build/clients/shellwright")
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
    print("| output | median wall, %d rows | rows/s | CPU µs/row | peak RSS |"
          % args.rows)
    print("| --- | ---: | ---: | ---: | ---: |")
    for name, extra in outputs:
        walls, cpus, peak = [], [], 0
        for _ in range(args.repeat):
            # A fresh file each time: truncating the last run's output
            # would charge freeing its pages to this run.
            remove_outputs(args.workdir)
            wall, cpu, rss = run([args.bin, "check", records, "--no-progress"]
                                 + extra)
            walls.append(wall)
            cpus.append(cpu)
            peak = max(peak, rss)
        wall = statistics.median(walls)
        print("| %s | %.2f s | %.0fk | %.2f | %.0f MB |" % (
            name, wall, args.rows / wall / 1000,
            statistics.median(cpus) / args.rows * 1e6, peak / 1024))
        sys.stdout.flush()
    remove_outputs(args.workdir)

if __name__ == "__main__":
    main()
