"""Findings grouped by cause: one *problem* per rule, foreground and background cause.

The same cause failing in several colour schemes is one problem that lists its schemes, each
with its own count and worst ratio (``Problem.schemes``).

A site with one bad colour declaration yields thousands of findings and one problem; fixing the
declaration fixes them all. Pure: records in, records out.
"""
from __future__ import annotations

import re
from array import array
from functools import lru_cache
from dataclasses import dataclass, field
from typing import Optional

from tinctura.colour import fix as colour_fix
from tinctura.colour import suggest
from tinctura.colour import wcag
from tinctura.colour.convert import quantize
from tinctura.model import DETERMINED, Cause, Declaration, Finding, state_rank

SEVERITY_RANK = {"error": 0, "warning": 1, "info": 2}


@dataclass
class Context:
    """Backgrounds one foreground value can serve, and that value (None: none can)."""

    backgrounds: tuple  # tuple[RGB], darkest first
    colour: Optional[tuple]
    ratio: Optional[float]  # the worst ratio ``colour`` reaches on these backgrounds
    schemes: tuple = ()  # the colour schemes in which these backgrounds occur


@dataclass
class CauseFix:
    """A new value for the foreground declaration itself.

    ``colour`` passes against every background where the declaration's colour is used;
    when no single value can, ``colour`` is None and ``contexts`` splits the backgrounds into
    groups (by luminance) that one value each can serve.
    """

    declaration: Optional[Declaration]  # where to change it (None: nothing declared it)
    required: float
    backgrounds: tuple  # every background considered, darkest first
    colour: Optional[tuple]
    ratio: Optional[float]
    contexts: tuple = ()  # tuple[Context], only when colour is None
    schemes: tuple = ()  # every scheme where the declaration's colour is used
    # where the writer edits the declaration, when it is in their own stylesheet (its source
    # in docs_dir, with line and column): set by ``writer.WriterAid``, which knows the project
    shown: str = ""
    settles: tuple = ()  # numbers (from 1) of other problems ``colour`` passes too (``settled``)
    # the new value as a rule for the writer's own stylesheet, where the declaration is the
    # theme's (rebuilt with the site): an ``overrides.Override`` not checked again, set by
    # ``overrides.plan_own_css``
    own_css: Optional[object] = None

    @property
    def possible(self) -> bool:
        return self.colour is not None


@dataclass
class Problem:
    rule: str
    slug: str
    severity: str
    scheme: str
    fg_cause: Optional[Cause]
    bg_cause: Optional[Cause]
    findings: list = field(default_factory=list)  # list[Finding]
    pages: int = 0  # number of distinct pages
    worst_ratio: float = 0.0
    required: float = 0.0  # the highest ratio any of its findings requires
    fix_at_cause: Optional[CauseFix] = None
    # every pass test its findings carry (the rules beyond the WCAG 2 ratio): a fix at the
    # cause must meet them all, a body text's Lc 75 as well as a heading's Lc 60
    tests: tuple = ()
    # Built by a Collector, which keeps no findings list: how many there were, the worst, the
    # earliest candidates for examples, their indexes in the run, the backgrounds they met.
    count: Optional[int] = None
    worst_finding: Optional[Finding] = None
    candidates: Optional[list] = None
    indexes: Optional[list] = None
    backgrounds: Optional[dict] = None
    # scheme name -> SchemeFigures, in the order the schemes were met
    schemes: dict = field(default_factory=dict)
    override: Optional[object] = None  # overrides.Override: the fix as the site's own CSS
    # built by a Collector: the worst finding whose text no opacity fades (``faded``)
    unfaded_finding: Optional[Finding] = None
    # built by a Collector: the declarations that use the text colour's cause (``color:
    # var(--accent)`` in each rule), and the background's, in the order met
    using: Optional[dict] = None
    using_bg: Optional[dict] = None
    # built by a Collector: every page it was met on (``writer.verification_pages``)
    met_on: Optional[set] = field(default=None, repr=False, compare=False)

    @property
    def scheme_names(self) -> list:
        return list(self.schemes) or [self.scheme]

    @property
    def occurrences(self) -> int:
        return self.count if self.count is not None else len(self.findings)

    @property
    def worst(self) -> Finding:
        if self.worst_finding is not None:
            return self.worst_finding
        return min(self.findings, key=worse_key)

    @property
    def worst_unfaded(self) -> Optional[Finding]:
        """The worst finding whose text no ancestor's opacity fades, or None: a problem
        groups texts by the declarations that colour them, faded or not, and where the worst
        is faded, raising the opacity does not fix the others."""
        if self.count is not None:
            return self.unfaded_finding
        return min((f for f in self.findings if not faded(f)), key=worse_key,
                   default=None)

    def using_declarations(self, side: str = "fg") -> list:
        """The declarations that set the text colour of its findings (``side`` "bg": the
        background; the rules using a custom property, when its value is the cause), each
        once."""
        kept = self.using if side == "fg" else self.using_bg
        if kept is not None:
            return list(kept)
        found = {}
        for f in self.findings:
            cause = f.sample.fg_cause if side == "fg" else f.sample.bg_cause
            if cause is not None and cause.declaration is not None:
                found.setdefault(cause.declaration, None)
        return list(found)

    def example_pool(self) -> list:
        """The findings examples are chosen from, in report order."""
        return self.findings if self.candidates is None else self.candidates

    def worst_and_pool(self) -> list:
        """The worst finding, then ``example_pool``: what the examples can show."""
        return [self.worst, *self.example_pool()]


