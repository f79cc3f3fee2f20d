"""What each report format costs on one built site: `tinctura check` writing each format alone,
side by side with the text report, in alternating rounds (wall and CPU seconds of the child and
its workers, the largest single process's peak, the report's size).

    python benchmarks/report_formats.py SITE_DIR [--config mkdocs.yml] [--repeat 3]
                                                [--formats text,json,sarif,...] [--jobs 2]

SITE_DIR is a built site (a `benchmarks/run.py` variant's `site-plain`, say). With `--config`,
findings point at Markdown lines as they do for a writer (the MkDocs project of that file).
A format that writes every finding grows with the findings (`csv`, `sarif-findings`); the
others grow with the problems: this prints how far each is from the text report.
"""
from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import tempfile
import time

FORMATS = ("text", "json", "sarif", "annotations", "junit", "html", "csv", "sarif-findings")


def one(site: str, fmt: str, config: str | None, jobs: int, out: str) -> dict:
    """Wall and CPU seconds, peak RSS (MB) and report size (bytes) of one run."""
    settings = ["--config", config] if config else ["--no-config"]
    start = time.perf_counter()
    child = subprocess.Popen([sys.executable, "-m", "tinctura", "check", site, "--jobs",
                              str(jobs), "--fail-on", "never", "--format", f"{fmt}:{out}",
                              *settings], stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    # this child's own usage, with the workers it waited for (not the earlier children's)
    _, status, usage = os.wait4(child.pid, 0)
    wall = time.perf_counter() - start
    child.returncode = os.waitstatus_to_exitcode(status)
    if child.returncode:
        raise SystemExit(f"{fmt}: tinctura check exited {child.returncode}")
    return {"wall": wall, "cpu": usage.ru_utime + usage.ru_stime,
            "peak": usage.ru_maxrss / 1024.0, "size": os.path.getsize(out)}


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("site_dir")
    parser.add_argument("--config", help="an mkdocs.yml: Markdown lines, as for a writer")
    parser.add_argument("--repeat", type=int, default=3)
    parser.add_argument("--jobs", type=int, default=2)
    parser.add_argument("--formats", default=",".join(FORMATS))
    args = parser.parse_args(argv)
    formats = [f.strip() for f in args.formats.split(",") if f.strip()]
    runs: dict = {fmt: [] for fmt in formats}
    with tempfile.TemporaryDirectory() as folder:
        for _ in range(args.repeat):  # alternating: the machine's drift hits every format
            for fmt in formats:
                runs[fmt].append(one(args.site_dir, fmt, args.config, args.jobs,
                                     os.path.join(folder, f"report.{fmt}")))
    base = statistics.median(r["wall"] for r in runs.get("text") or runs[formats[0]])
    print(f"{'format':16}{'wall s':>8}{'cpu s':>8}{'vs text':>9}{'peak MB':>9}{'report':>12}")
    for fmt in formats:
        wall = statistics.median(r["wall"] for r in runs[fmt])
        cpu = statistics.median(r["cpu"] for r in runs[fmt])
        peak = max(r["peak"] for r in runs[fmt])
        size = runs[fmt][-1]["size"]
        shown = f"{size / 1e6:.1f} MB" if size >= 1e5 else f"{size / 1e3:.0f} KB"
        print(f"{fmt:16}{wall:8.2f}{cpu:8.2f}{wall / base:8.2f}x{peak:9.0f}{shown:>12}")
    print(f"medians of {args.repeat} alternating rounds, --jobs {args.jobs}; peak: the largest "
          f"single process (workers included)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
