"""CAM02-UCS against colour-science (general-purpose reference library), which implements
CIECAM02 (CIE 159:2004) and CAM02-UCS (Luo, Cui & Li 2006) with the same sRGB viewing
conditions (colour.appearance.ciecam02.CAM_KWARGS_CIECAM02_sRGB)."""
import warnings

import numpy as np
import pytest

from tinctura.colour import ucs_distance as cam02ucs

COLOURS = [(0.5, 0.5, 0.5), (0.2, 0.4, 0.8), (1.0, 1.0, 1.0), (0.0, 0.0, 0.0), (1.0, 0.0, 0.0),
           (0.01, 0.9, 0.3), (0.0, 0.0, 1.0), (0.9, 0.8, 0.1), (0.46, 0.46, 0.46)]


@pytest.fixture(scope="module")
def colour():
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        import colour as colour_science
    return colour_science


@pytest.mark.parametrize("rgb", COLOURS)
def test_matches_colour_science(colour, rgb):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        reference = colour.convert(np.array(rgb), "sRGB", "CAM02UCS") * 100
    # tolerance 0.02 on the 0-100 scale: the two differ only in the sRGB matrix's rounding
    assert np.allclose(cam02ucs.from_srgb(rgb), reference, atol=0.02)


def test_viewing_conditions_as_colour_science_uses_for_srgb(colour):
    from colour.appearance.ciecam02 import CAM_KWARGS_CIECAM02_sRGB as kwargs

    assert cam02ucs.L_A == pytest.approx(kwargs["L_A"]) and cam02ucs.Y_B == kwargs["Y_b"]
    assert np.allclose(cam02ucs.XYZ_W, kwargs["XYZ_w"], atol=0.01)
