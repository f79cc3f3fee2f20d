"""Several reports from one run: ``--format FORMAT[:FILE]`` (repeatable) and the plugin's
``report`` option. Each format is a Formatter registered by name in ``report.FORMATS``
(``report.register``); a report written to a file goes to a temporary file first, then
replaces the file (``atomic_output``), so a reader never sees half a report.
"""
from __future__ import annotations

import contextlib
import os
import tempfile
from collections import Counter

from tinctura.palette import report_page

from .base import findings_by_page


def active(finding) -> bool:
    """True when a finding counts: not suppressed, not already in the baseline."""
    return not getattr(finding, "suppressed", "") and \
        getattr(finding, "baseline", "") != "unchanged"


def per_situation(memo: dict, f, make, limit: int = 50000):
    """``make(f)``, worked out once for all the occurrences of ``f``'s situation: they share
    their template's arguments and fixes (``situations.occurrence``), which the memo holds so
    that their ids stay theirs. ``memo`` is cleared past ``limit`` situations."""
    key = (id(f.args), id(f.fixes), f.rule, f.sample.scheme, f.sample.state)
    kept = memo.get(key)
    if kept is None:
        if len(memo) >= limit:
            memo.clear()
        kept = memo[key] = (f.args, f.fixes, make(f))
    return kept[2]


def record_counts(record) -> bool:
    """``active`` for a store's occurrence record (``FindingStore.occurrences``): its gate
    marks ``(fingerprint, suppressed, baseline, origin)`` or None."""
    marks = record[6] if len(record) > 6 else None
    return not marks or (not marks[1] and marks[2] != "unchanged")


def count(findings) -> dict:
    """The counts a summary needs, in FindingStore's shape, over the findings that count."""
    counts = {"severity": Counter(), "rule": Counter(), "page": Counter(), "scheme": Counter()}
    for f in findings:
        add_count(counts, f)
    return counts


def add_count(counts: dict, f) -> None:
    counts["severity"][f.severity] += 1
    counts["rule"][f.rule] += 1
    # site-level findings compare pages: they count under the whole site, where reports list them
    counts["page"][report_page(f)] += 1
    counts["scheme"][f.sample.scheme] += 1


def add_situation_counts(counts: dict, page: str, per_situation, size: int, templates,
                         sign: int = 1) -> None:
    """``add_count`` for ``size`` occurrences on ``page``, given per situation
    (``per_situation``: situation -> occurrences; ``templates``: situation -> template
    finding); ``sign`` -1 takes them away."""
    for sid, n in per_situation.items():
        t = templates[sid]
        counts["severity"][t.severity] += sign * n
        counts["rule"][t.rule] += sign * n
        counts["scheme"][t.sample.scheme] += sign * n
    if size:
        counts["page"][page] += sign * size


class GateView:
    """A run's findings as one report sees them: only those that count (``marked=False``), or
    all of them, marked (``marked=True``). Counts (summaries, exit status) are always of the
    findings that count. Works over a list or a FindingStore (read one page at a time)."""

    def __init__(self, findings, marked: bool, counts: dict | None = None):
        self._findings = findings
        self.marked = marked
        if hasattr(findings, "by_page"):
            self._pages, self._grouped = findings.pages(), None
        else:
            self._grouped = findings_by_page(findings)
            self._pages = list(self._grouped)
        self.counts = counts if counts is not None else count(f for f in self._all() if active(f))

    def _all(self):
        for name in self._pages:
            yield from self._page(name)

    def _page(self, name):
        if self._grouped is not None:
            return self._grouped.get(name, [])
        return self._findings.by_page(name)

    def pages(self) -> list:
        return list(self._pages)

    def by_page(self, name) -> list:
        items = self._page(name)
        return list(items) if self.marked else [f for f in items if active(f)]

    def __iter__(self):
        for name in self._pages:
            yield from self.by_page(name)

    def __len__(self) -> int:
        return sum(self.counts["severity"].values())

    def __bool__(self) -> bool:
        return len(self) > 0


