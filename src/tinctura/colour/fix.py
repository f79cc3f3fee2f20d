"""Suggest the nearest colour that reaches a WCAG 2 contrast ratio.

The search keeps the colour's OKLCh hue and moves its lightness, the least it must (the
change is measured as Euclidean distance in OKLab). Chroma stays as it was where the sRGB
gamut allows and is reduced only as far as needed to stay inside it. Every suggestion is
checked on its ``#rrggbb`` rounding, since that is what a stylesheet will contain.

Contrast depends on relative luminance only, so the passing region is a set of luminance
intervals worked out exactly from the WCAG formula; lightness is then found by bisection
(luminance grows with OKLab lightness at fixed hue and chroma).
"""
from __future__ import annotations

import math

from .convert import (
    _LMS_TO_LSRGB,
    _OKLAB_TO_LMS,
    from_polar,
    linear_to_srgb,
    oklab_to_linear_srgb,
    quantize,
    srgb_to_oklab,
    to_polar,
)
from functools import lru_cache

from .wcag import contrast_ratio, relative_luminance

_BISECT_LIGHTNESS = 32  # 1 / 2**32 of the lightness range: far below one 8-bit step
_BISECT_CHROMA = 24
_STEP = 0.001  # lightness step when the 8-bit rounding falls short
_GAMUT_TOLERANCE = 1e-9


def nearest_passing_foreground(fg, bg, required: float):
    """Nearest colour to ``fg`` (same hue) reaching ``required`` against ``bg``.

    Returns ``(rgb, ratio)``, rgb being an 8-bit colour (channels k / 255) and ratio its
    unrounded contrast ratio, or None when no colour of that hue can reach the ratio. A
    foreground that already passes is returned unchanged.
    """
    return _nearest_cached(_key(fg), (_key(bg),), float(required))


def nearest_passing_background(fg, bg, required: float):
    """Nearest colour to ``bg`` (same hue) reaching ``required`` against ``fg``."""
    return _nearest_cached(_key(bg), (_key(fg),), float(required))


def passing_foreground_for_all(fg, bgs, required: float):
    """One colour near ``fg`` passing against every background in ``bgs``, or None.

    The ratio returned is the lowest over the backgrounds.
    """
    bgs = tuple(_key(b) for b in bgs)
    if not bgs:
        return None
    return _nearest_cached(_key(fg), bgs, float(required))


def _key(rgb) -> tuple:
    return tuple(float(c) for c in rgb[:3])


@lru_cache(maxsize=8192)
def _nearest_cached(colour, others, required):
    # A site repeats the same few colour pairs thousands of times; a search costs ~3 ms.
    return _nearest(colour, others, required)


def _worst_ratio(rgb, others):
    return min(contrast_ratio(rgb, other) for other in others)


def _feasible_luminances(others, required):
    """Closed luminance intervals within [0, 1] where every ratio reaches ``required``."""
    excluded = []
    for other in others:
        lum = relative_luminance(other)
        # ratio >= r  <=>  Y <= (L + 0.05) / r - 0.05  or  Y >= r (L + 0.05) - 0.05
        excluded.append(((lum + 0.05) / required - 0.05, required * (lum + 0.05) - 0.05))
    excluded.sort()
    intervals, start = [], 0.0
    for lo, hi in excluded:
        if lo >= start and start <= 1.0:
            intervals.append((start, min(lo, 1.0)))
        start = max(start, hi)
    if start <= 1.0:
        intervals.append((start, 1.0))
    return [(a, b) for a, b in intervals if a <= b]


def _in_gamut_colour(lightness, chroma, hue):
    """sRGB of OKLCh (L, C, h) with chroma reduced just enough to fit the gamut."""
    lightness = min(max(lightness, 0.0), 1.0)
    fits = _fits(lightness, hue)
    if not fits(chroma):
        lo, hi = 0.0, chroma
        for _ in range(_BISECT_CHROMA):
            mid = (lo + hi) / 2
            if fits(mid):
                lo = mid
            else:
                hi = mid
        chroma = lo
    linear = oklab_to_linear_srgb(from_polar((lightness, chroma, hue)))
    return tuple(min(max(c, 0.0), 1.0) for c in linear_to_srgb(linear))