def faded(finding) -> bool:
    """True when the text is fainter than its colour over its background: an ancestor's
    opacity fades it (a translucent colour alone composites to exactly what is seen)."""
    from tinctura.colour.composite import over

    s = finding.sample
    if s.fg_raw is None or s.fg is None or s.bg is None:
        return False
    seen = over(tuple(s.fg_raw), tuple(s.bg))[:3]
    return max(abs(a - b) for a, b in zip(seen, s.fg)) > 2 / 255


def cause_key(cause: Optional[Cause]) -> tuple:
    """The declaration a fix would change: `color: var(--ink)` in ten rules is one cause,
    `--ink`, so one faint theme variable is one problem wherever it is used."""
    if cause is None:
        return ("unknown",)
    d = target_declaration(cause)
    return (d.sheet, d.line, d.column, d.property, d.value) if d is not None else ("initial",)


@dataclass
class SchemeFigures:
    """One scheme's share of a problem: its occurrences, worst ratio and worst finding."""

    count: int = 0
    worst_ratio: float = 21.0
    worst: Optional[Finding] = None

    def add(self, finding: Finding) -> None:
        self.count += 1
        if self.worst is None or worse_key(finding) < worse_key(self.worst):
            self.worst_ratio, self.worst = finding.ratio, finding


def worse_key(finding: Finding) -> tuple:
    """Findings in order, worst first: the lowest ratio; on a tie, the highest requirement
    (at the same colours, a body text's Lc 75 before a bold text's Lc 60), then the state a
    reader meets first (text that fails at rest is not "too faint when hovered")."""
    args = finding.args
    return (finding.ratio, -finding.required, -(args.get("lc_required") or 0) if args else 0,
            state_rank(finding.sample.state))


def problem_key(finding: Finding) -> tuple:
    """One problem per cause across schemes: the scheme is not part of the key."""
    s = finding.sample
    return (finding.rule, cause_key(s.fg_cause), cause_key(s.bg_cause))


def _add_scheme(problem, finding: Finding) -> None:
    figures = problem.schemes.get(finding.sample.scheme)
    if figures is None:
        figures = problem.schemes[finding.sample.scheme] = SchemeFigures()
    figures.add(finding)


_ALIAS = re.compile(r"^\s*var\(\s*--[^\s,()]+\s*(,.*)?\)\s*(!\s*important\s*)?$", re.I | re.S)


