"""Non-text contrast (family ``nontext``): samples in, findings out, no I/O.

TC110 ui-ratio: graphical objects that carry meaning against the colours next to them, 3:1
(WCAG 2.2 SC 1.4.11): icon glyphs that left TC100 as not being text in a human language
(``extract/exempt.py``, exemption ``icon``), and the samples of ``extract/nontext.py``:
control boundaries, focus outlines and inline SVG icons.
"""
from __future__ import annotations

from tinctura.colour import fix as colour_fix
from tinctura.colour import wcag
from tinctura.model import DETERMINED, Finding, Fix

from .catalogue import UI_RATIO
from .text import backgrounds, foreground_on

REQUIRED = 3.0  # WCAG 2.2 SC 1.4.11: "a contrast ratio of at least 3:1 against adjacent color(s)"


WHAT = {"boundary": "control boundary", "focus-ring": "focus outline", "svg-icon": "svg icon"}


def check_ui_ratio(samples, options) -> list:
    """TC110: one finding per graphical object or control indicator below 3:1."""
    level = getattr(options, "level", "AA") or "AA"
    findings = []
    for sample in samples:
        if sample.status != DETERMINED:
            continue
        if sample.kind == "boundary":
            finding = _boundary(sample, level)
        elif sample.kind in ("focus-ring", "svg-icon"):
            finding = None if sample.exempt else _pair(sample, level, WHAT[sample.kind])
        elif sample.exempt == "icon":
            finding = _pair(sample, level, "icon glyph")
        else:
            continue
        if finding is not None:
            findings.append(finding)
    return findings


def _pair(sample, level, what):
    if sample.fg is None or sample.bg is None:
        return None
    pairs = [(foreground_on(sample, bg), bg) for bg in backgrounds(sample)]
    ratios = [wcag.contrast_ratio(fg, bg) for fg, bg in pairs]
    worst = min(range(len(ratios)), key=ratios.__getitem__)
    if ratios[worst] >= REQUIRED:  # unrounded, as for text
        return None
    fg, bg = pairs[worst]
    return _finding(sample, level, what, ratios[worst], fg, bg, worst, len(pairs))


def _boundary(sample, level):
    """Whichever identifies the control, its border or its fill, must reach 3:1 against the
    colour around it; a control with neither (its fill the surround's colour, no border) is
    identified by its text, which TC100 judges."""
    if sample.exempt or sample.surround is None:
        return None
    around = tuple(sample.surround)
    candidates = []
    if sample.fg is not None:
        candidates.append(tuple(sample.fg))
    if sample.bg is not None and any(abs(a - b) > 1 / 255 for a, b in zip(sample.bg, around)):
        candidates.append(tuple(sample.bg))
    if not candidates:
        return None
    ratios = [wcag.contrast_ratio(c, around) for c in candidates]
    best = max(range(len(ratios)), key=ratios.__getitem__)
    if ratios[best] >= REQUIRED:
        return None
    return _finding(sample, level, "control boundary", ratios[best], candidates[best], around,
                    0, 1)


def _finding(sample, level, what, ratio, fg, bg, stop, stops):
    fixes = []
    found = colour_fix.nearest_passing_foreground(fg, bg, REQUIRED)
    if found is not None:
        fixes.append(Fix("foreground", tuple(found[0]), found[1]))
    return Finding(
        rule=UI_RATIO.code, slug=UI_RATIO.slug, severity=UI_RATIO.severity, sample=sample,
        ratio=ratio, required=REQUIRED, level=level, fixes=fixes,
        args={"what": what, "sc": "1.4.11", "fg": fg, "bg": bg, "stop": stop, "stops": stops},
    )
