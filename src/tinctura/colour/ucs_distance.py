"""Distances in CAM02-UCS between sRGB colours, for ranking suggested colours by closeness.

CIECAM02 (CIE 159:2004) forward model to J, M, h for fixed sRGB viewing conditions, then
CAM02-UCS (``colour.cam02ucs.jab_one``, Luo, Cui & Li 2006).
Viewing conditions as colour-science uses for sRGB (``CAM_KWARGS_CIECAM02_sRGB``): D65 white,
L_A = 64 / pi * 0.2 cd/m2, Y_b = 20, average surround (F = 1, c = 0.69, N_c = 1).

The forward model is written out (a few dozen multiplications a colour) rather than taken from
``colour.ciecam02``, which uses colour-science: that takes about a second to import, which a
plain check should not pay for a tie-break between suggestions.

References: CIE 159:2004 "A colour appearance model for colour management systems: CIECAM02";
M. R. Luo, G. Cui, C. Li, "Uniform colour spaces based on CIECAM02 colour appearance model",
Color Research & Application 31 (2006) 320-330.
"""
from __future__ import annotations

import math
from functools import lru_cache

from . import cam02ucs
from .convert import LINEAR_SRGB_TO_XYZ, srgb_to_linear

L_A = 64 / math.pi * 0.2  # adapting luminance, cd/m2
Y_B = 20.0  # background luminance factor
F, C, N_C = 1.0, 0.69, 1.0  # average surround

M_CAT02 = ((0.7328, 0.4296, -0.1624), (-0.7036, 1.6975, 0.0061), (0.0030, 0.0136, 0.9834))
M_HPE = ((0.38971, 0.68898, -0.07868), (-0.22981, 1.18340, 0.04641), (0.0, 0.0, 1.0))


def _mul(m, v):
    return tuple(sum(m[i][j] * v[j] for j in range(3)) for i in range(3))


def _inv(m):
    (a, b, c), (d, e, f), (g, h, i) = m
    det = a * (e * i - f * h) - b * (d * i - f * g) + c * (d * h - e * g)
    return ((( e * i - f * h) / det, -(b * i - c * h) / det, ( b * f - c * e) / det),
            (-(d * i - f * g) / det, ( a * i - c * g) / det, -(a * f - c * d) / det),
            (( d * h - e * g) / det, -(a * h - b * g) / det, ( a * e - b * d) / det))


_M_CAT02_INV = _inv(M_CAT02)
XYZ_W = tuple(100 * v for v in _mul(LINEAR_SRGB_TO_XYZ, (1.0, 1.0, 1.0)))

# Viewing-condition parameters, once
_K = 1 / (5 * L_A + 1)
F_L = 0.2 * _K ** 4 * (5 * L_A) + 0.1 * (1 - _K ** 4) ** 2 * (5 * L_A) ** (1 / 3)
_N = Y_B / XYZ_W[1]
N_BB = N_CB = 0.725 * (1 / _N) ** 0.2
_Z = 1.48 + math.sqrt(_N)
_D = min(max(F * (1 - (1 / 3.6) * math.exp((-L_A - 42) / 92)), 0.0), 1.0)
_RGB_W = _mul(M_CAT02, XYZ_W)
_GAIN = tuple(XYZ_W[1] * _D / w + 1 - _D for w in _RGB_W)


def _compress(x: float) -> float:
    """Post-adaptation non-linear response compression."""
    p = (F_L * abs(x) / 100) ** 0.42
    return math.copysign(400 * p / (27.13 + p), x) + 0.1


def _responses(xyz):
    rgb_c = tuple(g * v for g, v in zip(_GAIN, _mul(M_CAT02, xyz)))
    return tuple(_compress(v) for v in _mul(M_HPE, _mul(_M_CAT02_INV, rgb_c)))


def _achromatic(ra, ga, ba) -> float:
    return (2 * ra + ga + ba / 20 - 0.305) * N_BB


_A_W = _achromatic(*_responses(XYZ_W))


def jmh(xyz) -> tuple:
    """CIECAM02 lightness J, colourfulness M and hue angle h (degrees) of XYZ (Y = 100 white)."""
    ra, ga, ba = _responses(xyz)
    a = ra - 12 * ga / 11 + ba / 11
    b = (ra + ga - 2 * ba) / 9
    h = math.degrees(math.atan2(b, a)) % 360
    e_t = 0.25 * (math.cos(math.radians(h) + 2) + 3.8)
    lightness = 100 * (max(_achromatic(ra, ga, ba), 0.0) / _A_W) ** (C * _Z)
    t = (50000 / 13 * N_C * N_CB * e_t * math.hypot(a, b)) / (ra + ga + 21 / 20 * ba)
    chroma = t ** 0.9 * math.sqrt(lightness / 100) * (1.64 - 0.29 ** _N) ** 0.73
    return lightness, chroma * F_L ** 0.25, h


@lru_cache(maxsize=4096)
def from_srgb(rgb) -> tuple:
    """CAM02-UCS (J', a', b') of an sRGB colour (channels 0..1)."""
    xyz = tuple(100 * v for v in _mul(LINEAR_SRGB_TO_XYZ, srgb_to_linear(tuple(rgb[:3]))))
    return cam02ucs.jab_one(*jmh(xyz))


def distance(a, b) -> float:
    """Euclidean distance of two sRGB colours in CAM02-UCS (Delta E')."""
    return math.dist(from_srgb(tuple(a)), from_srgb(tuple(b)))
