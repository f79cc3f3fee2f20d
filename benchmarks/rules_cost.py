"""What the rules beyond TC100 cost: `tinctura check` with TC100 alone and with every rule,
side by side, in alternating runs (CPU seconds of each child process: the machine is shared).

    python benchmarks/rules_cost.py SITE_DIR [--repeat 3] [--rules TC100,TC200,TC400,TC500]
                                             [--jobs 1] [--instructions]

SITE_DIR is a built site (e.g. `generate_site.py 200` built with `mkdocs-plain.yml`); each child
is `tinctura check SITE_DIR --jobs 1 --no-config [--select RULES]` as a user runs it: TC100
alone against every rule, or against the rules `--rules` names (the text-appearance rules of
TC200, TC400 and TC500 with TC100, say). `--jobs N` runs the children with N workers (their CPU
counted with the child's: every process's work). `--instructions` runs each child once under
valgrind's callgrind instead and counts instructions, which the machine's drift does not move
(a 200-page site takes several minutes).
"""
from __future__ import annotations

import argparse
import os
import resource
import statistics
import subprocess
import sys
import tempfile

CHILD = r'''
import sys
from tinctura import cli
rules, site, jobs = sys.argv[1], sys.argv[2], sys.argv[3]
select = [] if rules == "all" else ["--select", rules]
# as the `tinctura` command runs (cli.command: it ends without freeing its heap)
sys.argv = ["tinctura", "check", site, "--jobs", jobs, "--fail-on", "never", "--no-config",
            "-o", "/dev/null"] + select
cli.command()
'''


def cpu_seconds(rules: str, site: str, jobs: int = 1) -> float:
    """CPU seconds of one child (with its workers, which it waits for)."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    subprocess.run([sys.executable, "-c", CHILD, rules, site, str(jobs)], check=True)
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    return (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)


def instructions(rules: str, site: str, jobs: int = 1) -> int:
    """Instructions of one child under callgrind, each process's own counted once: forked
    workers start with their parent's counts, so the parent's are written out (and reset)
    before each fork, and every process's files are summed."""
    with tempfile.TemporaryDirectory() as folder:
        subprocess.run(["valgrind", "--tool=callgrind", "--dump-before=*fork*",
                        f"--callgrind-out-file={folder}/cg.%p", sys.executable, "-c", CHILD,
                        rules, site, str(jobs)], check=True, stdout=subprocess.DEVNULL,
                       stderr=subprocess.DEVNULL, env={**os.environ, "PYTHONHASHSEED": "0"})
        from critical_path import callgrind_dump  # (beside this script)

        return sum(callgrind_dump(os.path.join(folder, name))[0]
                   for name in os.listdir(folder))


def count_instructions(args) -> None:
    counts = {rules: instructions(args.rules if rules == "all" else rules, args.site, args.jobs)
              for rules in ("TC100", "all")}
    chosen = "all rules" if args.rules == "all" else args.rules
    print(f"TC100  {counts['TC100'] / 1e9:.2f} G instructions")
    print(f"{chosen}: {counts['all'] / 1e9:.2f} G instructions, "
          f"{counts['all'] / counts['TC100']:.3f}x TC100 alone")


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("site")
    parser.add_argument("--repeat", type=int, default=3)
    parser.add_argument("--rules", default="all", help="codes to select (default: every rule)")
    parser.add_argument("--jobs", type=int, default=1, help="workers per check (default: 1)")
    parser.add_argument("--instructions", action="store_true",
                        help="count instructions under valgrind's callgrind, once each")
    args = parser.parse_args()
    from run import compile_installed  # (benchmarks/run.py, beside this script)

    compile_installed(sys.executable)  # every run reads bytecode, as an installed package's
    if args.instructions:
        count_instructions(args)
        return
    runs = {"TC100": [], "all": []}
    for n in range(args.repeat):
        # each pair in turn order, then the other (the machine's speed drifts within minutes)
        for rules in (("TC100", "all") if n % 2 == 0 else ("all", "TC100")):
            runs[rules].append(cpu_seconds(args.rules if rules == "all" else rules, args.site,
                                           args.jobs))
    medians = {rules: statistics.median(v) for rules, v in runs.items()}
    for rules, values in runs.items():
        print(f"{rules:6} CPU median {medians[rules]:.2f} s  runs {[round(v, 2) for v in values]}")
    pairs = sorted(b / a for a, b in zip(runs["TC100"], runs["all"]))
    chosen = "all rules" if args.rules == "all" else args.rules
    print(f"{chosen} / TC100 alone: {medians['all'] / medians['TC100']:.2f}x (ratio of medians); "
          f"{statistics.median(pairs):.2f}x (median of the {len(pairs)} pairs' ratios: "
          f"{', '.join(f'{r:.2f}' for r in pairs)})")


if __name__ == "__main__":
    main()
