"""Reports: formatters that turn a run's records into text, JSON, HTML or CSV, and the exit
status.

Each format's module is imported when a run first asks for that format: a check writing JSON
does not load the HTML report (its charts, swatches and what they import) nor CSV.
"""
from __future__ import annotations

import importlib

from .base import Formatter, Header, emit
from .notice import DISCLAIMER
from .progress import progress_for
from .scope import scope_of
from .status import exit_status
from .summary import Summary, summarise

__all__ = [
    "DISCLAIMER", "FORMATS", "Formatter", "Header", "JsonFormatter", "Summary", "TextFormatter",
    "emit", "exit_status", "progress_for", "render", "scope_of", "summarise",
]

# format -> (module of this package, Formatter class), in the order --help lists them
_BUILTIN = {
    "text": ("text_report", "TextFormatter"),
    "json": ("json_report", "JsonFormatter"),
    "sarif": ("sarif", "SarifFormatter"),  # one result per problem
    "sarif-findings": ("sarif", "SarifFindingsFormatter"),  # one result per finding
    "junit": ("junit", "JunitFormatter"),
    "annotations": ("annotations", "AnnotationsFormatter"),
    "baseline": ("baseline_report", "BaselineFormatter"),
    "html": ("html_report", "HtmlFormatter"),  # the audit report
    "csv": ("csv_report", "CsvFormatter"),  # one row per finding, for spreadsheets
}
_CLASSES = {cls: module for module, cls in _BUILTIN.values()}


def _load(module: str, cls: str):
    return getattr(importlib.import_module(f"{__name__}.{module}"), cls)


class _Formats(dict):
    """Format name -> Formatter class; a built-in format's class is imported on first use
    (names and order are known without importing any)."""

    def __getitem__(self, name):
        value = super().__getitem__(name)
        if isinstance(value, tuple):
            value = _load(*value)
            super().__setitem__(name, value)
        return value

    def get(self, name, default=None):
        return self[name] if name in self else default

    def values(self):
        return [self[name] for name in self]

    def items(self):
        return [(name, self[name]) for name in self]


FORMATS = _Formats(_BUILTIN)


def register(name: str, formatter) -> None:
    """Add an output format (a Formatter class taking ``(stream, header)``)."""
    FORMATS[name] = formatter


def __getattr__(name: str):
    """``report.JsonFormatter`` and the other formatter classes, imported when first named."""
    if name in _CLASSES:
        return _load(_CLASSES[name], name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


def render(stream, fmt: str, header: Header, pages, findings, problems, diagnostics=(),
           colour_choice: str = "auto", environ=None) -> Summary:
    """Write one report to ``stream`` in format ``fmt``; return its summary."""
    summary = summarise(pages, findings, problems, diagnostics, header.schemes)
    if fmt == "text":
        formatter = FORMATS["text"](stream, header, environ=environ, choice=colour_choice)
    else:
        formatter = FORMATS[fmt](stream, header)
    emit(formatter, pages, findings, problems, diagnostics, summary)
    return summary
