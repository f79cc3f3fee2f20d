"""SARIF 2.1.0 (OASIS Static Analysis Results Interchange Format), for code-scanning views.

One run: the rules run with their documentation, one result per finding (the held ones too:
suppressed findings carry a suppression with its reason, and with a baseline every result has
its ``baselineState``; baseline findings that are gone come last as "absent"), and the input
diagnostics as tool notifications. Results point at the Markdown source when a source map
gives one (``Header.source``), else at the built page; the element's XPath is a logical
location; ``partialFingerprints`` holds the fingerprint (``tinctura.fingerprint``).
Results are streamed as pages arrive. JSON escapes all page text; URIs are percent-encoded.
"""
from __future__ import annotations

import json
from urllib.parse import quote

from tinctura import fingerprint as fp_mod

from . import messages as m
from .base import Formatter, markdown_source, rules_run
from .notice import DISCLAIMER

SCHEMA = "https://json.schemastore.org/sarif-2.1.0.json"
LEVEL = {"error": "error", "warning": "warning", "info": "note"}
FINGERPRINT_KEY = f"tinctura/{fp_mod.VERSION}"
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


class SarifFormatter(Formatter):
    wants_fingerprints = True
    marked = True

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

    def page(self, page, findings) -> None:
        for f in findings:
            self._write(self.result(f))

    def _location(self, page: str, line: int) -> dict:
        built = self.header.uri(page) if callable(self.header.uri) else page
        loc = {"artifactLocation": {"uri": uri(built)}}
        if line and line > 0:
            loc["region"] = {"startLine": line}
        return loc

    def result(self, f) -> dict:
        s = f.sample
        fg, bg = m.finding_colours(f)
        built = self._location(s.page, s.line)
        if s.text and "region" in built:
            built["region"]["snippet"] = {"text": m.excerpt(s.text, 200)}
        source = markdown_source(self.header, s)
        if source:
            path, line = source
            primary = {"artifactLocation": {"uri": uri(path)}}
            if line and line > 0:
                primary["region"] = {"startLine": line}
        else:
            primary = built
        location = {"physicalLocation": primary,
                    "logicalLocations": [{"fullyQualifiedName": s.xpath, "kind": "element"}]}
        result = {
            "ruleId": f.rule,
            "ruleIndex": self.index.get(f.rule, -1),
            "level": LEVEL.get(f.severity, "warning"),
            "message": {"text": f"{m.message(f)} ({m.colour(fg)} on {m.colour(bg)}; scheme "
                                f"{s.scheme}, state {s.state}): \u201c"
                                f"{m.excerpt(s.text, 80)}\u201d"},
            "locations": [location],
            "properties": {"scheme": s.scheme, "state": s.state, "fg": m.colour(fg),
                           "bg": m.colour(bg), "ratio": float(f.ratio),
                           "required": float(f.required), "wcagLevel": f.level},
        }
        if result["ruleIndex"] < 0:
            del result["ruleIndex"]
        if source:
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

    def diagnostic(self, d) -> None:
        note = {"level": "error" if d.severity == "error" else "warning",
                "message": {"text": d.message},
                "locations": [{"physicalLocation": self._location(d.path, d.line)}]}
        self.notifications.append(note)

    def stop(self, summary) -> None:
        for entry in self.header.gone or ():
            self._write(self.gone_result(entry))
        failed = any(n["level"] == "error" for n in self.notifications)  # unreadable input
        invocations = [{"executionSuccessful": not failed,
                        "toolExecutionNotifications": self.notifications}]
        properties = {"disclaimer": DISCLAIMER, "schemes": list(summary.schemes),
                      "level": self.header.level}
        self.stream.write('\n],\n"invocations": %s,\n"properties": %s\n}]\n}\n'
                          % (_dumps(invocations), _dumps(properties)))

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
