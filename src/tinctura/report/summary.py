"""Counts for the end of a report. Pure: a run's records in, a Summary out."""
from __future__ import annotations

from collections import Counter
from dataclasses import dataclass, field

from tinctura import distribution
from tinctura.model import DETERMINED
from tinctura.palette import SITE_PAGE

SEVERITIES = ("error", "warning", "info")  # most severe first


@dataclass
class Summary:
    pages: int = 0
    samples: int = 0
    findings: int = 0
    problems: int = 0
    by_severity: dict = field(default_factory=dict)
    by_rule: dict = field(default_factory=dict)
    by_page: dict = field(default_factory=dict)  # only pages with findings
    by_scheme: dict = field(default_factory=dict)
    undetermined: int = 0  # samples (not exempt) whose colours could not be determined: not judged
    undetermined_reasons: dict = field(default_factory=dict)
    exempt: int = 0  # samples WCAG does not cover (e.g. disabled controls)
    exempt_reasons: dict = field(default_factory=dict)  # exemption id -> count (extract/exempt.py)
    skipped: dict = field(default_factory=dict)  # reason -> count, as extraction reported
    diagnostics: int = 0
    schemes: list = field(default_factory=list)  # scheme names evaluated
    pages_with_findings: int = 0
    ratios: dict = field(default_factory=dict)  # scheme -> {bin: judged samples} (distribution)


def summarise(pages, findings, problems=(), diagnostics=(), schemes=()) -> Summary:
    """Count what a run produced.

    ``pages``: PageResults; ``findings``: every Finding; ``diagnostics``: site-wide ones
    (page diagnostics are counted from the pages); ``schemes``: Scheme records or names.
    """
    from tinctura.extract.nontext import KINDS as non_text  # counted as texts: not these

    samples = [s for page in pages for s in page.samples if s.kind not in non_text]
    undetermined = Counter(
        s.reason or "unknown" for s in samples if s.status != DETERMINED and not s.exempt
    )
    kept = [page.stats for page in pages if page.stats is not None]  # samples dropped
    exempt = Counter(s.exempt for s in samples if s.exempt)
    for stats in kept:
        exempt.update(stats.get("exempt_reasons", {}))
    for stats in kept:
        undetermined.update(stats["undetermined"])
    ratios = distribution.histogram(samples)
    for stats in kept:
        distribution.merge(ratios, stats.get("ratios", {}))
    skipped: Counter = Counter()
    for page in pages:
        skipped.update(page.skipped)
    counts = getattr(findings, "counts", None)  # a FindingStore counted them as they came
    if counts is None:
        from .outputs import count

        counts = count(findings)
    by_severity = {name: 0 for name in SEVERITIES}
    by_severity.update(counts["severity"])
    by_page = counts["page"]
    names = [getattr(s, "name", s) for s in schemes]
    if not names:
        names = sorted({s.scheme for s in samples} |
                       {n for stats in kept for n in stats["schemes"]})
    return Summary(
        pages=len(pages),
        samples=len(samples) + sum(stats["samples"] for stats in kept),
        findings=len(findings),
        problems=len(problems),
        by_severity=by_severity,
        by_rule=dict(sorted(counts["rule"].items())),
        by_page=dict(sorted(by_page.items())),
        by_scheme=dict(sorted(counts["scheme"].items())),
        undetermined=sum(undetermined.values()),
        undetermined_reasons=dict(sorted(undetermined.items())),
        exempt=sum(1 for s in samples if s.exempt) + sum(stats["exempt"] for stats in kept),
        exempt_reasons=dict(sorted(exempt.items())),
        skipped=dict(sorted(skipped.items())),
        diagnostics=len(diagnostics) + sum(len(p.diagnostics) for p in pages),
        schemes=names,
        pages_with_findings=sum(1 for name in by_page if name != SITE_PAGE),  # (pages, not
        # the site-level rules' findings, which compare pages)
        ratios=ratios,
    )
