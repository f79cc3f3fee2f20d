"""What the audit report says, as records: results per WCAG success criterion, per rule and per
scheme, and pages ranked by findings. Pure: a run's counts in, rows out; formatting is
``html_report``'s job.

Only the public fields of findings and problems are read (rule, severity, scheme, page), so a
change in how findings are stored leaves this module alone.
"""
from __future__ import annotations

from collections import Counter
from dataclasses import dataclass, field

from tinctura import rules
from tinctura.model import DETERMINED
from tinctura.palette import SITE_PAGE
from tinctura.rules.catalogue import Criterion

_U = "https://www.w3.org/WAI/WCAG22/Understanding/"

# The WCAG 2.2 success criteria about colour and contrast, whether or not a rule checks them
# (numbers, names and levels as W3C publishes them), and what a person must judge.
COLOUR_CRITERIA = (
    (Criterion("1.4.1", "Use of Color", "A", _U + "use-of-color.html"),
     "whether colour is the only visual means of conveying information, such as a link told "
     "apart from its sentence or a required field marked in red"),
    (Criterion("1.4.3", "Contrast (Minimum)", "AA", _U + "contrast-minimum.html"),
     "text in images, text over photographs and gradients, and whether exempt text (logos, "
     "inactive controls, decoration) is really exempt"),
    (Criterion("1.4.6", "Contrast (Enhanced)", "AAA", _U + "contrast-enhanced.html"),
     "the same as 1.4.3, at the higher ratios"),
    (Criterion("1.4.8", "Visual Presentation", "AAA", _U + "visual-presentation.html"),
     "whether readers can choose the text and background colours of blocks of text"),
    (Criterion("1.4.11", "Non-text Contrast", "AA", _U + "non-text-contrast.html"),
     "the contrast of icons, form-field borders, focus rings and the parts of charts that "
     "carry meaning"),
    (Criterion("2.4.7", "Focus Visible", "AA", _U + "focus-visible.html"),
     "whether every focusable control shows where the keyboard focus is"),
    (Criterion("2.4.13", "Focus Appearance", "AAA", _U + "focus-appearance.html"),
     "the size and contrast of the focus indicator"),
)

FAIL, PASS, REVIEW, NOT_CHECKED = "fail", "pass", "needs review", "not checked by this tool"
LEVELS = {"A": 1, "AA": 2, "AAA": 3}


@dataclass
class CriterionRow:
    criterion: Criterion
    status: str  # FAIL, PASS, REVIEW or NOT_CHECKED
    note: str
    rules: list = field(default_factory=list)  # codes of the rules that checked it
    findings: int = 0
    problems: int = 0


@dataclass
class Row:
    """Counts for one rule or one scheme."""

    name: str
    findings: int = 0
    problems: int = 0
    pages: int = 0
    extra: dict = field(default_factory=dict)


def selected_rules(names=()) -> tuple:
    return rules.selected(tuple(names or ()))


# Rules whose results are advice beyond WCAG 2 (APCA, colour-appearance models), even when
# their metadata names the contrast criteria they complement. A rule may say so itself with
# an ``advice`` attribute.
ADVICE = frozenset({"TC200", "TC300", "TC310", "TC400", "TC500"})


def is_advice(rule) -> bool:
    return bool(getattr(rule, "advice", rule.code in ADVICE)) or not rule.criteria


def applied(rule, level: str):
    """The criterion ``rule`` applies at ``level`` (None for advice beyond WCAG 2)."""
    return None if is_advice(rule) else rule.criterion(level)