@lru_cache(maxsize=4096)  # causes are shared records; a page asks about each many times
def target_declaration(cause: Optional[Cause]) -> Optional[Declaration]:
    """The declaration that holds the colour expression, where a new value belongs.

    Walks the custom-property chain (outermost first) past pure aliases such as
    ``color: var(--ink)``; stops at the first value that is more than a reference, so for
    ``--bg: hsla(var(--hue), 15%, 14%, 1)`` it is ``--bg``, not the ``--hue`` it uses.
    """
    if cause is None:
        return None
    steps = ([cause.declaration] if cause.declaration is not None else []) + list(cause.chain)
    for step in steps:
        if not _ALIAS.match(step.value):
            return step
    return steps[-1] if steps else None


def group(findings, samples=(), uses=None) -> list:
    """Group ``findings`` into problems: errors first, then warnings, then info, largest first
    within each (a gate fails on errors: advice met on every page must not bury them).

    ``samples`` (optional, every sample of the run) widens the fix at the cause: the new value
    must also keep passing wherever the same declaration is used without a finding today,
    in every scheme, so one declaration never receives two conflicting suggestions.
    ``uses`` is that information already gathered (``declaration_uses``, merged with
    ``merge_uses`` page by page when samples are not kept).
    """
    buckets: dict = {}
    for finding in findings:
        buckets.setdefault(problem_key(finding), []).append(finding)
    if uses is None:
        uses = declaration_uses(samples)
    problems = []
    for members in buckets.values():
        first = members[0]
        problem = Problem(
            rule=first.rule,
            slug=first.slug,
            severity=min((f.severity for f in members), key=lambda s: SEVERITY_RANK.get(s, 9)),
            scheme=first.sample.scheme,
            fg_cause=first.sample.fg_cause,
            bg_cause=first.sample.bg_cause,
            findings=members,
            pages=len({f.sample.page for f in members}),
            worst_ratio=min(f.ratio for f in members),
            required=max(f.required for f in members),
        )
        for f in members:
            _add_scheme(problem, f)
            _add_test(problem, f)
        problem.fix_at_cause = fix_at_cause(problem, uses)
        problems.append(problem)
    problems.sort(key=lambda p: (SEVERITY_RANK.get(p.severity, 9), -p.occurrences, p.worst_ratio))
    return problems


class _Progress:
    """A problem's pages and findings seen so far (``Collector``)."""

    __slots__ = ("pages", "seen")

    def __init__(self):
        self.pages, self.seen = set(), 0


