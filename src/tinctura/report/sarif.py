"""SARIF 2.1.0 (OASIS Static Analysis Results Interchange Format), for code-scanning views.

Two formats. ``sarif``: one result per problem (a cause the writer fixes once, as the text
report groups them), at its worst occurrence, with example occurrences as related locations,
the fix in its message and properties, and a fingerprint of the problem that stays put when
pages are added or lines move. A site whose accent fails on every navigation link gives a few
hundred results, not hundreds of thousands: code-scanning services cap the results of a run
(recalled from memory: GitHub reads at most 25,000, and files of at most 10 MB compressed).
``sarif-findings``: one result per finding (the held ones too: suppressed findings carry a
suppression with its reason, and with a baseline every result has its ``baselineState``;
baseline findings that are gone come last as "absent"), streamed as pages arrive.

Both: the rules run with their documentation and the input diagnostics as tool notifications;
results point at the Markdown source when a source map gives one (``Header.source``), else at
the built page; the element's XPath is a logical location. JSON escapes all page text; URIs
are percent-encoded.
"""
from __future__ import annotations

import hashlib
import json
from urllib.parse import quote

from tinctura import fingerprint as fp_mod

from . import messages as m
from .base import Formatter, markdown_source, rules_run
from .notice import DISCLAIMER
from .outputs import per_situation

SCHEMA = "https://json.schemastore.org/sarif-2.1.0.json"
LEVEL = {"error": "error", "warning": "warning", "info": "note"}
FINGERPRINT_KEY = f"tinctura/{fp_mod.VERSION}"
PROBLEM_KEY = "tinctura-problem/v1"
RELATED = 10  # example occurrences a problem's result names besides its worst
SUPPRESSION_KIND = {"comment": "inSource", "attribute": "inSource", "configuration": "external"}


def uri(path: str) -> str:
    """A relative URI reference for a file path (spaces, '#', '%' and the like encoded)."""
    return quote(path.replace("\\", "/"), safe="/")


def rule_dict(rule, level: str) -> dict:
    criterion = rule.criterion(level)
    docs = rule.docs
    help_text = f"{docs.checks}\n\nWhy: {docs.why}\n\nHow to fix: {docs.fix}"
    refs = "\n".join(f"- [{title}]({url})" for title, url in docs.references)
    return {
        "id": rule.code,
        "name": rule.slug,
        "shortDescription": {"text": rule.title},
        "fullDescription": {"text": docs.checks},
        "help": {"text": help_text,
                 "markdown": f"{docs.checks}\n\n**Why:** {docs.why}\n\n**How to fix:** "
                             f"{docs.fix}" + (f"\n\n{refs}" if refs else "")},
        "helpUri": criterion.url,
        "defaultConfiguration": {"level": LEVEL.get(rule.severity, "warning")},
        "properties": {"wcag": [c.number for c in rule.criteria],
                       "tags": ["accessibility", "contrast"]},
    }


