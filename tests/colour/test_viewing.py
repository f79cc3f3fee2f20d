"""Viewing profiles: the sRGB reference viewing conditions and the effective ratio.

Sources: IEC 61966-2-1 (sRGB) reference viewing environment, values from memory (display white
80 cd/m2, ambient 64 lux, viewing flare 1 % of white); W3C WCAG 2.2, definition of contrast
ratio (0.05 added to both luminances for flare); flare from illuminance F = R E / (pi Lw)
(Lambertian approximation, common practice). WCAG ratios from tests/wcag_reference.py.
"""
import math

import pytest
from wcag_reference import luminance, ratio

from tinctura.colour import viewing


def test_office_is_the_srgb_reference_environment():
    office = viewing.PROFILES["office"]
    assert (office.illuminance, office.white) == (64.0, 80.0)  # IEC 61966-2-1
    assert office.flare == pytest.approx(0.01)  # viewing flare 1 % of white (IEC 61966-2-1)
    assert office.reflected == pytest.approx(0.8)  # 1 % of 80 cd/m2


def test_flare_follows_its_definition():
    day = viewing.PROFILES["daylight"]
    assert day.flare == pytest.approx(day.reflectance * day.illuminance / (math.pi * day.white))
    assert 1000 <= day.illuminance <= 10000  # "several thousand lux" (overcast daylight)


@pytest.mark.parametrize("fg, bg", [("#767676", "#ffffff"), ("#ffffff", "#1e2129"),
                                    ("#ff3030", "#000000")])
def test_office_gives_the_wcag_ratio(fg, bg):
    rgb = lambda h: tuple(int(h[i:i + 2], 16) / 255 for i in (1, 3, 5))
    assert viewing.effective_ratio(rgb(fg), rgb(bg), viewing.OFFICE) == pytest.approx(ratio(fg, bg))


def test_effective_ratio_by_hand():
    # #767676 on white in daylight: (L1 + F) / (L2 + F), F = 0.05 + F_day - F_office
    day = viewing.DAYLIGHT
    f = 0.05 + day.flare - 0.01
    want = (1.0 + f) / (luminance("#767676") + f)
    got = viewing.effective_ratio((0x76 / 255,) * 3, (1.0, 1.0, 1.0), day)
    assert got == pytest.approx(want)
    assert got < ratio("#767676", "#ffffff")


def test_dim_room_keeps_more_contrast_and_lc_is_not_credited():
    grey, white = (0x88 / 255,) * 3, (1.0, 1.0, 1.0)
    assert viewing.effective_ratio(grey, white, viewing.DIM) > viewing.effective_ratio(grey, white, viewing.OFFICE)
    assert viewing.effective_lc(grey, white, viewing.DIM) == viewing.effective_lc(grey, white, viewing.OFFICE)
    assert abs(viewing.effective_lc(grey, white, viewing.DAYLIGHT)) < 63.06  # APCA reference Lc


def test_unknown_profile_is_a_clear_error():
    with pytest.raises(ValueError, match="unknown viewing profile 'beach'"):
        viewing.get("beach")
