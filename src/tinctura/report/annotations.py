"""CI annotations in the workflow-command syntax CI runners read from a job's output::

    ::error file=site/guide/index.html,line=12,title=TC100 text-ratio::message

Severity error -> ``error``, warning -> ``warning``, info -> ``notice``. Escaped as that
syntax documents: in the message ``%`` -> ``%25``, CR -> ``%0D``, LF -> ``%0A``; in property
values also ``:`` -> ``%3A`` and ``,`` -> ``%2C``. Other control characters are written as
``\\xNN`` so that page text cannot drive the terminal. Runners show only the first few
annotations of each kind, so a plain summary line follows them.
"""
from __future__ import annotations

import re

from . import messages as m
from .base import Formatter, markdown_source
from .outputs import active

COMMAND = {"error": "error", "warning": "warning", "info": "notice"}
_CONTROL = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\x7f-\x9f]")


def _controls(text: str) -> str:
    return _CONTROL.sub(lambda mo: f"\\x{ord(mo.group()):02x}", text)


def escape_data(text: str) -> str:
    text = _controls(str(text))
    return text.replace("%", "%25").replace("\r", "%0D").replace("\n", "%0A")


def escape_property(text: str) -> str:
    return escape_data(text).replace(":", "%3A").replace(",", "%2C")


def command(kind: str, message: str, **props) -> str:
    shown = ",".join(f"{k}={escape_property(v)}" for k, v in props.items() if v not in (None, ""))
    return f"::{kind}{' ' + shown if shown else ''}::{escape_data(message)}"


class AnnotationsFormatter(Formatter):
    def __init__(self, stream, header):
        super().__init__(stream, header)
        self.count = 0

    def page(self, page, findings) -> None:
        for f in findings:
            if active(f):
                self.stream.write(self.annotation(f) + "\n")
                self.count += 1

    def annotation(self, f) -> str:
        s = f.sample
        fg, bg = m.finding_colours(f)
        path, line = s.page, s.line
        if callable(self.header.uri):
            path = self.header.uri(s.page)
        source = markdown_source(self.header, s)
        if source:
            path, line = source
        state = "" if s.state == "rest" else f", :{s.state}"
        message = (f"{m.message(f)} ({m.colour(fg)} on {m.colour(bg)}; scheme {s.scheme}"
                   f"{state}): \u201c{m.excerpt(s.text, 80)}\u201d at {s.xpath}")
        return command(COMMAND.get(f.severity, "warning"), message, file=path,
                       line=str(line) if line else None, title=f"{f.rule} {f.slug}")

    def diagnostic(self, d) -> None:
        if d.severity == "error":
            self.stream.write(command("error", d.message, file=d.path,
                                      line=str(d.line) if d.line else None,
                                      title="tinctura input") + "\n")

    def stop(self, summary) -> None:
        by = ", ".join(f"{n:,} {sev}" for sev, n in summary.by_severity.items() if n)
        self.stream.write(
            f"tinctura: {m.plural(summary.findings, 'finding')}"
            + (f" ({by})" if by else "")
            + f" on {m.plural(summary.pages_with_findings, 'page')} of {summary.pages:,} "
              f"checked; annotations above ({self.count:,}); the full list is in the other "
              f"reports. Automated checks cover only part of WCAG: conformance needs a review "
              f"by qualified people.\n")
