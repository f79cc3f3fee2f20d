"""The JSON report, documented by ``tinctura/data/report-schema.json``; and JSON Lines samples.

Colours are ``#rrggbb``; ratios are unrounded floats (display code truncates, never JSON).
"""
from __future__ import annotations

import functools
import json
import os

from . import appearance
from . import messages as m
from .base import Formatter, Header
from .notice import DISCLAIMER
from .text_report import headline

SCHEMA_VERSION = 3  # the compact layout; the flat one keeps writing format 1
FLAT_VERSION = 1
SCHEMA_PATH = os.path.join(os.path.dirname(os.path.dirname(__file__)), "data", "report-schema.json")


def schema() -> dict:
    """The JSON Schema of the report (shipped as package data)."""
    with open(SCHEMA_PATH, encoding="utf-8") as fh:
        return json.load(fh)


def declaration_dict(d) -> dict | None:
    if d is None:
        return None
    return {
        "property": d.property,
        "value": d.value,
        "sheet": d.sheet,
        "line": d.line,
        "column": getattr(d, "column", 0),
        "selector": d.selector,
        "origin": d.origin,
        "important": d.important,
    }


def cause_dict(c) -> dict | None:
    if c is None:
        return None
    return {
        "declaration": declaration_dict(c.declaration),
        "inherited_from": c.inherited_from,
        "chain": [declaration_dict(d) for d in c.chain],
    }


def layer_dict(layer) -> dict:
    alpha = None
    if layer.colour is not None:
        alpha = float(layer.colour[3]) if len(layer.colour) > 3 else 1.0
    return {
        "xpath": layer.xpath,
        "kind": layer.kind,
        "colour": None if layer.colour is None else m.colour(layer.colour),
        "alpha": alpha,
        "cause": cause_dict(layer.cause),
    }


def fix_dict(fix) -> dict:
    return {"target": fix.target, "colour": m.colour(fix.colour), "ratio": float(fix.ratio)}


def verdict_dict(f, fg, bg) -> dict:
    """What a rule said of a finding's colours: shared by a finding and a situation."""
    return {
        "fg": m.colour(fg),
        "bg": m.colour(bg),
        "ratio": float(f.ratio),
        "required": float(f.required),
        "level": f.level,
        "message": m.message(f),
        "fix": [fix_dict(x) for x in f.fixes],
    }


def finding_dict(f) -> dict:
    out = _finding_dict(f)
    if appearance.is_appearance(f):  # site-level rules: the palette entries and contexts
        out["appearance"] = appearance.appearance_dict(f)
    return out


def _finding_dict(f) -> dict:
    s = f.sample
    fg, bg = m.finding_colours(f)
    return {
        "rule": f.rule,
        "slug": f.slug,
        "severity": f.severity,
        "page": s.page,
        "scheme": s.scheme,
        "state": s.state,
        "xpath": s.xpath,
        "line": s.line,
        "text": m.excerpt(s.text, 200),
        **verdict_dict(f, fg, bg),
        "fg_cause": cause_dict(s.fg_cause),
        "bg_cause": cause_dict(s.bg_cause),
        **gate_dict(f),
    }


def gate_dict(f) -> dict:
    """The gate's marks (tinctura.gate), when the run set them."""
    if not getattr(f, "fingerprint", ""):
        return {}
    return marks_dict((f.fingerprint, f.suppressed, f.baseline))


def situation_dict(f, problem: int | None, occurrences: int) -> dict:
    """What every occurrence of one situation shares (compact layout)."""
    s = f.sample
    fg, bg = m.finding_colours(f)
    fg_cause = cause_dict(s.fg_cause)
    if fg_cause is not None:
        fg_cause["inherited_from"] = None  # per occurrence: its fifth field
    return {
        "problem": problem,
        "rule": f.rule,
        "slug": f.slug,
        "severity": f.severity,
        "scheme": s.scheme,
        "state": s.state,
        **verdict_dict(f, fg, bg),
        "fg_cause": fg_cause,
        "bg_cause": cause_dict(s.bg_cause),
        "occurrences": occurrences,
        **({"appearance": appearance.appearance_dict(f)} if appearance.is_appearance(f) else {}),
    }


