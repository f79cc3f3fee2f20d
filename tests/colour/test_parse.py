"""Parsing CSS colours: CSS Color 4 (W3C) syntax and values, CSS Color 5 light-dark(),
system colours, currentcolor, missing (``none``) components and invalid input.

Expected sRGB values come from the definitions in CSS Color 4 (hex and named colours,
hsl()/hwb() examples) or from colour-science (general-purpose reference library) for the
CIE-based and wide-gamut forms.
"""
import numpy as np
import pytest
import tinycss2

from tinctura.colour import parse_color
from tinctura.colour.system import DARK, LIGHT

BLACK = (0.0, 0.0, 0.0, 1.0)
WHITE = (1.0, 1.0, 1.0, 1.0)
GREEN = (0.0, 128 / 255, 0.0, 1.0)


def hexa(value):
    value = value.lstrip("#")
    channels = [int(value[i : i + 2], 16) / 255 for i in range(0, len(value), 2)]
    return tuple(channels) + ((1.0,) if len(channels) == 3 else ())


@pytest.mark.parametrize(
    "css, expected",
    [
        # CSS Color 4, hex notation: 3, 4, 6 and 8 digits
        ("#777", hexa("777777")),
        ("#f008", hexa("ff000088")),
        ("#663399", hexa("663399")),
        ("#66339980", hexa("66339980")),
        # CSS Color 4, named colours: rebeccapurple = #663399, case-insensitive
        ("rebeccapurple", hexa("663399")),
        ("RebeccaPurple", hexa("663399")),
        ("transparent", (0.0, 0.0, 0.0, 0.0)),
        # rgb(): legacy and modern, numbers, percentages, alpha
        ("rgb(255, 0, 0)", (1.0, 0.0, 0.0, 1.0)),
        ("rgba(0, 0, 255, 0.5)", (0.0, 0.0, 1.0, 0.5)),
        ("rgb(0 128 0 / 25%)", (0.0, 128 / 255, 0.0, 0.25)),
        ("rgb(100% 0% 50%)", (1.0, 0.0, 0.5, 1.0)),
        # the current CSS Color 4 draft allows numbers and percentages mixed (modern syntax)
        ("rgb(100% 0 127.5)", (1.0, 0.0, 0.5, 1.0)),
        # hsl(): CSS Color 4 examples, hsl(120deg 100% 50%) is lime, hsl(0 100% 25%) maroon-ish
        ("hsl(120deg 100% 50%)", (0.0, 1.0, 0.0, 1.0)),
        ("hsl(120, 100%, 25%)", (0.0, 0.5, 0.0, 1.0)),
        ("hsla(240, 100%, 50%, 0.5)", (0.0, 0.0, 1.0, 0.5)),
        ("hsl(0.5turn 100% 50%)", (0.0, 1.0, 1.0, 1.0)),
        ("hsl(120 100 50)", (0.0, 1.0, 0.0, 1.0)),  # modern syntax accepts plain numbers
        ("hsl(120 100 50%)", (0.0, 1.0, 0.0, 1.0)),  # ... and mixes them with percentages
        # hwb(): hwb(0 0% 0%) is red; w + b >= 100% is grey w / (w + b)
        ("hwb(0 0% 0%)", (1.0, 0.0, 0.0, 1.0)),
        ("hwb(120 50% 50%)", (0.5, 0.5, 0.5, 1.0)),
        ("hwb(240deg 20% 20%)", (0.2, 0.2, 0.8, 1.0)),
        # color(): srgb and srgb-linear
        ("color(srgb 0.2 0.4 0.6)", (0.2, 0.4, 0.6, 1.0)),
        ("color(srgb-linear 1 0 0 / 0.5)", (1.0, 0.0, 0.0, 0.5)),
    ],
)
def test_forms_with_values_from_the_definitions(css, expected):
    np.testing.assert_allclose(parse_color(css), expected, atol=1e-9)


