"""Colour-vision deficiency (family ``deficiency``): samples in, findings out, no I/O.

TC400 cvd-ratio: text that meets a measure for normal vision (the WCAG 2 ratio, or the APCA Lc
level of its tier) and loses it for a reader with protanopia, deuteranopia or tritanopia
(Machado, Oliveira and Fernandes 2009, ``tinctura.colour.cvd``). The distinct colours of the
samples are simulated once each, in plain Python (``colour.cvd`` says why not in numpy);
colour-science is imported only for a severity other than 1 (its interpolated matrices).

A neutral pair (every channel equal in both colours) is not simulated: the model's matrices map
a grey to itself (their rows sum to 1), so every reader sees it alike.
"""
from __future__ import annotations

from tinctura.colour import apca, wcag

from . import perception as appearance
from .catalogue import CVD_RATIO
from .text import backgrounds, foreground_on, judged

DEFICIENCIES = ("protanopia", "deuteranopia", "tritanopia")
_VERDICTS = appearance.Verdicts()


def check_cvd_ratio(samples, options) -> list:
    """TC400: one finding per sample, naming every deficiency under which it fails."""
    level = getattr(options, "level", "AA") or "AA"
    severity = float(getattr(options, "cvd_severity", 1.0))
    levels = appearance.lc_levels(options)
    levels_key = tuple(sorted(levels.items()))
    keyed = []
    for sample in samples:
        if not judged(sample) or _neutral(sample):
            continue
        tier = appearance.tier(sample.font_size_px, sample.font_weight, sample.kind)
        large = wcag.is_large_text(sample.font_size_px, sample.font_weight)
        key = (level, severity, levels_key, tier, large, sample.fg, sample.bg,
               sample.bg_alternatives, sample.fg_raw)
        keyed.append((sample, key, tier, large))
    _simulate_new(keyed, severity)
    findings = []
    for sample, key, tier, large in keyed:
        verdict = _VERDICTS.get(key, lambda: _judge(sample, level, large, levels[tier], severity))
        if verdict is not None:
            findings.append(appearance.finding(CVD_RATIO, sample, verdict, level))
    return findings


def _neutral(sample) -> bool:
    colours = (sample.fg, sample.bg) + tuple(sample.bg_alternatives)
    return all(c is None or c[0] == c[1] == c[2] for c in colours)


def _simulate_new(keyed, severity) -> None:
    """Batch the simulation of the colours of situations not judged yet."""
    colours = set()
    for sample, key, _, _ in keyed:
        if not _VERDICTS.known(key):
            for bg in backgrounds(sample):
                colours.add(tuple(bg))
                colours.add(tuple(foreground_on(sample, bg)))
    if colours:
        appearance.simulate_all(sorted(colours), DEFICIENCIES, severity)


def _judge(sample, level, large, need, severity):
    required = wcag.required_ratio(level, large)
    pairs = [(foreground_on(sample, bg), bg) for bg in backgrounds(sample)]
    normal = [(wcag.contrast_ratio(fg, bg), apca.lightness_contrast(fg, bg)) for fg, bg in pairs]
    if min(r for r, _ in normal) < required:
        return None  # TC100 reports it
    failing = []  # (simulated ratio, deficiency, pair index, sim fg, sim bg, sim Lc)
    for deficiency in DEFICIENCIES:
        worst = None
        for i, (fg, bg) in enumerate(pairs):
            sim_fg = appearance.simulated(fg, deficiency, severity)
            sim_bg = appearance.simulated(bg, deficiency, severity)
            ratio = wcag.contrast_ratio(sim_fg, sim_bg)
            lc = apca.lightness_contrast(sim_fg, sim_bg)
            lost_lc = abs(normal[i][1]) >= need > abs(lc)
            if ratio < required or lost_lc:
                if worst is None or ratio < worst[0]:
                    worst = (ratio, deficiency, i, sim_fg, sim_bg, lc)
        if worst is not None:
            failing.append(worst)
    if not failing:
        return None
    ratio, deficiency, i, sim_fg, sim_bg, lc = min(failing)
    requirement = appearance.Requirement(
        ratio=required, deficiencies=tuple(f[1] for f in failing), severity=severity,
        cvd_lc=need)
    return appearance.verdict(ratio, required, {
        "deficiency": deficiency,
        "deficiencies": ", ".join(f[1] for f in failing),
        "severity": severity,
        "sim_fg": sim_fg,
        "sim_bg": sim_bg,
        "lc": lc,
        "normal_ratio": normal[i][0],
        "normal_lc": normal[i][1],
        "lc_required": need,
    }, requirement, pairs, i, large)
