"""The terminal report: problems first (or findings by page), a summary line, the notice."""
from __future__ import annotations

import re
import shutil
import textwrap
from collections import Counter

from tinctura.colour import suggest
from tinctura.extract.values import colour_longhand, with_colour
from tinctura.overrides import faded
from tinctura.model import state_rank
from tinctura.situations import rebuild, slot

from . import messages as m
from . import plain
from .appearance import headline as appearance_headline
from .appearance import finding_lines as appearance_finding_lines
from .appearance import is_appearance
from .base import Formatter, Header
from .notice import DISCLAIMER
from .outputs import per_situation, record_counts
from .summary import SEVERITIES
from .terminal import TerminalWriter

EXAMPLES = 3  # example occurrences shown under each problem
WIDTH = 88  # wrap width of the notice at most
INDENT = "   "
SEVERITY_STYLE = {"error": ("red", "bold"), "warning": ("yellow",), "info": ("cyan",)}


class TextFormatter(Formatter):
    def __init__(self, stream, header: Header, colour: bool | None = None, environ=None,
                 choice: str = "auto"):
        super().__init__(stream, header)
        self.tw = TerminalWriter(stream, colour, environ, choice)
        self.diagnostics: list = []
        self.schemes = list(header.schemes)
        self.width = terminal_width()
        # grouped by page, the store's records are read, and only the findings listed rebuilt
        self.wants_occurrences = header.group == "page"
        self._described: dict = {}  # ``described``'s situations already written in full
        self._written: dict = {}  # and their descriptions, by their words
        self._listed: dict = {}  # ``_listing``: (place, description) -> the page listing it
        self._ranks: list = []  # the store's situations' (state rank, scheme): ``occurrences``
        self._by_number: dict = {}  # situation number -> ``_said``'s, described already
        self._blocks: dict = {}  # ``_credit``: a replayed block -> the pages it is counted under

    @classmethod
    def reads_records(cls, group: str) -> bool:
        return group == "page"  # grouped by problem: the problems carry the examples

    @property
    def wants_findings(self) -> bool:
        return self.reads_records(self.header.group)

    # -- helpers -----------------------------------------------------------------------

    @property
    def many_schemes(self) -> bool:
        return len(self.schemes) > 1

    def severity(self, name: str) -> str:
        return self.tw.markup(name, *SEVERITY_STYLE.get(name, ()))

    def where(self, sample) -> str:
        """The readable locator (and Markdown line) when the run can tell, else the XPath."""
        if self.header.locate is None:
            return sample.xpath
        loc = self.header.locate(sample)
        source = loc.source.where() if loc.source is not None else ""
        text = loc.locator or sample.xpath
        return f"{text} ({source})" if source else text

    def context(self, sample) -> str:
        """`` [scheme slate, when hovered]`` when it matters, else empty."""
        bits = []
        if self.many_schemes:
            bits.append(f"scheme {sample.scheme}")
        if sample.state and sample.state != "rest":
            bits.append(plain.STATES.get(sample.state, sample.state))
        return f" [{', '.join(bits)}]" if bits else ""

    # -- events ------------------------------------------------------------------------

    def start(self, summary) -> None:
        self.schemes = list(self.header.schemes or summary.schemes)
        if self.header.group == "cause" and summary.problems:
            # (site-level problems compare pages: they stand on none of their own)
            where = f"on {m.plural(summary.pages_with_findings, 'page')}" \
                if summary.pages_with_findings else "across the site"
            self.tw.line(
                f"{m.plural(summary.problems, 'problem')} "
                f"({m.plural(summary.findings, 'occurrence')} {where}), by severity, "
                "largest first",
                "bold",
            )
            self.tw.line()

    def problem(self, index: int, problem) -> None:
        if self.header.group != "cause":
            return
        if is_appearance(problem.worst):  # site-level: entries and contexts, no ratio or fix
            self.appearance_problem(index, problem)
            return
        for indent, text, style, wrap in problem_lines(index, problem, self.header.locate,
                                                        self.many_schemes):
            if style == "severity":
                text = text.replace(problem.severity, self.severity(problem.severity), 1)
                style = None
            hang = 9 if text.startswith(("Where:", "       ")) else 2
            for line in wrapped(indent, text, self.width if wrap else 0, hang):
                self.tw.line(line, *((style,) if style else ()))
        self.tw.line()

    def appearance_problem(self, index: int, problem) -> None:
        for line in wrapped(0, f"{index}. {appearance_headline(problem)}", self.width):
            self.tw.line(line, "bold")
        self.appearance_detail(problem.worst, 1)
        self.tw.line()

    def appearance_detail(self, finding, indent: int) -> None:
        """A TC300/TC310 finding's message, then its entries and every context, wrapped."""
        message = f"{finding.severity} {finding.rule} {finding.slug}: {m.message(finding)}"
        for n, line in enumerate(wrapped(indent, message, self.width, 2)):
            self.tw.line(line.replace(finding.severity, self.severity(finding.severity), 1)
                         if n == 0 else line)
        for text in appearance_finding_lines(finding, self.many_schemes):
            hang = 2 + len(text) - len(text.lstrip())  # a context's wrapped lines under it
            for line in wrapped(indent, text, self.width, hang):
                self.tw.line(line)

    def occurrences(self, page, store) -> None:
        """``page`` grouped by page from the run's store: its records that count, in the order
        ``page`` gets findings, and only the findings listed rebuilt (404,000 findings of 200
        pages rebuilt took 1.6 s of the report's 3.8); a replayed block placed as on an
        earlier page (its navigation) is counted from what that page listed, unread
        (``_credit``)."""
        templates, ranks = store.situations, self._ranks
        for t in templates[len(ranks):]:  # (the order ``page`` gets findings in)
            ranks.append((state_rank(t.sample.state), t.sample.scheme))
        skipped: Counter = Counter()  # page first listing them -> findings not read
        fresh = []  # (block, its records) of the blocks met first on this page

        def met(block, count):
            credit = self._blocks.get(block)
            if credit is not None and sum(credit.values()) == count:
                skipped.update(credit)
                return True
            fresh.append((block, []))
            return fresh[-1][1]
        records = [r for r in store.occurrences(page.page, met) if record_counts(r)]
        records.sort(key=lambda r: (r[2], r[1]) + ranks[r[0]])
        self._listing(page, records, templates, True, skipped)
        for block, kept in fresh:
            self._credit(block, kept)

    def page(self, page, findings) -> None:
        self._listing(page, [(n, f.sample.xpath, f.sample.line, f.sample.text)
                             for n, f in enumerate(findings)], findings, False)

    def _credit(self, block, records) -> None:
        """Keep, for a replayed block (``FindingStore.occurrences``) whose records were just
        listed, the pages each of them is counted under from now on: another page placing the
        same block is counted from this, its records not read (6.2 million findings of 1,000
        pages, mostly the navigation's, were read one by one). Only where every record of it
        is in ``_listed``."""
        if len(self._blocks) >= LISTED_MOST:
            return
        credit: Counter = Counter()
        for r in records:
            known = self._by_number.get(r[0])
            first = self._listed.get((r[1], r[3]) + known[2]) if known is not None else None
            if first is None:
                return
            credit[first] += 1
        self._blocks[block] = credit

    def _listing(self, page, records, templates, numbered: bool, skipped=None) -> None:
        """``page``'s findings from ``records`` ``(n, XPath, line, text, ...)`` of
        ``templates[n]``: the store's (``numbered``: ``n`` a situation's number, the finding
        rebuilt from the record when listed), or the findings themselves.

        A finding at a place (XPath and text, scheme and state) with a description (``said``)
        that an earlier page listed is counted under that page (``_listed``, up to
        ``LISTED_MOST``): the navigation and header of every page are the same places, and a
        theme's link colour failing in them made each page list the same 1,500 findings
        (65 MB for 200 pages)."""
        if self.header.group != "page" or not (records or skipped):
            return
        tw = self.tw
        total = len(records) + (sum(skipped.values()) if skipped else 0)
        tw.line(f"{page.page} ({m.plural(total, 'finding')})", "bold")
        before = None
        # page first listing them -> findings not listed again (``skipped``: not even read)
        repeated: Counter = Counter(skipped or ())
        alike: dict = {}  # id(said) -> [findings so described on this page, the first's]
        by_number, listed = self._by_number, self._listed
        for r in records:
            f = templates[r[0]]
            known = by_number.get(r[0]) if numbered else None
            if known is None:
                if is_appearance(f):  # site-level: the entries and their contexts
                    self.appearance_detail(rebuild(f, r[1:], page.page) if numbered else f, 1)
                    before = None
                    continue
                known = self._said(f, r[0] if numbered else None, page.page, r[2])
            lines, said, part = known
            key = (r[1], r[3]) + part
            first = listed.get(key)
            if first is None:
                if len(listed) < LISTED_MOST:
                    listed[key] = page.page
            elif first != page.page:
                repeated[first] += 1
                continue
            seen = alike.setdefault(id(said), [0, f])
            seen[0] += 1
            if seen[0] > PLACES_SHOWN:  # (counted after the page's listing)
                continue
            s = rebuild(f, r[1:], page.page).sample if numbered else f.sample
            place = f"  {s.line}: {self.where(s)}  \"{m.excerpt(s.text)}\"{self.context(s)}"
            if place != before:  # (the findings of one place follow each other: named once)
                for wrapped_line in wrapped(0, place, self.width, 6):
                    tw.line(wrapped_line)
                before = place
            for wrapped_line in lines:
                tw.line(wrapped_line)
        self.not_listed(alike, repeated)
        tw.line()

    def _said(self, f, number, page: str, line) -> tuple:
        """``(lines, said, key part)``: ``described``'s, and what ``_listing`` keys a place's
        description by; kept by situation number (``number``: None for a finding not read
        from the store), whose later findings refer to where it was described."""
        lines, said = self.described(f, page, line)
        part = (f.sample.scheme, f.sample.state, id(said))
        if number is not None:
            self._by_number[number] = (said, said, part)
        return lines, said, part

    def not_listed(self, alike: dict, repeated: Counter) -> None:
        """The lines counting a page's findings not listed: past ``PLACES_SHOWN`` described
        alike (a code listing's tokens in one colour: hundreds a page), and those listed
        under earlier pages."""
        for n, f in alike.values():
            if n > PLACES_SHOWN:
                fg, bg = m.finding_colours(f)
                for line in wrapped(0, f"  and {n - PLACES_SHOWN:,} more in the same colours on "
                                       f"this page: {f.severity} {f.rule} {f.slug}, "
                                       f"{m.colour(fg)} on {m.colour(bg)}, {m.measured(f)}",
                                    self.width, 4):
                    self.tw.line(line, "dim")
        if not repeated:
            return
        (first, _), others = repeated.most_common(1)[0], len(repeated) - 1
        also = f" and {m.plural(others, 'other page')}" if others else ""
        for line in wrapped(0, f"  and {sum(repeated.values()):,} more as under {first}{also} "
                               f"(the same text at the same place, in the same colours)",
                            self.width, 4):
            self.tw.line(line, "dim")

    def described(self, f, page: str, line) -> tuple:
        """``(lines, said)``: a finding's message, colours, measure and fix, wrapped: in full
        the first time the report describes its situation, then in one line that refers
        there; ``said`` the same object for every finding described alike (kept). A theme's
        link colour failing on every page of a site repeated its whole description on every
        page: 2,900 findings a page on 200 pages with styles of their own made 247 MB in 57 s."""
        fresh = []
        said = per_situation(self._described, f, lambda f: fresh.append(1) or
                             self._first_description(f, f"{page}:{line}" if line else page))
        return (said[0] if fresh and said[0] is not None else said[1]), said[1]

    def _first_description(self, f, here: str) -> tuple:
        """``(full lines, or None where the same words were written already; the line that
        refers to where they were)`` (``described``)."""
        fg, bg = m.finding_colours(f)
        lines = self._ruled(f, m.message(f)) + wrapped(2, colours_and_fix(f, fg, bg),
                                                        self.width, 2)
        again = self._ruled(f, f"{m.colour(fg)} on {m.colour(bg)}, {m.measured(f)}, "
                               f"as at {here}")
        # the same words from findings that share nothing (a page's own rules giving the same
        # colours) refer to the first place too: the report depends on what it says alone
        first = self._written.setdefault(tuple(lines), again)
        return (lines if first is again else None), first

    def _ruled(self, f, text: str) -> list:
        """``text`` after the finding's severity, rule and slug, wrapped under its place."""
        lines = wrapped(2, f"{f.severity} {f.rule} {f.slug}: {text}", self.width, 2)
        lines[0] = lines[0].replace(f.severity, self.severity(f.severity), 1)
        return lines

    def diagnostic(self, diagnostic) -> None:
        self.diagnostics.append(diagnostic)

    def stop(self, summary) -> None:
        tw = self.tw
        if not summary.findings:
            tw.line("No contrast findings.", "green", "bold")
        if self.diagnostics:
            tw.line("Not everything could be checked:", "yellow")
            for d, elsewhere in m.grouped_diagnostics(self.diagnostics):
                tw.line("  " + m.diagnostic_line(d, elsewhere))
        tw.line(summary_line(summary, self.header))
        tw.line()
        for line in textwrap.wrap(DISCLAIMER, min(self.width, WIDTH)):
            tw.line(line, "dim")
        tw.flush()


