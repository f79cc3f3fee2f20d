"""Colour-vision deficiency simulation (Machado, Oliveira and Fernandes 2009).

The model maps each colour through a 3x3 matrix in linear-light sRGB; the matrix depends on the
deficiency (protan, deutan, tritan: the L, M or S cone type working abnormally or missing) and on
its severity (0: normal vision, 1: dichromacy: protanopia, deuteranopia, tritanopia). The
matrices are those the authors published, as tabulated by colour-science
(``colour.blindness.matrix_cvd_Machado2009``), which interpolates between the published
severities. The dichromat matrices (severity 1, the default) are written out below as the paper
gives them (tested equal to colour-science's): importing colour-science costs about half a
second and 70 MB (measured on 2026-12-02), a quarter of what every rule beyond TC100 added to a
200-page check. colour-science is imported for any other severity, on first use.

Simulated colours are clipped to the sRGB gamut before re-encoding (a simulated colour can fall
slightly outside it; a display cannot show it either).

References
----------
- G. M. Machado, M. M. Oliveira and L. A. F. Fernandes, "A physiologically-based model for
  simulation of color vision deficiency", IEEE Transactions on Visualization and Computer
  Graphics 15(6), 2009, pp. 1291-1298.
- colour-science, ``colour.blindness`` (general-purpose reference library).

Two forms of the same steps (linearise, matrix, clip, encode): :func:`simulate` on numpy arrays,
batched over leading axes, and :func:`simulate_one`, one colour in plain Python, which the rules
use. numpy is imported by the first only. Measured on 2026-12-03 (CPython 3.11, numpy 2.4): a
200-page site has about 150 distinct colours to simulate per deficiency; importing numpy costs
about 0.1 s of CPU, more than the rest of TC400's simulation, and even for 20,000 colours the
batched call with its results made tuples again (1.3 us a colour) is no faster than the plain
loop (1.1 us). tests/colour/test_cvd.py checks both forms against colour-science.
"""
from __future__ import annotations

from functools import lru_cache

from .convert import linear_to_srgb_channel, srgb_to_linear

# Our names (the reader-facing ones) -> colour-science's names of the anomalies.
DEFICIENCIES = {
    "protanopia": "Protanomaly",
    "deuteranopia": "Deuteranomaly",
    "tritanopia": "Tritanomaly",
}


# Severity 1.0 (dichromacy): Machado, Oliveira and Fernandes 2009, the published table (the same
# values as colour-science's CVD_MATRICES_MACHADO2010, tests/colour/test_cvd.py)
DICHROMAT = {
    "protanopia": ((0.152286, 1.052583, -0.204868), (0.114503, 0.786281, 0.099216),
                   (-0.003882, -0.048116, 1.051998)),
    "deuteranopia": ((0.367322, 0.860646, -0.227968), (0.280085, 0.672501, 0.047413),
                     (-0.011820, 0.042940, 0.968881)),
    "tritanopia": ((1.255528, -0.076749, -0.178779), (-0.078411, 0.930809, 0.147602),
                   (0.004733, 0.691367, 0.303900)),
}


def needs_library(severity: float) -> bool:
    """Whether simulating at ``severity`` imports colour-science (not at 1.0)."""
    return float(severity) != 1.0


@lru_cache(maxsize=64)
def matrix(deficiency: str, severity: float = 1.0) -> np.ndarray:
    """The 3x3 linear-sRGB simulation matrix for ``deficiency`` at ``severity`` (0..1)."""
    if deficiency not in DEFICIENCIES:
        raise ValueError(f"unknown colour-vision deficiency {deficiency!r}; "
                         f"expected one of {', '.join(DEFICIENCIES)}")
    if not 0.0 <= severity <= 1.0:
        raise ValueError(f"severity must lie in 0..1, got {severity}")
    import numpy as np

    if not needs_library(severity):
        m = np.array(DICHROMAT[deficiency], dtype=float)
        m.setflags(write=False)
        return m
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
    import numpy as np

    rgb = np.asarray(rgb_linear, dtype=float)[..., :3]
    return np.clip(rgb @ matrix(deficiency, severity).T, 0.0, 1.0)


def simulate(rgb, deficiency: str, severity: float = 1.0) -> np.ndarray:
    """Simulated sRGB-encoded colours (0..1) of sRGB-encoded ``rgb``; batched over leading axes."""
    import numpy as np

    rgb = np.asarray(rgb, dtype=float)[..., :3]
    lin = _to_linear(rgb)
    return _to_srgb(simulate_linear(lin, deficiency, severity))


def simulate_one(rgb, deficiency: str, severity: float = 1.0) -> tuple:
    """:func:`simulate` for one colour (sRGB-encoded, 0..1), as a plain (r, g, b) tuple,
    without numpy at severity 1."""
    return simulate_with(rows(deficiency, severity), rgb)


@lru_cache(maxsize=64)
def rows(deficiency: str, severity: float = 1.0) -> tuple:
    """:func:`matrix` as a tuple of rows of floats (at severity 1 without importing numpy)."""
    if deficiency in DICHROMAT and not needs_library(severity):
        return DICHROMAT[deficiency]
    return tuple(tuple(float(x) for x in row) for row in matrix(deficiency, severity))


def simulate_with(m: tuple, rgb) -> tuple:
    """One sRGB-encoded colour (0..1) through the rows ``m`` (:func:`rows`): the steps of
    :func:`simulate` in plain Python (the transfer functions are ``colour.convert``'s)."""
    lin = srgb_to_linear(rgb)
    return tuple(linear_to_srgb_channel(
        min(max(row[0] * lin[0] + row[1] * lin[1] + row[2] * lin[2], 0.0), 1.0)) for row in m)


def _to_linear(rgb: np.ndarray) -> np.ndarray:
    import numpy as np

    return np.where(rgb <= 0.04045, rgb / 12.92, ((rgb + 0.055) / 1.055) ** 2.4)


def _to_srgb(lin: np.ndarray) -> np.ndarray:
    import numpy as np

    return np.where(lin <= 0.0031308, lin * 12.92, 1.055 * np.power(lin, 1 / 2.4) - 0.055)
