#!/usr/bin/env python3
"""Write a synthetic N-page mkdocs-material project for benchmarks.

    python benchmarks/generate_site.py N OUTDIR [--seed 7] [--plugin | --no-plugin]
                                       [--variant baseline|varied|states|many|mkdocs-theme|readthedocs-theme]

The subject is invented: the manual of "Tidewright", a berth and ferry scheduler run by the
harbour office of the fictional town of Brindlemoor. Every page is listed in the navigation
(sections of about 20 pages), so each built page repeats a navigation of N links, as large
documentation sites do. Pages mix headings, paragraphs with links and inline code, tables,
highlighted code (some with line numbers), admonitions and lists. A custom stylesheet
redefines a few custom properties per colour scheme and plants faint colours, so the check
has findings to report; the tables' status chips (``.tw-state.tw-ok`` and its siblings) are a
palette, which the site-level appearance rules judge after the last page.

Files written into OUTDIR:
    docs/**.md, docs/stylesheets/tidewright.css
    mkdocs.yml          plain (plugins: [search]) or, with --plugin, [search, tinctura]
    mkdocs-plain.yml    always without tinctura
    mkdocs-plugin.yml   always with tinctura
Output is deterministic for a given N and seed (no clocks, no hash-order dependence).
"""
from __future__ import annotations

import argparse
import os
import random
import shutil
import sys
from pathlib import Path

SECTION_SIZE = 20
# The light scheme's accent colours links on hover and focus. This one passes on white, so
# findings stay the few planted ones; most other accents fail there on every navigation link.
DEFAULT_ACCENT = "deep purple"
FAILING_ACCENT = "teal"  # fails on white: every navigation link fails on :hover and :focus

# Named site shapes the benchmark runs side by side. "baseline" is the original generator
# (mixed pages, collapsed navigation sections, an accent that passes); the others are what
# other manuals look like: pages of one kind each, every navigation section expanded (so every
# page shows a link to every page), structural and :has() selectors in the site's own CSS,
# an accent that fails in a state, and a page of faint colours on every page.
VARIANTS = {
    "baseline": dict(kinds=False, expand=False, structural=False, accent=DEFAULT_ACCENT,
                     many=False),
    "varied": dict(kinds=True, expand=True, structural=True, accent=DEFAULT_ACCENT, many=False),
    "states": dict(kinds=True, expand=True, structural=True, accent=FAILING_ACCENT, many=False),
    "many": dict(kinds=True, expand=True, structural=True, accent=FAILING_ACCENT, many=True),
    # varied's pages on MkDocs' own theme (Bootstrap 5: 348 KB of CSS against
    # mkdocs-material's 148 KB, light and dark by data-bs-theme, a build about half as long)
    "mkdocs-theme": dict(kinds=True, expand=True, structural=True, accent=DEFAULT_ACCENT,
                         many=False, theme="mkdocs"),
    # varied's pages on MkDocs' other built-in theme: a dark side navigation showing every
    # section's caption and the current section's pages, light only (the site's own CSS
    # adds a dark scheme by prefers-color-scheme), a remote stylesheet that is never fetched
    "readthedocs-theme": dict(kinds=True, expand=True, structural=True,
                              accent=DEFAULT_ACCENT, many=False, theme="readthedocs"),
    # states' site with Markdown extensions the others leave out (content tabs, code
    # annotations, icons drawn as inline SVG, cards, task lists, keys, footnotes), navigation
    # tabs with the page's table of contents in the side navigation, and :has() selectors
    # that read the following siblings or name no tag, class or id
    "extensions": dict(kinds=True, expand=True, structural=True, accent=FAILING_ACCENT,
                       many=False, extensions=True),
    # varied's pages, each with a <style> block of its own (a berth board generated from data,
    # its rows coloured by classes of that page, some too faint): a rule set per page
    "own-styles": dict(kinds=True, expand=True, structural=True, accent=DEFAULT_ACCENT,
                       many=False, own_styles=True),
}
# (text, background) of the berth boards' rows: invented; the last three fail WCAG's 4.5:1
BOARD_COLOURS = [("#1d3557", "#ffffff"), ("#14213d", "#e9f1f7"), ("#3d2c1e", "#fdf6ec"),
                 ("#ffffff", "#22577a"), ("#8a9bb0", "#ffffff"), ("#ffffff", "#4fa3a5"),
                 ("#b08968", "#fdf6ec")]