def criteria_rows(level: str, chosen, by_rule: dict, problems_by_rule: dict,
                  undetermined: int) -> list:
    """One row per colour criterion: fail, needs review, pass, or not checked by this tool."""
    rows = []
    for criterion, person in COLOUR_CRITERIA:
        checking = [r.code for r in chosen if (c := applied(r, level)) is not None
                    and c.number == criterion.number]
        found = sum(by_rule.get(code, 0) for code in checking)
        probs = sum(problems_by_rule.get(code, 0) for code in checking)
        if not checking:
            above = LEVELS[criterion.level] > LEVELS.get(level, 2)
            mentioned = any(c.number == criterion.number for r in chosen if not is_advice(r)
                            for c in r.criteria)
            if above and mentioned:
                note = f"Level {criterion.level}: run the check at level {criterion.level}. "
            elif mentioned:
                note = (f"This run applied level {level}; run the check at level "
                        f"{criterion.level} for this criterion's own verdict. ")
            else:
                note = "No rule of this run checks it. "
            rows.append(CriterionRow(criterion, NOT_CHECKED, note + f"A person must judge "
                                     f"{person}.", [], 0, 0))
            continue
        if found:
            status, note = FAIL, f"{found:,} findings in {probs:,} problems."
        elif undetermined:
            status, note = REVIEW, (f"No failure found, but {undetermined:,} texts could not be "
                                    f"judged (see \u201cNot judged\u201d).")
        else:
            status, note = PASS, "No failure found in the text checked."
        rows.append(CriterionRow(criterion, status, f"{note} A person must still judge "
                                 f"{person}.", checking, found, probs))
    return rows


def other_rules(level: str, chosen) -> list:
    """Rules whose results are advice beyond WCAG 2 (appearance models, APCA)."""
    return [r for r in chosen if applied(r, level) is None]


class Tally:
    """Counts gathered page by page while the report is written (findings are not kept)."""

    def __init__(self):
        self.by_page: Counter = Counter()
        self.by_page_scheme: dict = {}  # page -> Counter(scheme)
        self.by_page_severity: dict = {}  # page -> Counter(severity)
        self.pages_of_rule: dict = {}  # rule -> set of pages
        self.pages_of_scheme: dict = {}  # scheme -> set of pages
        self.pages: list = []  # every page checked, in run order
        self.undetermined: dict = {}  # page -> {reason: texts not judged}

    def add(self, page: str, findings, undetermined=None, templates: bool = False) -> None:
        """``findings``: the page's (site-level ones: counted on their first page), or, with
        ``templates``, their situations' templates, counted on ``page``."""
        if page != SITE_PAGE:  # the site-level findings' group is not a page
            self.pages.append(page)
        if undetermined:
            self.undetermined[page] = dict(undetermined)
        for f in findings:
            scheme, at = f.sample.scheme, page if templates else f.sample.page
            self.by_page[at] += 1
            self.by_page_scheme.setdefault(at, Counter())[scheme] += 1
            self.by_page_severity.setdefault(at, Counter())[f.severity] += 1
            self.pages_of_rule.setdefault(f.rule, set()).add(at)
            self.pages_of_scheme.setdefault(scheme, set()).add(at)

    def ranked_pages(self) -> list:
        """(page, findings) with most findings first, then by name."""
        return sorted(self.by_page.items(), key=lambda item: (-item[1], item[0]))


def undetermined_of(page) -> dict:
    """{reason: texts} a PageResult could not judge (from its samples or its counts)."""
    if page.stats is not None:
        return page.stats.get("undetermined", {})
    out: dict = {}
    for s in page.samples:
        if s.status != DETERMINED and not s.exempt:
            out[s.reason or "unknown"] = out.get(s.reason or "unknown", 0) + 1
    return out


def rule_rows(chosen, summary, problems, tally: Tally) -> list:
    per_rule = Counter(p.rule for p in problems)
    return [Row(r.code, summary.by_rule.get(r.code, 0), per_rule.get(r.code, 0),
                len(tally.pages_of_rule.get(r.code, ())), {"rule": r}) for r in chosen]


def scheme_rows(summary, problems, tally: Tally) -> list:
    per_scheme = Counter(p.scheme for p in problems)
    names = list(summary.schemes) or sorted(summary.by_scheme)
    return [Row(name, summary.by_scheme.get(name, 0), per_scheme.get(name, 0),
                len(tally.pages_of_scheme.get(name, ())),
                {"judged": sum(summary.ratios.get(name, {}).values())}) for name in names]


def thresholds(level: str) -> tuple:
    """The ratios text needs at ``level``: large text first (WCAG SC 1.4.3 / 1.4.6)."""
    from tinctura.colour import wcag

    return wcag.required_ratio(level, True), wcag.required_ratio(level, False)
