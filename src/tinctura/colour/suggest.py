"""Suggested colours that keep the pair's polarity and stay close to the original.

A writer who set grey text on a white page wants a darker grey, not a black page: a suggested
background for dark text gets lighter (or cannot be found), a suggested text colour for a dark
page gets lighter. Each suggestion:

- stays on its side of every colour it is paired with (lighter stays lighter, darker stays
  darker: ``sides``), so the set of passing luminances is one interval; a pair below
  ``AMBIGUOUS`` (1.5:1) has no clear polarity and may go either way;
- keeps the OKLCh hue and moves lightness the least it must (``colour.fix`` does the search and
  the 8-bit rounding);
- keeps the chroma where the sRGB gamut allows; where the gamut forces a lower chroma, the
  candidates at several chromas are ranked by their distance to the original in CAM02-UCS
  (Luo, Cui & Li 2006; ``colour.ucs_distance``).

Returns ``None`` when no colour on the same side reaches the ratio: callers say so rather than
suggest the opposite polarity.

References: WCAG 2.2, definitions "contrast ratio" and "relative luminance" (W3C); M. R. Luo,
G. Cui, C. Li, "Uniform colour spaces based on CIECAM02 colour appearance model", Color Research
& Application 31 (2006).
"""
from __future__ import annotations

import math
from functools import lru_cache

from . import ucs_distance
from . import fix as _fix
from .convert import srgb_to_oklab, to_polar
from .wcag import contrast_ratio, relative_luminance

LIGHTER, DARKER = 1, -1
_CHROMA_STEPS = (1.0, 0.75, 0.5, 0.25, 0.0)  # fractions of the original chroma tried
# Below this ratio a pair has no clear polarity (text nearly as dark as its background):
# either side may be suggested, the nearer wins. Common practice, not a published threshold.
AMBIGUOUS = 1.5


def side(colour, other) -> int:
    """LIGHTER when ``colour`` is at least as light (in relative luminance) as ``other``."""
    return LIGHTER if relative_luminance(colour) >= relative_luminance(other) else DARKER


def same_side_interval(others, sides, required: float):
    """The luminances (lo, hi) reaching ``required`` against every other colour while staying
    on the given side of each; None when there are none."""
    lo, hi = 0.0, 1.0
    for other, s in zip(others, sides):
        lum = relative_luminance(other)
        if s == LIGHTER:  # (Y + 0.05) / (L + 0.05) >= r
            lo = max(lo, required * (lum + 0.05) - 0.05)
        else:  # (L + 0.05) / (Y + 0.05) >= r
            hi = min(hi, (lum + 0.05) / required - 0.05)
    return (lo, hi) if lo <= hi else None


def nearest_same_side(colour, others, required: float, sides=None):
    """The colour nearest ``colour`` (same hue, same side of each of ``others``) whose worst
    ratio against ``others`` reaches ``required``: ``(rgb, ratio)`` or None.

    ``sides`` defaults to the side ``colour`` is on today of each other colour.
    """
    colour = _fix._key(colour)
    others = tuple(_fix._key(o) for o in others)
    if not others:
        return None
    if sides is None:
        sides = tuple(side(colour, o) if contrast_ratio(colour, o) >= AMBIGUOUS else 0
                      for o in others)
    options = [tuple(sides)]
    for i, s in enumerate(sides):  # either side of a nearly equal colour: try both
        if s == 0:
            options = [o[:i] + (d,) + o[i + 1:] for o in options for d in (LIGHTER, DARKER)]
    found = [r for r in (_nearest(colour, others, float(required), o) for o in options[:16])
             if r is not None]
    if not found:
        return None
    start = srgb_to_oklab(colour)
    return min(found, key=lambda r: math.dist(start, srgb_to_oklab(r[0])))


def foreground(fg, bg, required: float):
    """A text colour for ``bg`` on the side ``fg`` is on (dark text stays dark)."""
    return nearest_same_side(fg, (bg,), required)


def background(fg, bg, required: float):
    """A background for ``fg`` on the side ``bg`` is on (a light page stays light)."""
    return nearest_same_side(bg, (fg,), required)