def page_occurrences(records) -> list:
    """A page's store records ``(situation, xpath, line, text, inherited_from, layers, marks)``,
    in run order, as format 3 occurrences ``[situations, shared, rest, line, text(, up)(,
    marks)]``.

    Records one after the other at the same place (one text failing several rules or states)
    become one occurrence naming their situations in order, so report order is kept. The XPath
    is written as how many leading characters it shares with the previous occurrence's XPath on
    the page (``shared``; ASCII characters only, so every JSON reader counts them alike) and the
    ``rest``. ``up``: the ancestor an inherited text colour comes from, how many levels up (or
    its XPath, should it not be an ancestor; null when there is none but marks follow).
    ``marks``: the gate's marks, one ``[fingerprint, suppressed, baseline]`` per situation, when
    the run set them."""
    return occurrences_after(records, "")[0]


def occurrences_after(records, previous: str) -> tuple:
    """``(page_occurrences(records), XPath of the last)`` of records that follow, on their
    page, an occurrence at ``previous`` (their first XPath is written against it)."""
    out = []
    last = None  # the previous record
    occ = None
    shared = 0
    for record in records:
        sid, xpath, line, text, inherited, _layers, marks = record
        if (last is not None and xpath == last[1] and line == last[2] and text == last[3]
                and inherited == last[4] and (not marks) == (not last[6])):
            occ[0].append(sid)
            if marks:
                occ[-1].append(marks_list(marks))
            continue
        last = record
        shared = _shared(previous, xpath, shared)
        previous = xpath
        occ = [[sid], shared, xpath[shared:], line, _excerpt(text)]
        if inherited or marks:
            occ.append(levels_up(xpath, inherited) if inherited else None)
        if marks:
            occ.append([marks_list(marks)])
        out.append(occ)
    return out, previous


# format 3's pages are written as ``json.dumps(..., ensure_ascii=False, separators=(",", ":"))``
_COMPACT = json.JSONEncoder(ensure_ascii=False, separators=(",", ":")).encode
_MARK = "\0"  # JSON writes a NUL in a string as \u0000: a raw one in its text is ours


def encoded_occurrences(records) -> str | None:
    """``page_occurrences`` of a page's records (numbered by the page's own templates) as
    format 3 writes them, but for each occurrence's list of numbers: written between two NUL
    characters, for ``renumbered`` to put in the run's situation numbers. Made where the page
    is judged (``situations.PageFindings.pack``), so that with several processes the main one
    only copies it. None if a text of the page held a NUL (excerpts never do): the report is
    then written from the records."""
    return encoded_list(page_occurrences(records))


def encoded_list(occurrences: list) -> str | None:
    """``occurrences`` (``page_occurrences``'s) written as ``encoded_occurrences`` does."""
    for occ in occurrences:
        occ[0] = _MARK + ",".join(map(str, occ[0])) + _MARK
    text = _COMPACT(occurrences)
    if text.count("\\u0000") != 2 * len(occurrences):
        return None
    return text.replace('"\\u0000', "[" + _MARK).replace('\\u0000"', _MARK + "]")


def renumbered(text: str, mapping) -> str:
    """``encoded_occurrences``' text with ``mapping`` (template number -> situation number;
    None: the same) applied, as ``page_occurrences`` of the renumbered records would write it."""
    parts = text.split(_MARK)
    if mapping is not None:
        new = {}  # a page's occurrences repeat a few lists of numbers
        for i in range(1, len(parts), 2):
            numbers = parts[i]
            if numbers not in new:
                new[numbers] = ",".join(str(mapping[int(n)]) for n in numbers.split(","))
            parts[i] = new[numbers]
    return "".join(parts)