PAGE_KINDS = ("code", "table", "prose", "api")

# Invented vocabulary; nothing here names a real product, place, company or person.
TOPICS = [
    "berth allocation", "tide windows", "ferry rotations", "pilot requests", "cargo manifests",
    "mooring plans", "quay cranes", "harbour dues", "weather holds", "crew rosters",
    "slipway bookings", "fuel barges", "dredging notices", "passenger counts", "lock cycles",
    "buoy inspections", "tug dispatch", "anchorage zones", "storm readiness", "night arrivals",
    "customs hand-off", "gangway checks", "bunker reports", "ballast logs", "dock lighting",
]
NOUNS = [
    "berth", "rotation", "manifest", "tide table", "mooring line", "quay segment", "roster",
    "dispatch queue", "harbour ledger", "arrival window", "pilot slot", "crane plan",
    "sailing notice", "hold order", "timetable", "slip record", "lock schedule",
]
VERBS = [
    "reserves", "releases", "reschedules", "validates", "exports", "merges", "locks",
    "archives", "publishes", "recalculates", "flags", "confirms", "splits", "balances",
]
ADJECTIVES = [
    "pending", "confirmed", "provisional", "overnight", "tidal", "seasonal", "shared",
    "priority", "deferred", "draft", "coastal", "inbound", "outbound", "reserved",
]
ROLES = ["harbour master", "duty clerk", "berth planner", "pilot desk", "night watch",
         "ferry coordinator", "port engineer"]
VESSELS = ["Gull Meadow", "Lantern Reach", "Saltbrook", "Quiet Heron", "Marram Star",
           "Tern Hollow", "Ember Skerry", "Brackwater Belle"]
IDENTS = ["berth_id", "tide_offset", "rotation", "window_start", "window_end", "draught",
          "pilot_code", "hold_reason", "crane_slot", "quay", "eta", "etd", "priority"]
COMMANDS = ["tidewright plan", "tidewright export", "tidewright lock", "tidewright sync",
            "tidewright roster", "tidewright check-tide", "tidewright release"]
ADMONITIONS = ["note", "tip", "info", "warning", "danger", "example", "question", "success"]
LANGS = ["python", "yaml", "bash", "json", "toml", "ini"]

EXTRA_CSS = """\
/* Tidewright house style: a few custom properties redefined per scheme.
   Some values are deliberately too faint: benchmarks need findings to report. */
:root,
[data-md-color-scheme="default"] {
  --tw-accent-fg: #1d5e8c;
  --tw-muted-fg: #5f6368;
  --tw-caption-fg: #8d8d8d;      /* planted: about 3.3:1 on white, fails AA body text */
  --tw-badge-bg: #2e7d32;
  --tw-badge-fg: #ffffff;
  --tw-callout-bg: #fff8e1;
  --tw-callout-fg: #5d4037;
}

[data-md-color-scheme="slate"] {
  --tw-accent-fg: #8cc4ef;
  --tw-muted-fg: #a7adb5;
  --tw-caption-fg: #4b5261;      /* planted: faint on the slate background */
  --tw-badge-bg: #a5d6a7;
  --tw-badge-fg: #ffffff;        /* planted: white on light green */
  --tw-callout-bg: #3b3320;
  --tw-callout-fg: #f3e5c0;
}

@media (prefers-color-scheme: dark) {
  :root { --tw-print-rule: #555555; }
}

.md-typeset .tw-accent { color: var(--tw-accent-fg); }
.md-typeset .tw-muted { color: var(--tw-muted-fg); }
.md-typeset .tw-caption { color: var(--tw-caption-fg); font-size: .64rem; }
.md-typeset .tw-faint { color: #c9c9c9; }   /* planted: faint on white */
.md-typeset .tw-badge {
  background-color: var(--tw-badge-bg);
  color: var(--tw-badge-fg);
  padding: 0 .3em;
  border-radius: .2em;
  font-size: .7rem;
}
.md-typeset .tw-callout {
  background-color: var(--tw-callout-bg);
  color: var(--tw-callout-fg);
  padding: .4em .8em;
}
.md-typeset .tw-warning-text { color: #f5a623; }  /* planted: orange on white */
/* status chips: a palette (a family with modifiers) for the site-level appearance rules */
.md-typeset .tw-state.tw-ok { color: #2e7d32; }
.md-typeset .tw-state.tw-late { color: #9a5b00; }
.md-typeset .tw-state.tw-fault { color: #c62828; }
[data-md-color-scheme="slate"] .md-typeset .tw-state.tw-ok { color: #81c784; }
[data-md-color-scheme="slate"] .md-typeset .tw-state.tw-late { color: #ffb74d; }
[data-md-color-scheme="slate"] .md-typeset .tw-state.tw-fault { color: #ef9a9a; }
.md-typeset a.tw-quiet-link { color: #9ecbf0; }
.md-typeset a.tw-quiet-link:hover { color: #d0e7fa; }  /* planted: fainter on hover */
"""


