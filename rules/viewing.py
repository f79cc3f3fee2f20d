"""Viewing conditions (family ``viewing``): samples in, findings out, no I/O.

TC500 glare-ratio: text that meets the WCAG 2 ratio in the office (the sRGB reference viewing
conditions, where the effective ratio is the WCAG 2 ratio) and falls below it under a selected
viewing profile (``Options.profiles``, default daylight), where light reflected by the screen
adds the same luminance to text and background (``tinctura.colour.viewing``).
"""
from __future__ import annotations

from tinctura.colour import viewing, wcag

from . import perception as appearance
from .catalogue import GLARE_RATIO
from .text import backgrounds, foreground_on, judged

_VERDICTS = appearance.Verdicts()


def selected_profiles(options) -> tuple:
    names = tuple(getattr(options, "profiles", None) or viewing.DEFAULT_PROFILES)
    return tuple(viewing.get(name) for name in names)


def check_glare_ratio(samples, options) -> list:
    """TC500: one finding per sample, in the profile where it keeps the least contrast."""
    level = getattr(options, "level", "AA") or "AA"
    profiles = selected_profiles(options)
    findings = []
    for sample in samples:
        if not judged(sample):
            continue
        large = wcag.is_large_text(sample.font_size_px, sample.font_weight)
        key = (level, profiles, large, sample.fg, sample.bg, sample.bg_alternatives,
               sample.fg_raw)
        verdict = _VERDICTS.get(key, lambda: _judge(sample, level, large, profiles))
        if verdict is not None:
            findings.append(appearance.finding(GLARE_RATIO, sample, verdict, level))
    return findings


def _judge(sample, level, large, profiles):
    required = wcag.required_ratio(level, large)
    pairs = [(foreground_on(sample, bg), bg) for bg in backgrounds(sample)]
    office = [wcag.contrast_ratio(fg, bg) for fg, bg in pairs]
    if min(office) < required:
        return None  # TC100 reports it
    worst = None  # (effective ratio, profile, pair index)
    failing = []
    for profile in profiles:
        ratios = [viewing.effective_ratio(fg, bg, profile) for fg, bg in pairs]
        i = min(range(len(ratios)), key=ratios.__getitem__)
        if ratios[i] < required:
            failing.append(profile.name)
            if worst is None or ratios[i] < worst[0]:
                worst = (ratios[i], profile, i)
    if worst is None:
        return None
    ratio, profile, i = worst
    fg, bg = pairs[i]
    requirement = appearance.Requirement(ratio=required, profiles=tuple(failing))
    return appearance.verdict(ratio, required, {
        "profile": profile.name,
        "profiles": ", ".join(failing),
        "about": profile.about,
        "office_ratio": office[i],
        "fg_cd": viewing.luminance_cd(fg, profile),
        "bg_cd": viewing.luminance_cd(bg, profile),
        "lc": viewing.effective_lc(fg, bg, profile),
    }, requirement, pairs, i, large)
