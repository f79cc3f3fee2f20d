"""Lightness contrast (family ``lightness``): samples in, findings out, no I/O.

TC200 text-lc: APCA Lc of text that meets the WCAG 2 ratio, against the APCA readability level
its size and weight call for (``appearance.tier``). Text below the WCAG 2 ratio is TC100's.
"""
from __future__ import annotations

from tinctura.colour import apca, wcag
from . import perception as appearance
from .catalogue import TEXT_LC
from .text import backgrounds, foreground_on, judged

_VERDICTS = appearance.Verdicts()


def check_text_lc(samples, options) -> list:
    """TC200: one finding per sample whose weakest |Lc| is below its tier's level."""
    level = getattr(options, "level", "AA") or "AA"
    levels = appearance.lc_levels(options)
    levels_key = tuple(sorted(levels.items()))
    findings = []
    for sample in samples:
        if not judged(sample):
            continue
        tier = appearance.tier(sample.font_size_px, sample.font_weight, sample.kind)
        large = wcag.is_large_text(sample.font_size_px, sample.font_weight)
        key = (level, levels_key, tier, large, sample.fg, sample.bg, sample.bg_alternatives,
               sample.fg_raw)
        verdict = _VERDICTS.get(key, lambda: _judge(sample, level, tier, large, levels[tier]))
        if verdict is not None:
            findings.append(appearance.finding(TEXT_LC, sample, verdict, level))
    return findings


def _judge(sample, level, tier, large, need):
    required = wcag.required_ratio(level, large)
    pairs = [(foreground_on(sample, bg), bg) for bg in backgrounds(sample)]
    ratios = [wcag.contrast_ratio(fg, bg) for fg, bg in pairs]
    if min(ratios) < required:
        return None  # TC100 reports it
    lcs = [apca.lightness_contrast(fg, bg) for fg, bg in pairs]
    worst = min(range(len(lcs)), key=lambda i: abs(lcs[i]))
    if abs(lcs[worst]) >= need:
        return None
    fg, bg = pairs[worst]
    requirement = appearance.Requirement(ratio=required, lc=need)
    return appearance.verdict(ratios[worst], required, {
        "lc": lcs[worst],
        "lc_required": need,
        "polarity": apca.polarity(fg, bg),
        "tier": appearance.TIER_TEXT[tier],
    }, requirement, pairs, worst, large)
