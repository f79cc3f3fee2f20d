"""The rule catalogue: every rule's metadata and documentation, as data.

Check functions live in one module per family (``text.py``...); this module holds only what a
reader needs to know about a rule, so reports, the ``rules`` command and the JSON Schema share one
source. Each rule's documentation carries a failing and a passing example; the test suite runs
both (``tests/rules/test_examples.py``), so the documentation cannot drift from the code.
"""
from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Criterion:
    """A WCAG 2 success criterion, as numbered and named by W3C."""

    number: str  # "1.4.3"
    name: str  # "Contrast (Minimum)"
    level: str  # "A", "AA", "AAA"
    url: str  # W3C "Understanding" document


@dataclass(frozen=True)
class Example:
    """A tiny page that shows a rule's verdict, and the colours it renders.

    ``html`` is a complete document an engine can check; ``fg``, ``bg``, ``size_px`` and
    ``weight`` restate what it renders so the rule can be tested without the engine.
    """

    html: str
    fg: str
    bg: str
    size_px: float = 16.0
    weight: int = 400
    bg_alternatives: tuple = ()  # other backgrounds (gradient stops) as CSS colours
    note: str = ""


@dataclass(frozen=True)
class Docs:
    checks: str  # what the rule checks
    why: str  # why it matters
    bad: Example
    good: Example
    fix: str  # how to fix
    references: tuple = ()  # (title, url) pairs


@dataclass(frozen=True)
class Rule:
    code: str  # "TC100"
    slug: str  # "text-ratio"
    title: str
    family: str  # module in tinctura.rules holding the check
    severity: str  # default severity: "error", "warning", "info"
    criteria: tuple  # tuple[Criterion]; the one applied depends on the level checked
    message: str  # template, formatted late by the reports (see tinctura.report.messages)
    docs: Docs

    def criterion(self, level: str) -> Criterion:
        """The success criterion that applies when checking at ``level`` ("AA" or "AAA")."""
        for criterion in self.criteria:
            if criterion.level == level:
                return criterion
        return self.criteria[0]


SC_1_4_3 = Criterion(
    "1.4.3", "Contrast (Minimum)", "AA",
    "https://www.w3.org/WAI/WCAG22/Understanding/contrast-minimum.html",
)
SC_1_4_6 = Criterion(
    "1.4.6", "Contrast (Enhanced)", "AAA",
    "https://www.w3.org/WAI/WCAG22/Understanding/contrast-enhanced.html",
)

_PAGE = (
    '<!doctype html><html lang="en"><head><meta charset="utf-8"><title>{title}</title></head>'
    '<body style="margin:0;background-color:#ffffff;color:#1a1a1a">{body}</body></html>'
)

TEXT_RATIO = Rule(
    code="TC100",
    slug="text-ratio",
    title="Text contrast ratio",
    family="text",
    severity="error",
    criteria=(SC_1_4_3, SC_1_4_6),
    message=(
        "text contrast {ratio}:1 is below the {required}:1 required for {size} text "
        "(WCAG {level}, SC {sc}){against}"
    ),
    docs=Docs(
        checks=(
            "The WCAG 2 contrast ratio between each rendered text and the background it is "
            "painted on, after compositing translucent colours. At level AA (SC 1.4.3) text needs "
            "4.5:1 and large text 3:1; at level AAA (SC 1.4.6) 7:1 and 4.5:1. Large text is at "
            "least 24 px, or at least 18.67 px (14 pt) when bold (weight 700 or more). Ratios are "
            "compared unrounded: 4.499:1 does not meet 4.5:1. When a text sits on a gradient, it "
            "must meet the ratio against every stop; the worst one is reported. Text that WCAG "
            "does not cover (disabled controls, logotypes, pure decoration) is not checked, and "
            "text whose colours could not be determined is counted separately, not judged."
        ),
        why=(
            "Readers with low vision, older readers and anyone reading a screen in bright light "
            "need enough difference in luminance between text and its background to read it. "
            "The ratio is a lower bound agreed in WCAG 2; meeting it does not guarantee that a "
            "text is comfortable to read."
        ),
        bad=Example(
            html=_PAGE.format(
                title="Lending rules",
                body='<p style="color:#8a8a8a">Return unused seed packets before the first frost.</p>',
            ),
            fg="#8a8a8a",
            bg="#ffffff",
            note="Mid grey on white: 3.45:1, below 4.5:1 for 16 px text.",
        ),
        good=Example(
            html=_PAGE.format(
                title="Lending rules",
                body='<p style="color:#595959">Return unused seed packets before the first frost.</p>',
            ),
            fg="#595959",
            bg="#ffffff",
            note="Dark grey on white: 7.00:1, enough for AA and AAA.",
        ),
        fix=(
            "Darken the text or lighten the background (or the reverse on dark schemes) until the "
            "ratio is met. Change the colour where it is declared, usually a stylesheet rule or a "
            "theme variable, rather than on each element: the report names the declaration and "
            "suggests the nearest passing value that keeps the hue."
        ),
        references=(
            ("WCAG 2.2, Understanding SC 1.4.3 Contrast (Minimum)", SC_1_4_3.url),
            ("WCAG 2.2, Understanding SC 1.4.6 Contrast (Enhanced)", SC_1_4_6.url),
            ("WCAG 2.2, definition of contrast ratio",
             "https://www.w3.org/TR/WCAG22/#dfn-contrast-ratio"),
        ),
    ),
)

RULES = (TEXT_RATIO,)
