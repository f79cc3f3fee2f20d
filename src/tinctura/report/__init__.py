"""Reports: formatters that turn a run's records into text, JSON, HTML or CSV, and the exit
status."""
from __future__ import annotations

from .base import Formatter, Header, emit
from .csv_report import CsvFormatter
from .html_report import HtmlFormatter
from .json_report import JsonFormatter
from .notice import DISCLAIMER
from .progress import progress_for
from .scope import scope_of
from .status import exit_status
from .summary import Summary, summarise
from .text_report import TextFormatter

__all__ = [
    "DISCLAIMER", "FORMATS", "Formatter", "Header", "JsonFormatter", "Summary", "TextFormatter",
    "emit", "exit_status", "progress_for", "render", "scope_of", "summarise",
]

FORMATS = {"text": TextFormatter, "json": JsonFormatter}


def register(name: str, formatter) -> None:
    """Add an output format (a Formatter class taking ``(stream, header)``)."""
    FORMATS[name] = formatter


from .annotations import AnnotationsFormatter  # noqa: E402  (they import this package's modules)
from .baseline_report import BaselineFormatter  # noqa: E402
from .junit import JunitFormatter  # noqa: E402
from .sarif import SarifFormatter  # noqa: E402

register("sarif", SarifFormatter)
register("junit", JunitFormatter)
register("annotations", AnnotationsFormatter)
register("baseline", BaselineFormatter)


def render(stream, fmt: str, header: Header, pages, findings, problems, diagnostics=(),
           colour_choice: str = "auto", environ=None) -> Summary:
    """Write one report to ``stream`` in format ``fmt``; return its summary."""
    summary = summarise(pages, findings, problems, diagnostics, header.schemes)
    if fmt == "text":
        formatter = TextFormatter(stream, header, environ=environ, choice=colour_choice)
    else:
        formatter = FORMATS[fmt](stream, header)
    emit(formatter, pages, findings, problems, diagnostics, summary)
    return summary


register("html", HtmlFormatter)  # the audit report
register("csv", CsvFormatter)  # one row per finding, for spreadsheets
