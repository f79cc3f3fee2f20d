"""Where the wall time of `tinctura check --jobs N` goes, in instructions: the main process's
phases and each worker's share (its pages, then its share of the fixes verified), counted
under valgrind's callgrind (the machine's drift does not move them).

    python benchmarks/critical_path.py SITE_DIR [--jobs 2] [--format json]

With N workers the wall time follows one path: the main process until the workers start
(imports, the first page's rule set), then the busiest worker, then the main process again
(problems, waiting while the workers verify the fixes, the reports; a site with fewer pages
than two per worker keeps no workers, and a helper forked then verifies beside the main
process). The path's length in instructions stands in for wall time on a shared machine
whose speed drifts by a third within the hour; the total says what the other cores carry.
The two disagree where cores are short: here the main process takes the workers' pages in
while they run, on the same cores.

How the phases are cut: callgrind writes a process's counts out before each fork
(`--dump-before=*fork*`: a forked worker then counts its own work only) and before each call
of a function no check calls otherwise, `os.getpgrp` (`--dump-before=os_getpgrp*`), which the
child calls at each mark: after the first page, after the last, when the reports start. Each
dump names its trigger; the main process's dumps are summed phase by phase, a mark's closing
one. A 200-page site takes several minutes.
"""
from __future__ import annotations

import argparse
import os
import subprocess
import sys
import tempfile

CHILD = r'''
import functools, os, sys
from tinctura import cli, engine
from tinctura.report import outputs

mark = os.getpgrp  # callgrind dumps the counts before it (the phases' ends)
site_pages = engine._site_pages
def marked_pages(*args, **kwargs):
    for n, item in enumerate(site_pages(*args, **kwargs)):
        yield item
        if n == 0:
            mark()
    mark()
engine._site_pages = marked_pages
write_reports = outputs.write_reports
@functools.wraps(write_reports)
def marked_reports(*args, **kwargs):
    mark()
    return write_reports(*args, **kwargs)
outputs.write_reports = marked_reports
site, jobs, fmt, out = sys.argv[1:5]
sys.argv = ["tinctura", "check", site, "--jobs", jobs, "--fail-on", "never", "--no-config",
            "--format", fmt, "-o", out]
cli.command()
'''

PHASES = ("until the workers start (imports, the first page's rules)", "while the workers check",
          "problems, fixes verified (by the workers)", "reports")


def callgrind_dump(path: str) -> tuple:
    """(instructions, whether a mark triggered it) of one callgrind dump (``rules_cost.py``
    reads its counts here too)."""
    marked, count = False, 0
    with open(path, encoding="utf-8", errors="replace") as fh:
        for line in fh:
            if line.startswith("desc: Trigger:"):
                marked = "os_getpgrp" in line
            elif line.startswith(("summary:", "totals:")):
                count = int(line.split()[1])
                break
    return count, marked


def _dumps(folder: str) -> dict:
    """pid -> its dumps in order (``cg.PID.1``, ``cg.PID.2``, ..., then ``cg.PID``,
    written when the process ended)."""
    out: dict = {}
    for name in os.listdir(folder):
        if not name.startswith("cg."):
            continue  # (the report)
        parts = name.split(".")
        serial = int(parts[2]) if len(parts) > 2 else 1 << 30
        dump = callgrind_dump(os.path.join(folder, name))
        out.setdefault(int(parts[1]), []).append((serial, dump))
    return {pid: [dump for _, dump in sorted(dumps)] for pid, dumps in out.items()}


def measure(site: str, jobs: int, fmt: str) -> tuple:
    """(the main process's instructions per phase, each other process's, largest first)."""
    with tempfile.TemporaryDirectory() as folder:
        run = subprocess.run(
            ["valgrind", "--tool=callgrind", "--dump-before=*fork*",
             "--dump-before=os_getpgrp*", f"--callgrind-out-file={folder}/cg.%p",
             sys.executable, "-c", CHILD, site, str(jobs), fmt,
             os.path.join(folder, "report")],
            capture_output=True, text=True, env={**os.environ, "PYTHONHASHSEED": "0"})
        if run.returncode != 0:
            sys.exit(f"the check failed under callgrind:\n{run.stderr[-2000:]}")
        dumps = _dumps(folder)
    main = min(dumps)  # (the main process started first: the lowest pid, short of wrapping)
    phases, at = [0] * len(PHASES), 0
    for count, marked in dumps[main]:
        phases[min(at, len(PHASES) - 1)] += count
        at += marked
    if at != len(PHASES) - 1:
        sys.exit(f"expected {len(PHASES) - 1} marks in the main process, found {at}")
    others = sorted((sum(count for count, _ in v) for pid, v in dumps.items() if pid != main),
                    reverse=True)
    return phases, [n for n in others if n > 1e7]  # (processes that did next to nothing)


def report(phases: list, others: list, jobs: int) -> None:
    g = 1e9
    workers, helpers = others[:jobs], others[jobs:]
    busiest = workers[0] if workers and jobs > 1 else 0
    for name, count in zip(PHASES, phases):
        print(f"{'main process, ' + name:62} {count / g:7.2f} G")
    for n, count in enumerate(workers if jobs > 1 else []):
        print(f"{'worker ' + str(n + 1):62} {count / g:7.2f} G")
    for count in helpers:
        print(f"{'helper (fixes verified beside the main process)':62} {count / g:7.2f} G")
    if jobs > 1:
        path = phases[0] + busiest + phases[2] + phases[3]
        print(f"{'critical path (main before + busiest worker + main after)':62} "
              f"{path / g:7.2f} G")
        print(f"  shares: start {phases[0] / path:.0%}, workers {busiest / path:.0%}, "
              f"after {(phases[2] + phases[3]) / path:.0%}")
    print(f"{'every process':62} {(sum(phases) + sum(others)) / g:7.2f} G")


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("site")
    parser.add_argument("--jobs", type=int, default=2)
    parser.add_argument("--format", default="json", help="report format (default: json)")
    args = parser.parse_args()
    from run import compile_installed  # (benchmarks/run.py, beside this script)

    compile_installed(sys.executable)  # every run reads bytecode, as an installed package's
    phases, others = measure(args.site, args.jobs, args.format)
    report(phases, others, args.jobs)


if __name__ == "__main__":
    main()