class Collector:
    """Problems built finding by finding, in run order, keeping per problem only what reports
    need (count, pages, worst, a few example candidates, indexes, backgrounds): the findings
    themselves can go to disk (``report.store``), so memory does not grow with them. Gives the
    same problems as ``group`` over the same findings.

    ``add(finding, situation)``: with the finding's situation number (``FindingStore.add``), an
    occurrence of a situation already seen costs a count, an index and its page: its problem,
    severity, ratio and backgrounds are those of the first one."""

    EXAMPLES = 3  # as many as a report shows (text_report.EXAMPLES)

    def __init__(self, keep_indexes: bool = True):
        # each finding's index in the run (a problem of the flat JSON layout lists them): 8
        # bytes a finding, so left out when no report reads them
        self.keep_indexes = keep_indexes
        self._buckets: dict = {}  # problem key -> Problem
        self._progress: dict = {}  # problem key -> _Progress (its pages, findings seen)
        # situation number -> (Problem, _Progress): a page's known situations are counted
        # without hashing their problem's key (declarations and causes, hashed in Python)
        self._known: dict = {}
        self.situations: dict = {}  # problem key -> its situation numbers, first seen first
        self._count = 0

    def add(self, finding: Finding, index: int | None = None,
            situation: Optional[int] = None) -> None:
        """``index``: the finding's place in the run's report when not every finding of the
        run is added (suppressed and baseline-known ones are listed but not grouped)."""
        index = self._count if index is None else index
        self._count += 1
        known = self._known.get(situation) if situation is not None else None
        if known is not None:
            p, progress = known
            p.count += 1
            if p.indexes is not None:
                p.indexes.append(index)
            p.schemes[finding.sample.scheme].count += 1  # a known situation: same scheme, ratio
            self._note_page(progress, p, finding.sample.page, lambda: finding)
            return
        key = problem_key(finding)
        if situation is not None:
            self.situations.setdefault(key, []).append(situation)
        p = self._buckets.get(key)
        if p is None:
            s = finding.sample
            p = self._buckets[key] = Problem(
                rule=finding.rule, slug=finding.slug, severity=finding.severity,
                scheme=s.scheme, fg_cause=s.fg_cause, bg_cause=s.bg_cause, pages=0,
                worst_ratio=finding.ratio, required=finding.required, count=0,
                worst_finding=finding, candidates=[],
                indexes=array("L") if self.keep_indexes else None, backgrounds={}, using={},
                using_bg={})
            self._progress[key] = _Progress()
        progress = self._progress[key]
        if situation is not None:
            self._known[situation] = (p, progress)
        p.count += 1
        if p.indexes is not None:
            p.indexes.append(index)
        _add_scheme(p, finding)
        if SEVERITY_RANK.get(finding.severity, 9) < SEVERITY_RANK.get(p.severity, 9):
            p.severity = finding.severity
        if worse_key(finding) < worse_key(p.worst_finding):
            p.worst_finding = finding
        if (p.unfaded_finding is None or worse_key(finding) < worse_key(p.unfaded_finding)) \
                and not faded(finding):
            p.unfaded_finding = finding
        for cause, kept in ((finding.sample.fg_cause, p.using),
                            (finding.sample.bg_cause, p.using_bg)):
            if cause is not None and cause.declaration is not None:
                kept.setdefault(cause.declaration, None)
        p.worst_ratio = min(p.worst_ratio, finding.ratio)
        p.required = max(p.required, finding.required)
        _add_test(p, finding)
        self._note_page(progress, p, finding.sample.page, lambda: finding)
        _add_backgrounds(p.backgrounds, finding.sample)

    def add_records(self, page: str, records, templates, indexes=None) -> None:
        """``add`` for ``FindingStore.add``'s records of ``page`` (``templates``: the store's
        situations; ``indexes``: as ``add``'s, one per record): a finding is built only where
        one is kept (the first of a situation, an example candidate)."""
        from tinctura.situations import rebuild

        known_ = self._known
        for n, r in enumerate(records):
            index = None if indexes is None else indexes[n]
            known = known_.get(r[0])
            if known is None:
                self.add(rebuild(templates[r[0]], r[1:], page), index, situation=r[0])
                continue
            p, progress = known
            p.count += 1
            p.schemes[templates[r[0]].sample.scheme].count += 1
            if p.indexes is not None:
                p.indexes.append(self._count if index is None else index)
            self._count += 1
            self._note_page(progress, p, page,
                            lambda r=r: rebuild(templates[r[0]], r[1:], page))

    def add_page(self, page: str, records, templates, start: int) -> None:
        """``add_records`` for one page's records as the store keeps them (the first at index
        ``start`` of the run), leaving out the held ones (suppressed, known to the baseline).
        An occurrence of a problem whose examples are chosen costs a count and an index."""
        settled = self._settled(page, {r[0] for r in records}, templates)
        kept, kept_at = [], []
        for n, r in enumerate(records):
            marks = r[6]
            if marks is not None and (marks[1] or marks[2] == "unchanged"):
                continue
            fast = settled.get(r[0])
            if fast is None:
                kept.append(r)
                kept_at.append(start + n)
                continue
            fast[0].append(start + n)
        for sid, (at, p, figures) in settled.items():
            if at:
                if p.indexes is not None:
                    p.indexes.extend(at)
                self._counted(page, sid, p, figures, len(at))
        if kept:
            self.add_records(page, kept, templates, kept_at)

    def add_counts(self, page: str, per_situation: dict, templates, start: int,
                   records) -> None:
        """``add_page`` for a page whose records are not at hand, only how many each situation
        has (none held): a situation whose problem has its examples needs no more when no
        index is kept; the others' records come from ``records(skip)`` (all of the page's
        records, in order, but for those of the situations in ``skip``)."""
        if self.keep_indexes:
            self.add_page(page, records(), templates, start)
            return
        settled = self._settled(page, per_situation, templates)
        for sid, (_, p, figures) in settled.items():  # first, as add_page does
            self._counted(page, sid, p, figures, per_situation[sid])
        if len(settled) < len(per_situation):  # the others' occurrences, in order
            self.add_records(page, records(settled.keys()), templates)

    def _counted(self, page: str, sid: int, p, figures, n: int) -> None:
        """``n`` more occurrences of a known situation whose problem has its examples."""
        p.count += n
        figures.count += n
        progress = self._known[sid][1]
        progress.seen += n
        progress.pages.add(page)
        self._count += n

    def _settled(self, page: str, sids, templates) -> dict:
        """Situations ``sids`` whose problem has its examples and has met ``page`` already,
        or has all its example pages: situation -> ([indexes], problem, scheme figures)."""
        out, known_ = {}, self._known
        for sid in sids:
            known = known_.get(sid)
            if known is None or known[1].seen < 2 * self.EXAMPLES:
                continue
            pages = known[1].pages
            if page not in pages and len(pages) < self.EXAMPLES:
                continue
            p = known[0]
            out[sid] = ([], p, p.schemes[templates[sid].sample.scheme])
        return out

    def _note_page(self, progress, p, page, finding) -> None:
        pages = progress.pages
        new_page = page not in pages
        if new_page:
            pages.add(page)
        # examples take the first finding of each of the first pages, then the earliest ones
        if (new_page and len(pages) <= self.EXAMPLES) or progress.seen < 2 * self.EXAMPLES:
            p.candidates.append(finding())
        progress.seen += 1

    def problems(self, uses: dict) -> list:
        out = []
        for key, p in self._buckets.items():
            p.met_on = self._progress[key].pages
            p.pages = len(p.met_on)
            if p.indexes is not None:  # add_page counts some ahead of others
                p.indexes = array("L", sorted(p.indexes))
            p.fix_at_cause = fix_at_cause(p, uses)
            out.append(p)
        out.sort(key=lambda p: (SEVERITY_RANK.get(p.severity, 9), -p.occurrences, p.worst_ratio))
        return out


