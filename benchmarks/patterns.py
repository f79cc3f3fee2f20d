"""Selector patterns and page contents, each added to a built site on its own, timed against
the site as it is: a sweep for whatever makes a page cost many times more than the others.

    python benchmarks/patterns.py SITE_DIR [--pages 20:40] [NAME ...]

For each pattern (a rule appended to the site's first own stylesheet, the one its pages link
last) or content (a block appended to every page's article), the site is copied, changed, and
pages ``a:b`` are checked in a fresh process as a worker checks them (``engine._process``,
after pages ``0:a`` warm its caches); it prints milliseconds a page, the unchanged site's
first. Timings on a shared machine move by a third: look for patterns at 2x and more, and
time again what stands out (``compare_revisions.py`` counts instructions).

The patterns are kinds met in sites' own CSS; the names are this script's own. The first
sweep (2026-12-05, HISTORY) found eight of them at 3x to 10x a page and two kinds of content
(an inline SVG diagram, a paragraph of 200 links); the second (2026-12-05 18:00), five
``:has()`` reading a state on the body, at 3x to 5x the check.
"""
from __future__ import annotations

import argparse
import re
import shutil
import subprocess
import sys
import tempfile
from pathlib import Path

PATTERNS = {
    "has-next-sibling": ".md-nav__item--nested > .md-nav__link:has(+ nav) { color: #222 }",
    "has-later-sibling": ".md-typeset p:has(~ .admonition) code { color: #6b2350 }",
    "has-any-element": ".md-typeset :has(> kbd) { color: #1d3f6e }",
    "has-then-not": ".md-typeset :has(> code):not(pre) { color: #1b1b1b }",
    "has-root-checked": ":root:has(input:checked) .md-typeset p { color: #1b1b1b }",
    "has-body": "body:has(.md-banner) .md-header { color: #1b1b1b }",
    "has-star": ".md-typeset *:has(> img) { color: #1b1b1b }",
    "has-in-not": ".md-typeset a:not(:has(img)) { color: #1b3b8b }",
    "is-has-next": ".md-typeset :where(h2):has(+ .admonition) { color: #1b1b1b }",
    "not-siblings": ".md-typeset :not(li + li) > code { color: #455a64 }",
    "after-title-all": ".md-typeset h1 ~ * { color: #1b1b1b }",
    "hovered-neighbour": ".md-typeset a:hover + span { color: #1b1b1b }",
    "is-next-is": ".md-typeset :is(h1, h2, h3, h4, h5, h6) + :is(p, ul) { color: #1b1b1b }",
    "next-paragraph": ".md-typeset h2 + p { color: #1b1b1b }",
    "later-nth": ".md-typeset h2 ~ p:nth-of-type(3n+1) { color: #1b1b1b }",
    "three-in-a-row": ".md-typeset li + li + li { color: #1b1b1b }",
    "nth-of-selector": ".md-typeset li:nth-child(2n of .task-list-item) { color: #1b1b1b }",
    "checked-label": ".md-typeset input:checked + label { color: #004d40 }",
    "row-hover": ".md-typeset table tr:hover td { background-color: #f5f5f5 }",
    "focus-within": ".md-nav__item:focus-within > .md-nav__link { color: #00695c }",
    "lang": ".md-typeset p:lang(en) { color: #212121 }",
    "icon-font": "\n".join(f".pt-i-{i}:before {{ content: \"\\f{i:03x}\" }}"
                           for i in range(2000)),
    "is-long": ".md-typeset :is(" + ", ".join(f".c{i}" for i in range(200)) + ", p)"
               " { color: #1b1b1b }",
    "var-chain": ":root { " + " ".join(f"--v{i}: var(--v{i + 1});" for i in range(60))
                 + " --v60: #1b1b1b } .md-typeset p { color: var(--v0) }",
    "layers": "@layer base, theme; @layer base { .md-typeset p { color: #1b1b1b } }"
              " @layer theme { .md-typeset li { color: #1b1b2b } }",
    # a :has() whose answer changes with a state, on the body: asked at state walks' targets
    "has-state": "body:has(.md-search__input:focus) .md-header { color: #1b1b1b }",
    "has-state-list": "body:has(a:hover, button:hover) .md-header { color: #1b1b1b }",
    "has-state-is": "body:has(.md-search__input:is(:focus, :hover)) .md-header"
                    " { color: #1b1b1b }",
    "has-state-next": "body:has(.md-search__input:focus + label) .md-header { color: #1b1b1b }",
    "has-state-inside": "body:has(a:hover code) .md-header { color: #1b1b1b }",
}
FILLS = ("#e3f2fd", "#fff3e0", "#e8f5e9", "#fce4ec", "#ede7f6", "#263238", "#ffffff", "#b0bec5")


