"""APCA lightness contrast Lc against the APCA 0.0.98G-4g reference values.

Source: the shared reference values (APCA 0.0.98G-4g constants and reference values, from
memory, verified there by computing the published formula). Tolerance 0.005: the reference
values are quoted to 2 decimals.
"""
import pytest

from tinctura.colour import apca

WHITE, BLACK = (1.0, 1.0, 1.0), (0.0, 0.0, 0.0)
GREY_88, GREY_AA = (0x88 / 255,) * 3, (0xAA / 255,) * 3


@pytest.mark.parametrize("text, background, expected", [
    (BLACK, WHITE, 106.04),
    (WHITE, BLACK, -107.88),
    (GREY_88, WHITE, 63.06),
    (WHITE, GREY_88, -68.54),
    (BLACK, GREY_AA, 58.15),
    (GREY_AA, BLACK, -56.24),
])
def test_reference_values(text, background, expected):
    assert apca.lightness_contrast(text, background) == pytest.approx(expected, abs=0.005)


def test_screen_luminance_uses_the_simple_exponent():
    # APCA's Y: 0.2126729 R^2.4 + 0.7151522 G^2.4 + 0.0721750 B^2.4 (reference values file)
    assert apca.screen_luminance((0.5, 0.5, 0.5)) == pytest.approx(0.5 ** 2.4 * (0.2126729 + 0.7151522 + 0.0721750))
    assert apca.screen_luminance(WHITE) == pytest.approx(1.0, abs=1e-6)


def test_equal_or_near_colours_give_zero():
    # |Ybg - Ytxt| < 0.0005 -> Lc 0; a small contrast below the low clip -> 0 too
    assert apca.lightness_contrast(GREY_88, GREY_88) == 0.0
    assert apca.lightness_contrast((0.50, 0.5, 0.5), (0.51, 0.51, 0.51)) == 0.0


def test_polarity_and_asymmetry():
    assert apca.polarity(BLACK, WHITE) == apca.NORMAL == "dark on light"
    assert apca.polarity(WHITE, BLACK) == apca.REVERSE == "light on dark"
    # the same pair reads differently by polarity (reference values: 63.06 vs -68.54)
    assert abs(apca.lightness_contrast(WHITE, GREY_88)) > abs(apca.lightness_contrast(GREY_88, WHITE))


def test_flare_lowers_contrast_and_zero_flare_is_apca():
    assert apca.lightness_contrast(GREY_88, WHITE, flare=0.0) == apca.lightness_contrast(GREY_88, WHITE)
    assert abs(apca.lightness_contrast(WHITE, BLACK, flare=0.05)) < 107.88
