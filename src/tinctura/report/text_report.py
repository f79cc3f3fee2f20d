"""The terminal report: problems first (or findings by page), a summary line, the notice."""
from __future__ import annotations

import textwrap

from tinctura.problems import target_declaration

from . import messages as m
from .appearance import headline as appearance_headline
from .appearance import finding_lines as appearance_finding_lines
from .appearance import is_appearance
from .appearance import problem_lines as appearance_lines
from .base import Formatter, Header
from .notice import DISCLAIMER
from .summary import SEVERITIES
from .terminal import TerminalWriter

EXAMPLES = 3  # example occurrences shown under each problem
WIDTH = 88  # wrap width of the notice; fixed so output does not depend on the terminal
SEVERITY_STYLE = {"error": ("red", "bold"), "warning": ("yellow",), "info": ("cyan",)}


class TextFormatter(Formatter):
    def __init__(self, stream, header: Header, colour: bool | None = None, environ=None,
                 choice: str = "auto"):
        super().__init__(stream, header)
        self.tw = TerminalWriter(stream, colour, environ, choice)
        self.diagnostics: list = []
        self.schemes = list(header.schemes)

    @property
    def wants_findings(self) -> bool:  # grouped by cause: the problems carry the examples
        return self.header.group == "page"

    # -- helpers -----------------------------------------------------------------------

    @property
    def many_schemes(self) -> bool:
        return len(self.schemes) > 1

    def severity(self, name: str) -> str:
        return self.tw.markup(name, *SEVERITY_STYLE.get(name, ()))

    def context(self, sample) -> str:
        """`` [scheme slate, :hover]`` when it matters, else empty."""
        bits = []
        if self.many_schemes:
            bits.append(f"scheme {sample.scheme}")
        if sample.state and sample.state != "rest":
            bits.append(f":{sample.state}")
        return f" [{', '.join(bits)}]" if bits else ""

    # -- events ------------------------------------------------------------------------

    def start(self, summary) -> None:
        self.schemes = list(self.header.schemes or summary.schemes)
        if self.header.group == "cause" and summary.problems:
            self.tw.line(
                f"{m.plural(summary.problems, 'problem')} "
                f"({m.plural(summary.findings, 'occurrence')} on "
                f"{m.plural(summary.pages_with_findings, 'page')}), largest first",
                "bold",
            )
            self.tw.line()

    def problem(self, index: int, problem) -> None:
        if self.header.group != "cause":
            return
        tw = self.tw
        worst = problem.worst
        if is_appearance(worst):  # site-level: entries and contexts, no ratio or fix
            self.appearance_problem(index, problem)
            return
        fg, bg = m.finding_colours(worst)
        where = f" [scheme {problem.scheme}]" if self.many_schemes else ""
        tw.line(
            f"{index}. {m.plural(problem.occurrences, 'occurrence')} on "
            f"{m.plural(problem.pages, 'page')}{where}: "
            f"{headline(problem.fg_cause, fg, 'color')} on "
            f"{headline(problem.bg_cause, bg, 'background')}, "
            f"{problem_measure(problem)}",
            "bold",
        )
        tw.line(f"   {self.severity(problem.severity)} {problem.rule} {problem.slug}: "
                f"{m.message(worst)}")
        tw.line(f"   text colour: {m.cause(problem.fg_cause, 'no declaration (initial value)')}")
        tw.line(f"   background:  {m.cause(problem.bg_cause, 'no declaration (the canvas)')}")
        for line in cause_fix_lines(problem.fix_at_cause):
            tw.line(f"   {line}", "green")
        for n, f in enumerate(examples(problem.example_pool())):
            s = f.sample
            efg, ebg = m.finding_colours(f)
            lead = "e.g." if n == 0 else "    "
            tw.line(
                f"   {lead} {s.page}:{s.line}  {m.css_path(s.xpath)}  \"{m.excerpt(s.text)}\"  "
                f"{m.colour(efg)} on {m.colour(ebg)}, {example_measure(f)}{self.context(s)}"
            )
        rest = problem.occurrences - min(EXAMPLES, problem.occurrences)
        if rest:
            tw.line(f"        and {m.plural(rest, 'more occurrence')}", "dim")
        tw.line()

    def appearance_problem(self, index: int, problem) -> None:
        self.tw.line(f"{index}. {appearance_headline(problem)}", "bold")
        self.tw.line(f"   {self.severity(problem.severity)} {problem.rule} {problem.slug}: "
                     f"{m.message(problem.worst)}")
        for line in appearance_lines(problem, self.many_schemes):
            self.tw.line(f"   {line}")
        self.tw.line()

    def page(self, page, findings) -> None:
        if self.header.group != "page" or not findings:
            return
        tw = self.tw
        tw.line(f"{page.page} ({m.plural(len(findings), 'finding')})", "bold")
        for f in findings:
            s = f.sample
            if is_appearance(f):  # site-level: the entries and their contexts
                tw.line(f"  {self.severity(f.severity)} {f.rule} {f.slug}: {m.message(f)}")
                for line in appearance_finding_lines(f, self.many_schemes):
                    tw.line(f"      {line}")
                continue
            fg, bg = m.finding_colours(f)
            tw.line(f"  {s.line}: {s.xpath}  \"{m.excerpt(s.text)}\"{self.context(s)}")
            tw.line(f"      {self.severity(f.severity)} {f.rule} {f.slug}: {m.message(f)}")
            fix = m.fixes(f)
            tail = f"; try {fix}" if fix else ""
            tw.line(f"      {m.colour(fg)} on {m.colour(bg)}, {m.measure(f)}{tail}")
        tw.line()

    def diagnostic(self, diagnostic) -> None:
        self.diagnostics.append(diagnostic)

    def stop(self, summary) -> None:
        tw = self.tw
        if not summary.findings:
            tw.line("No contrast findings.", "green", "bold")
        if self.diagnostics:
            tw.line("Not everything could be checked:", "yellow")
            for d in self.diagnostics:
                at = f"{d.path}:{d.line}" if d.line else d.path
                tw.line(f"  {at}: {d.severity}: {d.message}")
        tw.line(summary_line(summary, self.header))
        tw.line()
        for line in textwrap.wrap(DISCLAIMER, WIDTH):
            tw.line(line, "dim")
        tw.flush()