def marks_list(marks) -> list:
    """The gate's marks ``(fingerprint, suppressed, baseline, suppressed_by)`` as format 3
    writes them (``suppressed_by`` is not written: only the SARIF report tells origins apart)."""
    return [marks[0], marks[1] or None, marks[2] or None]


def marks_dict(marks) -> dict:
    """The gate's marks ``(fingerprint, suppressed, baseline[, suppressed_by])`` as format 1
    writes them (``suppressed_by`` is not written, as in ``marks_list``)."""
    fingerprint, suppressed, baseline = marks[:3]
    return {"fingerprint": fingerprint, "suppressed": suppressed or None,
            "baseline": baseline or None}


def levels_up(xpath: str, inherited: str):
    """How many levels above ``xpath`` the ancestor ``inherited`` is (its XPath when it is not
    an ancestor)."""
    n = len(inherited)
    if xpath.startswith("/", n) and xpath.startswith(inherited):
        end = xpath.find("::", n)  # a pseudo-element's or a kind's suffix
        return xpath.count("/", n, end if end >= 0 else len(xpath))
    return inherited


@functools.lru_cache(maxsize=4096)
def _excerpt(text: str) -> str:
    return m.excerpt(text, 200)  # the same navigation texts on every page: computed once


def _shared(a: str, b: str, guess: int = 0) -> int:
    """The number of leading characters ``a`` and ``b`` share, up to their first non-ASCII one.
    ``guess``: the previous pair's answer, often this one's too (links of one list); then a
    bisection over C-level slice comparisons, faster than a loop over characters."""
    n = len(a) if len(a) < len(b) else len(b)
    if a[:n] != b[:n]:
        low, high = 0, n  # a[:low] == b[:low], a[:high] != b[:high]
        if 0 < guess < n:
            if a[:guess] != b[:guess]:
                high = guess
            elif a[guess] != b[guess]:
                low = high = guess
            else:
                low = guess
        while high - low > 1:
            mid = (low + high) // 2
            if a[:mid] == b[:mid]:
                low = mid
            else:
                high = mid
        n = low
    if not a.isascii() and not a[:n].isascii():
        n = next(i for i, c in enumerate(a) if not c.isascii())
    return n


def read_page(entry: dict, version: int = SCHEMA_VERSION) -> list:
    """A compact report's page entry with its XPaths written out: per occurrence
    ``[situations, xpath, line, text, up, marks]`` (``situations`` a list; ``marks`` a list of
    dicts as format 1 writes them, one per situation; ``up`` and ``marks`` None when absent).
    Reads format 2's records too."""
    out = []
    xpath = ""
    for occ in entry["occurrences"]:
        if version == 2:
            sids, xpath, rest = [occ[0]], occ[1], occ[2:]
            marks = [rest[3]] if len(rest) > 3 else None
        else:
            sids, xpath, rest = occ[0], xpath[:occ[1]] + occ[2], occ[3:]
            marks = [marks_dict(x) for x in rest[3]] if len(rest) > 3 else None
        up = rest[2] if len(rest) > 2 else None
        out.append([sids, xpath, rest[0], rest[1], up, marks])
    return out


def places(doc: dict):
    """Every finding of a compact report, in report order: ``(page, situation index, occurrence,
    marks or None)``, the occurrence as ``read_page`` gives it (shared by its situations)."""
    version = doc.get("format_version", SCHEMA_VERSION)
    for entry in doc["pages"]:
        for occ in read_page(entry, version):
            marks = occ[5] or [None] * len(occ[0])
            for sid, mark in zip(occ[0], marks):
                yield entry["page"], sid, occ, mark


def inherited_xpath(occurrence: list):
    """The XPath an occurrence's text colour is inherited from (None: set on the element);
    ``occurrence`` as ``read_page`` gives it (or a format 2 record)."""
    if len(occurrence) < 5 or occurrence[4] is None:
        return None
    up = occurrence[4]
    if isinstance(up, str):
        return up
    return occurrence[1].split("::")[0].rsplit("/", up)[0]