def _fits(lightness, hue):
    """``fits(chroma)``: whether OKLCh (lightness, chroma, hue) is in the sRGB gamut, as
    ``in_gamut(oklab_to_linear_srgb(from_polar(...)), _GAMUT_TOLERANCE)`` says, by the very same
    float operations in the same order, with what does not depend on chroma worked out once
    (the searches bisect chroma at fixed lightness and hue)."""
    r = math.radians(hue)
    cos_h, sin_h = math.cos(r), math.sin(r)
    (m00, m01, m02), (m10, m11, m12), (m20, m21, m22) = _OKLAB_TO_LMS
    (n00, n01, n02), (n10, n11, n12), (n20, n21, n22) = _LMS_TO_LSRGB
    low, high = -_GAMUT_TOLERANCE, 1 + _GAMUT_TOLERANCE

    def fits(chroma):
        a, b = chroma * cos_h, chroma * sin_h
        l_ = (m00 * lightness + m01 * a + m02 * b) ** 3
        m_ = (m10 * lightness + m11 * a + m12 * b) ** 3
        s_ = (m20 * lightness + m21 * a + m22 * b) ** 3
        return (low <= n00 * l_ + n01 * m_ + n02 * s_ <= high
                and low <= n10 * l_ + n11 * m_ + n12 * s_ <= high
                and low <= n20 * l_ + n21 * m_ + n22 * s_ <= high)
    return fits


def _lightness_for(target, lo, hi, chroma, hue, rising):
    """Bisection on lightness in [lo, hi]: the end nearest the start where the luminance
    crosses ``target`` (``rising``: searching upwards from lo, else downwards from hi)."""
    for _ in range(_BISECT_LIGHTNESS):
        mid = (lo + hi) / 2
        lum = relative_luminance(_in_gamut_colour(mid, chroma, hue))
        if (lum >= target) == rising:
            hi, lo = (mid, lo) if rising else (hi, mid)
        else:
            lo, hi = (mid, hi) if rising else (lo, mid)
    return hi if rising else lo


def _nearest(colour, others, required):
    colour = tuple(colour[:3])
    others = tuple(tuple(o[:3]) for o in others)
    if _worst_ratio(colour, others) >= required:
        return colour, _worst_ratio(colour, others)
    intervals = _feasible_luminances(others, required)
    if not intervals:
        return None
    start = srgb_to_oklab(colour)
    lightness, chroma, hue = to_polar(start)
    lum = relative_luminance(colour)
    candidates = []
    below = [b for a, b in intervals if b < lum]
    above = [a for a, b in intervals if a > lum]
    if below:  # darken until the luminance is at most the top of the nearest interval below
        target = max(below)
        found = _lightness_for(target, 0.0, lightness, chroma, hue, rising=False)
        candidates.append(_settle(found, -_STEP, chroma, hue, others, required))
    if above:
        target = min(above)
        found = _lightness_for(target, lightness, 1.0, chroma, hue, rising=True)
        candidates.append(_settle(found, _STEP, chroma, hue, others, required))
    candidates = [c for c in candidates if c is not None]
    if not candidates:
        return None
    best = min(candidates, key=lambda rgb: _distance(start, rgb))
    return best, _worst_ratio(best, others)


def _settle(lightness, step, chroma, hue, others, required):
    """Step lightness further until the 8-bit rounding of the colour passes too."""
    while -step <= lightness <= 1 + step:
        rgb = quantize(_in_gamut_colour(lightness, chroma, hue))
        if _worst_ratio(rgb, others) >= required:
            return rgb
        lightness += step
    return None


def _distance(start, rgb):
    return math.dist(start, srgb_to_oklab(rgb))


# -- search by predicate --------------------------------------------------------------------
# Rules beyond the WCAG 2 ratio (APCA Lc, a simulated colour-vision deficiency, a viewing
# profile) pass where no closed form says: they give a test ``test(text, background) -> bool``
# (hashable, so results are cached) and the search walks the lightness of the colour's OKLCh
# hue outwards in both directions, then bisects the last step. Whether a test passes need not
# grow with luminance; the walk finds the nearest passing step, the bisection assumes only that
# the test does not flip back within one step (0.02 in OKLab lightness).

