"""Suggested colours: every suggestion is checked with the WCAG 2.2 contrast formula
(W3C) on its #rrggbb form, keeps its OKLCh hue within a stated tolerance, and is close to
the smallest change that passes. Reference points: #767676 is the lightest grey that reaches
4.5:1 on white and #595959 reaches 7:1 (reference-values.md; the first is common practice,
both follow from the formula).
"""
import numpy as np
import pytest

from tinctura.colour import (
    contrast_ratio,
    nearest_passing_background,
    nearest_passing_foreground,
    parse_color,
    passing_foreground_for_all,
    srgb_to_oklch,
    to_hex,
)

WHITE = (1.0, 1.0, 1.0)
BLACK = (0.0, 0.0, 0.0)
HUE_TOLERANCE = 2.0  # degrees, for colours with OKLCh chroma above 0.05


def rgb(value):
    return parse_color(value)[:3]


def on_hex(colour):
    """The colour as a stylesheet would carry it: through #rrggbb and back."""
    return rgb(to_hex(colour))


def hue_gap(a, b):
    d = abs(srgb_to_oklch(a)[2] - srgb_to_oklch(b)[2]) % 360
    return min(d, 360 - d)


def test_777_on_white():
    colour, ratio = nearest_passing_foreground(rgb("#777"), WHITE, 4.5)
    hexed = to_hex(colour)
    r, g, b = colour
    assert r == g == b  # a grey stays grey
    assert 0x70 / 255 <= r <= 0x76 / 255, hexed  # between #707070 and #767676
    assert contrast_ratio(on_hex(colour), WHITE) >= 4.5
    assert ratio == pytest.approx(contrast_ratio(on_hex(colour), WHITE))
    assert hexed == "#767676"  # the smallest step: #777 itself fails (4.478:1)


def test_777_on_white_for_aaa():
    colour, ratio = nearest_passing_foreground(rgb("#777"), WHITE, 7.0)
    assert to_hex(colour) == "#595959"
    assert ratio >= 7.0


@pytest.mark.parametrize(
    "fg, bg, required",
    [
        ("#ff0000", "#ffffff", 4.5),
        ("#e0a000", "#ffffff", 3.0),
        ("#0066cc", "#222222", 4.5),
        ("#2e8b57", "#fafafa", 7.0),
        ("#9370db", "#1e1e2e", 4.5),
        ("#ff69b4", "#ffffff", 4.5),
        ("#4b0082", "#000000", 3.0),
    ],
)
def test_foreground_passes_keeps_hue_and_is_near(fg, bg, required):
    f, b = rgb(fg), rgb(bg)
    assert contrast_ratio(f, b) < required
    colour, ratio = nearest_passing_foreground(f, b, required)
    assert contrast_ratio(on_hex(colour), b) >= required
    assert hue_gap(colour, f) <= HUE_TOLERANCE
    # near the boundary: no more than a few 8-bit steps beyond the threshold
    assert ratio < required * 1.06, (to_hex(colour), ratio)


def test_background_variant():
    fg, bg = rgb("#767676"), rgb("#dddddd")
    colour, ratio = nearest_passing_background(fg, bg, 4.5)
    assert contrast_ratio(fg, on_hex(colour)) >= 4.5
    assert colour[0] == colour[1] == colour[2]
    assert colour[0] > bg[0]  # the background gets lighter, towards white
    # teal on a pale blue: hue of the background is kept
    fg, bg = rgb("#008080"), rgb("#b0d8ff")
    colour, _ = nearest_passing_background(fg, bg, 4.5)
    assert contrast_ratio(fg, on_hex(colour)) >= 4.5
    assert hue_gap(colour, bg) <= HUE_TOLERANCE


def test_already_passing_is_returned_unchanged():
    colour, ratio = nearest_passing_foreground(rgb("#595959"), WHITE, 4.5)
    assert colour == rgb("#595959")
    assert ratio == contrast_ratio(rgb("#595959"), WHITE)


def test_impossible_gives_none():
    # against #888 neither black (5.9:1) nor white (3.5:1) reaches 7:1 (WCAG formula)
    assert contrast_ratio(BLACK, rgb("#888")) < 7 and contrast_ratio(WHITE, rgb("#888")) < 7
    assert nearest_passing_foreground(rgb("#777"), rgb("#888"), 7.0) is None
    assert nearest_passing_background(rgb("#888"), rgb("#777"), 7.0) is None


def test_one_colour_for_several_backgrounds():
    # on both white and black, 4.5:1 needs a luminance in [0.175, 0.183]: #767676 fits.
    colour, ratio = passing_foreground_for_all(rgb("#777"), [WHITE, BLACK], 4.5)
    assert min(contrast_ratio(on_hex(colour), bg) for bg in (WHITE, BLACK)) >= 4.5
    assert ratio == pytest.approx(min(contrast_ratio(colour, bg) for bg in (WHITE, BLACK)))
    # 5:1 against both is impossible: Y >= 0.2 and Y <= 0.16
    assert passing_foreground_for_all(rgb("#777"), [WHITE, BLACK], 5.0) is None
    # two light backgrounds: the answer passes against the harder one
    bgs = [rgb("#ffffff"), rgb("#eeeeee"), rgb("#fff8dc")]
    colour, ratio = passing_foreground_for_all(rgb("#1e90ff"), bgs, 4.5)
    assert min(contrast_ratio(on_hex(colour), bg) for bg in bgs) >= 4.5
    assert hue_gap(colour, rgb("#1e90ff")) <= HUE_TOLERANCE
    assert passing_foreground_for_all(rgb("#777"), [], 4.5) is None


def test_random_pairs_pass_or_are_impossible():
    # Invariant from the WCAG formula: with the hue kept, lightness can reach black and
    # white, so a suggestion exists exactly when black or white passes.
    rng = np.random.default_rng(2024)
    for _ in range(60):
        fg, bg = tuple(rng.random(3)), tuple(rng.random(3))
        required = float(rng.choice([3.0, 4.5, 7.0]))
        result = nearest_passing_foreground(fg, bg, required)
        reachable = max(contrast_ratio(BLACK, bg), contrast_ratio(WHITE, bg)) >= required
        if result is None:
            assert not reachable
        else:
            colour, ratio = result
            assert contrast_ratio(on_hex(colour), bg) >= required
            assert ratio >= required


def test_the_gamut_test_of_the_searches_is_the_conversions_own():
    # fix._fits works out per chroma only what depends on it; it must answer exactly as the
    # conversion functions composed (convert.from_polar, oklab_to_linear_srgb, in_gamut), so
    # that suggestions stay the same to the last bit
    import random

    from tinctura.colour import fix
    from tinctura.colour.convert import from_polar, in_gamut, oklab_to_linear_srgb

    rng = random.Random(11)
    for _ in range(20000):
        lightness, hue = rng.random(), rng.uniform(0, 360)
        chroma = rng.choice([rng.uniform(0, 0.4), rng.uniform(0, 0.05)])
        expected = in_gamut(oklab_to_linear_srgb(from_polar((lightness, chroma, hue))),
                            fix._GAMUT_TOLERANCE)
        assert fix._fits(lightness, hue)(chroma) == expected
