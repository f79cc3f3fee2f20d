"""Colour-vision deficiency simulation (Machado, Oliveira and Fernandes 2009).

The model maps each colour through a 3x3 matrix in linear-light sRGB; the matrix depends on the
deficiency (protan, deutan, tritan: the L, M or S cone type working abnormally or missing) and on
its severity (0: normal vision, 1: dichromacy: protanopia, deuteranopia, tritanopia). The
matrices are those the authors published, as tabulated by colour-science
(``colour.blindness.matrix_cvd_Machado2009``), which interpolates between the published
severities. colour-science is imported on first use only: its import costs about half a second,
which a run that does not simulate deficiencies must not pay.

Simulated colours are clipped to the sRGB gamut before re-encoding (a simulated colour can fall
slightly outside it; a display cannot show it either).

References
----------
- G. M. Machado, M. M. Oliveira and L. A. F. Fernandes, "A physiologically-based model for
  simulation of color vision deficiency", IEEE Transactions on Visualization and Computer
  Graphics 15(6), 2009, pp. 1291-1298.
- colour-science, ``colour.blindness`` (general-purpose reference library).

Use :func:`simulate` on arrays of the distinct colours of a run (one numpy call per deficiency),
not colour by colour in a loop.
"""
from __future__ import annotations

from functools import lru_cache

import numpy as np

# Our names (the reader-facing ones) -> colour-science's names of the anomalies.
DEFICIENCIES = {
    "protanopia": "Protanomaly",
    "deuteranopia": "Deuteranomaly",
    "tritanopia": "Tritanomaly",
}


@lru_cache(maxsize=64)
def matrix(deficiency: str, severity: float = 1.0) -> np.ndarray:
    """The 3x3 linear-sRGB simulation matrix for ``deficiency`` at ``severity`` (0..1)."""
    if deficiency not in DEFICIENCIES:
        raise ValueError(f"unknown colour-vision deficiency {deficiency!r}; "
                         f"expected one of {', '.join(DEFICIENCIES)}")
    if not 0.0 <= severity <= 1.0:
        raise ValueError(f"severity must lie in 0..1, got {severity}")
    import warnings

    from . import colour_science  # lazy: see the module docstring

    with warnings.catch_warnings():  # (it warns that its tritan matrices are approximations)
        warnings.simplefilter("ignore")
        m = colour_science().blindness.matrix_cvd_Machado2009(DEFICIENCIES[deficiency],
                                                              severity)
    m = np.array(m, dtype=float)
    m.setflags(write=False)
    return m


def simulate_linear(rgb_linear, deficiency: str, severity: float = 1.0) -> np.ndarray:
    """Simulated linear-light sRGB of ``rgb_linear`` (array, last axis r, g, b), clipped to 0..1."""
    rgb = np.asarray(rgb_linear, dtype=float)[..., :3]
    return np.clip(rgb @ matrix(deficiency, severity).T, 0.0, 1.0)


def simulate(rgb, deficiency: str, severity: float = 1.0) -> np.ndarray:
    """Simulated sRGB-encoded colours (0..1) of sRGB-encoded ``rgb``; batched over leading axes."""
    rgb = np.asarray(rgb, dtype=float)[..., :3]
    lin = _to_linear(rgb)
    return _to_srgb(simulate_linear(lin, deficiency, severity))


def simulate_one(rgb, deficiency: str, severity: float = 1.0) -> tuple:
    """:func:`simulate` for one colour, as a plain (r, g, b) tuple."""
    return tuple(float(c) for c in simulate(np.asarray(rgb[:3]), deficiency, severity))


def _to_linear(rgb: np.ndarray) -> np.ndarray:
    return np.where(rgb <= 0.04045, rgb / 12.92, ((rgb + 0.055) / 1.055) ** 2.4)


def _to_srgb(lin: np.ndarray) -> np.ndarray:
    return np.where(lin <= 0.0031308, lin * 12.92, 1.055 * np.power(lin, 1 / 2.4) - 0.055)
