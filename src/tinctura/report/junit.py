"""JUnit XML, for test dashboards: one test case per page and rule.

A test case fails when the page has findings of that rule that count (not suppressed, not
already in the baseline); the failure lists the first ``LISTED`` of them and counts the rest
(a page whose navigation link fails in a state has thousands: a dashboard shows a case's text
whole, and every finding is in the JSON, CSV and ``sarif-findings`` reports). Held findings
are named in the case's ``system-out``, likewise. Names are unique (``page: code slug``).
Page text is escaped by the XML serializer; characters XML 1.0 cannot carry at all (most
control characters) are written as ``\\xNN``.
"""
from __future__ import annotations

import re
import xml.etree.ElementTree as ET

from tinctura import rules

from . import messages as m
from .base import Formatter, rules_run
from .notice import DISCLAIMER
from .outputs import active, record_counts

LISTED = 20  # findings a case's failure (or system-out) lists; the rest are counted
_NOT_XML = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\ud800-\udfff\ufffe\uffff]")


def xml_text(text: str) -> str:
    """``text`` with the characters XML 1.0 forbids written as ``\\xNN`` (or ``\\uNNNN``)."""
    return _NOT_XML.sub(lambda mo: f"\\x{ord(mo.group()):02x}" if ord(mo.group()) < 256
                        else f"\\u{ord(mo.group()):04x}", text or "")


def finding_line(f) -> str:
    s = f.sample
    fg, bg = m.finding_colours(f)
    state = "" if s.state == "rest" else f" :{s.state}"
    return (f"{s.page}:{s.line} {s.xpath} [scheme {s.scheme}{state}] {f.severity}: "
            f"{m.message(f)} ({m.colour(fg)} on {m.colour(bg)}) \u201c{m.excerpt(s.text, 80)}\u201d"
            + (f" [fingerprint {f.fingerprint}]" if f.fingerprint else ""))


def held_line(f) -> str:
    why = f"suppressed: {f.suppressed}" if f.suppressed else "unchanged against the baseline"
    return f"{finding_line(f)} ({why})"


def _listed(items, line, finding) -> str:
    """The first ``LISTED`` of ``items`` as lines (``finding(item)``: the item as a Finding),
    and a count of the others."""
    lines = [line(finding(item)) for item in items[:LISTED]]
    if len(items) > LISTED:
        lines.append(f"and {m.plural(len(items) - LISTED, 'more finding')} of this rule on "
                     f"this page (every finding: the JSON, CSV and sarif-findings reports)")
    return "\n".join(lines)


class JunitFormatter(Formatter):
    # a finding's fingerprint is shown where the run has it (a baseline, a suppression on the
    # page, another report that wants them): working it out for every finding only for the
    # 20 a case lists was most of this report's cost
    marked = True

    def __init__(self, stream, header):
        super().__init__(stream, header)
        self.rules = rules_run(header)
        self.cases: list = []
        self.failures = 0
        self.names: set = set()

    # a case lists only its first findings: the store's records are read, and only those
    # listed are rebuilt as findings
    wants_occurrences = True

    def occurrences(self, page, store) -> None:
        from tinctura.situations import rebuild

        templates, by_rule = store.situations, {}
        for r in store.occurrences(page.page):
            counts = record_counts(r)
            by_rule.setdefault(templates[r[0]].rule, ([], []))[0 if counts else 1].append(r)
        self._cases(page.page, by_rule,
                    lambda r: rebuild(templates[r[0]], r[1:], page.page))

    def page(self, page, findings) -> None:
        by_rule: dict = {}
        for f in findings:
            by_rule.setdefault(f.rule, ([], []))[0 if active(f) else 1].append(f)
        self._cases(page.page, by_rule, lambda f: f)

    def _cases(self, page: str, by_rule: dict, finding) -> None:
        """``by_rule``: code -> (items that count, held items); ``finding(item)``: a Finding."""
        codes = [r.code for r in self.rules] + sorted(set(by_rule) - {r.code for r in self.rules})
        for code in codes:
            counting, held = by_rule.get(code, ((), ()))
            self.cases.append(self.case(page, code, counting, held, finding))

    def case(self, page: str, code: str, counting, held, finding) -> ET.Element:
        try:
            slug = rules.get(code).slug
        except KeyError:
            slug = ""
        name = xml_text(f"{page}: {code} {slug}".strip())
        while name in self.names:  # unique even if two inputs share a page path
            name += " (again)"
        self.names.add(name)
        case = ET.Element("testcase", classname=xml_text(page), name=name)
        if counting:
            self.failures += 1
            failure = ET.SubElement(case, "failure", type=code,
                                    message=xml_text(f"{m.plural(len(counting), 'finding')}: "
                                                     f"{m.message(finding(counting[0]))}"))
            failure.text = xml_text(_listed(counting, finding_line, finding))
        if held:
            out = ET.SubElement(case, "system-out")
            out.text = xml_text(_listed(held, held_line, finding))
        return case

    def stop(self, summary) -> None:
        suites = ET.Element("testsuites", name="tinctura", tests=str(len(self.cases)),
                            failures=str(self.failures), errors="0")
        suite = ET.SubElement(suites, "testsuite", name=f"tinctura {self.header.level}",
                              tests=str(len(self.cases)), failures=str(self.failures),
                              errors="0", skipped="0")
        props = ET.SubElement(suite, "properties")
        ET.SubElement(props, "property", name="disclaimer", value=DISCLAIMER)
        ET.SubElement(props, "property", name="schemes", value=", ".join(summary.schemes))
        suite.extend(self.cases)
        ET.indent(suites)
        self.stream.write('<?xml version="1.0" encoding="UTF-8"?>\n')
        self.stream.write(ET.tostring(suites, encoding="unicode"))
        self.stream.write("\n")