def declaration_uses(samples) -> dict:
    """Declaration -> {background: schemes} over every judged sample whose text colour it sets.

    Backgrounds are rounded to 8 bits: colours closer than that are one context.
    """
    uses: dict = {}
    # what each sample adds, by the identity of the objects it reads (the samples are alive
    # till the end, so ids are unique): samples of one style add it once
    seen = set()
    for s in samples:
        if s.status != DETERMINED or s.exempt or s.bg is None:
            continue
        same = (id(s.fg_cause), id(s.bg), id(s.bg_alternatives), id(s.surround), s.scheme)
        if same in seen:
            continue
        seen.add(same)
        declaration = target_declaration(s.fg_cause)
        if declaration is None:
            continue
        _add_backgrounds(uses.setdefault(declaration, {}), s)
    return uses


def merge_uses(into: dict, more: dict) -> dict:
    for declaration, backgrounds in more.items():
        bucket = into.setdefault(declaration, {})
        for bg, schemes in backgrounds.items():
            bucket.setdefault(bg, set()).update(schemes)
    return into


def shared_uses(uses: dict, table: dict) -> dict:
    """``uses`` with each declaration and its backgrounds the objects ``table`` already holds
    for equal ones: a site's pages repeat their navigation's declarations, and a plugin that
    keeps every page's uses (``mkdocs serve`` checks only changed pages again) kept 27 KB a
    page, 4 KB shared. The backgrounds are read only (``merge_uses`` copies them)."""
    out = {}
    for declaration, backgrounds in uses.items():
        key = (declaration, frozenset((bg, frozenset(schemes))
                                      for bg, schemes in backgrounds.items()))
        got = table.get(key)
        if got is None:
            got = table[key] = (declaration, backgrounds)
        out[got[0]] = got[1]
    return out


def _add_backgrounds(bucket: dict, sample) -> None:
    for bg in judged_against(sample):
        if bg is not None:
            bucket.setdefault(_quantize(tuple(bg)), set()).add(sample.scheme)