def background_under(text, bg, required: float, rounds: int = 12):
    """A background on the side ``bg`` is on for text drawn translucent (``text``: r, g, b, a
    with a < 1), or None. What the reader sees of such text is its composite over the
    background, which moves with the background: the background is moved (``background``)
    until the composite over it passes too. ``(rgb, ratio)`` as ``background`` gives."""
    from .composite import over

    candidate = tuple(bg)[:3]
    for _ in range(rounds):
        seen = over(tuple(text), candidate + (1.0,))[:3]
        ratio = contrast_ratio(seen, candidate)
        if ratio >= required:
            return candidate, ratio
        found = background(seen, bg, required)
        if found is None or tuple(found[0]) == candidate:
            return None
        candidate = tuple(found[0])[:3]
    return None


def describe_side(colour, other) -> str:
    """``lighter`` or ``darker``: the way a suggestion for ``colour`` may move."""
    return "lighter" if side(colour, other) == LIGHTER else "darker"


@lru_cache(maxsize=8192)  # a site repeats few colour situations
def _nearest(colour, given, required, sides):
    # found against the edges of the given colours' hex cells, its ratio told against them
    others = tuple(_edge(o, s) for o, s in zip(given, sides))
    interval = same_side_interval(others, sides, required)
    if interval is None:
        return None
    lo, hi = interval
    lum = relative_luminance(colour)
    if lo <= lum <= hi and _fix._worst_ratio(colour, others) >= required:
        return colour, _fix._worst_ratio(colour, given)
    rising = lum < lo
    target = lo if rising else hi
    lightness, chroma, hue = to_polar(srgb_to_oklab(colour))
    candidates = []
    for fraction in _CHROMA_STEPS:
        c = chroma * fraction
        found = _fix._lightness_for(target, 0.0, 1.0, c, hue, rising)
        rgb = _fix._settle(found, _fix._STEP if rising else -_fix._STEP, c, hue, others,
                           required)
        if rgb is not None and _on_sides(rgb, others, sides) and rgb not in candidates:
            candidates.append(rgb)
        if candidates and not _chroma_reduced(candidates[0], chroma):
            break  # the original chroma fits: nothing nearer to rank against
    if not candidates:
        return None
    best = candidates[0] if len(candidates) == 1 else min(
        candidates, key=lambda rgb: cam02ucs_distance(colour, rgb))
    return best, _fix._worst_ratio(best, given)


# Half a step of an 8-bit channel: a colour shown (and grouped) as #rrggbb may be anywhere within
# it of that value (a theme's hsl(225deg 15% 14%) is #1e2129 plus 0.35 of a step in red).
_HALF_STEP = 0.5 / 255


def _edge(other, s) -> tuple:
    """The colour within half an 8-bit step of ``other`` that is hardest to contrast with
    from side ``s`` (lighter for lighter text): a suggestion that passes against it passes
    against every colour written as ``other``'s hex."""
    if s not in (LIGHTER, DARKER):
        return other
    return tuple(min(1.0, max(0.0, c + s * _HALF_STEP)) for c in other[:3])


def hex_cell_edges(other) -> tuple:
    """The two colours within half an 8-bit step of ``other`` that are hardest to contrast
    with from either side: a colour that passes a test against both passes it against every
    colour written as ``other``'s hex (as far as the test grows with the luminance distance,
    as the WCAG 2 ratio and APCA's Lc do)."""
    return _edge(other, LIGHTER), _edge(other, DARKER)


def _on_sides(rgb, others, sides) -> bool:
    return all(side(rgb, o) == s for o, s in zip(others, sides))


def _chroma_reduced(rgb, chroma: float) -> bool:
    """True when the gamut held the suggestion well below the original chroma."""
    return to_polar(srgb_to_oklab(rgb))[1] < chroma - 0.02


def cam02ucs_distance(a, b) -> float:
    """Euclidean distance of two sRGB colours in CAM02-UCS (``colour.ucs_distance``)."""
    return ucs_distance.distance(a, b)