def expand(doc: dict) -> list:
    """Every finding of a report as format 1 writes it (a compact report's situations and
    occurrences put back together), in report order."""
    return list(iter_findings(doc))


def iter_findings(doc: dict):
    """``expand``, one finding at a time (a large report's findings need not all be in memory)."""
    if "findings" in doc:
        yield from doc["findings"]
        return
    situations = doc["situations"]
    for page, sid, occ, marks in places(doc):
        sit = situations[sid]
        fg_cause = sit["fg_cause"]
        if fg_cause is not None:
            fg_cause = dict(fg_cause, inherited_from=inherited_xpath(occ))
        yield {
            "rule": sit["rule"], "slug": sit["slug"], "severity": sit["severity"],
            "page": page, "scheme": sit["scheme"], "state": sit["state"],
            "xpath": occ[1], "line": occ[2], "text": occ[3], "fg": sit["fg"],
            "bg": sit["bg"], "ratio": sit["ratio"], "required": sit["required"],
            "level": sit["level"], "message": sit["message"], "fix": sit["fix"],
            "fg_cause": fg_cause, "bg_cause": sit["bg_cause"],
            **({"appearance": sit["appearance"]} if "appearance" in sit else {}),
            **(marks or {})}


def cause_fix_dict(fix) -> dict | None:
    if fix is None:
        return None
    return {
        "declaration": declaration_dict(fix.declaration),
        "required": float(fix.required),
        "backgrounds": [m.colour(b) for b in fix.backgrounds],
        "colour": None if fix.colour is None else m.colour(fix.colour),
        "ratio": None if fix.ratio is None else float(fix.ratio),
        "contexts": [
            {
                "backgrounds": [m.colour(b) for b in c.backgrounds],
                "colour": None if c.colour is None else m.colour(c.colour),
                "ratio": None if c.ratio is None else float(c.ratio),
                "schemes": list(c.schemes),
            }
            for c in fix.contexts
        ],
    } | ({"settles": list(fix.settles)} if fix.settles else {}) | \
        ({"own_css": override_dict(fix.own_css)} if fix.own_css is not None else {})


def override_dict(o) -> dict | None:
    """A problem's fix as the site's own CSS: ``{file, css}`` (and whether a re-check proved it)."""
    if o is None:
        return None
    out = {"file": o.where, "css": o.css(), "verified": bool(o.verified)}
    if o.verified is False:
        out["not_verified"] = m.not_verified(o)
    if o.note:
        out["note"] = o.note
    if o.shared_with:
        out["shared_with"] = list(o.shared_with)
    return out


def source_dict(source) -> dict | None:
    if source is None:
        return None
    return {"file": source.file, "line": source.line, "near": source.near,
            "template": source.template}


def where_dict(finding, location) -> dict:
    """Where a problem's worst occurrence is, for a writer: its page, text, readable locator and
    Markdown source (or theme template) when the run could tell."""
    s = finding.sample
    out = {"page": s.page, "text": m.excerpt(s.text, 200), "locator": "", "source": None}
    if location is not None:
        out["locator"] = location.locator
        out["source"] = source_dict(location.source)
    return out


def problem_dict(problem, index_of: dict, locate=None, many_schemes: bool = False) -> dict:
    location = locate(problem.worst.sample) if locate is not None else None
    return {
        "rule": problem.rule,
        "slug": problem.slug,
        "severity": problem.severity,
        "scheme": problem.scheme,
        "occurrences": problem.occurrences,
        "pages": problem.pages,
        "worst_ratio": float(problem.worst_ratio),
        "required": float(problem.required),
        "fg_cause": cause_dict(problem.fg_cause),
        "bg_cause": cause_dict(problem.bg_cause),
        "fix_at_cause": cause_fix_dict(problem.fix_at_cause),
        "schemes": [{"name": name, "occurrences": f.count, "worst_ratio": float(f.worst_ratio)}
                    for name, f in problem.schemes.items()],
        "fix": override_dict(getattr(problem, "override", None)),
        "findings": list(problem.indexes) if problem.indexes is not None else
        [index_of[id(f)] for f in problem.findings if id(f) in index_of],
        "where": where_dict(problem.worst, location),
        "sentence": headline(problem, locate, many_schemes or len(problem.schemes) > 1),
    }


