"""Non-text contrast (family ``nontext``): samples in, findings out, no I/O.

TC110 ui-ratio: graphical objects that carry meaning against the colours next to them, 3:1
(WCAG 2.2 SC 1.4.11). Today: icon glyphs that left TC100 as not being text in a human language
(``extract/exempt.py``, exemption ``icon``).
"""
from __future__ import annotations

from tinctura.colour import fix as colour_fix
from tinctura.colour import wcag
from tinctura.model import DETERMINED, Finding, Fix

from .catalogue import UI_RATIO
from .text import backgrounds, foreground_on

REQUIRED = 3.0  # WCAG 2.2 SC 1.4.11: "a contrast ratio of at least 3:1 against adjacent color(s)"


def check_ui_ratio(samples, options) -> list:
    """TC110: one finding per meaningful icon glyph below 3:1 on its worst background."""
    level = getattr(options, "level", "AA") or "AA"
    findings = []
    for sample in samples:
        if sample.exempt != "icon" or sample.status != DETERMINED or sample.fg is None \
                or sample.bg is None:
            continue
        pairs = [(foreground_on(sample, bg), bg) for bg in backgrounds(sample)]
        ratios = [wcag.contrast_ratio(fg, bg) for fg, bg in pairs]
        worst = min(range(len(ratios)), key=ratios.__getitem__)
        if ratios[worst] >= REQUIRED:  # unrounded, as for text
            continue
        fg, bg = pairs[worst]
        fixes = []
        found = colour_fix.nearest_passing_foreground(fg, bg, REQUIRED)
        if found is not None:
            fixes.append(Fix("foreground", tuple(found[0]), found[1]))
        findings.append(Finding(
            rule=UI_RATIO.code, slug=UI_RATIO.slug, severity=UI_RATIO.severity, sample=sample,
            ratio=ratios[worst], required=REQUIRED, level=level, fixes=fixes,
            args={"what": "icon glyph", "sc": "1.4.11", "fg": fg, "bg": bg, "stop": worst,
                  "stops": len(pairs)},
        ))
    return findings
