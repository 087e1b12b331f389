#!/usr/bin/env python3
"""Times whole `shellwright` processes (start-up included); figures for
docs/performance.md.

Runs each command REPEAT times per binary, the binaries and commands
interleaved so that a busy or quiet spell of the machine falls on all of
them, and prints per binary and command the median wall time, the median
CPU time (user + system), the median peak RSS, and with two or more
binaries the ratio of each median wall time to the first binary's. Wall
time runs from just before the child is started until it has been reaped
(os.wait4), so it holds the fork and exec of the child but not Python's
own start-up; CPU comes from wait4's rusage, peak RSS from a second run
of the same command under /usr/bin/time (see peak_rss_kb).

    python3 tests/perf/time_startup.py [--repeat 30]
        [--bin build/clients/shellwright [--bin /tmp/old/shellwright]]
        [--cmd "compound SbWFeMoPrPbCoMnVO0.99999" [--cmd=--version]]
        [--no-compare]

Every run's output must match the first binary's, byte for byte (a
faster start must not change an answer), unless --no-compare is given
(to set a trivial program such as /bin/true beside them).
"""
import argparse
import os
import shlex
import statistics
import subprocess
import sys
import tempfile
import time

DEFAULT_COMMANDS = ["--version", "atom Fe3+",
                    "compound SbWFeMoPrPbCoMnVO0.99999"]


def run(argv):
    """Runs argv; returns (wall s, CPU s, stdout bytes)."""
    read, write = os.pipe()
    actions = [(os.POSIX_SPAWN_DUP2, write, 1),
               (os.POSIX_SPAWN_OPEN, 2, os.devnull, os.O_WRONLY, 0),
               (os.POSIX_SPAWN_CLOSE, read), (os.POSIX_SPAWN_CLOSE, write)]
    start = time.perf_counter()
    # posix_spawn (a vfork in glibc) costs far less than a fork of this
    # interpreter, which would be timed with the child.
    pid = os.posix_spawn(argv[0], argv, os.environ, file_actions=actions)
    os.close(write)
    chunks = []
    while True:
        chunk = os.read(read, 65536)
        if not chunk:
            break
        chunks.append(chunk)
    os.close(read)
    _, status, usage = os.wait4(pid, 0)
    wall = time.perf_counter() - start
    code = os.waitstatus_to_exitcode(status)
    if code not in (0, 1):  # 1: an invalid record, a valid answer.
        sys.exit("%s exited with %d" % (shlex.join(argv), code))
    return wall, usage.ru_utime + usage.ru_stime, b"".join(chunks)


def peak_rss_kb(argv, scratch):
    """Peak RSS in KB of argv, run under /usr/bin/time.

    Not from our own wait4: a child forked from this interpreter counts
    the interpreter's pages until its exec, so its ru_maxrss is never
    below Python's; /usr/bin/time is a small process to fork from.
    """
    subprocess.run(["/usr/bin/time", "-f", "%M", "-o", scratch] + argv,
                   stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    with open(scratch) as f:
        return int(f.read().split()[-1])


def main():
    p = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    p.add_argument("--repeat", type=int, default=30)
    p.add_argument("--bin", action="append",
                   help="shellwright binary; repeat to compare builds "
                   "(default build/clients/shellwright)")
    p.add_argument("--cmd", action="append",
                   help="arguments, one string (repeatable; default: %s)" %
                   ", ".join(DEFAULT_COMMANDS))
    p.add_argument("--no-compare", action="store_true",
                   help="do not compare the outputs")
    args = p.parse_args()
    bins = args.bin or ["build/clients/shellwright"]
    commands = args.cmd or DEFAULT_COMMANDS
    scratch_dir = tempfile.TemporaryDirectory()
    scratch = os.path.join(scratch_dir.name, "rss")
    results = {}  # (bin, cmd) -> list of (wall, cpu, rss)
    expected = {}  # cmd -> first binary's output
    for _ in range(args.repeat):
        for cmd in commands:
            for binary in bins:
                argv = [binary] + shlex.split(cmd)
                wall, cpu, out = run(argv)
                rss = peak_rss_kb(argv, scratch)
                if (not args.no_compare and
                        expected.setdefault(cmd, out) != out):
                    sys.exit("%s %s: output differs from %s's" %
                             (binary, cmd, bins[0]))
                results.setdefault((binary, cmd), []).append((wall, cpu, rss))
    many = len(bins) > 1
    print("| command |%s median wall | median CPU | median peak RSS |%s" %
          (" binary |" if many else "", " wall ratio |" if many else ""))
    print("| --- |%s ---: | ---: | ---: |%s" %
          (" --- |" if many else "", " ---: |" if many else ""))
    for cmd in commands:
        base = statistics.median(r[0] for r in results[(bins[0], cmd)])
        for binary in bins:
            runs = results[(binary, cmd)]
            wall = statistics.median(r[0] for r in runs)
            cpu = statistics.median(r[1] for r in runs)
            rss = statistics.median(r[2] for r in runs)
            print("| `%s` |%s %.1f ms | %.1f ms | %.1f MB |%s" %
                  (cmd, " %s |" % binary if many else "", wall * 1e3,
                   cpu * 1e3, rss / 1024.0,
                   " %.2f |" % (wall / base) if many else ""))
    print("(%d runs each, load average %.1f at the end)" %
          (args.repeat, os.getloadavg()[0]))


if __name__ == "__main__":
    main()
