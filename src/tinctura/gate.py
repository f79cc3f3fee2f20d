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
from tinctura import situations as sit
from tinctura.model import Diagnostic

from . import suppress
from .report import outputs


active = outputs.active  # True when a finding counts: not suppressed, not in the baseline


class Gate:
    def __init__(self, allow=(), allow_source: str = "configuration", baseline=None,
                 rules_run=(), read=None, fingerprints: bool = True):
        self.allow = suppress.ConfigAllow(allow, allow_source)
        self.baseline = baseline
        self.rules_run = set(rules_run or (r.code for r in rules.RULES))
        self.read = read  # site-relative page -> its bytes (None: cannot be read)
        # whether every finding gets its fingerprint (a baseline always needs them; pages with
        # suppressions get them, as their marks are written out)
        self.fingerprints = fingerprints or baseline is not None
        self.pages: set = set()
        # active findings only, in FindingStore's shape: summaries and exit_status(gate)
        self.counts = outputs.count(())
        self.held = Counter()  # "suppressed", "unchanged"
        self.diagnostics: list = []  # run-wide (the configuration's unused entries)

    def page(self, rel: str, findings, page_marks=None) -> list:
        """Mark one page's findings (document order); returns the page's diagnostics about
        suppressions (malformed, or matching nothing). ``page_marks``: ``marks_of``' answer,
        when the caller asked already."""
        self.pages.add(rel)
        fingerprint.assign(findings)
        root, marks = page_marks or self.marks_of(rel, bool(findings))
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

    def counts_only(self, rel: str, page_marks) -> bool:
        """Whether the page's findings need nothing but counting (``count``): no suppression
        on it (``page_marks``: ``marks_of``' answer), no ``allow`` entry for it, no fingerprints."""
        return page_marks[1] is None and not self.allow.applies(rel) and not self.fingerprints

    def count(self, rel: str, per_situation, size: int, templates) -> None:
        """``records`` for a page that ``counts_only``, from its occurrences per situation."""
        self.pages.add(rel)
        outputs.add_situation_counts(self.counts, rel, per_situation, size, templates)

    def records(self, rel: str, records: list, templates, page_marks=None) -> tuple:
        """``page`` for a store's records of one page (``templates``: situation -> template
        finding): ``(diagnostics, records)``, the records carrying the gate's marks when it
        set them. A page without suppressions, in a run that needs no fingerprints, costs a
        count per situation: its findings are never built."""
        self.pages.add(rel)
        page_marks = page_marks or self.marks_of(rel, bool(records))
        if self.counts_only(rel, page_marks):
            self.count(rel, Counter(r[0] for r in records), len(records), templates)
            return [], records
        if page_marks[1] is not None or self.allow.applies(rel):
            findings = [sit.rebuild(templates[r[0]], r[1:], rel) for r in records]
            diagnostics = self.page(rel, findings, page_marks)
            return diagnostics, [(r[0],) + sit.place(f) for r, f in zip(records, findings)]
        marked, counted = [], []
        for r, value in zip(records, fingerprint.of_records(rel, records, templates)):
            state = self.baseline.state(value) if self.baseline is not None else ""
            marked.append(r[:6] + ((value, "", state, ""),))
            if state == "unchanged":
                self.held["unchanged"] += 1
            else:
                counted.append(r)
        self.count(rel, Counter(r[0] for r in counted), len(counted), templates)
        return [], marked

    def marks_of(self, rel: str, has_findings: bool):
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


def intake(gate: Gate, store, collector, rel: str, findings) -> list:
    """One page's findings through the gate, into the store (``report.store.FindingStore``)
    and the problems (``problems.Collector``); returns the gate's diagnostics of the page."""
    start = len(store)
    if isinstance(findings, sit.PageFindings) and findings.built() is None:
        page_marks = gate.marks_of(rel, bool(findings))
        if findings.packed() is not None and gate.counts_only(rel, page_marks):
            # as a worker packed them: kept and counted without reading them
            numbers = store.numbers(findings)
            per_situation = store.put_packed(rel, findings, numbers)
            gate.count(rel, per_situation, len(findings), store.situations)
            collector.add_counts(rel, per_situation, store.situations, start,
                                 lambda skip=(): _renumbered(findings, numbers, skip))
            return []
        diagnostics, records = gate.records(rel, store.records_of(findings), store.situations,
                                            page_marks)
    else:  # findings built already (site-level rules, tests): the gate marks them
        diagnostics = gate.page(rel, findings)
        records = store.records_of(findings)
    store.put(rel, records)
    collector.add_page(rel, records, store.situations, start)
    return diagnostics


def _renumbered(findings, numbers, skip=()) -> list:
    """A worker's records of ``findings`` (``situations.PageFindings``) with ``numbers``
    (template index -> situation number) applied, in order, but for those of the situations
    in ``skip`` (left out before they are made or copied: a page's records are mostly of
    situations whose problems need nothing more)."""
    wanted = [n not in skip for n in numbers]
    return [(numbers[r[0]],) + r[1:] for r in findings.records_of(wanted)]


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
