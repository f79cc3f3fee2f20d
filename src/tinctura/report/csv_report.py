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


def row(f, header=None) -> list:
    from .html_report import source_of

    s = f.sample
    fg, bg = m.finding_colours(f)
    fix = {x.target: m.colour(x.colour) for x in f.fixes}
    fg_decl, fg_where = _declaration(s.fg_cause)
    bg_decl, bg_where = _declaration(s.bg_cause)
    text = [s.page, s.line, s.xpath, s.scheme, s.state, f.rule, f.slug, f.severity, f.level,
            m.message_args(f)["sc"], m.excerpt(s.text, 200)]
    numbers = [m.colour(fg), m.colour(bg), f"{f.ratio:.4f}", m.required(f.required)]
    tail = [fix.get("foreground", ""), fix.get("background", ""), fg_decl, fg_where, bg_decl,
            bg_where, source_of(s, header), m.message(f)]
    return [safe(v) for v in text] + numbers + [safe(v) for v in tail]


class CsvFormatter(Formatter):
    def __init__(self, stream, header: Header):
        super().__init__(stream, header)
        self.writer = csv.writer(stream, lineterminator="\n")

    def start(self, summary) -> None:
        self.writer.writerow(COLUMNS)

    def page(self, page, findings) -> None:
        for f in findings:
            self.writer.writerow(row(f, self.header))
