"""The CSV report: one row per finding, for spreadsheets. Columns are documented in README.md.

Cells a spreadsheet would read as a formula (starting with ``=``, ``+``, ``-``, ``@``, a tab or a
carriage return) get a leading apostrophe, common practice for spreadsheet exports; page text
and stylesheet values are untrusted input. Numbers the tool writes itself stay numbers.
"""
from __future__ import annotations

import csv

from tinctura.problems import target_declaration

from . import messages as m
from .base import Formatter, Header
from .outputs import per_situation

COLUMNS = (
    "page", "line", "xpath", "scheme", "state", "rule", "slug", "severity", "level", "criterion",
    "text", "fg", "bg", "ratio", "required", "fix_fg", "fix_bg", "fg_declaration", "fg_where",
    "bg_declaration", "bg_where", "source", "message",
)
_FORMULA = ("=", "+", "-", "@", "\t", "\r")


def safe(value) -> str:
    text = "" if value is None else str(value)
    return "'" + text if text.startswith(_FORMULA) else text


def _declaration(cause) -> tuple:
    d = target_declaration(cause)
    if d is None:
        return "", ""
    return f"{d.property}: {d.value}", d.where()


def row(f, header=None, memo=None) -> list:
    """A finding's cells. ``memo``: a dict that keeps the cells a situation decides (colours,
    measures, causes, message) once for all its occurrences, which share their template's
    arguments and fixes (``situations.occurrence``)."""
    from .html_report import source_of

    s = f.sample
    head, numbers, causes, message = _situation_cells(f) if memo is None else \
        per_situation(memo, f, _situation_cells)
    text = [s.page, s.line, s.xpath, s.scheme, s.state, *head, m.excerpt(s.text, 200)]
    tail = [*causes, source_of(s, header), message]
    return [safe(v) for v in text] + numbers + [safe(v) for v in tail]


def _situation_cells(f) -> tuple:
    s = f.sample
    fg, bg = m.finding_colours(f)
    fix = {x.target: m.colour(x.colour) for x in f.fixes}
    fg_decl, fg_where = _declaration(s.fg_cause)
    bg_decl, bg_where = _declaration(s.bg_cause)
    head = [f.rule, f.slug, f.severity, f.level, m.message_args(f)["sc"]]
    numbers = [m.colour(fg), m.colour(bg), f"{f.ratio:.4f}", m.required(f.required)]
    causes = [fix.get("foreground", ""), fix.get("background", ""), fg_decl, fg_where, bg_decl,
              bg_where]
    return head, numbers, causes, m.message(f)


class CsvFormatter(Formatter):
    def __init__(self, stream, header: Header):
        super().__init__(stream, header)
        self.writer = csv.writer(stream, lineterminator="\n")
        self.memo: dict = {}

    def start(self, summary) -> None:
        self.writer.writerow(COLUMNS)

    def page(self, page, findings) -> None:
        for f in findings:
            self.writer.writerow(row(f, self.header, self.memo))
