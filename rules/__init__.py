"""The rule set: metadata in ``catalogue``, checks in one module per family.

``run(samples, options)`` is the entry point the engine calls: pure, samples in, findings out.
"""
from __future__ import annotations

from . import appearance, deficiency, lightness, links, nontext, text, viewing
from .catalogue import RULES, Criterion, Docs, Example, Rule

__all__ = ["RULES", "CHECKS", "SITE_LEVEL", "run_site", "Criterion", "Docs", "Example", "Rule",
           "get", "selected", "selection", "with_severity", "run"]

# code -> check function (samples, options) -> list[Finding]
CHECKS = {
    "TC100": text.check_text_ratio,
    "TC110": nontext.check_ui_ratio,
    "TC120": links.check_link_cue,
    "TC200": lightness.check_text_lc,
    "TC400": deficiency.check_cvd_ratio,
    "TC500": viewing.check_glare_ratio,
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


def selected(names=(), ignore=()) -> tuple:
    """The rules named by code or slug, in catalogue order (all rules when ``names`` is empty),
    less those in ``ignore``. The one selection used by the CLI, the config file and the plugin.
    """
    wanted = {get(name).code for name in names} if names else {rule.code for rule in RULES}
    wanted -= {get(name).code for name in ignore}
    return tuple(rule for rule in RULES if rule.code in wanted)


def selection(select=(), ignore=()) -> tuple:
    """``Options.rules`` for ``--select``/``--ignore``: the codes to run; ``()`` means all.
    ValueError when nothing is left to run."""
    if not ignore:
        return tuple(get(name).code for name in select)
    chosen = selected(select, ignore)
    if not chosen:
        raise ValueError("select and ignore leave no rule to run")
    return tuple(rule.code for rule in chosen)


def with_severity(findings, overrides) -> list:
    """Apply per-rule severity overrides (``{code: severity}`` or its items) to findings."""
    overrides = dict(overrides or ())
    if overrides:
        for f in findings:
            f.severity = overrides.get(f.rule, f.severity)
    return findings


def run(samples, options) -> list:
    """Run the selected rules (``options.rules``; all when empty) on ``samples``."""
    samples = list(samples)
    findings = []
    for rule in selected(getattr(options, "rules", ()) or ()):
        if rule.code not in SITE_LEVEL:
            findings.extend(CHECKS[rule.code](samples, options))
    return with_severity(findings, getattr(options, "severity", ()))


def workers_import_library(options) -> bool:
    """Whether the page-level rules of a run will import colour-science: TC400 simulating at a
    severity other than the dichromat matrices it keeps (the site-level rules, which may use
    it too, run once in the main process)."""
    from tinctura.colour import cvd

    chosen = {r.code for r in selected(getattr(options, "rules", ()) or ())}
    return "TC400" in chosen and cvd.needs_library(getattr(options, "cvd_severity", 1.0))


def run_site(uses: dict, options) -> list:
    """The site-level rules selected, over a site's merged palette uses (``tinctura.palette``)."""
    return with_severity(appearance.check_site(uses, options), getattr(options, "severity", ()))