@pytest.mark.parametrize(
    "css",
    [
        "lab(50 20 30)",
        "lab(50% 16% -24%)",  # lab percentages: 100% L = 100, 100% a/b = 125
        "lch(60 40 120deg)",
        "oklab(0.6 0.1 -0.05)",
        "oklab(60% 25% -12.5%)",  # oklab percentages: 100% L = 1, 100% a/b = 0.4
        "oklch(0.7 0.1 200)",
        "color(display-p3 0.3 0.5 0.4)",
        "color(a98-rgb 0.3 0.5 0.4)",
        "color(rec2020 0.3 0.5 0.4)",
        "color(prophoto-rgb 0.4 0.5 0.45)",
        "color(xyz 0.2 0.25 0.3)",
        "color(xyz-d65 0.2 0.25 0.3)",
        "color(xyz-d50 0.2 0.25 0.3)",
    ],
)
def test_cie_and_wide_gamut_forms_against_colour_science(colour_science, css):
    cs = colour_science
    d50 = cs.CCS_ILLUMINANTS["CIE 1931 2 Degree Standard Observer"]["D50"]
    d65 = cs.CCS_ILLUMINANTS["CIE 1931 2 Degree Standard Observer"]["D65"]

    def from_d50(xyz):
        return cs.chromatic_adaptation(
            xyz, cs.xy_to_XYZ(d50), cs.xy_to_XYZ(d65), method="Von Kries", transform="Bradford"
        )

    def rgb_space(name, rgb):
        space = cs.RGB_COLOURSPACES[name]
        npm = cs.normalised_primary_matrix(space.primaries, space.whitepoint)
        return npm @ space.cctf_decoding(np.array(rgb))

    def rec2020(rgb):
        # the exact BT.2020 constants, as CSS Color 4 uses (see test_convert.py)
        from colour.models.rgb.transfer_functions.itur_bt_2020 import CONSTANTS_BT2020_PRECISE

        space = cs.RGB_COLOURSPACES["ITU-R BT.2020"]
        npm = cs.normalised_primary_matrix(space.primaries, space.whitepoint)
        return npm @ cs.models.oetf_inverse_BT2020(np.array(rgb), constants=CONSTANTS_BT2020_PRECISE)

    references = {
        "lab(50 20 30)": lambda: from_d50(cs.Lab_to_XYZ([50, 20, 30], d50)),
        "lab(50% 16% -24%)": lambda: from_d50(cs.Lab_to_XYZ([50, 20, -30], d50)),
        "lch(60 40 120deg)": lambda: from_d50(cs.Lab_to_XYZ(cs.LCHab_to_Lab([60, 40, 120]), d50)),
        "oklab(0.6 0.1 -0.05)": lambda: cs.Oklab_to_XYZ([0.6, 0.1, -0.05]),
        "oklab(60% 25% -12.5%)": lambda: cs.Oklab_to_XYZ([0.6, 0.1, -0.05]),
        "oklch(0.7 0.1 200)": lambda: cs.Oklab_to_XYZ(cs.LCHab_to_Lab([0.7, 0.1, 200])),
        "color(display-p3 0.3 0.5 0.4)": lambda: rgb_space("Display P3", [0.3, 0.5, 0.4]),
        "color(a98-rgb 0.3 0.5 0.4)": lambda: rgb_space("Adobe RGB (1998)", [0.3, 0.5, 0.4]),
        "color(rec2020 0.3 0.5 0.4)": lambda: rec2020([0.3, 0.5, 0.4]),
        "color(prophoto-rgb 0.4 0.5 0.45)": lambda: from_d50(rgb_space("ProPhoto RGB", [0.4, 0.5, 0.45])),
        "color(xyz 0.2 0.25 0.3)": lambda: np.array([0.2, 0.25, 0.3]),
        "color(xyz-d65 0.2 0.25 0.3)": lambda: np.array([0.2, 0.25, 0.3]),
        "color(xyz-d50 0.2 0.25 0.3)": lambda: from_d50(np.array([0.2, 0.25, 0.3])),
    }
    xyz = references[css]()
    srgb_space = cs.RGB_COLOURSPACES["sRGB"]
    npm = cs.normalised_primary_matrix(srgb_space.primaries, srgb_space.whitepoint)
    srgb = cs.models.eotf_inverse_sRGB(np.linalg.inv(npm) @ xyz)
    assert np.all((srgb > 0) & (srgb < 1)), "keep samples inside sRGB: libraries extend the curve differently"
    ours = parse_color(css, clip=False)
    # 5e-4 covers colour-science's OKLab matrix and 4-decimal ProPhoto primaries (see
    # test_convert.py); everything else agrees to ~1e-6.
    np.testing.assert_allclose(ours[:3], srgb, atol=5e-4)
    assert ours[3] == 1.0


def test_out_of_gamut_is_clipped_unless_asked():
    assert parse_color("color(display-p3 1 0 0)") == (1.0, 0.0, 0.0, 1.0)
    r, g, b, a = parse_color("color(display-p3 1 0 0)", clip=False)
    assert r > 1 and g < 0 and b < 0


def test_tokens_as_input():
    tokens = tinycss2.parse_component_value_list("  hsla(225deg, 15%, 90%, .82) /* c */ ")
    string = parse_color("hsla(225deg, 15%, 90%, .82)")
    assert parse_color(tokens) == string
    assert parse_color(tokens) == string  # cached path gives the same
    assert parse_color(tinycss2.parse_component_value_list("red blue")) is None
    assert parse_color([]) is None


