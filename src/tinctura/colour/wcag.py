"""WCAG 2 relative luminance and contrast ratio (W3C, WCAG 2.2, definitions section).

Ratios are never rounded before comparison (Understanding SC 1.4.3: 4.499:1 does not meet
4.5:1); :func:`truncate` exists only for display, and floors so that a shown value never
overstates the ratio.
"""
from __future__ import annotations

from decimal import ROUND_FLOOR, Decimal

from functools import lru_cache
from typing import TYPE_CHECKING

if TYPE_CHECKING:  # numpy is imported on use: the checks never call the vectorised forms
    import numpy as np

# WCAG 2.2 "large scale (text)": at least 18 pt, or 14 pt bold; 1 pt = 4/3 px
# (CSS Values and Units: 1in = 96px = 72pt).
LARGE_PX = 18 * 4 / 3  # 24 px
LARGE_BOLD_PX = 14 * 4 / 3  # 18.666... px
BOLD_WEIGHT = 700  # "bold" as a numeric font-weight (common practice)
_PX_TOLERANCE = 1e-6  # absorbs float error in computed font sizes such as 14pt or 1.1667em

# Success Criteria 1.4.3 (AA) and 1.4.6 (AAA); SC 1.4.11 for non-text content.
_REQUIRED = {("AA", False): 4.5, ("AA", True): 3.0, ("AAA", False): 7.0, ("AAA", True): 4.5}
NON_TEXT_RATIO = 3.0


def _linear(c: float) -> float:
    return c / 12.92 if c <= 0.04045 else ((c + 0.055) / 1.055) ** 2.4


def relative_luminance(rgb) -> float:
    """Relative luminance of an sRGB-encoded colour (alpha, if present, is ignored)."""
    return _luminance(rgb[0], rgb[1], rgb[2])


@lru_cache(maxsize=65536)  # a site uses few colours, each thousands of times
def _luminance(r: float, g: float, b: float) -> float:
    return 0.2126 * _linear(r) + 0.7152 * _linear(g) + 0.0722 * _linear(b)


def ratio_from_luminances(l1: float, l2: float) -> float:
    if l1 < l2:
        l1, l2 = l2, l1
    return (l1 + 0.05) / (l2 + 0.05)


def contrast_ratio(rgb1, rgb2) -> float:
    """Contrast ratio of two opaque sRGB colours, 1..21, order-independent, unrounded."""
    return ratio_from_luminances(relative_luminance(rgb1), relative_luminance(rgb2))


def relative_luminances(rgb) -> np.ndarray:
    """Vectorised :func:`relative_luminance` over an array whose last axis is r, g, b[, a]."""
    import numpy as np

    c = np.asarray(rgb, dtype=float)[..., :3]
    lin = np.where(c <= 0.04045, c / 12.92, ((c + 0.055) / 1.055) ** 2.4)
    return lin @ np.array([0.2126, 0.7152, 0.0722])


def contrast_ratios(fg, bg) -> np.ndarray:
    """Vectorised :func:`contrast_ratio`; inputs broadcast against each other."""
    import numpy as np

    l1, l2 = relative_luminances(fg), relative_luminances(bg)
    return (np.maximum(l1, l2) + 0.05) / (np.minimum(l1, l2) + 0.05)


def truncate(x: float, digits: int = 2) -> float:
    """Floor ``x`` to ``digits`` decimals for display: 4.478 -> 4.47, 4.5 -> 4.5.

    Works on the shortest decimal form of the float (``repr``), so 4.47 stays 4.47
    instead of becoming 4.46 through 4.47 * 100 = 446.99999999999994.
    """
    q = Decimal(1).scaleb(-digits)
    return float(Decimal(repr(float(x))).quantize(q, rounding=ROUND_FLOOR))


def format_ratio(x: float, digits: int = 2) -> str:
    """Truncated ratio as text with a fixed number of decimals: ``"4.50"``."""
    return f"{truncate(x, digits):.{digits}f}"


def is_large_text(size_px: float, weight: float | int) -> bool:
    """WCAG large-scale text: >= 24 px, or >= 18.6667 px (14 pt) at weight >= 700."""
    if size_px >= LARGE_PX - _PX_TOLERANCE:
        return True
    return weight >= BOLD_WEIGHT and size_px >= LARGE_BOLD_PX - _PX_TOLERANCE


def required_ratio(level: str = "AA", large: bool = False) -> float:
    """Minimum contrast ratio for text: SC 1.4.3 (AA) or SC 1.4.6 (AAA)."""
    try:
        return _REQUIRED[(level.upper(), bool(large))]
    except KeyError:
        raise ValueError(f"unknown conformance level {level!r} (use 'AA' or 'AAA')") from None


def passes(ratio: float, required: float) -> bool:
    """The comparison WCAG makes: unrounded ratio at least the threshold."""
    return ratio >= required