def diagnostic_dict(d) -> dict:
    return {"path": d.path, "line": d.line, "severity": d.severity, "message": d.message}


def summary_dict(s) -> dict:
    return {
        "pages": s.pages,
        "samples": s.samples,
        "findings": s.findings,
        "problems": s.problems,
        "by_severity": dict(s.by_severity),
        "by_rule": dict(s.by_rule),
        "by_page": dict(s.by_page),
        "by_scheme": dict(s.by_scheme),
        "undetermined": s.undetermined,
        "undetermined_reasons": dict(s.undetermined_reasons),
        "exempt": s.exempt,
        "exempt_reasons": dict(s.exempt_reasons),
        "skipped": dict(s.skipped),
        "diagnostics": s.diagnostics,
        "schemes": list(s.schemes),
    }


def link_dict(link):
    """A link's context for SC 1.4.1 (TC120), or None for samples outside running-text links."""
    if link is None:
        return None
    return {"surround": None if link.surround is None else m.colour(link.surround),
            "rest": list(link.rest), "hover": list(link.hover), "focus": list(link.focus)}


def sample_dict(s) -> dict:
    """One line of ``tinctura pairs``: a sample with its colours and where they came from."""
    return {
        "page": s.page,
        "scheme": s.scheme,
        "state": s.state,
        "xpath": s.xpath,
        "line": s.line,
        "text": (s.text or "")[:60],
        "kind": s.kind,
        "fg": None if s.fg is None else m.colour(s.fg),
        "bg": None if s.bg is None else m.colour(s.bg),
        "fg_alpha_raw": float(s.fg_alpha_raw),
        "font_size_px": float(s.font_size_px),
        "font_weight": s.font_weight,
        "status": s.status,
        "reason": s.reason,
        "exempt": s.exempt,
        "link": link_dict(s.link),
        "bg_alternatives": [m.colour(b) for b in s.bg_alternatives if b is not None],
        "fg_cause": cause_dict(s.fg_cause),
        "bg_cause": cause_dict(s.bg_cause),
        "bg_layers": [layer_dict(layer) for layer in s.bg_layers],
    }