STATES = {"stable": "ok", "beta": "late", "deprecated": "fault"}


def state_chip(status: str) -> str:
    """A table's status as a coloured chip (no random draw: the pages' text stays the same)."""
    return f'<span class="tw-state tw-{STATES[status]}">{status}</span>'


# Selectors a theme customisation often has: a structural one whose rightmost compound matches
# list items in the navigation, and :has() ones. Their colours pass; they only test whether the
# checker's sharing of styles survives them.
STRUCTURAL_CSS = """
/* separators between navigation items, and tables that hold code */
.md-nav--primary ul > li:not(:first-child) { color: var(--md-default-fg-color); }
.md-typeset table:has(code) { background-color: var(--md-default-bg-color); }
.md-typeset .admonition:has(> ul) { color: var(--md-default-fg-color); }
.md-typeset ol > li:nth-child(2n) { color: var(--md-default-fg-color); }
"""

# The "extensions" variant: :has() that reads the following siblings (a section's link before
# its list of pages, a paragraph introducing a list) or names no tag, class or id (whatever holds
# keyboard keys), and sibling relations of the kinds that once turned sharing off (a heading's
# next paragraph through :is(), everything after the title, a hovered link's neighbour). Their
# colours pass, as the structural ones do.
RELATIONS_CSS = """
.md-nav__item--nested > .md-nav__link:has(+ nav) { color: var(--md-default-fg-color); }
.md-typeset p:has(+ ul) { color: var(--md-default-fg-color); }
.md-typeset :has(> kbd) { color: var(--md-default-fg-color); }
.md-typeset :is(h1, h2, h3, h4) + :is(p, ul) { color: var(--md-default-fg-color); }
.md-typeset h1 ~ * code, .md-typeset :not(li + li) > code { color: var(--md-code-fg-color); }
.md-typeset a:hover + span, :root:has(input:checked) .md-typeset strong { color: inherit; }
"""
EXTENSION_FEATURES = ("navigation.tabs", "toc.integrate", "content.code.annotate",
                      "content.tabs.link")
EXTENSION_MARKDOWN = """\
  - abbr
  - footnotes
  - pymdownx.critic
  - pymdownx.keys
  - pymdownx.mark
  - pymdownx.tabbed:
      alternate_style: true
  - pymdownx.tasklist:
      custom_checkbox: true
  - pymdownx.emoji:
      emoji_index: !!python/name:material.extensions.emoji.twemoji
      emoji_generator: !!python/name:material.extensions.emoji.to_svg
"""

# The "many findings" variant: faint colours used all over the article.
MANY_CSS = """
.md-typeset td:not(:first-child) { color: #a4a4a4; }           /* planted: faint table cells */
.md-typeset .highlight .c1, .md-typeset .highlight .ch { color: #b8b8b8; }  /* faint comments */
.md-typeset li code { color: #9aa5b1; }                        /* planted: faint inline code */
"""


def slug(text: str) -> str:
    return "".join(c if c.isalnum() else "-" for c in text.lower()).strip("-")


