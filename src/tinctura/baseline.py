"""A baseline: the findings a project has accepted for now, so that only new ones fail.

``tinctura check --write-baseline FILE`` records the fingerprints of the current findings
(``tinctura.fingerprint``); ``--baseline FILE`` marks each finding "new" or "unchanged" and
lists the recorded findings that are gone. The file is JSON, sorted, so that its diff in a
review shows what changed.
"""
from __future__ import annotations

import json

from tinctura.report import messages as m

FORMAT = 1


class BaselineError(ValueError):
    """A baseline file that cannot be used; ``str()`` names the file."""


class Baseline:
    def __init__(self, entries=(), path: str = ""):
        self.path = path
        self.entries = {e["fingerprint"]: e for e in entries}
        self.seen: set = set()

    def state(self, fingerprint: str) -> str:
        if fingerprint in self.entries:
            self.seen.add(fingerprint)
            return "unchanged"
        return "new"

    def gone(self, pages=None, rules=None) -> list:
        """Recorded findings not met in this run, on the pages checked and rules run."""
        out = []
        for fp, entry in sorted(self.entries.items(), key=lambda kv: _order(kv[1])):
            if fp in self.seen:
                continue
            if pages is not None and entry.get("page") not in pages:
                continue
            if rules is not None and entry.get("rule") not in rules:
                continue
            out.append(entry)
        return out


def _order(entry) -> tuple:
    return (entry.get("page", ""), entry.get("rule", ""), entry.get("scheme", ""),
            entry.get("state", ""), entry.get("fingerprint", ""))


def entry(finding) -> dict:
    s = finding.sample
    fg, bg = m.finding_colours(finding)
    return {"fingerprint": finding.fingerprint, "rule": finding.rule, "page": s.page,
            "scheme": s.scheme, "state": s.state, "text": m.excerpt(s.text, 60),
            "fg": m.colour(fg), "bg": m.colour(bg)}


def dumps(findings, version: str = "") -> str:
    entries = sorted((entry(f) for f in findings), key=_order)
    doc = {"tool": "tinctura", "version": version, "format": FORMAT,
           "about": "Findings accepted for now: `tinctura check --baseline FILE` fails only on "
                    "findings not listed here. Regenerate with --write-baseline.",
           "findings": entries}
    return json.dumps(doc, indent=1, ensure_ascii=False) + "\n"


def load(path: str) -> Baseline:
    try:
        with open(path, encoding="utf-8") as fh:
            doc = json.load(fh)
    except OSError as exc:
        raise BaselineError(f"{path}: cannot read the baseline: {exc.strerror or exc}") from None
    except (json.JSONDecodeError, UnicodeDecodeError) as exc:
        raise BaselineError(f"{path}: not a tinctura baseline (not valid JSON: {exc})") from None
    if not isinstance(doc, dict) or doc.get("tool") != "tinctura" or \
            not isinstance(doc.get("findings"), list):
        raise BaselineError(f"{path}: not a tinctura baseline (write one with --write-baseline)")
    if doc.get("format") != FORMAT:
        raise BaselineError(f"{path}: baseline format {doc.get('format')!r} is not {FORMAT}; "
                            f"write it again with --write-baseline")
    entries = doc["findings"]
    if not all(isinstance(e, dict) and isinstance(e.get("fingerprint"), str) for e in entries):
        raise BaselineError(f"{path}: a baseline entry has no fingerprint")
    return Baseline(entries, path)