def colours_and_fix(f, fg, bg) -> str:
    """``#777777 on #ffffff, 4.47:1, needs 4.5:1; try text #767676 (4.54:1)``, and that no
    background of the hue reaches it where no fix changes the background."""
    fix = m.fixes(f)
    tail = f"; try {fix}" if fix else ""
    if not any(x.target == "background" for x in f.fixes) and fg is not None \
            and bg is not None:
        tail += f"; no {suggest.describe_side(bg, fg)} background of this hue reaches it"
    return f"{m.colour(fg)} on {m.colour(bg)}, {m.measure(f)}{tail}"


def examples(findings, first=None, most: int = EXAMPLES) -> list:
    """Up to ``most`` occurrences, preferring different pages, in report order; ``first``
    (the problem's worst, which its sentence describes) leads when given: the first pages'
    occurrences may all be milder than the ratio the sentence gives."""
    chosen = [] if first is None else [first]
    pages = {f.sample.page for f in chosen}
    taken = {slot(f) for f in chosen}
    for f in findings:
        if len(chosen) == most:
            return chosen
        if f.sample.page not in pages and slot(f) not in taken:
            chosen.append(f)
            pages.add(f.sample.page)
            taken.add(slot(f))
    for f in findings:
        if len(chosen) == most:
            break
        if slot(f) not in taken:
            chosen.append(f)
            taken.add(slot(f))
    return chosen