def page_layout(n_pages: int, rng: random.Random):
    """Return [(section_title, section_dir, [(title, relpath), ...]), ...] and the home page.

    Page 0 is the home page (index.md); the remaining pages fill sections of SECTION_SIZE.
    """
    home = ("Home", "index.md")
    sections = []
    remaining = n_pages - 1
    number = 1
    s = 0
    while remaining > 0:
        count = min(SECTION_SIZE, remaining)
        topic = TOPICS[s % len(TOPICS)]
        cycle = s // len(TOPICS)
        title = topic.capitalize() + (f" ({cycle + 1})" if cycle else "")
        sdir = f"s{s + 1:03d}-{slug(topic)}"
        pages = []
        for _ in range(count):
            noun = rng.choice(NOUNS)
            adj = rng.choice(ADJECTIVES)
            ptitle = f"{adj.capitalize()} {noun}s" if number % 3 else f"Working with {noun}s"
            pages.append((ptitle, f"{sdir}/p{number:05d}-{slug(adj)}-{slug(noun)}.md"))
            number += 1
        sections.append((title, sdir, pages))
        remaining -= count
        s += 1
    return home, sections


def relative_link(from_path: str, to_path: str) -> str:
    return os.path.relpath(to_path, os.path.dirname(from_path) or ".").replace(os.sep, "/")


