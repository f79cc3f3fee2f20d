"""Text contrast rules (family ``text``): samples in, findings out, no I/O.

TC100 text-ratio: WCAG 2 contrast ratio of rendered text against SC 1.4.3 (AA) or 1.4.6 (AAA).
"""
from __future__ import annotations

from tinctura.colour import suggest
from tinctura.colour import wcag
from tinctura.colour.composite import over
from tinctura.model import DETERMINED, Finding, Fix, Sample

from .catalogue import TEXT_RATIO

# samples of graphics and controls (extract/nontext.py), judged by TC110 only
NOT_TEXT = frozenset({"boundary", "focus-ring", "svg-icon"})


def judged(sample: Sample) -> bool:
    """True when a text rule can judge the sample: colours known and WCAG applies."""
    return (
        sample.status == DETERMINED
        and sample.kind not in NOT_TEXT
        and not sample.exempt
        and sample.fg is not None
        and sample.bg is not None
    )


def backgrounds(sample: Sample) -> list:
    """Every opaque background the text may sit on: the main one, then the alternatives."""
    return [tuple(sample.bg)] + [tuple(b) for b in sample.bg_alternatives if b is not None]


def foreground_on(sample: Sample, bg) -> tuple:
    """The text colour the reader sees on ``bg``.

    ``Sample.fg`` is already composited over ``Sample.bg``; a translucent text colour looks
    different on each gradient stop, so it is composited again over the alternatives.
    """
    raw = sample.fg_raw
    if raw is None or len(raw) < 4 or raw[3] >= 1.0 or tuple(bg) == tuple(sample.bg):
        return tuple(sample.fg)
    return tuple(over(raw, tuple(bg)))[:3]


# Colour situations known to pass, by level: a site repeats a few dozen of them thousands of
# times. Bounded; the check is pure, so this only saves time.
_PASSING: set = set()
_PASSING_LIMIT = 50000


def check_text_ratio(samples, options) -> list:
    """TC100: one finding per sample whose worst background fails the required ratio."""
    level = getattr(options, "level", "AA") or "AA"
    criterion = TEXT_RATIO.criterion(level)
    findings = []
    for sample in samples:
        if not judged(sample):
            continue
        situation = (level, sample.fg, sample.bg, sample.bg_alternatives, sample.fg_raw,
                     sample.font_size_px, sample.font_weight)
        if situation in _PASSING:
            continue
        large = wcag.is_large_text(sample.font_size_px, sample.font_weight)
        required = wcag.required_ratio(level, large)
        pairs = [(foreground_on(sample, bg), bg) for bg in backgrounds(sample)]
        ratios = [wcag.contrast_ratio(fg, bg) for fg, bg in pairs]
        worst = min(range(len(ratios)), key=ratios.__getitem__)
        ratio = ratios[worst]
        if ratio >= required:  # unrounded: 4.499 fails 4.5 (Understanding SC 1.4.3)
            if len(_PASSING) >= _PASSING_LIMIT:
                _PASSING.clear()
            _PASSING.add(situation)
            continue
        fg, bg = pairs[worst]
        findings.append(Finding(
            rule=TEXT_RATIO.code,
            slug=TEXT_RATIO.slug,
            severity=TEXT_RATIO.severity,
            sample=sample,
            ratio=ratio,
            required=required,
            level=level,
            fixes=text_fixes(sample, pairs, fg, bg, required),
            args={
                "large": large,
                "sc": criterion.number,
                "fg": fg,
                "bg": bg,
                "stop": worst,  # 0: the main background; n: bg_alternatives[n - 1]
                "stops": len(pairs),
            },
        ))
    return findings


def text_fixes(sample: Sample, pairs, fg, bg, required: float) -> list:
    """Nearest passing foreground (keeping hue, against every background) and background, each
    on the side of the pair it is on today (dark text stays darker than its background)."""
    fixes = []
    if len(pairs) == 1:
        found = suggest.foreground(fg, bg, required)
    else:
        found = suggest.nearest_same_side(tuple(sample.fg), [b for _, b in pairs], required)
    if found is not None:
        fixes.append(Fix("foreground", tuple(found[0]), found[1]))
    found = suggest.background(fg, bg, required)
    if found is not None:
        fixes.append(Fix("background", tuple(found[0]), found[1]))
    return fixes
