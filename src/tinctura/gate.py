"""The maintainer's gate, applied to each page's findings after the rules run.

Every finding gets its fingerprint (``fingerprint``); reviewed suppressions mark it
``suppressed`` with their reason (``suppress``); a baseline marks it "new" or "unchanged"
(``baseline``). Findings that are suppressed or unchanged against the baseline are *held*:
they stay in the JSON and SARIF reports, marked, but do not fail the run and are not grouped
into problems. The walk, its caches and the rules are untouched: this only reads findings and,
for pages that carry a directive, the built page again.
"""
from __future__ import annotations

import os
from collections import Counter

from tinctura import fingerprint, rules
from tinctura.model import Diagnostic

from . import suppress
from .report import outputs


active = outputs.active  # True when a finding counts: not suppressed, not in the baseline


class Gate:
    def __init__(self, allow=(), allow_source: str = "configuration", baseline=None,
                 rules_run=(), read=None):
        self.allow = suppress.ConfigAllow(allow, allow_source)
        self.baseline = baseline
        self.rules_run = set(rules_run or (r.code for r in rules.RULES))
        self.read = read  # site-relative page -> its bytes (None: cannot be read)
        self.pages: set = set()
        # active findings only, in FindingStore's shape: summaries and exit_status(gate)
        self.counts = outputs.count(())
        self.held = Counter()  # "suppressed", "unchanged"
        self.diagnostics: list = []  # run-wide (the configuration's unused entries)

    def page(self, rel: str, findings) -> list:
        """Mark one page's findings (document order); returns the page's diagnostics about
        suppressions (malformed, or matching nothing)."""
        self.pages.add(rel)
        fingerprint.assign(findings)
        root, marks = self._marks(rel, bool(findings))
        diagnostics = list(marks.diagnostics) if marks is not None else []
        config_match = self.allow.matcher(rel, root)
        for f in findings:
            reason, origin = None, "configuration"
            for mark in (marks.marks if marks else ()):
                if mark.covers(f):
                    mark.used = True
                    reason, origin = mark.reason, mark.origin
                    break
            if reason is None:
                reason = config_match(f)
            f.suppressed = reason or ""
            if reason:  # a new dict: re-stamped findings of a replayed fragment share theirs
                f.args = {**f.args, "suppressed_by": origin}
            if self.baseline is not None:
                f.baseline = self.baseline.state(f.fingerprint)
            if f.suppressed:
                self.held["suppressed"] += 1
            elif f.baseline == "unchanged":
                self.held["unchanged"] += 1
            else:
                outputs.add_count(self.counts, f)
        for mark in (marks.marks if marks is not None else ()):
            if not mark.used and mark.rules & self.rules_run:
                diagnostics.append(Diagnostic(
                    rel, f"suppression of {', '.join(sorted(mark.rules))} matches no finding "
                         f"(reason given: {mark.reason}); remove it if the fault is fixed",
                    line=mark.line))
        return diagnostics

    def _marks(self, rel: str, has_findings: bool):
        """The page's tree and suppressions, when it has any (else (None, None))."""
        if self.read is None:
            return None, None
        want_tree = has_findings and self.allow.wants_tree(rel)
        data = self.read(rel)
        if data is None or not (want_tree or suppress.has_marks(data)):
            return None, None
        from tinctura.extract.html import parse_html

        try:
            root = parse_html(data)
        except Exception:  # the engine has already reported a page it cannot parse
            return None, None
        return root, suppress.scan(root, rel)

    def finish(self) -> list:
        """Run-wide diagnostics: configuration entries that matched nothing."""
        self.diagnostics.extend(self.allow.unused(self.rules_run))
        return self.diagnostics

    def gone(self) -> list:
        """Baseline entries not met on the pages checked, for the rules run."""
        if self.baseline is None:
            return []
        return self.baseline.gone(self.pages, self.rules_run)

    def note(self) -> str:
        """One line on what the gate held back, or empty."""
        bits = []
        if self.held["suppressed"]:
            bits.append(f"{self.held['suppressed']:,} suppressed (with reasons)")
        if self.baseline is not None:
            new = sum(self.counts["severity"].values())
            bits.append(f"baseline {self.baseline.path}: {new:,} new, "
                        f"{self.held['unchanged']:,} unchanged (not failing), "
                        f"{len(self.gone()):,} gone")
        return "; ".join(bits)


def site_reader(paths):
    """A ``read(rel)`` for the sites and single pages given on the command line."""
    roots = [os.path.abspath(p) if os.path.isdir(p) else os.path.dirname(os.path.abspath(p))
             for p in paths]

    def read(rel: str):
        for root in roots:
            path = os.path.join(root, rel)
            if os.path.isfile(path):
                try:
                    with open(path, "rb") as fh:
                        return fh.read()
                except OSError:
                    return None
        return None
    return read