class PageWriter:
    def __init__(self, rng: random.Random, all_pages: list, path: str, index: int,
                 kinds: bool = False, extensions: bool = False, own_styles: bool = False):
        self.extensions = extensions
        self.own_styles = own_styles
        self.rng = rng
        self.all_pages = all_pages
        self.path = path
        self.index = index
        self.kind = PAGE_KINDS[index % len(PAGE_KINDS)] if kinds else "mixed"

    def link(self) -> str:
        title, target = self.rng.choice(self.all_pages)
        if target == self.path:
            target = self.all_pages[0][1]
            title = self.all_pages[0][0]
        return f"[{title.lower()}]({relative_link(self.path, target)})"

    def sentence(self, links: bool = True) -> str:
        r = self.rng
        parts = [
            f"The {r.choice(ROLES)} {r.choice(VERBS)} each {r.choice(ADJECTIVES)} "
            f"{r.choice(NOUNS)} before the {r.choice(NOUNS)} closes",
        ]
        roll = r.random()
        if roll < 0.3:
            parts.append(f", using `{r.choice(IDENTS)}` as the key")
        elif roll < 0.45 and links:
            parts.append(f"; see {self.link()}")
        elif roll < 0.6:
            parts.append(f" when the *{r.choice(VESSELS)}* is **{r.choice(ADJECTIVES)}**")
        return "".join(parts) + "."

    def paragraph(self, n: int | None = None) -> str:
        n = n or self.rng.randint(2, 5)
        return " ".join(self.sentence() for _ in range(n))

    def table(self) -> str:
        r = self.rng
        cols = r.randint(3, 5)
        header = ["Field", "Type", "Default", "Status", "Notes"][:cols]
        lines = ["| " + " | ".join(header) + " |", "|" + "|".join(["---"] * cols) + "|"]
        for _ in range(r.randint(3, 7)):
            row = [
                f"`{r.choice(IDENTS)}`",
                r.choice(["string", "integer", "duration", "date-time", "list", "boolean"]),
                r.choice(["`0`", "`none`", "`auto`", "`06:00`", "empty", "`true`"]),
                ('<span class="tw-badge">stable</span>' if r.random() < 0.3
                 else state_chip(r.choice(["stable", "beta", "deprecated"]))),
                f"{r.choice(VERBS).capitalize()} the {r.choice(NOUNS)}.",
            ][:cols]
            lines.append("| " + " | ".join(row) + " |")
        return "\n".join(lines)

    def code_block(self) -> str:
        r = self.rng
        lang = r.choice(LANGS)
        attrs = []
        if r.random() < 0.35:
            attrs.append('linenums="1"')
        if r.random() < 0.25:
            attrs.append('hl_lines="2 3"')
        if r.random() < 0.4:
            ext = {"python": "py", "bash": "sh"}.get(lang, lang)
            attrs.append(f'title="{slug(r.choice(NOUNS))}.{ext}"')
        body = CODE_SAMPLES[lang](r)
        head = "``` " + lang + (" " + " ".join(attrs) if attrs else "")
        return f"{head}\n{body}\n```"

    def admonition(self) -> str:
        r = self.rng
        kind = r.choice(ADMONITIONS)
        marker = "???" if r.random() < 0.2 else "!!!"
        title = (f'"{r.choice(ADJECTIVES).capitalize()} {r.choice(NOUNS)}s"'
                 if r.random() < 0.6 else "")
        body = "    " + self.paragraph(2)
        if r.random() < 0.3:
            first = self.sentence(links=False)
            body += "\n\n    - " + first + "\n    - " + self.sentence(links=False)
        return f"{marker} {kind} {title}".rstrip() + "\n\n" + body

    def bullet_list(self) -> str:
        r = self.rng
        ordered = r.random() < 0.4
        items = []
        for i in range(r.randint(3, 6)):
            mark = f"{i + 1}." if ordered else "-"
            items.append(f"{mark} {self.sentence()}")
            if r.random() < 0.2:
                command, option = r.choice(COMMANDS), r.choice(IDENTS).replace("_", "-")
                items.append(f"    - `{command} --{option}`")
        return "\n".join(items)

    def long_code_block(self) -> str:
        """A long highlighted block, as code-heavy pages have (line numbers on most)."""
        r = self.rng
        lang = r.choice(["python", "yaml", "bash"])
        body = "\n".join(CODE_SAMPLES[lang](r) for _ in range(r.randint(4, 8)))
        attrs = ['linenums="1"'] if r.random() < 0.7 else []
        if r.random() < 0.4:
            attrs.append('hl_lines="3 4 9"')
        return f"``` {lang} {' '.join(attrs)}".rstrip() + f"\n{body}\n```"

    def berth_board(self) -> list:
        """A board generated from data, with its own ``<style>`` block: each row's colours are
        a class of this page."""
        r, n = self.rng, self.index
        rules, rows = [], []
        for k in range(r.randint(12, 30)):
            fg, bg = r.choice(BOARD_COLOURS)
            rules.append(f".tw-board-{n}-{k} {{ color: {fg}; background: {bg}; }}")
            rows.append(f'<tr class="tw-board-{n}-{k}"><td>Berth {k + 1}</td>'
                        f'<td>{r.choice(VESSELS)}</td><td>{r.randint(5, 23):02d}:00</td></tr>')
        return ["<style>", *rules, "</style>", "", '<table class="tw-board">', *rows,
                "</table>", ""]

    def api_entry(self) -> str:
        """One function of an API reference: signature, description, parameters, returns."""
        r = self.rng
        name = f"{r.choice(VERBS)[:-1]}_{slug(r.choice(NOUNS)).replace('-', '_')}"
        params = r.sample(IDENTS, k=r.randint(2, 5))
        lines = [f"### `tidewright.{name}()`", "",
                 "```python", f"def {name}({', '.join(params)}, *, strict=False) -> Ledger", "```",
                 "", self.paragraph(2), "", "| Parameter | Type | Description |",
                 "|---|---|---|"]
        for p in params:
            lines.append(f"| `{p}` | `{r.choice(['str', 'int', 'Tide', 'Berth', 'date'])}` | "
                         f"{r.choice(VERBS).capitalize()} the {r.choice(NOUNS)}. |")
        lines += ["", f"`{r.choice(IDENTS)}`", f":   {self.sentence(links=False)}", "",
                  f"**Returns:** a `Ledger` of {r.choice(ADJECTIVES)} {r.choice(NOUNS)}s.", ""]
        if r.random() < 0.3:
            lines += ["!!! note", "", "    " + self.sentence(links=False), ""]
        return "\n".join(lines)

    def extension_blocks(self) -> list:
        """Content tabs (one with annotated code), cards with icons, a task list, keys, marks
        and a footnote: what the Markdown extensions of the "extensions" variant write."""
        r = self.rng
        ident = r.choice(IDENTS)
        out = [f"Press ++ctrl+alt+{r.choice('bdfhk')}++ to {r.choice(VERBS)[:-1]} the "
               f"==selected {r.choice(NOUNS)}== and {{++confirm++}} it[^1]. The ROTA screen "
               f"shows :material-ferry: {r.choice(VESSELS)}.", "",
               "*[ROTA]: rotation of arrivals", "",
               '=== "Planner"', "", f"    {self.sentence(links=False)}", "",
               "    ``` yaml", f"    {ident}: {r.randint(1, 99)}  # (1)!", "    ```", "",
               f"    1.  {self.sentence(links=False)}", "",
               '=== "Desk"', "", "    - [x] " + self.sentence(links=False),
               "    - [ ] " + self.sentence(links=False), "",
               '<div class="grid cards" markdown>', ""]
        for icon in ("material-anchor", "material-weather-windy"):
            out += [f"-   :{icon}: **{r.choice(ADJECTIVES).capitalize()} {r.choice(NOUNS)}s**",
                    "", "    ---", "", f"    {self.sentence(links=False)}", ""]
        return out + ["</div>", "", f"[^1]: {self.sentence(links=False)}", ""]

    def kind_sections(self) -> list:
        r = self.rng
        out = []
        if self.kind == "api":
            for _ in range(r.randint(5, 9)):
                out += [self.api_entry(), ""]
            return out
        for _ in range(r.randint(3, 5)):
            out += [f"## {r.choice(ADJECTIVES).capitalize()} {r.choice(NOUNS)}s", ""]
            if self.kind == "code":
                out += [self.paragraph(1), "", self.long_code_block(), "", self.code_block(), ""]
            elif self.kind == "table":
                out += [self.paragraph(1), "", self.table(), "", self.table(), "",
                        self.bullet_list(), ""]
            else:  # prose
                out += [self.paragraph(5), "", self.paragraph(4), "", self.bullet_list(), "",
                        self.admonition(), ""]
        return out

    def render(self, title: str) -> str:
        r = self.rng
        out = [f"# {title}", "", self.paragraph(3), ""]
        if self.index % 4 == 0:
            out += [f'<span class="tw-badge">since 2.{self.index % 9}</span> '
                    f'<span class="tw-muted">Maintained by the {r.choice(ROLES)}.</span>', ""]
        blocks = [self.table, self.code_block, self.admonition, self.bullet_list, self.paragraph]
        if self.own_styles:
            out += self.berth_board()
        if self.extensions:
            out += self.extension_blocks()
        if self.kind != "mixed":
            out += self.kind_sections()
        for _ in range(r.randint(3, 5) if self.kind == "mixed" else 0):
            heading = f"## {r.choice(ADJECTIVES).capitalize()} {r.choice(NOUNS)}s"
            out += [heading, "", self.paragraph(), ""]
            for block in r.sample(blocks, k=r.randint(2, 4)):
                out += [block(), ""]
            if r.random() < 0.5:
                out += [f"### {r.choice(VERBS).capitalize()} the {r.choice(NOUNS)}", "",
                        self.paragraph(2), ""]
        # Planted colours, on a deterministic share of pages.
        if self.index % 5 == 0:
            out += ["Older notes on this topic were withdrawn from the harbour archive.",
                    "{ .tw-faint }", ""]
        if self.index % 7 == 0:
            out += [f'<p class="tw-callout">Tidal hold: berths close {r.randint(20, 90)} minutes '
                    f'before low water.</p>', ""]
        if self.index % 11 == 0:
            home = relative_link(self.path, "index.md")
            out += [f'Also read <a class="tw-quiet-link" href="{home}">the overview</a>.', ""]
        if self.index % 13 == 0:
            out += ['<span class="tw-warning-text">Check the tide table before confirming.'
                    '</span>', ""]
        if self.index % 17 == 0:
            out += ['<span style="color: #b4c8d8">Figures are provisional until the evening '
                    'ledger closes.</span>', ""]
        out += [f"Page {self.index} of the Tidewright manual. Examples use invented vessels.",
                "{ .tw-caption }", ""]
        return "\n".join(out)


