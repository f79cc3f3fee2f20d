"""A large, realistic stylesheet, and the time and memory tinctura takes to parse and index it.

    python benchmarks/large_stylesheet.py --mb 5,20 [--seed 7] [--profile]

For each size, writes ``benchmarks/out/large-<N>mb/`` (one page and ``theme.css``: a theme of
the invented harbour scheduler "Tidewright", repeated with variations until the size is
reached: custom properties on ``:root`` and in a dark scheme, component rules with comma lists
of selectors, pseudo-classes, ``@media`` and ``@supports`` blocks, ``@layer``, declarations that
matter for colour and many that do not) and measures, each in a fresh process:

- ``parse``: ``extract.loader.SheetLoader.sheet`` (read, decode, parse, flatten, compile);
- ``index``: the page's ``RuleSet`` and one environment's ``Index``;
- ``check``: ``tinctura check`` on the one-page site (everything, as a user runs it);

with wall-clock seconds, CPU seconds (user + system) and the peak resident memory of the
process (``ru_maxrss``). Linear
cost means seconds and megabytes per megabyte of CSS stay about the same from size to size.
``--profile`` prints the top of a cProfile of ``parse`` + ``index`` for the largest size.
"""
from __future__ import annotations

import argparse
import json
import os
import random
import resource
import subprocess
import sys
import time

HERE = os.path.dirname(os.path.abspath(__file__))
COMPONENTS = ("berth", "tide-row", "pilot-card", "gauge", "crane-slot", "ledger", "swell",
              "mooring", "buoy", "quay-map", "ferry-line", "harbour-note")
PARTS = ("title", "body", "meta", "icon", "badge", "link", "cell", "header", "footer", "label")
STATES = ("", ":hover", ":focus-visible", "::before", ":not(.is-idle)", ":first-child",
          "[aria-current=page]", ":nth-child(2n+1)")
TAGS = ("a", "span", "p", "li", "td", "h2", "code", "button")


def block(rng: random.Random, n: int) -> str:
    """One theme 'module': about 5-6 KB of CSS."""
    c = rng.choice(COMPONENTS)
    out = [f":root {{\n"]
    for k in range(12):
        out.append(f"  --tw-{c}-{n}-{k}: #{rng.randrange(1 << 24):06x};\n")
    out.append(f"  --tw-{c}-{n}-fg: var(--tw-{c}-{n}-0, #1d2a33);\n"
               f"  --tw-{c}-{n}-bg: color-mix(in srgb, var(--tw-{c}-{n}-1) 20%, white);\n}}\n")
    out.append(f'[data-tw-scheme="night"] {{\n  --tw-{c}-{n}-fg: #d9e4ea;\n'
               f"  --tw-{c}-{n}-bg: #10181d;\n}}\n")
    for _ in range(14):
        sels = []
        for _ in range(rng.randint(1, 5)):
            part = rng.choice(PARTS)
            sel = f".tw-{c}-{n}__{part}{rng.choice(STATES)}"
            if rng.random() < 0.4:
                sel = f".tw-{c}-{n} > {rng.choice(TAGS)}{sel}" if "::" not in sel else sel
            sels.append(sel)
        decls = [f"color: var(--tw-{c}-{n}-fg)" if rng.random() < 0.5
                 else f"color: #{rng.randrange(1 << 24):06x}",
                 f"background-color: var(--tw-{c}-{n}-bg)",
                 f"padding: {rng.randint(0, 24)}px {rng.randint(0, 24)}px",
                 f"margin: 0 0 {rng.randint(0, 3)}rem",
                 f"border: 1px solid rgb({rng.randrange(256)} {rng.randrange(256)} "
                 f"{rng.randrange(256)} / 0.4)",
                 f"font-size: {rng.choice(('0.8rem', '0.875rem', '1rem', '14px', '1.2em'))}",
                 f"transition: color 120ms ease-in, background-color 200ms linear",
                 f"box-shadow: 0 1px 2px rgba(0,0,0,.{rng.randint(1, 9)})"]
        rng.shuffle(decls)
        out.append(",\n".join(sels) + " {\n  " + ";\n  ".join(decls[:rng.randint(3, 8)]) + ";\n}\n")
    out.append(f"@media (max-width: {rng.choice((600, 760, 960, 1220))}px) {{\n"
               f"  .tw-{c}-{n}__body {{ font-size: 0.9rem; display: block; }}\n"
               f"  .tw-{c}-{n}__icon {{ display: none; }}\n}}\n")
    out.append(f"@media (prefers-color-scheme: dark) {{\n  .tw-{c}-{n}__meta "
               f"{{ color: #9fb3bf; }}\n}}\n")
    out.append(f"@supports (backdrop-filter: blur(2px)) {{\n  .tw-{c}-{n}__header "
               f"{{ backdrop-filter: blur(2px); }}\n}}\n")
    out.append(f"@layer tw.components {{\n  .tw-{c}-{n}__label {{ color: #3b4b55; "
               f"letter-spacing: .02em; }}\n}}\n")
    out.append(f"@keyframes tw-{c}-{n}-pulse {{ from {{ opacity: 1; }} to {{ opacity: .6; }} "
               f"}}\n/* {c} module {n}: tide-gauge and berth styling */\n")
    return "".join(out)


