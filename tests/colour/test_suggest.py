"""Suggestions keep the pair's polarity and the hue, and stay near the original.

Ratios with the WCAG 2.2 formulas written out in tests/wcag_reference.py (W3C); hues and
CAM02-UCS distances with colour-science (general-purpose reference library).
"""
import math
import warnings

import pytest

from tinctura.colour import suggest
from tinctura.colour.convert import to_hex
from wcag_reference import luminance, ratio


def rgb(hex_):
    return tuple(int(hex_[i:i + 2], 16) / 255 for i in (1, 3, 5))


def test_grey_text_on_white_gets_darker_text_never_a_black_background():
    fg, bg = rgb("#777777"), rgb("#ffffff")
    assert suggest.background(fg, bg, 4.5) is None  # nothing lighter than white
    found, got = suggest.foreground(fg, bg, 4.5)
    assert to_hex(found) != "#060606"
    assert ratio(to_hex(found), "#ffffff") >= 4.5
    assert luminance(to_hex(found)) < luminance("#777777")
    assert got == pytest.approx(ratio(to_hex(found), "#ffffff"), abs=1e-9)


@pytest.mark.parametrize("fg, bg, wanted", [
    ("#ffffff", "#03a9f4", "darker"),   # white header text on a light blue bar
    ("#2a4d7a", "#1b2330", None),       # text lighter than a dark panel: background darker fails
    ("#333333", "#555555", "lighter"),  # dark text on a mid grey: the background gets lighter
])
def test_backgrounds_stay_on_their_side(fg, bg, wanted):
    found = suggest.background(rgb(fg), rgb(bg), 4.5)
    if wanted is None:
        assert found is None
        return
    new = to_hex(found[0])
    assert ratio(fg, new) >= 4.5
    lighter = luminance(new) > luminance(bg)
    assert lighter == (wanted == "lighter")
    assert (luminance(new) > luminance(fg)) == (luminance(bg) > luminance(fg))


def test_hue_is_kept_and_the_distance_is_small():
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        import colour
    start = rgb("#6fa8dc")
    found, _ = suggest.foreground(start, rgb("#ffffff"), 4.5)

    def hue(c):
        lab = colour.convert(c, "sRGB", "Oklab")
        return math.degrees(math.atan2(lab[2], lab[1])) % 360

    assert abs(hue(found) - hue(start)) < 3  # degrees; 8-bit rounding moves it a little
    # nearer in CAM02-UCS than the passing grey of the same lightness search
    grey_start = (sum(start) / 3,) * 3
    grey = suggest.foreground(grey_start, rgb("#ffffff"), 4.5)[0]
    assert suggest.cam02ucs_distance(start, found) < suggest.cam02ucs_distance(start, grey)


def test_several_backgrounds_need_one_interval():
    # text lighter than a dark page and darker than a light row: no colour serves both sides
    dark, light = rgb("#1e2129"), rgb("#f0f3f7")
    sides = (suggest.LIGHTER, suggest.DARKER)
    assert suggest.nearest_same_side(rgb("#e4e6ec"), (dark, light), 4.5, sides) is None
    # on the dark page alone it can
    assert suggest.nearest_same_side(rgb("#3d4250"), (dark,), 4.5) is not None


def test_a_suggestion_passes_against_every_colour_written_as_the_backgrounds_hex():
    # material's slate background hsla(225deg, 15%, 14%, 1) is (0.1190, 0.1295, 0.1610)
    # (CSS Color 4 hsl-to-rgb, by hand), shown and grouped as #1e2129: its red is 0.35 of a
    # step above 30/255. The accent suggested against #1e2129 must pass against it too.
    exact = (0.119, 0.1295, 0.161)
    assert to_hex(exact) == "#1e2129"
    found, got = suggest.foreground(rgb("#526cfe"), rgb("#1e2129"), 4.5)
    assert ratio(to_hex(found), exact) >= 4.5  # (WCAG 2.2 formula, tests/wcag_reference.py)
    assert got == pytest.approx(ratio(to_hex(found), "#1e2129"), abs=1e-9)  # told for the hex


def test_a_background_for_translucent_text_passes_with_the_text_composited_over_it():
    # a search field's placeholder: white at 70 % over a tan header (mkdocs-material's
    # --md-primary-bg-color--light on a custom primary). Source-over compositing of straight
    # alpha in sRGB, as browsers paint (W3C Compositing and Blending Level 1, "simple alpha
    # compositing": co = cs x as + cb x (1 - as)), written out here
    text, bg = (1.0, 1.0, 1.0, 0.7), rgb("#937c4f")
    seen = tuple(0.7 + c * 0.3 for c in bg)
    assert ratio(seen, bg) < 4.5  # the premise: 2.8:1
    plain = suggest.background(seen, bg, 4.5)  # the text taken as opaque
    moved = plain[0]
    assert ratio(tuple(0.7 + c * 0.3 for c in moved), moved) < 4.5  # it moved with it
    found, got = suggest.background_under(text, bg, 4.5)
    composite = tuple(0.7 + c * 0.3 for c in found)
    assert ratio(composite, found) >= 4.5
    assert got == pytest.approx(ratio(composite, found), abs=1e-9)
    assert luminance(found) < luminance(bg)  # darker: light text stays on a dark ground


def test_no_background_when_the_translucent_text_cannot_pass():
    # black at 10 % over anything is within a shade of it: no background gives 3:1
    assert suggest.background_under((0.0, 0.0, 0.0, 0.1), rgb("#808080"), 3.0) is None