def cause_fix_lines(fix, need: str | None = None) -> list:
    """The fix at the cause: one value for the declaration, or one per group of backgrounds.
    ``need``: what the problem needs, as its measure says it (``messages.needs``: an Lc level
    for the APCA rules); a WCAG 2 ratio when not given."""
    if fix is None:
        return []
    n = len(fix.backgrounds)
    ratio_needed = f"{m.required(fix.required)}:1"
    need = need or ratio_needed
    d = fix.declaration
    on_all = {1: "its background", 2: "both backgrounds it is used on"}.get(
        n, f"all {n} backgrounds it is used on")
    if fix.possible:
        # (no declaration to change: the text has the initial colour, or one not traced)
        target = "give the text the colour" if d is None else \
            f"set `{d.property}` at {fix.shown or d.where()} to"
        value = m.colour(fix.colour)
        if d is not None and colour_longhand(d.property) != d.property:  # (its other parts kept)
            value = f"`{with_colour(d.property, d.value, value)}`"
        reached = f"{m.ratio(fix.ratio)}:1 or more on {on_all}" if need == ratio_needed else \
            f"reaches {need} on {on_all} ({m.ratio(fix.ratio)}:1)"
        settles = fix.settles
        if settles:  # one value for a declaration the advice rules each found a value for
            reached += (f"; it settles problem{'s' if len(settles) > 1 else ''} "
                        f"{', '.join(map(str, settles))} too")
        return [f"fix at the cause: {target} {value}: {reached}"] + \
            own_css_lines(fix.own_css)
    what = "no single text colour" if d is None else f"no single value of `{d.property}`"
    lines = [f"{what} reaches {need} on {on_all}; one value per group of backgrounds:"]
    several = len({sch for c in fix.contexts for sch in c.schemes}) > 1
    for c in fix.contexts:
        on = ", ".join(m.colour(b) for b in c.backgrounds)
        if several:
            on += f" ({', '.join(c.schemes)} scheme{'s' if len(c.schemes) > 1 else ''})"
        if c.colour is None:
            lines.append(f"  on {on}: no text colour of this hue reaches {need}; "
                         f"change the background")
        else:
            lines.append(f"  on {on}: {m.colour(c.colour)} ({m.ratio(c.ratio)}:1)")
    return lines