class _Sarif(Formatter):
    """The run around the results: the rules, the notifications, the run's properties."""

    def __init__(self, stream, header):
        super().__init__(stream, header)
        self.rules = rules_run(header)
        self.index = {r.code: n for n, r in enumerate(self.rules)}
        self.notifications: list = []
        self.count = 0
        self.baseline_used = False

    def start(self, summary) -> None:
        driver = {"name": "tinctura", "version": self.header.version or "0",
                  "rules": [rule_dict(r, self.header.level) for r in self.rules]}
        self.stream.write('{"$schema": %s,\n"version": "2.1.0",\n"runs": [{\n"tool": %s,\n'
                          '"results": [' % (json.dumps(SCHEMA), _dumps({"driver": driver})))

    def _write(self, result: dict) -> None:
        self.stream.write(",\n    " if self.count else "\n    ")
        self.stream.write(json.dumps(result, ensure_ascii=False))
        self.count += 1

    def _location(self, page: str, line: int) -> dict:
        built = self.header.uri(page) if callable(self.header.uri) else page
        loc = {"artifactLocation": {"uri": uri(built)}}
        if line and line > 0:
            loc["region"] = {"startLine": line}
        return loc

    def _places(self, s) -> tuple:
        """``(where the result points, the built page or None)``: the Markdown source when
        known (then the built page besides), else the built page."""
        built = self._location(s.page, s.line)
        if s.text and "region" in built:
            built["region"]["snippet"] = {"text": m.excerpt(s.text, 200)}
        source = markdown_source(self.header, s)
        if not source:
            return built, None
        path, line = source
        primary = {"artifactLocation": {"uri": uri(path)}}
        if line and line > 0:
            primary["region"] = {"startLine": line}
        return primary, built

    def diagnostic(self, d) -> None:
        note = {"level": "error" if d.severity == "error" else "warning",
                "message": {"text": d.message},
                "locations": [{"physicalLocation": self._location(d.path, d.line)}]}
        self.notifications.append(note)

    def stop(self, summary) -> None:
        self._last()
        failed = any(n["level"] == "error" for n in self.notifications)  # unreadable input
        invocations = [{"executionSuccessful": not failed,
                        "toolExecutionNotifications": self.notifications}]
        properties = {"disclaimer": DISCLAIMER, "schemes": list(summary.schemes),
                      "level": self.header.level, **self._properties()}
        self.stream.write('\n],\n"invocations": %s,\n"properties": %s\n}]\n}\n'
                          % (_dumps(invocations), _dumps(properties)))

    def _last(self) -> None:
        """Results written after all others."""

    def _properties(self) -> dict:
        return {}


class SarifFormatter(_Sarif):
    """One result per problem (``sarif``)."""

    wants_findings = False

    @classmethod
    def reads_records(cls, group: str) -> bool:
        return False  # problems carry their examples

    def problem(self, index: int, problem) -> None:
        self._write(self.problem_result(index, problem))

    def problem_result(self, index: int, p) -> dict:
        from .text_report import counted, examples, fix_texts, headline

        worst = p.worst
        lines = [headline(p, self.header.locate, len(self.header.schemes) > 1),
                 f"{counted(p)}; problem {index} of the reports.", *fix_texts(p)]
        primary, built = self._places(worst.sample)
        result = {
            "ruleId": p.rule, "ruleIndex": self.index.get(p.rule, -1),
            "level": LEVEL.get(p.severity, "warning"),
            "message": {"text": "\n".join(lines)},
            "locations": [{"physicalLocation": primary, "logicalLocations": [
                {"fullyQualifiedName": worst.sample.xpath, "kind": "element"}]}],
            "partialFingerprints": {PROBLEM_KEY: problem_fingerprint(p)},
            "properties": self._figures(p),
        }
        if result["ruleIndex"] < 0:
            del result["ruleIndex"]
        if getattr(worst, "baseline", ""):  # with a baseline, problems group new findings only
            result["baselineState"] = "new"
        related = [] if built is None else [(built, "the built page")]
        for f in examples(p.example_pool(), worst, RELATED + 1):
            if f is not worst and len(related) < RELATED + 1:
                fg, bg = m.finding_colours(f)
                related.append((self._places(f.sample)[0],
                                f"also: \u201c{m.excerpt(f.sample.text, 80)}\u201d, "
                                f"{m.colour(fg)} on {m.colour(bg)}, {m.measured(f)}"))
        if related:
            result["relatedLocations"] = [{"id": n, "physicalLocation": where,
                                           "message": {"text": text}}
                                          for n, (where, text) in enumerate(related, 1)]
        return result

    def _figures(self, p) -> dict:
        worst = p.worst
        fg, bg = m.finding_colours(worst)
        out = {"occurrences": p.occurrences, "pages": p.pages,
               "schemes": sorted(p.schemes) or [worst.sample.scheme],
               "state": worst.sample.state, "fg": m.colour(fg), "bg": m.colour(bg),
               "ratio": float(worst.ratio), "required": float(worst.required),
               "wcagLevel": worst.level}
        override = getattr(p, "override", None)
        if override is not None:
            out["fix"] = {"file": override.where, "css": override.css(),
                          "verified": bool(override.verified)}
        return out

    def _properties(self) -> dict:
        gone = len(self.header.gone or ())
        return {"results": "one per problem; `--format sarif-findings` gives one per finding",
                **({"baselineGone": gone} if gone else {})}


