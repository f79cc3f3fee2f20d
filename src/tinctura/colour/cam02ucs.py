"""CAM02-UCS: a uniform colour space on CIECAM02's J, M, h (Luo, Cui and Li 2006).

J' = 1.7 J / (1 + 0.007 J), M' = ln(1 + 0.0228 M) / 0.0228, a' = M' cos h, b' = M' sin h, and
the colour difference dE' = sqrt(dJ'^2 + da'^2 + db'^2) (K_L = 1, c1 = 0.007, c2 = 0.0228).
One unit is roughly one just-noticeable difference for large uniform patches; differences of a
few units are plainly visible side by side.

References
----------
- M. R. Luo, G. Cui and C. Li, "Uniform colour spaces based on CIECAM02 colour appearance
  model", Color Research & Application 31(4), 2006, pp. 320-330.
- colour-science, ``colour.JMh_CIECAM02_to_CAM02UCS`` (general-purpose reference library).
"""
from __future__ import annotations

import math
from typing import TYPE_CHECKING

if TYPE_CHECKING:  # numpy is imported on use: a plain check needs only ``jab_one``
    import numpy as np

K_L, C1, C2 = 1.0, 0.007, 0.0228  # CAM02-UCS coefficients (Luo, Cui and Li 2006, Table 2)


def jab(J, M, h) -> np.ndarray:
    """J', a', b' from CIECAM02 lightness J, colourfulness M and hue angle h (degrees)."""
    import numpy as np

    J, M, h = (np.asarray(v, dtype=float) for v in (J, M, h))
    j = (1 + 100 * C1) * J / (1 + C1 * J)
    m = np.log1p(C2 * M) / C2
    rad = np.radians(h)
    return np.stack([j, m * np.cos(rad), m * np.sin(rad)], axis=-1)


def jab_one(J: float, M: float, h: float) -> tuple:
    """``jab`` of one colour, in plain floats (the same operations in the same order): ranking
    suggested colours (``ucs_distance``) needs neither arrays nor numpy's import time."""
    j = (1 + 100 * C1) * J / (1 + C1 * J)
    m = math.log1p(C2 * M) / C2
    rad = math.radians(h)
    return j, m * math.cos(rad), m * math.sin(rad)


def delta_e(a, b) -> np.ndarray:
    """dE' between J'a'b' arrays (last axis J', a', b')."""
    import numpy as np

    d = np.asarray(a, dtype=float) - np.asarray(b, dtype=float)
    return np.sqrt((d[..., 0] / K_L) ** 2 + d[..., 1] ** 2 + d[..., 2] ** 2)