def own_css_lines(own) -> list:
    """A theme's declaration changed in the writer's own stylesheet (``CauseFix.own_css``)."""
    if own is None:
        return []
    note = f" ({own.note})" if own.note else ""
    shared = ""
    if own.shared_with:  # an override of another problem sets the same property there
        others = ", ".join(map(str, own.shared_with))
        shared = (f"; the checked fix of problem{'s' if len(own.shared_with) > 1 else ''} "
                  f"{others} sets the same property in the same rule: use this value there "
                  f"(it passes problem{'s' if len(own.shared_with) > 1 else ''} {others} too)")
    return [f"that stylesheet is the theme's, copied again by the next build: add to "
            f"{own.where}{note} instead, not checked again: `{own.compact()}`{shared}"]


def summary_line(summary, header: Header) -> str:
    parts = [
        f"Checked {m.plural(summary.pages, 'page')} at level {header.level}, "
        f"{m.plural(summary.samples, 'text sample')}"
    ]
    if len(summary.schemes) > 1:
        parts[0] += f" in {len(summary.schemes)} schemes ({', '.join(summary.schemes)})"
    counts = ", ".join(
        m.plural(summary.by_severity.get(s, 0), s, s if s == "info" else None) for s in SEVERITIES
    )
    parts.append(counts)
    if header.group == "cause":
        parts.append(m.plural(summary.problems, "problem"))
    undetermined = f"{summary.undetermined:,} undetermined"
    if summary.undetermined_reasons:
        undetermined += " (" + ", ".join(
            f"{k} {v:,}" for k, v in summary.undetermined_reasons.items()) + ")"
    parts.append(undetermined)
    if summary.exempt:
        exempt = f"{summary.exempt:,} exempt"
        reasons = getattr(summary, "exempt_reasons", None)
        if reasons:
            exempt += " (" + ", ".join(f"{k} {v:,}" for k, v in reasons.items()) + ")"
        parts.append(exempt)
    skipped = sum(summary.skipped.values())
    if skipped:
        detail = ", ".join(f"{k} {v:,}" for k, v in summary.skipped.items())
        parts.append(f"{skipped:,} skipped ({detail})")
    if summary.diagnostics:
        parts.append(m.plural(summary.diagnostics, "diagnostic"))
    return "; ".join(parts) + "."