def write_site(mb: float, seed: int) -> str:
    root = os.path.join(HERE, "out", f"large-{mb:g}mb")
    os.makedirs(root, exist_ok=True)
    rng = random.Random(seed)
    target = int(mb * 1024 * 1024)
    parts, size, n = [], 0, 0
    while size < target:
        text = block(rng, n)
        parts.append(text)
        size += len(text)
        n += 1
    with open(os.path.join(root, "theme.css"), "w", encoding="utf-8") as fh:
        fh.write("".join(parts))
    with open(os.path.join(root, "index.html"), "w", encoding="utf-8") as fh:
        fh.write('<!doctype html><html lang="en"><head><link rel="stylesheet" href="theme.css">'
                 '</head><body><div class="tw-berth-0"><p class="tw-berth-0__body">Berth 4 '
                 'is free from 14:00</p><a class="tw-berth-0__link" href="#">Book it</a></div>'
                 '</body></html>\n')
    return root


def measure_in_process(root: str, what: str) -> dict:
    """Run in a fresh process: seconds and peak RSS for parse, index or check."""
    from tinctura.extract.html import parse_html
    from tinctura.extract.loader import SheetLoader
    from tinctura.extract.media import Environment

    css = os.path.join(root, "theme.css")
    start = time.perf_counter()
    if what == "check":
        from tinctura import cli

        with open(os.devnull, "w") as null:
            cli.main(["check", root, "--fail-on", "never", "--jobs", "1"], stdout=null,
                     stderr=null)
        extra = {}
    else:
        loader = SheetLoader(root)
        parsed, diags = loader.sheet(css)
        extra = {"rules": len(parsed.rules), "diagnostics": len(diags)}
        if what == "index":
            with open(os.path.join(root, "index.html"), "rb") as fh:
                page = parse_html(fh.read())
            ruleset, _ = loader.ruleset_for(page, os.path.join(root, "index.html"))
            ruleset.index(Environment(1280))
    seconds = time.perf_counter() - start
    usage = resource.getrusage(resource.RUSAGE_SELF)
    peak = usage.ru_maxrss / 1024  # KiB on Linux
    # CPU seconds too: on a shared machine wall-clock time follows the load
    return {"seconds": round(seconds, 2), "cpu_s": round(usage.ru_utime + usage.ru_stime, 2),
            "peak_mb": round(peak), **extra}


def profile(root: str) -> None:
    import cProfile
    import pstats

    cProfile.runctx("measure_in_process(root, 'index')", globals(), {"root": root},
                    "/tmp/large_stylesheet.prof")
    pstats.Stats("/tmp/large_stylesheet.prof").sort_stats("cumulative").print_stats(25)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--mb", default="5,20", help="sizes in MB, comma-separated")
    ap.add_argument("--seed", type=int, default=7)
    ap.add_argument("--profile", action="store_true")
    ap.add_argument("--measure", nargs=2, metavar=("ROOT", "WHAT"), help=argparse.SUPPRESS)
    args = ap.parse_args()
    if args.measure:
        print(json.dumps(measure_in_process(*args.measure)))
        return
    sizes = [float(x) for x in args.mb.split(",")]
    print("| CSS | rules kept | parse s (CPU) | parse peak MB | parse+index s (CPU) | peak MB | "
          "tinctura check s (CPU) | peak MB |")
    print("|---|---|---|---|---|---|---|---|")
    for mb in sizes:
        root = write_site(mb, args.seed)
        real_mb = os.path.getsize(os.path.join(root, "theme.css")) / 1048576
        row = {}
        for what in ("parse", "index", "check"):
            done = subprocess.run([sys.executable, __file__, "--measure", root, what],
                                  capture_output=True, text=True, check=True)
            row[what] = json.loads(done.stdout.strip().splitlines()[-1])
        cell = {what: f"{row[what]['seconds']} ({row[what].get('cpu_s', '?')})"
                for what in row}
        print(f"| {real_mb:.1f} MB | {row['parse']['rules']:,} | {cell['parse']} | "
              f"{row['parse']['peak_mb']} | {cell['index']} | "
              f"{row['index']['peak_mb']} | {cell['check']} | "
              f"{row['check']['peak_mb']} |", flush=True)
    if args.profile:
        profile(root)


if __name__ == "__main__":
    main()
