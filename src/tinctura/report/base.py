"""The formatter interface and the driver that feeds a run's records to a formatter.

Findings stay records until a formatter turns them into text (flake8's split between
violations and formatters). Every formatter receives every call and keeps what it needs:
the text report shows problems or pages depending on its grouping, JSON keeps both.
"""
from __future__ import annotations

from dataclasses import dataclass, field

from tinctura.model import PageResult, state_rank
from tinctura.palette import report_page


@dataclass
class Header:
    """What a report says about the run itself."""

    tool: str = "tinctura"
    version: str = ""
    level: str = "AA"
    scope: object = None  # report.scope.Scope: how the run was made (the audit report shows it)
    group: str = "cause"  # "cause" (problems first) or "page"
    fail_on: str = "error"
    schemes: list = field(default_factory=list)  # scheme names evaluated
    # callable sample -> writer.Location (readable locator, Markdown source), when the run can
    # tell (a writer.WriterAid)
    locate: object = None
    # JSON: "compact" (each situation once, occurrences as small records; format 3) or
    # "flat" (every finding in full; format 1)
    findings_layout: str = "compact"
    rules: tuple = ()  # codes of the rules run (empty: every rule)
    # where results point: page -> (path, line or 0) of its Markdown source, or None (then the
    # built page); the hook a source map plugs into
    source: object = None
    uri: object = None  # page -> the built page's path as reports name it (default: as is)
    gone: list = field(default_factory=list)  # baseline entries no longer found


def rules_run(header) -> list:
    """The rules a run selected (every rule when it names none), in catalogue order."""
    from tinctura import rules

    chosen = set(getattr(header, "rules", None) or ())
    return [r for r in rules.RULES if not chosen or r.code in chosen]


class Formatter:
    """start, then page* (stable order), problem* (errors, then warnings, then info; largest first within each), diagnostic*, then stop.

    A formatter that sets ``wants_findings = False`` gets ``page(page, [])`` (nothing is read
    back from the run's store); one that sets ``wants_occurrences = True`` gets
    ``occurrences(page, store)`` instead of ``page``: the ``report.store.FindingStore`` that
    holds each situation once and the page's small occurrence records
    (``store.occurrences(page.page)``), those the gate holds too (marked, whatever
    ``marked`` says: ``outputs.record_counts`` tells the others).

    ``wants_fingerprints = True``: every finding it gets carries its fingerprint (else only
    the findings of pages with suppressions, and every finding when a baseline is used).

    ``marked = True``: the formatter also receives the findings held by the gate (suppressed,
    or unchanged against the baseline), each marked; otherwise only the findings that count.
    """

    wants_findings = True
    wants_occurrences = False
    wants_fingerprints = False  # the gate then gives every finding its fingerprint
    marked = False
    # True: in its compact layout, with no gate marks, the format reads each page's
    # occurrences as written where the page was judged (``outputs.records_written_as_judged``,
    # ``engine.Options.encode_occurrences``) instead of the records
    written_as_judged = False

    @classmethod
    def reads_records(cls, group: str) -> bool:
        """Whether this format, in a run grouped by ``group``, reads the pages' records back
        from the run's store (``wants_findings`` or ``wants_occurrences``): decided before
        the run, so that a run whose outputs read none keeps none
        (``engine.Options.keep_records``)."""
        return True

    def __init__(self, stream, header: Header):
        self.stream = stream
        self.header = header

    def start(self, summary) -> None:
        pass

    def page(self, page, findings: list) -> None:
        """``page``: a PageResult; ``findings``: its findings in document order."""

    def problem(self, index: int, problem) -> None:
        """``index`` counts from 1."""

    def diagnostic(self, diagnostic) -> None:
        pass

    def stop(self, summary) -> None:
        pass


def markdown_source(header, sample):
    """(Markdown path, line or 0) a result should point at, or None (then the built page): the
    line the source map finds for the sample's text when the run has one (``header.locate``),
    else the page's Markdown file (``header.source``)."""
    if not callable(getattr(header, "source", None)):
        return None
    if callable(getattr(header, "locate", None)):
        found = header.locate(sample)
        src = getattr(found, "source", None)
        if src is not None and src.file:
            return src.file, src.line
    return header.source(sample.page, sample.line)


def findings_by_page(findings) -> dict:
    out: dict = {}
    for f in findings:  # site-level findings (they compare pages) under the whole site
        out.setdefault(report_page(f), []).append(f)
    for items in out.values():
        items.sort(key=lambda f: (f.sample.line, f.sample.xpath, state_rank(f.sample.state),
                                  f.sample.scheme))
    return out


def emit(formatter: Formatter, pages, findings, problems, diagnostics, summary) -> None:
    """Feed one run to ``formatter``. ``diagnostics``: site-wide ones; page ones come along."""
    formatter.start(summary)
    if formatter.wants_occurrences:
        _emit_occurrences(formatter, pages, findings)
    elif not formatter.wants_findings:
        for page in pages:
            formatter.page(page, [])
    else:
        _emit_pages(formatter, pages, findings)
    for index, problem in enumerate(problems, 1):
        formatter.problem(index, problem)
    for diagnostic in diagnostics:
        formatter.diagnostic(diagnostic)
    for page in pages:
        for diagnostic in page.diagnostics:
            formatter.diagnostic(diagnostic)
    formatter.stop(summary)


def _emit_occurrences(formatter: Formatter, pages, findings) -> None:
    from .store import FindingStore

    inner = getattr(findings, "_findings", None)  # an outputs.GateView over the run's store
    if isinstance(inner, FindingStore):
        # the store as it is, every finding marked: a formatter that shows only those that
        # count skips the others itself (``outputs.record_counts``)
        findings = inner
    store = FindingStore.of(findings)
    listed = [page.page for page in pages]
    for page in pages:
        formatter.occurrences(page, store)
    for name in sorted(set(store.pages()) - set(listed)):  # pages the run did not list
        formatter.occurrences(PageResult(name), store)


def _emit_pages(formatter: Formatter, pages, findings) -> None:
    if hasattr(findings, "by_page"):  # a FindingStore: one page in memory at a time
        grouped = {name: None for name in findings.pages()}

        def of(name):
            return findings_by_page(findings.by_page(name)).get(name, [])
    else:
        grouped = findings_by_page(findings)

        def of(name):
            return grouped.get(name, [])
    seen = set()
    for page in pages:
        seen.add(page.page)
        formatter.page(page, of(page.page))
    for name in sorted(set(grouped) - seen):  # findings on pages the run did not list
        formatter.page(PageResult(name), of(name))