def terminal_width() -> int:
    """Columns to wrap at: the terminal's (or $COLUMNS), 100 when not a terminal, at least 60."""
    return max(60, shutil.get_terminal_size((100, 24)).columns)


LISTED_MOST = 100_000  # places and descriptions remembered by the report by page
PLACES_SHOWN = 10  # findings a page lists described alike (the report by page)

_SPACES = re.compile(r"[^\S ]")  # whitespace textwrap turns into spaces (tabs, line breaks)


def wrapped(indent: int, text: str, width: int, hang: int = 2) -> list:
    """``text`` indented by ``indent`` levels, wrapped at ``width`` (0: not wrapped); wrapped
    lines hang ``hang`` spaces further in."""
    lead = INDENT * indent
    if not width:
        return [lead + text]
    most = max(30, width - 1)
    # most lines fit: what textwrap would give them, at a tenth of its cost (2,000 problems'
    # reports wrap 21,000 lines)
    if len(lead) + len(text) <= most and text.rstrip(" ") == text and text.strip(" ") \
            and not _SPACES.search(text):
        return [lead + text]
    return textwrap.wrap(text, most, initial_indent=lead,
                         subsequent_indent=lead + " " * hang, break_long_words=False,
                         break_on_hyphens=False) or [lead]


def problem_lines(index, problem, locate=None, many_schemes: bool = False, detail: bool = True,
                  most: int = EXAMPLES) -> list:
    """A problem for a writer: ``(indent, text, style, wrap)`` lines. The plain sentence first,
    then where it is (up to ``most`` places), then the fix as the site's own CSS, then the
    technical detail (unless ``detail`` is false)."""
    worst = problem.worst
    lead = f"{index}. " if index else ""
    out = [(0, lead + sentence_of(problem, locate, many_schemes), "bold", True)]
    places = example_places(problem, locate, many_schemes, most)
    for n, place in enumerate(places):
        out.append((1, f"{'Where:' if n == 0 else '      '} {place}", None, True))
    rest = problem.occurrences - len(places)
    if rest:
        pages = f" on {m.plural(problem.pages, 'page')}" if problem.pages > 1 else ""
        out.append((1, f"       and {m.plural(rest, 'more occurrence')}{pages}", "dim", True))
    out += fix_lines(problem)
    if not detail:  # the rule's code still: suppressions and severities name it
        return out + [(1, f"Rule: {problem.rule} {problem.slug} ({problem.severity})", "dim",
                       True)]
    out.append((1, "Detail:", "dim", True))
    fg, bg = m.finding_colours(worst)
    out.append((2, f"{problem.severity} {problem.rule} {problem.slug}: {m.message(worst)}",
                "severity", True))
    text_colour = m.cause(problem.fg_cause, "no declaration (initial value)")
    inherited = problem.fg_cause.inherited_from if problem.fg_cause is not None else None
    if inherited and hasattr(locate, "locator"):  # a WriterAid: ancestors get locators too
        text_colour = text_colour.replace(
            f"inherited from {inherited}",
            f"inherited from {locate.locator(worst.sample.page, inherited)}")
    out.append((2, f"{m.non_text(worst) or 'text'} colour: {text_colour}", None, True))
    out.append((2, f"background: {m.cause(problem.bg_cause, 'no declaration (the canvas)')}",
                None, True))
    if getattr(problem, "override", None) is not None:  # else the fix above said it
        for line in cause_fix_lines(problem.fix_at_cause, m.needs(worst)):
            out.append((2, line, None, True))
    return out


