#!/usr/bin/env python3
"""Times `shellwright check --server` beside `check` in process, side by
side in one run; figures for docs/performance.md.

Starts one shellwrightd per --server-bin (port 0, log level warning), then
runs, REPEAT times in turn so that a busy or quiet spell of the machine
falls on all of them: `check` in process, and `check --server` against
each server, each with full reports and with --fields FIELDS. Prints per
configuration the median wall time, rows/s, the ratio to in process with
the same fields, the client's and the server's CPU µs per row (the
server's from /proc/PID/stat), the client's peak RSS, the output size,
and each server's peak RSS (VmHWM) at the end. Every run's output is
compared with the in-process output of the same fields: they must be the
same bytes.

    python3 tests/perf/time_remote.py [--rows 200000] [--repeat 3]
        [--bin build/clients/shellwright]
        [--server-bin build/server/shellwrightd [--server-bin OLD]]
        [--fields valid,diagnostics,oxidation_states] [--out /dev/null]

The input comes from tests/perf/make_records.py (made once, kept in the
work directory). An old server that does not know report_mask answers in
full; the masked lines are still the same bytes, only more travels.
"""

import argparse
import filecmp
import os
import re
import statistics
import subprocess
import sys

from time_check import run  # (wall s, CPU s, peak RSS KB) of a command.

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(os.path.dirname(HERE))
TICKS = os.sysconf("SC_CLK_TCK")


def cpu_seconds(pid):
    """User + system CPU seconds of process `pid` so far."""
    with open("/proc/%d/stat" % pid) as f:
        fields = f.read().rsplit(")", 1)[1].split()
    return (int(fields[11]) + int(fields[12])) / TICKS


def peak_rss_kb(pid):
    with open("/proc/%d/status" % pid) as f:
        return int(re.search(r"VmHWM:\s+(\d+)", f.read()).group(1))


def start_server(binary):
    proc = subprocess.Popen(
        [binary, "--listen", "127.0.0.1:0", "--log-level", "warning"],
        stdout=subprocess.PIPE, stderr=subprocess.DEVNULL, text=True)
    line = proc.stdout.readline()
    match = re.search(r"listening on (\S+)", line)
    if not match:
        proc.kill()
        sys.exit("%s did not start: %r" % (binary, line))
    return proc, match.group(1)


def main():
    p = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    p.add_argument("--rows", type=int, default=200000)
    p.add_argument("--repeat", type=int, default=3)
    p.add_argument("--bin", default=os.path.join(ROOT, "build/clients/shellwright"))
    p.add_argument("--server-bin", action="append",
                   help="shellwrightd binary; repeat to compare builds "
                   "(default build/server/shellwrightd)")
    p.add_argument("--fields", default="valid,diagnostics,oxidation_states")
    p.add_argument("--out", default=None,
                   help="output file (default: a .jsonl in the work "
                   "directory; /dev/null skips the byte comparison)")
    p.add_argument("--workdir", default="/tmp/shellwright-perf")
    args = p.parse_args()
    servers = args.server_bin or [os.path.join(ROOT, "build/server/shellwrightd")]
    os.makedirs(args.workdir, exist_ok=True)
    records = os.path.join(args.workdir, "records-%d.csv" % args.rows)
    if not os.path.exists(records):
        with open(records, "w") as f:
            subprocess.run([sys.executable, os.path.join(HERE, "make_records.py"),
                            str(args.rows)], stdout=f, check=True)

    started = [start_server(b) for b in servers]
    configs = []  # (name, server index or None, fields or None)
    for fields in (None, args.fields):
        configs.append(("in process", None, fields))
        for i in range(len(servers)):
            configs.append(("server %d" % (i + 1), i, fields))
    results = {c: [] for c in configs}
    reference = {}
    try:
        for _ in range(args.repeat):
            for config in configs:
                name, server, fields = config
                out = args.out or os.path.join(
                    args.workdir, "remote-%s.jsonl" % name.replace(" ", "-"))
                cmd = [args.bin]
                if server is not None:
                    cmd += ["--server", started[server][1]]
                cmd += ["check", records, "--out", out, "--out-format",
                        "jsonl", "--no-progress", "--quiet"]
                if fields:
                    cmd += ["--fields", fields]
                server_pid = started[server][0].pid if server is not None else None
                before = cpu_seconds(server_pid) if server_pid else 0
                wall, cpu, rss = run(cmd)
                server_cpu = cpu_seconds(server_pid) - before if server_pid else 0
                size = os.path.getsize(out) if out != "/dev/null" else 0
                if out != "/dev/null":
                    if server is None:
                        keep = os.path.join(args.workdir, "reference-%s.jsonl"
                                            % ("full" if not fields else "masked"))
                        os.replace(out, keep)
                        reference[fields] = keep
                    else:
                        if not filecmp.cmp(out, reference[fields], shallow=False):
                            sys.exit("%s: output differs from in process" % name)
                        os.remove(out)
                results[config].append((wall, cpu, server_cpu, rss, size))
    finally:
        hwm = []
        for proc, _ in started:
            hwm.append(peak_rss_kb(proc.pid))
            proc.terminate()
            proc.wait()

    print("\n| fields | run | median wall | rows/s | ratio to in process | "
          "client CPU µs/row | server CPU µs/row | client peak RSS | "
          "output |")
    print("|---|---|---:|---:|---:|---:|---:|---:|---:|")
    for config in configs:
        name, server, fields = config
        runs = results[config]
        wall = statistics.median(r[0] for r in runs)
        local = statistics.median(
            r[0] for r in results[("in process", None, fields)])
        print("| %s | %s | %.2f s | %.0fk | %.2f | %.2f | %s | %.0f MB | %.0f MB |"
              % (fields or "all", name, wall, args.rows / wall / 1000,
                 local / wall,
                 statistics.median(r[1] for r in runs) / args.rows * 1e6,
                 "%.2f" % (statistics.median(r[2] for r in runs) / args.rows * 1e6)
                 if server is not None else "",
                 max(r[3] for r in runs) / 1024, runs[0][4] / 1e6))
    for i, b in enumerate(servers):
        print("server %d (%s): peak RSS %.0f MB" % (i + 1, b, hwm[i] / 1024))


if __name__ == "__main__":
    main()
