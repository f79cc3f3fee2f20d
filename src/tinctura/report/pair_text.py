"""`tinctura pair`: the colour-appearance part of one pair's report (after the WCAG 2 lines).

APCA Lc with the text tiers it meets, the pair as each colour-vision deficiency shows it, and
the pair in each viewing profile. Lines are ``(text, styles)``; the CLI writes them.
"""
from __future__ import annotations

from tinctura.colour import apca, viewing, wcag

from . import messages as m

TIER_NAMES = {"body": "body text", "content": "other content text",
              "headline": "large headlines", "any": "placeholder text"}


def appearance_lines(fg, bg, size_px: float, weight: int, required: float, levels: dict,
                     severity: float = 1.0, mark=lambda ok: "pass" if ok else "fail") -> list:
    """Lines for the pair ``fg`` on ``bg`` (opaque); ``required`` is the WCAG 2 ratio the text
    needs at the selected level, ``levels`` the Lc per tier (rules.perception)."""
    from tinctura.rules import perception as appearance
    from tinctura.rules.deficiency import DEFICIENCIES

    lines = []
    lc = apca.lightness_contrast(fg, bg)
    tier = appearance.tier(size_px, weight)
    lines.append((f"APCA lightness contrast: Lc {m.lc(lc)} ({apca.polarity(fg, bg)}); "
                  f"advice, not a WCAG 2 requirement", ("bold",)))
    met = [f"{TIER_NAMES[t]} (Lc {levels[t]:g})" for t in levels if abs(lc) >= levels[t]]
    lines.append((f"  meets the levels for: {', '.join(met) if met else 'none'}", ()))
    lines.append((f"  this text is {TIER_NAMES[tier]}: needs Lc {levels[tier]:g}: "
                  f"{mark(abs(lc) >= levels[tier])}", ()))

    need = f"needs {m.required(required)}:1"
    lines.append((f"Colour-vision deficiency (Machado et al. 2009, severity {severity:g}; "
                  f"{need}):", ("bold",)))
    appearance.simulate_all([tuple(fg), tuple(bg)], DEFICIENCIES, severity)
    for deficiency in DEFICIENCIES:
        sfg = appearance.simulated(fg, deficiency, severity)
        sbg = appearance.simulated(bg, deficiency, severity)
        ratio = wcag.contrast_ratio(sfg, sbg)
        lines.append((f"  {deficiency:<13}{m.colour(sfg)} on {m.colour(sbg)}: "
                      f"{m.ratio(ratio)}:1, Lc {m.lc(apca.lightness_contrast(sfg, sbg))}: "
                      f"{mark(ratio >= required)}", ()))

    lines.append((f"Viewing profiles (light reflected by the screen; office gives the WCAG 2 "
                  f"ratio; {need}):", ("bold",)))
    for profile in viewing.PROFILES.values():
        ratio = viewing.effective_ratio(fg, bg, profile)
        lines.append((f"  {profile.name:<9}{profile.illuminance:,.0f} lux, {profile.white:g} "
                      f"cd/m2: {m.ratio(ratio)}:1, Lc {m.lc(viewing.effective_lc(fg, bg, profile))}"
                      f": {mark(ratio >= required)}", ()))
    return lines
