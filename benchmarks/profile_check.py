#!/usr/bin/env python3
"""Profile the tinctura engine on a few pages of a built site.

    python benchmarks/profile_check.py SITE [--pages 5] [--setup] [--top 30] [--sort cumulative]

Loads the site and checks its first page (stylesheets are parsed and compiled then, perhaps
lazily), then runs the engine's ``Site.check_page`` on a few other pages spread evenly over
the site under cProfile and prints the top functions by cumulative time. Loading and the first
page are timed but left out of the profile unless --setup is given: on a real site loading
happens once, while pages number in the thousands.
The raw profile is saved to benchmarks/out/profile-check.prof for other viewers.
"""
from __future__ import annotations

import argparse
import cProfile
import pstats
import sys
import time
from pathlib import Path

OUT = Path(__file__).resolve().parent / "out"


def spread(items: list, k: int) -> list:
    """k items evenly spread over the list, the first included."""
    if k >= len(items):
        return list(items)
    step = len(items) / k
    return [items[int(i * step)] for i in range(k)]


def count(value) -> str:
    try:
        return str(len(value))
    except TypeError:
        return "?"


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("site", type=Path, help="a built site directory")
    ap.add_argument("--pages", type=int, default=5, help="pages to check (default 5)")
    ap.add_argument("--setup", action="store_true", help="also profile loading the site")
    ap.add_argument("--top", type=int, default=30)
    ap.add_argument("--sort", default="cumulative", help="pstats sort key (cumulative, tottime...)")
    ap.add_argument("--out", type=Path, default=OUT / "profile-check.prof")
    args = ap.parse_args(argv)

    t0 = time.perf_counter()
    from tinctura.engine import Options, Site
    print(f"import tinctura.engine: {time.perf_counter() - t0:.3f} s")

    prof = cProfile.Profile()
    t0 = time.perf_counter()
    if args.setup:
        prof.enable()
    site = Site(args.site, Options())
    pages = list(site.pages())
    if not pages:
        print(f"no pages found in {args.site}")
        return 1
    # The engine may load stylesheets lazily on the first page: check one page first, outside
    # the profile unless --setup, so the profile shows the steady per-page cost.
    warm = pages[0]
    site.check_page(warm)
    if args.setup:
        prof.disable()
    print(f"Site() load + first page ({warm}): {time.perf_counter() - t0:.3f} s"
          + ("" if args.setup else "  [not profiled; --setup to include]"))

    rest = pages[1:] or pages
    chosen = spread(rest, args.pages)
    print(f"{len(pages)} pages in the site; profiling {len(chosen)}")
    total = 0.0
    for rel in chosen:
        t0 = time.perf_counter()
        prof.enable()
        result = site.check_page(rel)
        prof.disable()
        dt = time.perf_counter() - t0
        total += dt
        samples = count(getattr(result, "samples", None))
        diags = count(getattr(result, "diagnostics", None))
        print(f"  {dt * 1000:8.1f} ms  {rel}  ({samples} samples, {diags} diagnostics)")
    if chosen:
        print(f"mean {total / len(chosen) * 1000:.1f} ms/page (under the profiler, which slows "
              "Python-heavy code more than C-heavy code)")

    args.out.parent.mkdir(parents=True, exist_ok=True)
    prof.dump_stats(str(args.out))
    print(f"profile saved to {args.out}\n")
    stats = pstats.Stats(prof, stream=sys.stdout)
    stats.strip_dirs().sort_stats(args.sort).print_stats(args.top)
    return 0


if __name__ == "__main__":
    sys.exit(main())
