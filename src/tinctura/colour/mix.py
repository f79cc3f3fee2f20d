"""color-mix() interpolation (CSS Color 5 section 2, with CSS Color 4 section 12).

Colours travel as ``(space, coords, alpha)`` where a coordinate or the alpha may be None:
the CSS ``none`` keyword, a *missing* component. Missing components are carried forward
into analogous components of the interpolation space, take the other colour's value while
mixing, and count as 0 only when the result is finally converted for display.
"""
from __future__ import annotations

from . import convert

# CSS Color 4, 12.3.2 "analogous components": the category of each component per space.
_R, _G, _B, _LIGHT, _CHROMA, _HUE, _OPP_A, _OPP_B = range(8)
_RGBISH = (_R, _G, _B)
CATEGORIES = {
    **{space: _RGBISH for space in convert.RGB_SPACES},
    "xyz": _RGBISH,
    "xyz-d50": _RGBISH,
    "xyz-d65": _RGBISH,
    "lab": (_LIGHT, _OPP_A, _OPP_B),
    "oklab": (_LIGHT, _OPP_A, _OPP_B),
    "lch": (_LIGHT, _CHROMA, _HUE),
    "oklch": (_LIGHT, _CHROMA, _HUE),
    "hsl": (_HUE, _CHROMA, _LIGHT),
    "hwb": (_HUE, None, None),
}

INTERPOLATION_SPACES = frozenset(CATEGORIES)
HUE_METHODS = frozenset({"shorter", "longer", "increasing", "decreasing"})

# Below these chroma values a converted colour counts as achromatic and its hue as powerless
# (CSS Color 4, 4.4.1). The thresholds are ours: well above the float noise of our
# conversions of greys (< 1e-7), well below any visible chroma.
_ACHROMATIC = {"lch": 1e-4, "oklch": 1e-6, "hsl": 1e-5}


def _hue_index(space):
    return 0 if space in ("hsl", "hwb") else 2


def to_space(colour, space):
    """Convert ``(space, coords, alpha)`` into ``space``, keeping missing components."""
    source, coords, alpha = colour
    if source == space:
        return (space, tuple(coords), alpha)
    values = tuple(0.0 if c is None else c for c in coords)
    out = list(convert.convert_space(values, source, space))
    # Carry forward: a missing source component makes the analogous target one missing.
    missing = {CATEGORIES[source][i] for i, c in enumerate(coords) if c is None} - {None}
    for i, category in enumerate(CATEGORIES[space]):
        if category is not None and category in missing:
            out[i] = None
    # Powerless hue of an achromatic colour becomes missing on conversion into a polar space.
    if space in convert.POLAR_SPACES:
        h = _hue_index(space)
        if out[h] is not None and _achromatic(space, out):
            out[h] = None
    return (space, tuple(out), alpha)


def _achromatic(space, coords):
    if space == "hwb":
        w, b = coords[1] or 0.0, coords[2] or 0.0
        return w + b >= 100 - 1e-5
    chroma = coords[1] or 0.0
    return abs(chroma) < _ACHROMATIC[space]


def _fix_hues(h1, h2, method):
    h1, h2 = h1 % 360, h2 % 360
    d = h2 - h1
    if method == "shorter":
        if d > 180:
            h1 += 360
        elif d < -180:
            h2 += 360
    elif method == "longer":
        if 0 < d < 180:
            h1 += 360
        elif -180 < d <= 0:
            h2 += 360
    elif method == "increasing":
        if d < 0:
            h2 += 360
    elif method == "decreasing":
        if d > 0:
            h1 += 360
    return h1, h2


def interpolate(c1, c2, t, space, hue_method="shorter"):
    """Mix two ``(space, coords, alpha)`` colours at progress ``t`` (0: c1, 1: c2).

    Premultiplied-alpha interpolation in ``space``; hue (in polar spaces) is interpolated
    unpremultiplied along ``hue_method``. Returns ``(space, coords, alpha)``.
    """
    _, a_coords, a_alpha = to_space(c1, space)
    _, b_coords, b_alpha = to_space(c2, space)
    a_coords, b_coords = list(a_coords), list(b_coords)
    for i in range(3):  # a component missing on one side takes the other side's value
        if a_coords[i] is None:
            a_coords[i] = b_coords[i]
        elif b_coords[i] is None:
            b_coords[i] = a_coords[i]
    if a_alpha is None:
        a_alpha = b_alpha
    elif b_alpha is None:
        b_alpha = a_alpha

    hue = _hue_index(space) if space in convert.POLAR_SPACES else -1
    pa = 1.0 if a_alpha is None else a_alpha
    pb = 1.0 if b_alpha is None else b_alpha
    alpha = None if a_alpha is None else pa + (pb - pa) * t
    out = []
    for i in range(3):
        x, y = a_coords[i], b_coords[i]
        if x is None:  # missing on both sides: stays missing
            out.append(None)
        elif i == hue:
            x, y = _fix_hues(x, y, hue_method)
            out.append((x + (y - x) * t) % 360)
        else:
            mixed = x * pa + (y * pb - x * pa) * t
            divisor = 1.0 if alpha is None else alpha
            out.append(mixed / divisor if divisor else 0.0)
    return (space, tuple(out), alpha)
