"""CI annotations in the workflow-command syntax CI runners read from a job's output::

    ::error file=site/guide/index.html,line=12,title=TC100 text-ratio::message

One annotation per problem (as the text report groups them), at its worst occurrence's
Markdown line when known, else its built page: the plain sentence, the counts and the fix. A
site whose accent fails on every navigation link would otherwise write hundreds of thousands of
lines into the job's log, of which runners show the first few (every finding is in the JSON,
CSV and ``sarif-findings`` reports).

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
    wants_findings = False

    @classmethod
    def reads_records(cls, group: str) -> bool:
        return False  # problems carry their examples

    def __init__(self, stream, header):
        super().__init__(stream, header)
        self.count = 0

    def problem(self, index: int, problem) -> None:
        self.stream.write(self.annotation(index, problem) + "\n")
        self.count += 1

    def annotation(self, index: int, p) -> str:
        from .text_report import counted, fix_texts, headline

        s = p.worst.sample
        path, line = s.page, s.line
        if callable(self.header.uri):
            path = self.header.uri(s.page)
        source = markdown_source(self.header, s)
        if source:
            path, line = source
        lines = [headline(p, self.header.locate, len(self.header.schemes) > 1),
                 f"{counted(p)} (problem {index} of the reports); here: "
                 f"\u201c{m.excerpt(s.text, 80)}\u201d at {s.xpath}", *fix_texts(p)]
        return command(COMMAND.get(p.severity, "warning"), "\n".join(lines), file=path,
                       line=str(line) if line else None, title=f"{p.rule} {p.slug}")

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
              f"checked; annotations above, one per problem ({self.count:,}); every finding is "
              f"in the JSON, CSV and sarif-findings reports. Automated checks cover only part "
              f"of WCAG: conformance needs a review by qualified people.\n")