def judged_against(sample) -> tuple:
    """The colours a sample's colour is judged against: a control's boundary meets the colour
    around the control (``extract/nontext.py``; its ``bg`` is the control's own fill), text
    its background and any alternative ones."""
    if sample.kind == "boundary":
        return (sample.surround,)
    return (sample.bg,) + tuple(sample.bg_alternatives)


_quantize = lru_cache(maxsize=4096)(quantize)  # a site has few distinct backgrounds


# Rules whose verdict is not a colour against the background: no colour fix at the cause (TC120
# is met by an underline or another cue; the rule's documentation says how)
NO_COLOUR_FIX = frozenset({"TC120"})


def _add_test(problem, finding) -> None:
    """Keep ``finding``'s pass test among its problem's (each distinct one once)."""
    test = finding.args.get("test") if finding.args else None
    if test is not None and test not in problem.tests:
        problem.tests += (test,)


def passing(problem):
    """The test a fix at the cause must pass: all of its findings' tests (the worst's alone
    when the problem was made without them); None for the WCAG 2 ratio alone."""
    tests = problem.tests or tuple(t for t in (problem.worst.args.get("test"),) if t is not None)
    if len(tests) < 2:
        return tests[0] if tests else None
    return AllOf(tests)


def ratio_test(required: float):
    """The WCAG 2 ratio alone as a pass test: the rules' own ``Requirement`` with nothing
    more (TC100's, beside the other rules' tests in ``AllOf``)."""
    from tinctura.rules.perception import Requirement

    return Requirement(required)


class AllOf:
    """Several pass tests as one ``test(text, background)``; hashable, as the nearest-colour
    search caches by test."""

    __slots__ = ("tests",)

    def __init__(self, tests):
        self.tests = tuple(tests)

    def __call__(self, text, background) -> bool:
        return all(t(text, background) for t in self.tests)

    def __eq__(self, other):
        return isinstance(other, AllOf) and other.tests == self.tests

    def __hash__(self):
        return hash(("all of", self.tests))


def fix_at_cause(problem: Problem, uses: dict) -> Optional[CauseFix]:
    if problem.rule in NO_COLOUR_FIX or problem.required <= 1.0:
        # (no ratio is required: the site-level appearance rules)
        return None
    declaration = target_declaration(problem.fg_cause)
    backgrounds: dict = {}  # background -> schemes it appears in
    if problem.backgrounds is not None:
        for bg, schemes in problem.backgrounds.items():
            backgrounds[bg] = set(schemes)
    for f in problem.findings:
        _add_backgrounds(backgrounds, f.sample)
    if declaration is not None:
        for bg, schemes in uses.get(declaration, {}).items():
            backgrounds.setdefault(bg, set()).update(schemes)
    ordered = tuple(sorted(backgrounds, key=wcag.relative_luminance))
    worst = problem.worst
    start = tuple(worst.args.get("fg") or worst.sample.fg)
    schemes = tuple(sorted(set().union(*backgrounds.values()))) if backgrounds else ()
    test = passing(problem)  # rules beyond the WCAG 2 ratio: what a fix must meet
    found = _nearest(start, ordered, problem.required, test)
    if found is not None:
        return CauseFix(declaration, problem.required, ordered, tuple(found[0]), found[1],
                        schemes=schemes)
    contexts = split_contexts(start, ordered, problem.required, test)
    for context in contexts:
        context.schemes = tuple(sorted(set().union(*(backgrounds[b] for b in context.backgrounds))))
    return CauseFix(declaration, problem.required, ordered, None, None, contexts=contexts,
                    schemes=schemes)


