"""The predicate-based fix search (fix.nearest_foreground_where / nearest_background_where).

The WCAG 2.2 ratio from tests/wcag_reference.py judges the suggestions; the closed-form search
(fix.nearest_passing_foreground) is the comparison for a ratio-only test.
"""
import pytest
from wcag_reference import ratio

from tinctura.colour import fix
from tinctura.colour.convert import to_hex


class AtLeast:
    """A hashable test: the WCAG ratio reaches ``required``."""

    def __init__(self, required):
        self.required = required

    def __call__(self, text, background):
        return ratio(text, background) >= self.required

    def __eq__(self, other):
        return isinstance(other, AtLeast) and other.required == self.required

    def __hash__(self):
        return hash(self.required)


GREY, WHITE, NIGHT = (0x8a / 255,) * 3, (1.0, 1.0, 1.0), (0x22 / 255,) * 3


def test_a_passing_colour_is_kept():
    found = fix.nearest_foreground_where((0.2, 0.2, 0.2), [WHITE], AtLeast(4.5))
    assert found[0] == (0.2, 0.2, 0.2)


def test_ratio_only_test_agrees_with_the_closed_form():
    found = fix.nearest_foreground_where(GREY, [WHITE], AtLeast(4.5))
    closed = fix.nearest_passing_foreground(GREY, WHITE, 4.5)
    assert ratio(found[0], WHITE) >= 4.5
    # the walk settles within one 8-bit step of the exact answer (#767676, 4.54:1)
    assert abs(int(to_hex(found[0])[1:3], 16) - int(to_hex(closed[0])[1:3], 16)) <= 1


def test_every_background_is_met_or_none():
    found = fix.nearest_foreground_where(GREY, [WHITE, (0.9, 0.9, 0.9)], AtLeast(4.5))
    assert all(ratio(found[0], bg) >= 4.5 for bg in (WHITE, (0.9, 0.9, 0.9)))
    # no grey reaches 7:1 on both white and black (L <= 0.1 and L >= 0.3 at once)
    assert fix.nearest_foreground_where(GREY, [WHITE, (0.0, 0.0, 0.0)], AtLeast(7.0)) is None


def test_background_search_swaps_the_roles():
    text, panel = (0x77 / 255,) * 3, (0x33 / 255,) * 3  # 3.3:1 (WCAG 2.2 formula)
    found = fix.nearest_background_where(text, panel, AtLeast(4.5))
    assert ratio(text, found[0]) >= 4.5 and found[0][0] < panel[0]  # a darker panel


def test_hue_is_kept():
    red = (0.9, 0.1, 0.1)
    found = fix.nearest_foreground_where(red, [WHITE], AtLeast(7.0))
    r, g, b = found[0]
    assert r > g and r > b and ratio(found[0], WHITE) >= 7.0


def test_rounding_to_8_bits_moves_oklab_lightness_less_than_the_walks_bound():
    """``fix._ROUNDING_L`` bounds how far 8-bit rounding moves OKLab lightness (the walks stop
    on it). Checked on a grid of sRGB colours, finest near black where the cube roots are
    steepest; the conversion is colour-science's (``sRGB_to_XYZ``, then ``XYZ_to_Oklab``)."""
    import colour
    import numpy as np

    axis = np.concatenate([np.linspace(0, 0.02, 41), np.linspace(0.02, 1, 50)])
    rgb = np.stack(np.meshgrid(axis, axis, axis), -1).reshape(-1, 3)
    rounded = np.round(rgb * 255) / 255

    def lightness(c):
        xyz = colour.sRGB_to_XYZ(c, apply_cctf_decoding=True)
        return colour.XYZ_to_Oklab(xyz)[..., 0]

    moved = np.abs(lightness(rounded) - lightness(rgb))
    assert moved.max() < fix._ROUNDING_L
    assert moved.max() > 0.04  # (near black it is large: the bound is not loose by much)


class Counted(AtLeast):
    """``AtLeast`` that also needs the channels' sums far apart: a test that is not the
    ratio's alone, as the rules' are not."""

    def __call__(self, text, background):
        far = abs(sum(text) - sum(background)) > 1.2
        return far and super().__call__(text, background)

    def __eq__(self, other):  # (never equal to an AtLeast: the searches cache by test)
        return type(other) is Counted and other.required == self.required

    def __hash__(self):
        return hash(("counted", self.required))


@pytest.mark.parametrize("required", [3.0, 4.5, 7.0])
def test_stopping_a_walk_early_finds_what_both_full_walks_find(required):
    """The nearest of the two full walks (each to its first passing step) is what the search
    answers, though it stops a walk that can no longer come nearer."""
    import math

    from tinctura.colour.convert import srgb_to_oklab, to_polar

    def full(colour, others, test):
        def ok(rgb):
            return all(test(rgb, other) for other in others)
        if ok(colour):
            return colour
        start = srgb_to_oklab(colour)
        found = []
        for step in (-fix._WALK_STEP, fix._WALK_STEP):
            for rgb in fix._walk(*to_polar(start), step, ok):
                if rgb is not fix._FAILED:
                    found += [rgb] if rgb is not None else []
                    break
        return min(found, key=lambda rgb: math.dist(start, srgb_to_oklab(rgb))) \
            if found else None

    colours = [(i / 7, (i * 3 % 7) / 7, (i * 5 % 7) / 7) for i in range(8)] + [
        (0.02, 0.0, 0.01), (0.98, 0.99, 1.0), GREY, NIGHT]
    for test in (AtLeast(required), Counted(required)):
        for fg in colours:
            for bg in (WHITE, NIGHT, (0.5, 0.5, 0.5), (0.0, 0.0, 0.0)):
                got = fix.nearest_foreground_where(fg, [bg], test)
                expected = full(fg, (bg,), test)
                assert (got and got[0]) == expected, (fg, bg)