class JsonFormatter(Formatter):
    """Writes one JSON document as the run goes, so that a large site's report is never held in
    memory twice.

    Compact layout (format 3, the default): ``pages`` as they arrive, each with its occurrences
    as small records ``[situations, shared, rest, line, text(, up)(, marks)]``
    (``page_occurrences``); ``problems``, each listing its situations; ``situations``, what
    their occurrences share (message, colours, ratio, fix, causes), each once. Flat layout
    (format 1, ``Header.findings_layout="flat"``): every finding in full, one per line, and
    problems listing finding indexes."""

    FLAT_SECTIONS = ("findings", "problems", "diagnostics")
    COMPACT_SECTIONS = ("pages", "problems", "situations", "diagnostics")
    marked = True  # suppressed and baseline-known findings are listed too, marked
    written_as_judged = True  # (``occurrences``: ``store.encoded``)

    def __init__(self, stream, header: Header):
        super().__init__(stream, header)
        self.flat = getattr(header, "findings_layout", "compact") == "flat"
        self.wants_occurrences = not self.flat
        self.SECTIONS = self.FLAT_SECTIONS if self.flat else self.COMPACT_SECTIONS
        self.index_of: dict = {}  # id(finding) -> index in "findings", for the problems
        self.store = None  # compact: the run's FindingStore
        self._situation_problem: dict = {}  # situation -> problem index (compact)
        self._by_problem = None  # problem key -> its situations (compact)
        self._section = -1  # index in SECTIONS of the open list
        self._count = 0  # items written to the open list

    def start(self, summary) -> None:
        head = {
            "tool": {"name": self.header.tool, "version": self.header.version},
            "format_version": FLAT_VERSION if self.flat else SCHEMA_VERSION,
            "level": self.header.level,
            "schemes": list(self.header.schemes or summary.schemes),
        }
        self.stream.write("{\n")
        for key, value in head.items():
            self._field(key, value)
            self.stream.write(",\n")

    def page(self, page, findings) -> None:
        for f in findings:
            self.index_of[id(f)] = self._item("findings", finding_dict(f))

    def occurrences(self, page, store) -> None:
        self.store = store
        encoded = store.encoded(page.page)
        if encoded is None:
            records = store.occurrences(page.page)
            if records:
                self._item("pages", {"page": page.page,
                                     "occurrences": page_occurrences(records)})
            return
        text = renumbered(*encoded)
        if text != "[]":  # as written by _item
            self._open(self.SECTIONS.index("pages"))
            self.stream.write(",\n    " if self._count else "\n    ")
            self.stream.write(f'{{"page":{_COMPACT(page.page)},"occurrences":{text}}}')
            self._count += 1

    def problem(self, index, problem) -> None:
        if self.flat:
            self._item("problems", problem_dict(problem, self.index_of, self.header.locate,
                                                len(self.header.schemes) > 1))
            return
        item = problem_dict(problem, {}, self.header.locate, len(self.header.schemes) > 1)
        del item["findings"]
        item["situations"] = sids = self._situations_of(problem)
        for sid in sids:
            self._situation_problem[sid] = index - 1
        self._item("problems", item)

    def _situations_of(self, problem) -> list:
        from tinctura.problems import cause_key, problem_key

        if self.store is None:
            return []
        if self._by_problem is None:
            self._by_problem = {}
            for sid, template in enumerate(self.store.situations):
                self._by_problem.setdefault(problem_key(template), []).append(sid)
        key = (problem.rule, cause_key(problem.fg_cause), cause_key(problem.bg_cause))
        return self._by_problem.get(key, [])

    def _situations(self) -> None:
        """The compact layout's situations, once every problem is written."""
        if self.flat or self._section >= self.SECTIONS.index("situations"):
            return
        self._open(self.SECTIONS.index("situations"))
        if self.store is None:
            return
        for sid, template in enumerate(self.store.situations):
            self._item("situations", situation_dict(
                template, self._situation_problem.get(sid), self.store.occurrence_counts[sid]))

    def diagnostic(self, diagnostic) -> None:
        self._situations()
        self._item("diagnostics", diagnostic_dict(diagnostic))

    def stop(self, summary) -> None:
        self._situations()
        self._open(len(self.SECTIONS))
        self._field("summary", summary_dict(summary))
        self.stream.write(",\n")
        self._field("disclaimer", DISCLAIMER)
        self.stream.write("\n}\n")

    def _field(self, key, value) -> None:
        text = json.dumps(value, indent=2, ensure_ascii=False).replace("\n", "\n  ")
        self.stream.write(f"  {json.dumps(key)}: {text}")

    def _open(self, section: int) -> None:
        """Close the open list and open (and close) every list before ``section``."""
        while self._section < section:
            if self._section >= 0:
                self.stream.write("\n  ],\n" if self._count else "],\n")
            self._section += 1
            self._count = 0
            if self._section < len(self.SECTIONS):
                self.stream.write(f'  "{self.SECTIONS[self._section]}": [')

    def _item(self, section: str, item) -> int:
        self._open(self.SECTIONS.index(section))
        self.stream.write(",\n    " if self._count else "\n    ")
        compact = (",", ":") if section == "pages" else None  # most of a large report
        self.stream.write(json.dumps(item, ensure_ascii=False, separators=compact))
        self._count += 1
        return self._count - 1