def test_system_colours_case_insensitive_and_per_scheme():
    assert parse_color("Canvas") == LIGHT["canvas"] == WHITE
    assert parse_color("canvastext") == BLACK
    assert parse_color("CANVAS", scheme="dark") == DARK["canvas"]
    # HTML rendering section's suggested link colours: #0000EE and #551A8B
    assert parse_color("LinkText") == hexa("0000ee")
    assert parse_color("VisitedText") == hexa("551a8b")
    assert parse_color("Mark") == hexa("ffff00") and parse_color("MarkText") == BLACK
    for name in (
        "Canvas CanvasText LinkText VisitedText ActiveText ButtonFace ButtonText ButtonBorder "
        "Field FieldText Mark MarkText GrayText Highlight HighlightText SelectedItem "
        "SelectedItemText AccentColor AccentColorText"
    ).split():
        assert parse_color(name) is not None
        assert parse_color(name, scheme="dark") is not None
    # deprecated keywords behave as their CSS Color 4 counterparts
    assert parse_color("WindowText", scheme="dark") == parse_color("CanvasText", scheme="dark")
    assert parse_color("ButtonHighlight") == parse_color("ButtonFace")


def test_light_dark():
    # CSS Color 5: the first colour for a light used scheme, the second for dark.
    assert parse_color("light-dark(white, black)") == WHITE
    assert parse_color("light-dark(white, black)", scheme="dark") == BLACK
    assert parse_color("light-dark(Canvas, #123)", scheme="dark") == hexa("112233")
    assert parse_color("light-dark(white)") is None
    assert parse_color("light-dark(white, nonsense)") is None
    assert parse_color("light-dark(currentcolor, black)", current=GREEN) == GREEN
    assert parse_color("light-dark(currentcolor, black)", scheme="dark") == BLACK
    assert parse_color("light-dark(currentcolor, black)") == "currentcolor"
    nested = "light-dark(light-dark(red, blue), color-mix(in srgb, white, black))"
    assert parse_color(nested, scheme="dark") == (0.5, 0.5, 0.5, 1.0)


def test_currentcolor():
    assert parse_color("currentcolor") == "currentcolor"
    assert parse_color("currentColor") == "currentcolor"
    assert parse_color("currentcolor", current=GREEN) == GREEN
    # current takes part in the cache key only when currentcolor occurs
    assert parse_color("currentcolor", current=(1.0, 0.0, 0.0, 1.0)) == (1.0, 0.0, 0.0, 1.0)
    assert parse_color("#fff", current=GREEN) == WHITE
    tokens = tinycss2.parse_component_value_list("color-mix(in srgb, currentcolor, white)")
    assert parse_color(tokens) == "currentcolor"
    assert parse_color(tokens, current=BLACK) == (0.5, 0.5, 0.5, 1.0)
    assert parse_color(tokens, current=(1.0, 0.0, 0.0, 1.0)) == (1.0, 0.5, 0.5, 1.0)


def test_none_components():
    # CSS Color 4: a missing component renders as 0. tinycss2 loses the lch/oklch hue when
    # the lightness is none; we keep it.
    np.testing.assert_allclose(
        parse_color("oklch(none 0.1 120)", clip=False), parse_color("oklch(0 0.1 120)", clip=False)
    )
    np.testing.assert_allclose(
        parse_color("lch(none 30 120)", clip=False), parse_color("lch(0 30 120)", clip=False)
    )
    assert parse_color("oklch(0.7 0.1 none)") == parse_color("oklch(0.7 0.1 0)")
    assert parse_color("rgb(none 128 none)") == GREEN
    assert parse_color("hsl(none 100% 50%)") == (1.0, 0.0, 0.0, 1.0)
    assert parse_color("rgb(0 0 0 / none)") == (0.0, 0.0, 0.0, 0.0)
    assert parse_color("hsl(120 none 50%)") == (0.5, 0.5, 0.5, 1.0)  # s = 0: grey
    assert parse_color("hwb(none 0% 0%)") == (1.0, 0.0, 0.0, 1.0)
    assert parse_color("rgb(none, 0, 0)") is None  # legacy syntax has no none


@pytest.mark.parametrize(
    "css",
    [
        "",
        "nonsense",
        "#12345",
        "#ggg",
        "rgb(1 2)",
        "rgb(1, 2 3)",
        "rgb(10% 20 30 40)",
        "hsl(320, 100, 50)",  # legacy hsl() needs percentages (CSS Color 4)
        "lab(50, 20, 30)",  # no legacy syntax for lab()
        "color(unknown 1 2 3)",
        "color()",
        "rgb(var(--x) 0 0)",
        "red blue",
        "12px",
        "url(a.png)",
        "light-dark()",
    ],
)
def test_invalid_input_gives_none(css):
    assert parse_color(css) is None