def problem_fingerprint(p) -> str:
    """A problem's identity across runs: its rule and the declarations behind both colours
    (selector, property, value; not the stylesheet's name, which a theme hashes, nor lines)."""
    from tinctura.problems import target_declaration

    parts = [p.rule]
    for cause in (p.fg_cause, p.bg_cause):
        d = target_declaration(cause) if cause is not None else None
        parts.append("-" if d is None else f"{d.selector}|{d.property}|{d.value}")
    return hashlib.sha1("\n".join(parts).encode("utf-8")).hexdigest()[:24]


def _said(f) -> tuple:
    fg, bg = m.finding_colours(f)
    return m.message(f), m.colour(fg), m.colour(bg)


class SarifFindingsFormatter(_Sarif):
    """One result per finding (``sarif-findings``)."""

    wants_fingerprints = True
    marked = True

    def __init__(self, stream, header):
        super().__init__(stream, header)
        self._memo: dict = {}  # (id of a situation's arguments, ...) -> (them, what it says)

    def page(self, page, findings) -> None:
        for f in findings:
            self._write(self.result(f))

    def _said(self, f) -> tuple:
        """``(message, fg, bg)`` of a finding's situation, worked out once for all its
        occurrences (they share their template's arguments: ``situations.occurrence``)."""
        return per_situation(self._memo, f, _said)

    def result(self, f) -> dict:
        s = f.sample
        said, fg, bg = self._said(f)
        primary, built = self._places(s)
        location = {"physicalLocation": primary,
                    "logicalLocations": [{"fullyQualifiedName": s.xpath, "kind": "element"}]}
        result = {
            "ruleId": f.rule,
            "ruleIndex": self.index.get(f.rule, -1),
            "level": LEVEL.get(f.severity, "warning"),
            "message": {"text": f"{said} ({fg} on {bg}; scheme {s.scheme}, state {s.state}): "
                                f"\u201c{m.excerpt(s.text, 80)}\u201d"},
            "locations": [location],
            "properties": {"scheme": s.scheme, "state": s.state, "fg": fg, "bg": bg,
                           "ratio": float(f.ratio),
                           "required": float(f.required), "wcagLevel": f.level},
        }
        if result["ruleIndex"] < 0:
            del result["ruleIndex"]
        if built is not None:
            result["relatedLocations"] = [{"id": 1, "physicalLocation": built,
                                           "message": {"text": "the built page"}}]
        if f.fingerprint:
            result["partialFingerprints"] = {FINGERPRINT_KEY: f.fingerprint}
        result["suppressions"] = []
        if f.suppressed:
            kind = SUPPRESSION_KIND.get(f.args.get("suppressed_by"), "inSource")
            result["suppressions"] = [{"kind": kind, "status": "accepted",
                                       "justification": f.suppressed}]
        if f.baseline:
            self.baseline_used = True
            result["baselineState"] = f.baseline
        return result

    def _last(self) -> None:
        for entry in self.header.gone or ():
            self._write(self.gone_result(entry))

    def gone_result(self, entry: dict) -> dict:
        text = (f"No longer found (recorded in the baseline): {entry.get('rule', '')} on "
                f"\u201c{entry.get('text', '')}\u201d (scheme {entry.get('scheme', '')}, "
                f"state {entry.get('state', '')})")
        result = {"ruleId": entry.get("rule", ""), "kind": "pass", "level": "none",
                  "message": {"text": text}, "baselineState": "absent",
                  "locations": [{"physicalLocation": self._location(entry.get("page", ""), 0)}],
                  "partialFingerprints": {FINGERPRINT_KEY: entry.get("fingerprint", "")}}
        if entry.get("rule") in self.index:
            result["ruleIndex"] = self.index[entry["rule"]]
        return result


def _dumps(value) -> str:
    return json.dumps(value, ensure_ascii=False)
