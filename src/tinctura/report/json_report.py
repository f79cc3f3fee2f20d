"""The JSON report, documented by ``tinctura/data/report-schema.json``; and JSON Lines samples.

Colours are ``#rrggbb``; ratios are unrounded floats (display code truncates, never JSON).
"""
from __future__ import annotations

import json
import os

from . import messages as m
from .base import Formatter, Header
from .notice import DISCLAIMER

SCHEMA_VERSION = 1
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


def finding_dict(f) -> dict:
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
        "fg": m.colour(fg),
        "bg": m.colour(bg),
        "ratio": float(f.ratio),
        "required": float(f.required),
        "level": f.level,
        "message": m.message(f),
        "fix": [fix_dict(x) for x in f.fixes],
        "fg_cause": cause_dict(s.fg_cause),
        "bg_cause": cause_dict(s.bg_cause),
    }


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
    }


def problem_dict(problem, index_of: dict) -> dict:
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
        "findings": [index_of[id(f)] for f in problem.findings if id(f) in index_of],
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
        "skipped": dict(s.skipped),
        "diagnostics": s.diagnostics,
        "schemes": list(s.schemes),
    }


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
        "bg_alternatives": [m.colour(b) for b in s.bg_alternatives if b is not None],
        "fg_cause": cause_dict(s.fg_cause),
        "bg_cause": cause_dict(s.bg_cause),
        "bg_layers": [layer_dict(layer) for layer in s.bg_layers],
    }


class JsonFormatter(Formatter):
    """Collects everything, writes one JSON document at ``stop``."""

    def __init__(self, stream, header: Header):
        super().__init__(stream, header)
        self.findings: list = []
        self.index_of: dict = {}
        self.problems: list = []
        self.diagnostics: list = []

    def page(self, page, findings) -> None:
        for f in findings:
            self.index_of[id(f)] = len(self.findings)
            self.findings.append(finding_dict(f))

    def problem(self, index, problem) -> None:
        self.problems.append(problem_dict(problem, self.index_of))

    def diagnostic(self, diagnostic) -> None:
        self.diagnostics.append(diagnostic_dict(diagnostic))

    def stop(self, summary) -> None:
        document = {
            "tool": {"name": self.header.tool, "version": self.header.version},
            "format_version": SCHEMA_VERSION,
            "level": self.header.level,
            "schemes": list(self.header.schemes or summary.schemes),
            "findings": self.findings,
            "problems": self.problems,
            "diagnostics": self.diagnostics,
            "summary": summary_dict(summary),
            "disclaimer": DISCLAIMER,
        }
        write_document(self.stream, document, one_per_line=("findings", "problems",
                                                             "diagnostics"))


def write_document(stream, document: dict, one_per_line=()) -> None:
    """Indented JSON, except that the entries of the lists named in ``one_per_line`` take one
    line each: a large site's report stays readable and greppable, and is written by the C
    encoder (``json`` falls back to pure Python whenever it indents; ten times slower here)."""
    stream.write("{\n")
    last = len(document) - 1
    for i, (key, value) in enumerate(document.items()):
        stream.write(f"  {json.dumps(key)}: ")
        if key in one_per_line and value:
            stream.write("[\n    ")
            stream.write(",\n    ".join(json.dumps(item, ensure_ascii=False) for item in value))
            stream.write("\n  ]")
        else:
            stream.write(json.dumps(value, indent=2, ensure_ascii=False).replace("\n", "\n  "))
        stream.write(",\n" if i < last else "\n")
    stream.write("}\n")