def _py(r):
    ident = r.choice(IDENTS)
    return (f"from tidewright import Harbour\n\nharbour = Harbour.open(\"brindlemoor\")\n"
            f"for berth in harbour.berths(state=\"{r.choice(ADJECTIVES)}\"):\n"
            f"    berth.{r.choice(VERBS)[:-1]}({ident}={r.randint(1, 99)})  # {r.choice(NOUNS)}\n"
            f"print(harbour.summary())")


def _yaml(r):
    return (f"harbour: brindlemoor\nberths:\n  - id: B{r.randint(1, 40):02d}\n"
            f"    {r.choice(IDENTS)}: {r.randint(1, 12)}\n    state: {r.choice(ADJECTIVES)}\n"
            f"tide_source: local-gauge  # {r.choice(NOUNS)}")


def _bash(r):
    command, option = r.choice(COMMANDS), r.choice(IDENTS).replace("_", "-")
    return (f"$ {command} --harbour brindlemoor --{option} {r.randint(1, 9)}\n"
            f"$ {r.choice(COMMANDS)} --dry-run | grep -v {r.choice(ADJECTIVES)}")


def _json(r):
    return (f'{{\n  "berth": "B{r.randint(1, 40):02d}",\n'
            f'  "{r.choice(IDENTS)}": {r.randint(0, 500)},\n'
            f'  "state": "{r.choice(ADJECTIVES)}",\n  "vessel": "{r.choice(VESSELS)}"\n}}')