def headline(problem, locate=None, many_schemes: bool = False) -> str:
    """A problem in one sentence: a site-level appearance problem's message (TC300, TC310),
    else ``sentence_of``."""
    worst = problem.worst
    return m.message(worst) if is_appearance(worst) else \
        sentence_of(problem, locate, many_schemes)


def counted(problem) -> str:
    """``7 occurrences on 3 pages``."""
    pages = f" on {m.plural(problem.pages, 'page')}" if problem.pages > 1 else ""
    return f"{m.plural(problem.occurrences, 'occurrence')}{pages}"


def fix_texts(problem) -> list:
    """``fix_lines`` as plain lines, nested lines indented by two spaces a level."""
    return ["  " * max(indent - 1, 0) + text for indent, text, _, _ in fix_lines(problem)]


def sentence_of(problem, locate=None, many_schemes: bool = False) -> str:
    """``plain.sentence`` of a problem, its worst occurrence located by ``locate``, and its
    examples too: an area is named only where they all are."""
    if locate is None:
        return plain.sentence(problem, None, many_schemes)
    worst = problem.worst
    others = [locate(f.sample) for f in examples(problem.example_pool(), worst)
              if f is not worst]
    return plain.sentence(problem, locate(worst.sample), many_schemes, others)


def example_places(problem, locate=None, many_schemes: bool = False,
                   most: int = EXAMPLES) -> list:
    """Up to ``most`` places of a problem's occurrences, each once as the writer reads it:
    pages built from one theme template share the template's place, so candidates beyond
    the first ``most`` are tried for other places."""
    places = {}
    for f in examples(problem.example_pool(), problem.worst, 4 * most):
        places.setdefault(example_place(f, locate, many_schemes))
        if len(places) == most:
            break
    return list(places)


