"""The rule set: metadata in ``catalogue``, checks in one module per family.

``run(samples, options)`` is the entry point the engine calls: pure, samples in, findings out.
"""
from __future__ import annotations

from . import deficiency, lightness, text, viewing
from .catalogue import RULES, Criterion, Docs, Example, Rule

__all__ = ["RULES", "CHECKS", "Criterion", "Docs", "Example", "Rule", "get", "selected", "run"]

# code -> check function (samples, options) -> list[Finding]
CHECKS = {
    "TC100": text.check_text_ratio,
    "TC200": lightness.check_text_lc,
    "TC400": deficiency.check_cvd_ratio,
    "TC500": viewing.check_glare_ratio,
}


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
        findings.extend(CHECKS[rule.code](samples, options))
    return findings