@contextlib.contextmanager
def atomic_output(path: str):
    """A text stream for ``path``: written to a temporary file beside it, renamed over it when
    the block ends without an error (removed otherwise)."""
    folder = os.path.dirname(os.path.abspath(path))
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{os.path.basename(path)}.", suffix=".tmp",
                                   dir=folder)
    except OSError as exc:
        raise OSError(exc.errno, f"cannot write: {exc.strerror or exc}", path) from None
    try:
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)  # as open() would create it, not mkstemp's 0600
        with os.fdopen(fd, "w", encoding="utf-8", newline="") as stream:
            yield stream
        os.replace(tmp, path)
    except BaseException:
        with contextlib.suppress(OSError):
            os.unlink(tmp)
        raise


def records_written_as_judged(names, flat: bool, marked: bool) -> bool:
    """Whether each page's records are written for the report where the page is judged (in
    a worker; ``engine.Options.encode_occurrences``): a compact JSON report among the formats
    ``names``, whose findings carry no gate marks (``marked``: fingerprints, a baseline)."""
    from . import FORMATS

    return any(FORMATS[name].written_as_judged for name in names) and not flat and not marked


def records_read_back(names, group: str, flat: bool, marked: bool, baseline: bool) -> bool:
    """Whether an output reads the pages' records back from the run's store: a report of the
    formats ``names`` that says so (``Formatter.reads_records``: all but the text one grouped
    by problem, whose problems carry their examples), or a baseline written, or findings that
    carry gate marks (``engine.Options.keep_records``). The compact JSON report reads what
    was written for it as each page was judged, when it was (``records_written_as_judged``):
    pickling each page's records too cost a few per cent of a check."""
    from . import FORMATS

    written = records_written_as_judged(names, flat, marked)
    return any(FORMATS[name].reads_records(group)
               and not (written and FORMATS[name].written_as_judged)
               for name in names) or flat or marked or baseline


def write_reports(specs, stdout, header, pages, findings, problems, diagnostics=(),
                  counts=None, colour_choice: str = "auto") -> None:
    """Write each ``(format, file or None)`` of ``specs``; no file: ``stdout``."""
    from . import FORMATS, render

    if specs:
        locate_ahead(header.locate, problems, ancestors=names_ancestors(specs))
    for name, path in specs:
        view = GateView(findings, FORMATS[name].marked, counts)
        if path:
            with atomic_output(path) as stream:
                render(stream, name, header, pages, view, problems, diagnostics,
                       colour_choice="never")
        else:
            render(stdout, name, header, pages, view, problems, diagnostics,
                   colour_choice=colour_choice)


def locate_ahead(aid, problems, until=None, spread=None, ancestors: bool = False) -> None:
    """Locate each problem's worst occurrence and the examples its sentence names, page by
    page: reports ask for them problem by problem, and the examples of one problem are on
    different pages, so asked in that order the pages kept parsed (``locator.Pages``) were
    read again (52 parses of 34 pages for a 200-page site's JSON report; 2 ms each).
    ``ancestors``: the elements the worst occurrences' colours are inherited from too
    (``names_ancestors``)."""
    if aid is None or not hasattr(aid, "locate_all"):
        return
    from .text_report import examples

    aid.locate_all([f.sample for p in problems for f in examples(p.example_pool(), p.worst)],
                   until, spread, ancestors=[(p.worst.sample.page, p.fg_cause.inherited_from)
                                             for p in problems if ancestors and inherited(p)])


def names_ancestors(specs) -> bool:
    """Whether one of the reports ``(format, file)`` names the element a problem's colour is
    inherited from by its locator (the text report's detail)."""
    return any(name == "text" for name, _ in specs)


def inherited(problem) -> bool:
    """Whether a problem's text colour is inherited from an ancestor (whose locator the text
    report's detail names)."""
    return problem.fg_cause is not None and bool(problem.fg_cause.inherited_from)