def example_place(f, locate=None, many_schemes: bool = False) -> str:
    """``faults/text.md:12 "Fault: the sensor…" (p.tw-faint), #949494 on #ffffff, 3.03:1``."""
    s = f.sample
    efg, ebg = m.finding_colours(f)
    where, locator = f"{s.page}:{s.line}", m.css_path(s.xpath)
    if locate is not None:
        loc = locate(s)
        locator = loc.locator or locator
        if loc.source is not None and loc.source.where():
            where = loc.source.where()  # the built page stays in JSON and --group page
    bits = []
    if many_schemes:
        bits.append(f"scheme {s.scheme}")
    if s.state and s.state != "rest":
        bits.append(plain.STATES.get(s.state, s.state))
    context = f" [{', '.join(bits)}]" if bits else ""
    return (f"{where} \"{m.excerpt(s.text)}\" ({locator}), {m.colour(efg)} on {m.colour(ebg)}, "
            f"{m.measured(f)}{context}")


def fix_lines(problem) -> list:
    """The fix as CSS for the site's own stylesheet, or why there is none."""
    override = getattr(problem, "override", None)
    if override is None and faded(problem.worst):  # the fading element was not found
        return [(1, f"Fix: {m.RAISE_OPACITY}, rather than change the text colour.", "green",
                 True)] + \
            unfaded_lines(problem)
    if override is None:
        return cause_fix(problem)
    # an opacity raise alone leaves the unfaded texts failing (``overrides.Planner._mixed``
    # plans both where it can)
    alone = override.target == "opacity" and faded(problem.worst)
    return override_lines(override) + (unfaded_lines(problem) if alone else [])


def cause_fix(problem) -> list:
    """The fix at the cause (the declaration to change), as ``fix_lines`` gives it."""
    fix, need = problem.fix_at_cause, m.needs(problem.worst)
    if fix is not None and not fix.possible and not any(c.colour for c in fix.contexts):
        return [(1, "Fix: no text colour of this hue on the same side of the background "
                    f"reaches {need}; change the background or both colours.", "green",
                 True)]
    lines = cause_fix_lines(fix, need)
    if not lines:
        return []
    return [(1, "Fix: " + lines[0].replace("fix at the cause: ", ""), "green", True)] + [
        (2, line.strip(), "green", True) for line in lines[1:]]


def unfaded_lines(problem) -> list:
    """Where the worst text is faded by an opacity and others of the problem fail unfaded:
    what those need (raising the opacity leaves them failing)."""
    other = getattr(problem, "worst_unfaded", None)
    if other is None:
        return []
    rest = cause_fix(problem)
    said = m.unfaded_too(other, quoted=True)
    head = f"{said[0].upper()}{said[1:]}" + (":" if rest else ".")
    return [(2, head, None, True)] + [(3, text.replace("Fix: ", "", 1), style, wrap)
                                      for _, text, style, wrap in rest]


def override_lines(override) -> list:
    """The override's heading, note and CSS."""
    if override.verified:
        head = f"Fix: add to {override.where} (checked again with it applied: it passes):"
    elif override.verified is None:
        head = f"Fix: add to {override.where}:"
    else:
        head = f"Possible fix, not verified ({m.not_verified(override)}): {override.where}"
    out = [(1, head, "green" if override.verified else None, True)]
    if override.note:
        out.append((2, f"({override.note})", "dim", True))
    if override.shared_with:
        others = ", ".join(str(n) for n in override.shared_with)
        out.append((2, f"(the same rule also fixes problem{'s' if len(override.shared_with) > 1 else ''} "
                       f"{others}: add it once)", "dim", True))
    for line in override.css().rstrip("\n").splitlines():
        out.append((2, line, "green" if override.verified else None, False))
    return out