def headline(cause, rgb, what: str) -> str:
    """``color `#777` at main.css:120``: the value and where it is set, for the problem line."""
    d = target_declaration(cause)
    if d is None:
        return f"{what} {m.colour(rgb)} (not declared)"
    return f"{d.property} `{d.value}` at {d.where()}"


def problem_measure(problem) -> str:
    """The problem's worst value against the requirement (rules other than the WCAG 2 ratio
    say what they measured: Lc, a deficiency, a viewing profile)."""
    if problem.rule == "TC100":
        return f"{m.ratio(problem.worst_ratio)}:1, needs {m.required(problem.required)}:1"
    return m.measure(problem.worst)


def example_measure(f) -> str:
    if f.rule == "TC100":
        return f"{m.ratio(f.ratio)}:1"
    return m.measure(f).split(", needs")[0]


def examples(findings) -> list:
    """Up to EXAMPLES occurrences, preferring different pages, in report order."""
    chosen, pages = [], set()
    for f in findings:
        if f.sample.page not in pages:
            chosen.append(f)
            pages.add(f.sample.page)
        if len(chosen) == EXAMPLES:
            return chosen
    for f in findings:
        if len(chosen) == EXAMPLES:
            break
        if f not in chosen:
            chosen.append(f)
    return chosen


def cause_fix_lines(fix) -> list:
    """The fix at the cause: one value for the declaration, or one per group of backgrounds."""
    if fix is None:
        return []
    n = len(fix.backgrounds)
    need = m.required(fix.required)
    d = fix.declaration
    on_all = {1: "its background", 2: "both backgrounds it is used on"}.get(
        n, f"all {n} backgrounds it is used on")
    if fix.possible:
        target = "declare a text colour" if d is None else f"set `{d.property}` at {d.where()}"
        return [f"fix at the cause: {target} to {m.colour(fix.colour)}: "
                f"{m.ratio(fix.ratio)}:1 or more on {on_all}"]
    what = "no single text colour" if d is None else f"no single value of `{d.property}`"
    lines = [f"{what} reaches {need}:1 on {on_all}; one value per group of backgrounds:"]
    several = len({sch for c in fix.contexts for sch in c.schemes}) > 1
    for c in fix.contexts:
        on = ", ".join(m.colour(b) for b in c.backgrounds)
        if several:
            on += f" ({', '.join(c.schemes)} scheme{'s' if len(c.schemes) > 1 else ''})"
        if c.colour is None:
            lines.append(f"  on {on}: no text colour of this hue reaches {need}:1; "
                         f"change the background")
        else:
            lines.append(f"  on {on}: {m.colour(c.colour)} ({m.ratio(c.ratio)}:1)")
    return lines


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
