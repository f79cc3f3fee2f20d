"""Instructions of checking a site's pages with two revisions of tinctura, side by side: what a
change costs or saves, where timings cannot tell (this machine's drift by a third within the
hour: the same code and pages took 20.9 to 36.0 ms a page in one hour).

    python benchmarks/compare_revisions.py SITE_DIR [--base REV] [--head REV] [--pages 20:50]

Each revision is checked out into a temporary folder (``--head`` defaults to the working tree
as it is, uncommitted changes included), byte-compiled (where PYTHONDONTWRITEBYTECODE is set,
a checkout without bytecode compiles every module it imports, in the count), and one process
per revision checks the site's pages ``0:a`` (warming its caches) then ``a:b`` as a worker
does (``engine._process``, findings packed and their JSON occurrences written), under
valgrind's callgrind. Only the pages ``a:b`` are counted: callgrind writes its counts out before
each call of ``os.getpgrp`` (``--dump-before``), which the process calls before and after them,
as ``critical_path.py`` cuts its phases. The two run at once: a count does not depend on what
the other core does. ``PYTHONHASHSEED=0``, so that both hash alike.

A few hundred pages a minute (callgrind runs Python about fifty times slower).
"""
from __future__ import annotations

import argparse
import os
import shutil
import subprocess
import sys
import tempfile
from pathlib import Path

from critical_path import callgrind_dump

ROOT = Path(__file__).resolve().parents[1]
PACKAGES = ("src", "rules", "plugin")  # what the wheel maps to tinctura, .rules, .plugin

CHILD = r'''
import gc, os, sys
gc.disable()
import tinctura, tinctura.rules
from tinctura import engine
print("imported", os.path.dirname(tinctura.__file__),
      os.path.dirname(tinctura.rules.__file__), file=sys.stderr)
site, a, b = sys.argv[1], int(sys.argv[2]), int(sys.argv[3])
options = engine.Options(keep_samples=False, encode_occurrences=True)
checked = engine.Site(site, options)
pages = checked.pages()
for rel in pages[:a]:
    engine._packed(engine._process(checked, rel, options, True), options)
os.getpgrp()  # (callgrind writes the counts so far out before this call)
for rel in pages[a:b]:
    engine._packed(engine._process(checked, rel, options, True), options)
os.getpgrp()
'''


def checkout(rev: str, into: Path) -> Path:
    """The revision's packages laid out as installed (``tinctura/rules``, ``tinctura/plugin``)
    under ``into``, byte-compiled; the folder to put on PYTHONPATH."""
    if rev == "WORKTREE":
        for name in PACKAGES:
            shutil.copytree(ROOT / name, into / name,
                            ignore=shutil.ignore_patterns("__pycache__"))
    else:
        archive = subprocess.run(["git", "-C", str(ROOT), "archive", rev, *PACKAGES],
                                 capture_output=True, check=True).stdout
        into.mkdir(parents=True)
        subprocess.run(["tar", "-x", "-C", str(into)], input=archive, check=True)
    package = into / "src" / "tinctura"
    for name in ("rules", "plugin"):
        os.symlink(into / name, package / name)
    subprocess.run([sys.executable, "-m", "compileall", "-q", str(into / "src")], check=True)
    return into / "src"


def counted(path: Path, site: str, pages: tuple, folder: Path) -> subprocess.Popen:
    env = {**os.environ, "PYTHONPATH": str(path), "PYTHONHASHSEED": "0"}
    return subprocess.Popen(
        ["valgrind", "--tool=callgrind", "--dump-before=os_getpgrp*",
         f"--callgrind-out-file={folder}/cg.%p", sys.executable, "-c", CHILD, site,
         str(pages[0]), str(pages[1])],
        env=env, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)


def pages_counted(folder: Path, expected: Path, stderr: str) -> int:
    """Instructions between the two marks of the run whose dumps are in ``folder``."""
    imported = [line for line in stderr.splitlines() if line.startswith("imported ")]
    if not imported or not all(p.startswith(str(expected)) for p in imported[0].split()[1:]):
        sys.exit(f"the run did not import the checkout under {expected}:\n{stderr[-2000:]}")
    dumps = sorted((int(p.name.split(".")[2]), p) for p in folder.iterdir()
                   if p.name.count(".") == 2)
    if len(dumps) != 2:
        sys.exit(f"expected two marks, found {len(dumps)}:\n{stderr[-2000:]}")
    count, marked = callgrind_dump(str(dumps[1][1]))
    if not marked:
        sys.exit(f"the second dump was not a mark:\n{stderr[-2000:]}")
    return count


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("site")
    parser.add_argument("--base", default="HEAD", help="git revision (default: HEAD)")
    parser.add_argument("--head", default="WORKTREE",
                        help="git revision, or WORKTREE: the files as they are (the default)")
    parser.add_argument("--pages", default="20:50",
                        help="A:B: pages 0 to A warm the caches, A to B are counted")
    args = parser.parse_args()
    a, b = (int(x) for x in args.pages.split(":"))
    site = os.path.abspath(args.site)
    with tempfile.TemporaryDirectory() as tmp:
        runs = []
        for name, rev in (("base", args.base), ("head", args.head)):
            folder = Path(tmp) / name
            dumps = folder / "cg"
            dumps.mkdir(parents=True)
            path = checkout(rev, folder / "code")
            runs.append((name, rev, path, dumps, counted(path, site, (a, b), dumps)))
        counts = []
        for name, rev, path, cg, process in runs:
            stderr = process.communicate()[1]
            if process.returncode != 0:
                sys.exit(f"{name} ({rev}) failed under callgrind:\n{stderr[-2000:]}")
            counts.append(pages_counted(cg, path, stderr))
    per_page = [c / (b - a) for c in counts]
    for (name, rev, *_), count, page in zip(runs, counts, per_page):
        print(f"{name} {rev:<12} pages {a}:{b}  {count / 1e9:8.3f} G instructions  "
              f"{page / 1e6:8.2f} M a page")
    print(f"head / base: {counts[1] / counts[0]:.4f} ({(counts[1] / counts[0] - 1):+.2%})")


if __name__ == "__main__":
    main()
