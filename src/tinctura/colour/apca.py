"""APCA lightness contrast Lc, version 0.0.98G-4g (the constants published for the WCAG 3
drafts), in our own code: no general-purpose library has it.

Symbols follow the published algorithm: ``Y`` the screen luminance estimate from a simple 2.4
exponent; a soft clamp lifts near-black ``Y`` (the model's flare); ``S`` the scaled difference
of the power-curved luminances, with exponents that depend on polarity. Lc is signed: positive
for dark text on a light background ("normal" polarity), negative for light text on dark
("reverse"). Lc is asymmetric: #888 on #fff is 63.06, #fff on #888 is -68.54.

APCA is not a WCAG 2 requirement; tinctura reports it as advice beside the WCAG 2 ratio.

``flare`` (optional, in units of white luminance) is added to both luminances before the soft
clamp: light reflected by the screen lifts text and background alike (``viewing.py``). This is
our extension, not part of APCA; with ``flare=0`` the function is APCA unchanged.

References
----------
- APCA 0.0.98G-4g constants and reference values as listed in the project's shared reference
  values (from memory, verified there by computing the formula; tests reproduce them).
"""
from __future__ import annotations

from functools import lru_cache

# Luminance estimate (sRGB coefficients, simple exponent)
MAIN_TRC = 2.4
S_RCO, S_GCO, S_BCO = 0.2126729, 0.7151522, 0.0721750
# Soft clamp of near-black luminance
BLK_THRS = 0.022
BLK_CLMP = 1.414
DELTA_Y_MIN = 0.0005
# Power curves: normal polarity (dark text on light), reverse polarity (light text on dark)
NORM_BG, NORM_TXT = 0.56, 0.57
REV_BG, REV_TXT = 0.65, 0.62
SCALE = 1.14
LO_CLIP = 0.1
LO_OFFSET = 0.027

NORMAL = "dark on light"
REVERSE = "light on dark"


def screen_luminance(rgb) -> float:
    """APCA's Y of an sRGB-encoded colour (0..1 channels; alpha ignored)."""
    r, g, b = (max(0.0, min(1.0, float(c))) for c in rgb[:3])
    return S_RCO * r ** MAIN_TRC + S_GCO * g ** MAIN_TRC + S_BCO * b ** MAIN_TRC


def _soft_clamp(y: float) -> float:
    return y + (BLK_THRS - y) ** BLK_CLMP if y < BLK_THRS else y


def lc_from_luminances(y_text: float, y_bg: float) -> float:
    """Lc from APCA luminances (before the soft clamp) of text and background."""
    y_text, y_bg = _soft_clamp(y_text), _soft_clamp(y_bg)
    if abs(y_bg - y_text) < DELTA_Y_MIN:
        return 0.0
    if y_bg > y_text:  # normal polarity
        s = (y_bg ** NORM_BG - y_text ** NORM_TXT) * SCALE
        return 0.0 if s < LO_CLIP else (s - LO_OFFSET) * 100.0
    s = (y_bg ** REV_BG - y_text ** REV_TXT) * SCALE
    return 0.0 if s > -LO_CLIP else (s + LO_OFFSET) * 100.0


def lightness_contrast(text, background, flare: float = 0.0) -> float:
    """Lc of opaque sRGB ``text`` on ``background``; ``flare`` adds to both luminances."""
    return _lc(tuple(float(c) for c in text[:3]), tuple(float(c) for c in background[:3]),
               float(flare))


@lru_cache(maxsize=65536)  # a site has few distinct pairs
def _lc(text, background, flare):
    return lc_from_luminances(screen_luminance(text) + flare, screen_luminance(background) + flare)


def polarity(text, background) -> str:
    """"dark on light" when the background is the brighter (APCA's normal polarity)."""
    return NORMAL if screen_luminance(background) > screen_luminance(text) else REVERSE