def _toml(r):
    return (f"[harbour]\nname = \"brindlemoor\"\n{r.choice(IDENTS)} = {r.randint(1, 60)}\n\n"
            f"[rotation]\nstate = \"{r.choice(ADJECTIVES)}\"")


def _ini(r):
    return f"[tide]\noffset = {r.randint(-30, 30)}\n; {r.choice(NOUNS)}\nsource = gauge"


CODE_SAMPLES = {"python": _py, "yaml": _yaml, "bash": _bash, "json": _json, "toml": _toml,
                "ini": _ini}


def home_page(sections) -> str:
    lines = ["# Tidewright harbour scheduler", "",
             "Tidewright plans berths, ferry rotations and tide windows for the harbour office "
             "of Brindlemoor, an invented town. Vessels, people and figures in this manual are "
             "made up.", "",
             "!!! warning \"Safety colours\"", "",
             "    Safety signs on the quay follow their own standards and local rules; this "
             "manual's colours are for reading only.", "",
             "## Sections", ""]
    for title, _sdir, pages in sections:
        lines.append(f"- [{title}]({pages[0][1]})")
    lines.append("")
    return "\n".join(lines)


MKDOCS_THEME = """\
theme:
  name: mkdocs
  color_mode: auto
  user_color_mode_toggle: true
"""


def material_theme(accent: str, expand: bool, more: tuple = ()) -> str:
    # expanded: every section of the navigation open on every page (links all visible)
    features = "    - navigation.sections\n    - navigation.expand\n" if expand else ""
    features += "".join(f"    - {name}\n" for name in more)
    return f"""\
theme:
  name: material
  font: false
  features:
    - navigation.top
    - content.code.copy
{features}  palette:
    - media: "(prefers-color-scheme: light)"
      scheme: default
      primary: indigo
      accent: {accent}
      toggle:
        icon: material/weather-night
        name: Switch to dark mode
    - media: "(prefers-color-scheme: dark)"
      scheme: slate
      primary: blue grey
      accent: amber
      toggle:
        icon: material/weather-sunny
        name: Switch to light mode
"""


