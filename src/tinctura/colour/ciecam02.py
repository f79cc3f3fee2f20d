"""CIECAM02 colour appearance of colours on a display, each seen on its own background.

The forward model of CIE 159:2004 (``forward``), written here on numpy arrays after the
publication's steps and symbols: chromatic adaptation in the CAT02 space with the degree of
adaptation D, the Hunt-Pointer-Estevez cone space, the post-adaptation compression, the
achromatic response A and the opponent dimensions a, b, then lightness J, brightness Q, chroma C,
colourfulness M, saturation s and hue angle h (hue quadrature H is left out: no rule reads it).
It is checked against colour-science (``colour.XYZ_to_CIECAM02``) and the published worked
examples in the tests. Measured: importing colour-science took 0.27-0.6 s at the end of every
check whose site has palette entries (the appearance rules run once, after the last page), a
fifth of the whole check on a 200-page site; the model itself takes microseconds.

This module also states the viewing conditions as data and turns sRGB colours into the model's
inputs:

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
- colour-science, ``colour.appearance.ciecam02`` (general-purpose reference library: the
  tests' reference).
- IEC 61966-2-1 (sRGB): reference display white 80 cd/m2, D65.
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import NamedTuple

import numpy as np

from .convert import LINEAR_SRGB_TO_XYZ

SURROUNDS = ("Average", "Dim", "Dark")
# CIE 159:2004 surround factors (F, c, N_c), as shared/reference-values.md lists them
SURROUND_FACTORS = {"Average": (1.0, 0.69, 1.0), "Dim": (0.9, 0.59, 0.9),
                    "Dark": (0.8, 0.525, 0.8)}
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


class Specification(NamedTuple):
    """CIECAM02 correlates, one array each: lightness J, chroma C, hue angle h (degrees),
    saturation s, brightness Q, colourfulness M."""

    J: np.ndarray
    C: np.ndarray
    h: np.ndarray
    s: np.ndarray
    Q: np.ndarray
    M: np.ndarray


# CIE 159:2004: the CAT02 matrix and the Hunt-Pointer-Estevez matrix (cone space); values from
# memory, which the tests' comparison with colour-science confirms
M_CAT02 = np.array([[0.7328, 0.4296, -0.1624],
                    [-0.7036, 1.6975, 0.0061],
                    [0.0030, 0.0136, 0.9834]])
M_HPE = np.array([[0.38971, 0.68898, -0.07868],
                  [-0.22981, 1.18340, 0.04641],
                  [0.0, 0.0, 1.0]])
_CAT02_TO_HPE = M_HPE @ np.linalg.inv(M_CAT02)


def forward(xyz, xyz_w, l_a, y_b, surround: str = "Average") -> Specification:
    """CIECAM02 (CIE 159:2004) of ``xyz`` (N x 3, Y 0..100) seen under white ``xyz_w``
    (N x 3), adapting luminance ``l_a`` (cd/m2, N) and background luminance factor ``y_b``
    (N), in one of ``SURROUNDS``."""
    F, c, N_c = SURROUND_FACTORS[surround]
    xyz, xyz_w = np.atleast_2d(xyz).astype(float), np.atleast_2d(xyz_w).astype(float)
    l_a, y_b = np.asarray(l_a, dtype=float), np.asarray(y_b, dtype=float)
    Y_w = xyz_w[:, 1]
    # viewing-condition parameters
    D = np.clip(F * (1 - (1 / 3.6) * np.exp((-l_a - 42) / 92)), 0, 1)
    k4 = (1 / (5 * l_a + 1)) ** 4
    F_L = 0.2 * k4 * (5 * l_a) + 0.1 * (1 - k4) ** 2 * np.cbrt(5 * l_a)
    n = y_b / Y_w
    N_bb = N_cb = 0.725 * (1 / n) ** 0.2
    z = 1.48 + np.sqrt(n)
    # chromatic adaptation (CAT02), then the cone space and the compression
    RGB, RGB_w = xyz @ M_CAT02.T, xyz_w @ M_CAT02.T
    adapt = (Y_w * D)[:, None] / RGB_w + (1 - D)[:, None]
    RGB_a = _compressed((RGB * adapt) @ _CAT02_TO_HPE.T, F_L)
    RGB_aw = _compressed((RGB_w * adapt) @ _CAT02_TO_HPE.T, F_L)
    R_a, G_a, B_a = RGB_a[:, 0], RGB_a[:, 1], RGB_a[:, 2]
    # opponent dimensions, hue, achromatic responses
    a = R_a - 12 * G_a / 11 + B_a / 11
    b = (R_a + G_a - 2 * B_a) / 9
    h = np.degrees(np.arctan2(b, a)) % 360
    e_t = (np.cos(np.radians(h) + 2) + 3.8) / 4
    A = (2 * R_a + G_a + B_a / 20 - 0.305) * N_bb
    A_w = (2 * RGB_aw[:, 0] + RGB_aw[:, 1] + RGB_aw[:, 2] / 20 - 0.305) * N_bb
    # the correlates
    J = 100 * _spow(A / A_w, c * z)
    Q = (4 / c) * np.sqrt(J / 100) * (A_w + 4) * F_L ** 0.25
    t = (50000 / 13 * N_c * N_cb) * e_t * np.hypot(a, b) / (R_a + G_a + 21 * B_a / 20)
    C = _spow(t, 0.9) * _spow(J / 100, 0.5) * (1.64 - 0.29 ** n) ** 0.73
    M = C * F_L ** 0.25
    s = 100 * _spow(M / Q, 0.5)
    return Specification(J, C, h, s, Q, M)


def _compressed(RGB: np.ndarray, F_L: np.ndarray) -> np.ndarray:
    """The post-adaptation non-linear compression of cone responses (sign kept)."""
    F_L_RGB = (F_L[:, None] * np.abs(RGB) / 100) ** 0.42
    return 400 * np.sign(RGB) * F_L_RGB / (27.13 + F_L_RGB) + 0.1


def _spow(x: np.ndarray, p: float) -> np.ndarray:
    """``x`` to the power ``p``, sign kept (a negative base stays defined)."""
    return np.sign(x) * np.abs(x) ** p


def appearance(colours, backgrounds, conditions: ViewingConditions = DEFAULT) -> Specification:
    """CIECAM02 correlates of each colour on its background (arrays of sRGB, same length)."""
    xyz = np.atleast_2d(srgb_to_xyz(colours))
    bg = np.atleast_2d(srgb_to_xyz(backgrounds))
    white = adopted_white(bg, conditions.background_weight)
    y_b = np.maximum(bg[:, 1] * 100.0 / white[:, 1], Y_B_MINIMUM)
    l_a = np.full(len(xyz), conditions.adapting_luminance)
    return forward(xyz, white, l_a, y_b, conditions.surround)