_WALK_STEP = 0.02
_WALK_BISECT = 14


def nearest_foreground_where(fg, bgs, test):
    """Nearest colour to ``fg`` (same hue) for which ``test(colour, bg)`` holds on every
    background in ``bgs``; ``(rgb, worst WCAG 2 ratio)`` or None. ``fg`` itself when it passes."""
    bgs = tuple(_key(b) for b in bgs)
    if not bgs:
        return None
    return _nearest_where(_key(fg), bgs, test)


def nearest_background_where(fg, bg, test):
    """Nearest colour to ``bg`` (same hue) for which ``test(fg, colour)`` holds."""
    return _nearest_where(_key(bg), (_key(fg),), _Swapped(test))


class _Swapped:
    """``test`` with its arguments swapped: the candidate is the background."""

    __slots__ = ("test",)

    def __init__(self, test):
        self.test = test

    def __call__(self, candidate, other):
        return self.test(other, candidate)

    def __eq__(self, other):
        return isinstance(other, _Swapped) and other.test == self.test

    def __hash__(self):
        return hash(("swapped", self.test))


# How far OKLab lightness can move when a colour is rounded to 8 bits: at most where the
# cube roots are steepest, from black to #010101 (0.053; ``tests/colour/test_fix_where.py``
# checks the bound on a grid). A walk stops once even that cannot bring it nearer than a colour the
# other walk found.
_ROUNDING_L = 0.06


@lru_cache(maxsize=4096)
def _nearest_where(colour, others, test):
    def ok(rgb):
        return all(_passes(test, rgb, other) for other in others)

    if ok(colour):
        return colour, _worst_ratio(colour, others)
    start = srgb_to_oklab(colour)
    lightness, chroma, hue = to_polar(start)
    walks = [_walk(lightness, chroma, hue, step, ok) for step in (-_WALK_STEP, _WALK_STEP)]
    found, nearest = [None, None], math.inf
    for k in range(1, int(1 / _WALK_STEP) + 2):  # both walks a step at a time
        for d, walk in enumerate(walks):
            if walk is None:
                continue
            if (k - 1) * _WALK_STEP - _ROUNDING_L > nearest:  # (cannot come nearer)
                walks[d] = None
                continue
            rgb = next(walk)
            if rgb is not _FAILED:
                walks[d] = None
                if rgb is not None:
                    found[d] = rgb
                    nearest = min(nearest, _distance(start, rgb))
        if walks == [None, None]:
            break
    candidates = [rgb for rgb in found if rgb is not None]
    if not candidates:
        return None
    best = min(candidates, key=lambda rgb: _distance(start, rgb))
    return best, _worst_ratio(best, others)


_FAILED = object()  # a walk's step that did not pass


def _walk(lightness, chroma, hue, step, ok):
    """Walk lightness by ``step``, yielding ``_FAILED`` per failing step, then the first
    passing 8-bit colour, refined by bisection (or None at the end of the range)."""
    previous = lightness
    for k in range(1, int(1 / abs(step)) + 2):
        current = min(max(lightness + k * step, 0.0), 1.0)  # ends included once
        rgb = _step_colour(current, chroma, hue)
        if ok(rgb):
            failing, passing = previous, current
            for _ in range(_WALK_BISECT):
                mid = (failing + passing) / 2
                trial = _step_colour(mid, chroma, hue)
                if ok(trial):
                    passing, rgb = mid, trial
                else:
                    failing = mid
            yield rgb
            return
        if current in (0.0, 1.0):
            yield None
            return
        yield _FAILED
        previous = current
    yield None


# The searches of one run start from a few dozen colours and revisit the same steps: the
# foreground of a situation, then of its problem over more backgrounds, then of each run of
# backgrounds that one colour can serve. Both caches hold pure results, so they only save time.

@lru_cache(maxsize=65536)
def _step_colour(lightness, chroma, hue):
    """The 8-bit colour at one step of a search: in gamut, then rounded."""
    return quantize(_in_gamut_colour(lightness, chroma, hue))


@lru_cache(maxsize=65536)
def _passes(test, text, background) -> bool:
    return test(text, background)