def mkdocs_yml(home, sections, plugin: bool, accent: str = DEFAULT_ACCENT,
               expand: bool = False, theme: str = "material", extensions: bool = False) -> str:
    nav = [f"  - {home[0]}: {home[1]}"]
    for title, _sdir, pages in sections:
        nav.append(f"  - \"{title}\":")
        for ptitle, path in pages:
            nav.append(f"      - \"{ptitle}\": {path}")
    # fail_on: never: the planted colours are findings by design, and a benchmark build
    # must finish to be timed.
    plugins = "  - search\n" + ("  - tinctura:\n      fail_on: never\n" if plugin else "")
    theme_block = {"mkdocs": MKDOCS_THEME, "readthedocs": "theme:\n  name: readthedocs\n"}.get(
        theme) or material_theme(accent, expand, EXTENSION_FEATURES if extensions else ())
    return f"""\
# Generated by benchmarks/generate_site.py; do not edit.
site_name: Tidewright harbour scheduler
docs_dir: docs
use_directory_urls: true
{theme_block}extra_css:
  - stylesheets/tidewright.css
markdown_extensions:
  - admonition
  - attr_list
  - md_in_html
  - tables
  - def_list
  - toc:
      permalink: true
  - pymdownx.details
  - pymdownx.highlight:
      anchor_linenums: true
  - pymdownx.inlinehilite
  - pymdownx.superfences
{EXTENSION_MARKDOWN if extensions else ""}plugins:
{plugins}nav:
""" + "\n".join(nav) + "\n"


def generate(n_pages: int, outdir: Path, seed: int = 7, plugin: bool = False,
             accent: str | None = None, variant: str = "baseline") -> dict:
    if n_pages < 1:
        raise ValueError("need at least one page")
    shape = VARIANTS[variant]
    accent = accent or shape["accent"]
    css = EXTRA_CSS + (STRUCTURAL_CSS if shape["structural"] else "") + \
        (MANY_CSS if shape["many"] else "") + \
        (RELATIONS_CSS if shape.get("extensions") else "")
    rng = random.Random(seed)
    home, sections = page_layout(n_pages, rng)
    docs = outdir / "docs"
    if docs.exists():
        shutil.rmtree(docs)
    (docs / "stylesheets").mkdir(parents=True)
    (docs / "stylesheets" / "tidewright.css").write_text(css, encoding="utf-8")
    (docs / "index.md").write_text(home_page(sections), encoding="utf-8")
    all_pages = [home] + [p for _t, _d, pages in sections for p in pages]
    index = 1
    for _title, sdir, pages in sections:
        (docs / sdir).mkdir()
        for ptitle, path in pages:
            # One generator per page: a page keeps its shape when N changes (link targets differ).
            page_rng = random.Random(f"{seed}:{index}")
            text = PageWriter(page_rng, all_pages, path, index,
                              kinds=shape["kinds"],
                              extensions=shape.get("extensions", False),
                              own_styles=shape.get("own_styles", False)).render(ptitle)
            (docs / path).write_text(text, encoding="utf-8")
            index += 1
    for name, with_plugin in (("mkdocs-plain.yml", False), ("mkdocs-plugin.yml", True),
                              ("mkdocs.yml", plugin)):
        (outdir / name).write_text(mkdocs_yml(home, sections, with_plugin, accent,
                                              expand=shape["expand"],
                                              theme=shape.get("theme", "material"),
                                              extensions=shape.get("extensions", False)),
                                   encoding="utf-8")
    return {"pages": len(all_pages), "sections": len(sections), "variant": variant}


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("pages", type=int, help="number of pages, home page included")
    ap.add_argument("outdir", type=Path)
    ap.add_argument("--seed", type=int, default=7)
    ap.add_argument("--plugin", action=argparse.BooleanOptionalAction, default=False,
                    help="list tinctura in mkdocs.yml (mkdocs-plain.yml and mkdocs-plugin.yml "
                         "are written either way)")
    ap.add_argument("--variant", choices=tuple(VARIANTS), default="baseline",
                    help="site shape (default baseline): varied = page kinds, expanded "
                         "navigation, structural and :has() selectors; states = varied with an "
                         "accent failing on hover/focus; many = states plus faint colours all "
                         "over the article; mkdocs-theme = varied on MkDocs' own theme; "
                         "readthedocs-theme = varied on MkDocs' readthedocs theme")
    ap.add_argument("--accent", default=None,
                    help="accent of the light scheme (default: the variant's; 'deep purple' "
                         "passes on white; 'teal' fails on hover/focus, so every navigation "
                         "link of every page becomes a finding: N*N findings)")
    args = ap.parse_args(argv)
    info = generate(args.pages, args.outdir, args.seed, args.plugin, args.accent, args.variant)
    print(f"wrote {info['pages']} pages ({info['variant']}) in {info['sections']} sections "
          f"to {args.outdir}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