def joined(problems) -> None:
    """One value for a declaration that several problems without an override share, where no
    problem's own value passes the others (an accent whose APCA value loses Lc under a
    deficiency, whose deficiency value misses the Lc): the nearest colour passing all their
    tests on all their backgrounds replaces each one's, since a writer can set only one. Left
    as they are where none exists. Before ``settled``, which then names them all."""
    for group in _by_declaration(problems).values():
        fixes = [p.fix_at_cause for _, p in group]
        if len(group) < 2 or not all(f.possible for f in fixes):
            continue
        if any(all(passes(f.colour, q) for _, q in group) for f in fixes):
            continue  # one of them serves all: ``settled`` says so
        tests = tuple(dict.fromkeys(passing(q) or ratio_test(q.required) for _, q in group))
        backgrounds = tuple(sorted({bg for f in fixes for bg in f.backgrounds},
                                   key=wcag.relative_luminance))
        worst = group[0][1].worst
        start = tuple(worst.args.get("fg") or worst.sample.fg)
        found = _nearest(start, backgrounds, max(q.required for _, q in group), AllOf(tests))
        if found is None:
            continue
        for f in fixes:
            f.colour = tuple(found[0])
            f.ratio = min(wcag.contrast_ratio(f.colour, bg) for bg in f.backgrounds)


def settled(problems) -> None:
    """Mark each suggested value at the cause with the other problems (numbers from 1, in
    ``problems``' order) of the same declaration it passes as well, by their own test on
    their own backgrounds: the advice rules (APCA, deficiency, viewing) each suggest a value
    for one accent colour, and a writer can set only one. Problems with an override (TC100's
    fixes in the site's stylesheet) are left out: theirs is the fix to apply."""
    for group in _by_declaration(problems).values():
        for n, p in group:
            if p.fix_at_cause.possible:
                colour = p.fix_at_cause.colour
                p.fix_at_cause.settles = tuple(m for m, other in group if m != n and
                                               passes(colour, other))


def _by_declaration(problems) -> dict:
    """Declaration -> [(number from 1, problem)] of the problems with a fix at the cause of
    that declaration and no override."""
    by_declaration: dict = {}
    for n, p in enumerate(problems, 1):
        fix = p.fix_at_cause
        if fix is not None and fix.declaration is not None and \
                getattr(p, "override", None) is None:
            by_declaration.setdefault(fix.declaration, []).append((n, p))
    return by_declaration


def passes(colour, problem) -> bool:
    """Whether text ``colour`` meets ``problem``'s requirement on every background its fix
    at the cause considered (those of its worst text where it has no such fix), anywhere in
    each one's hex (``_nearest``)."""
    test = passing(problem) or ratio_test(problem.required)
    fix = problem.fix_at_cause
    backgrounds = fix.backgrounds if fix is not None else (tuple(problem.worst.sample.bg)[:3],)
    return all(test(colour, e) for bg in backgrounds for e in suggest.hex_cell_edges(bg))


def _nearest(start, backgrounds, required: float, test=None):
    """One text colour near ``start`` passing on every background: for the WCAG 2 ratio, on the
    same side of the backgrounds as ``start`` and of its hue (``colour.suggest``); for a rule
    that gave ``test(text, background)`` (it includes the ratio), the nearest that passes it."""
    if test is None:
        return suggest.nearest_same_side(start, backgrounds, required)
    # backgrounds are grouped by their hex: a theme's hsl() or translucent background lies
    # between two 8-bit values, and a value that reaches Lc 75 at the hex may miss it there
    edges = tuple(e for bg in backgrounds for e in suggest.hex_cell_edges(bg))
    found = colour_fix.nearest_foreground_where(start, edges, test)
    if found is None:
        return None
    return found[0], min(wcag.contrast_ratio(found[0], bg) for bg in backgrounds)


def split_contexts(start, ordered, required: float, test=None) -> tuple:
    """Split backgrounds (darkest first) into runs that one foreground value can serve.

    Greedy in luminance order: a run grows while one value still passes on all of it, staying
    on the side of each background the text is on today. Any subset of a servable set is
    servable, so this gives the fewest runs of neighbours.
    """
    contexts = []
    run: list = []
    run_fix = None
    for bg in ordered:
        trial = _nearest(start, run + [bg], required, test)
        if trial is not None or not run:
            run.append(bg)
            run_fix = trial
            continue
        contexts.append(_context(run, run_fix))
        run = [bg]
        run_fix = _nearest(start, run, required, test)
    if run:
        contexts.append(_context(run, run_fix))
    return tuple(contexts)


def _context(run, found) -> Context:
    if found is None:
        return Context(tuple(run), None, None)
    return Context(tuple(run), tuple(found[0]), found[1])
