"""The rule set: metadata in ``catalogue``, checks in one module per family.

``run(samples, options)`` is the entry point the engine calls: pure, samples in, findings out.
"""
from __future__ import annotations

from . import appearance, text
from .catalogue import RULES, Criterion, Docs, Example, Rule

__all__ = ["RULES", "CHECKS", "SITE_LEVEL", "run_site", "Criterion", "Docs", "Example", "Rule",
           "get", "selected", "run"]

# code -> check function (samples, options) -> list[Finding]
CHECKS = {
    "TC100": text.check_text_ratio,
    "TC300": appearance.check_surround_shift,
    "TC310": appearance.check_lookalike,
}

# Rules that compare colours across a whole site: ``run`` leaves them out (it judges one page or
# fragment); the engine gathers palette uses and calls ``run_site`` once, at the end.
SITE_LEVEL = frozenset({"TC300", "TC310"})


def get(name: str) -> Rule:
    """The rule with this code or slug (case-insensitive); KeyError if there is none."""
    wanted = name.strip().lower()
    for rule in RULES:
        if wanted in (rule.code.lower(), rule.slug):
            return rule
    raise KeyError(name)


def selected(names=()) -> tuple:
    """The rules named by code or slug, in catalogue order; all rules when ``names`` is empty."""
    if not names:
        return RULES
    wanted = {get(name).code for name in names}
    return tuple(rule for rule in RULES if rule.code in wanted)


def run(samples, options) -> list:
    """Run the selected rules (``options.rules``; all when empty) on ``samples``."""
    samples = list(samples)
    findings = []
    for rule in selected(getattr(options, "rules", ()) or ()):
        if rule.code not in SITE_LEVEL:
            findings.extend(CHECKS[rule.code](samples, options))
    return findings


def run_site(uses: dict, options) -> list:
    """The site-level rules selected, over a site's merged palette uses (``tinctura.palette``)."""
    return appearance.check_site(uses, options)
