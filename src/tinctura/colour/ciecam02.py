"""CIECAM02 colour appearance of colours on a display, each seen on its own background.

The forward model is colour-science's (``colour.XYZ_to_CIECAM02``), called once on arrays of
every (colour, background) pair of a run. This module only states the viewing conditions as data
and turns sRGB colours into the model's inputs:

- the display white is D65 at ``white_luminance`` cd/m2 (default 80, the sRGB reference display);
- the adapting luminance L_A is 20 % of the white's luminance (the grey-world assumption the
  CIE recommends when the adapting field is not measured);
- Y_b, the relative luminance of the background, is the luminance factor (0-100) of the colour's
  immediate background, clamped to ``Y_B_MINIMUM``: the model's induction factor n = Y_b / Y_w
  goes to 0 on black, where its lightness exponent collapses (J = 0 for every colour);
- the surround (Average, Dim, Dark) comes from the viewing profile: an office or daylight screen
  is Average, a screen in a dim room Dim, a projector in the dark Dark.

CIECAM02's background enters through Y_b only, which is achromatic: it models that a colour looks
lighter on black than on white, but not that a strongly coloured background tints it. To model
that chromatic induction the adopted white is the display white moved towards the background's
chromaticity by ``background_weight`` (default 0.2: the eye adapts mostly to the display and
partly to a large coloured area around the text; a modelling choice of this project, not a
published constant). A neutral background leaves the white unchanged.

References
----------
- CIE 159:2004, "A colour appearance model for colour management systems: CIECAM02".
- M. R. Luo and C. Li, "CIECAM02 and its recent developments", in Advanced Color Image
  Processing and Analysis, Springer, 2013 (worked examples).
- colour-science, ``colour.appearance.ciecam02`` (general-purpose reference library).
- IEC 61966-2-1 (sRGB): reference display white 80 cd/m2, D65.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .convert import LINEAR_SRGB_TO_XYZ

SURROUNDS = ("Average", "Dim", "Dark")
Y_B_MINIMUM = 1.0  # luminance factor of the darkest background the model is given (0-100)


@dataclass(frozen=True)
class ViewingConditions:
    """How the page is seen: display white, surround, and how much the background tints it."""

    white_luminance: float = 80.0  # cd/m2 of the display white (sRGB reference display)
    surround: str = "Average"  # "Average", "Dim" or "Dark" (CIE 159:2004 surround factors)
    background_weight: float = 0.2  # 0: CIECAM02 as published (achromatic background only)

    def __post_init__(self):
        if self.surround not in SURROUNDS:
            raise ValueError(f"surround must be one of {', '.join(SURROUNDS)}, "
                             f"got {self.surround!r}")
        if not self.white_luminance > 0:
            raise ValueError(f"white luminance must be above 0 cd/m2, got {self.white_luminance}")
        if not 0.0 <= self.background_weight <= 1.0:
            raise ValueError(f"background weight must lie in 0..1, got {self.background_weight}")

    @property
    def adapting_luminance(self) -> float:
        """L_A: 20 % of the white's luminance (grey world)."""
        return 0.2 * self.white_luminance


DEFAULT = ViewingConditions()

_M = np.array(LINEAR_SRGB_TO_XYZ, dtype=float)
_WHITE = _M @ np.ones(3) * 100.0  # display white (D65), Y = 100


def srgb_to_xyz(rgb) -> np.ndarray:
    """sRGB-encoded colours (0..1, last axis r, g, b) -> XYZ (D65, Y 0..100)."""
    rgb = np.asarray(rgb, dtype=float)[..., :3]
    lin = np.where(rgb <= 0.04045, rgb / 12.92, ((rgb + 0.055) / 1.055) ** 2.4)
    return lin @ _M.T * 100.0


def adopted_white(bg_xyz: np.ndarray, weight: float) -> np.ndarray:
    """The display white moved towards each background's chromaticity by ``weight`` (Y = 100)."""
    bg_xyz = np.atleast_2d(bg_xyz)
    y = bg_xyz[:, 1:2]
    # the background scaled to the white's luminance: its chromaticity at Y = 100 (black: none)
    scaled = np.where(y > 0.5, bg_xyz * (100.0 / np.maximum(y, 1e-9)), _WHITE)
    return (1.0 - weight) * _WHITE + weight * scaled


def appearance(colours, backgrounds, conditions: ViewingConditions = DEFAULT):
    """CIECAM02 correlates of each colour on its background (arrays of sRGB, same length).

    Returns colour-science's specification (J, C, h, s, Q, M, H as arrays). colour-science is
    imported here, on first use: a run without appearance rules never pays its import.
    """
    from . import colour_science

    colour = colour_science()
    xyz = np.atleast_2d(srgb_to_xyz(colours))
    bg = np.atleast_2d(srgb_to_xyz(backgrounds))
    white = adopted_white(bg, conditions.background_weight)
    y_b = np.maximum(bg[:, 1] * 100.0 / white[:, 1], Y_B_MINIMUM)
    surround = colour.VIEWING_CONDITIONS_CIECAM02[conditions.surround]
    l_a = np.full(len(xyz), conditions.adapting_luminance)
    return colour.XYZ_to_CIECAM02(xyz, white, l_a, y_b, surround)