def _diagram() -> str:
    parts = []
    for i in range(2000):
        parts.append(f'<rect x="{i % 50 * 10}" y="{i // 50 * 10}" width="8" height="8" '
                     f'fill="{FILLS[i % len(FILLS)]}"/>')
        if i % 10 == 0:
            parts.append(f'<text x="{i % 50 * 10}" y="{i // 50 * 10}">t{i}</text>')
    return '<svg viewBox="0 0 500 400" width="500">' + "".join(parts) + "</svg>"


CONTENTS = {
    "svg-diagram": _diagram(),
    "link-paragraph": "<p>" + " ".join(f'<a href="#l{i}">link {i}</a> word'
                                       for i in range(200)) + "</p>",
    "long-table": "<table><tbody>" + "".join(f"<tr><td>r{i}</td><td><code>v{i}</code></td>"
                                             f"<td>ok</td></tr>" for i in range(300))
                  + "</tbody></table>",
    "closed-details": "".join(f'<details class="note"><summary>S{i}</summary><p>body {i} '
                              f'<a href="#x">l</a></p></details>' for i in range(100)),
    "inline-colours": "<p>" + " ".join(f'<span style="color:#{(i * 40503) % 0x7f7f7f:06x}">'
                                       f's{i}</span>' for i in range(500)) + "</p>",
    "form-controls": "<form>" + "".join(f'<label>field {i} <input name="f{i}" value="v{i}">'
                                        f'</label><button type="button">go {i}</button>'
                                        for i in range(100)) + "</form>",
    "link-index": "<ul>" + "".join(f'<li><a href="#t{i}">term {i}</a> - a gloss</li>'
                                   for i in range(1000)) + "</ul>",
}

TIMER = r'''
import gc, sys, time, pathlib
gc.disable()
from tinctura import engine
site = pathlib.Path(sys.argv[1])
options = engine.Options(keep_samples=False, encode_occurrences=True)
checker = engine.Site(str(site), options)
pages = [str(p.relative_to(site)) for p in sorted(site.rglob("*.html"))]
a, b = int(sys.argv[2]), int(sys.argv[3])
for rel in pages[:a]:
    engine._packed(engine._process(checker, rel, options, True), options)
start = time.process_time()
for rel in pages[a:b]:
    engine._packed(engine._process(checker, rel, options, True), options)
print((time.process_time() - start) * 1000 / (b - a))
'''


def own_stylesheet(site: Path) -> Path:
    """The site's own stylesheet: the last one the home page links (a theme's come first)."""
    html = (site / "index.html").read_text(encoding="utf-8")
    links = re.findall(r'<link[^>]+rel="stylesheet"[^>]+href="([^"]+)"', html)
    local = [h for h in links if "//" not in h]
    if not local:
        raise SystemExit(f"{site}/index.html links no local stylesheet")
    return site / local[-1].split("?")[0]


def timed(site: Path, pages: tuple) -> float:
    out = subprocess.run([sys.executable, "-c", TIMER, str(site), *map(str, pages)],
                         capture_output=True, text=True, check=True)
    return float(out.stdout.strip().splitlines()[-1])


def changed_copy(site: Path, name: str, into: Path) -> Path:
    copy = into / name
    shutil.copytree(site, copy)
    if name in PATTERNS:
        sheet = own_stylesheet(copy)
        sheet.write_text(sheet.read_text(encoding="utf-8") + "\n" + PATTERNS[name] + "\n",
                         encoding="utf-8")
    else:
        for page in copy.rglob("*.html"):
            text = page.read_text(encoding="utf-8")
            page.write_text(text.replace("</article>", CONTENTS[name] + "</article>", 1),
                            encoding="utf-8")
    return copy


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("site", type=Path, help="a built site (mkdocs-material's pages)")
    ap.add_argument("--pages", default="20:40", help="pages timed, after the ones before")
    ap.add_argument("names", nargs="*", help=f"of {', '.join([*PATTERNS, *CONTENTS])}")
    args = ap.parse_intermixed_args(argv)
    pages = tuple(int(x) for x in args.pages.split(":"))
    names = args.names or [*PATTERNS, *CONTENTS]
    unknown = set(names) - set(PATTERNS) - set(CONTENTS)
    if unknown:
        ap.error(f"unknown: {', '.join(sorted(unknown))}")
    print(f"{'(the site as it is)':24} {timed(args.site, pages):8.1f} ms a page", flush=True)
    with tempfile.TemporaryDirectory(prefix="tinctura-patterns-") as tmp:
        for name in names:
            copy = changed_copy(args.site, name, Path(tmp))
            print(f"{name:24} {timed(copy, pages):8.1f} ms a page", flush=True)
            shutil.rmtree(copy)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
