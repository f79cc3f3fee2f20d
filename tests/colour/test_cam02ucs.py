"""CAM02-UCS (Luo, Cui and Li 2006): formula values and colour-science as the reference."""
import math

import numpy as np
import pytest

from tinctura.colour import cam02ucs


def test_formula_values():
    """J' = 1.7 J / (1 + 0.007 J), M' = ln(1 + 0.0228 M) / 0.0228 (Luo, Cui and Li 2006),
    worked by hand: J = 50 -> 85 / 1.35 = 62.963; M = 40 -> ln(1.912) / 0.0228 = 28.428."""
    j, a, b = cam02ucs.jab(50.0, 40.0, 90.0)
    assert j == pytest.approx(62.963, abs=1e-3)
    assert a == pytest.approx(0.0, abs=1e-9)
    assert b == pytest.approx(math.log(1.912) / 0.0228, abs=1e-9)
    assert b == pytest.approx(28.428, abs=1e-3)


def test_matches_colour_science():
    colour = pytest.importorskip("colour")
    jmh = np.array([[41.73, 0.108, 219.0], [65.96, 41.67, 19.6], [21.79, 37.3, 177.1]])
    ours = cam02ucs.jab(jmh[:, 0], jmh[:, 1], jmh[:, 2])
    assert np.allclose(ours, colour.JMh_CIECAM02_to_CAM02UCS(jmh), atol=1e-9)


def test_delta_e_is_euclidean_in_jab():
    assert cam02ucs.delta_e([10, 3, 4], [10, 0, 0]) == pytest.approx(5.0)


def test_one_colour_form_matches_colour_science():
    colour = pytest.importorskip("colour")
    jmh = np.array([[41.73, 0.108, 219.0], [65.96, 41.67, 19.6], [21.79, 37.3, 177.1]])
    reference = colour.JMh_CIECAM02_to_CAM02UCS(jmh)
    for row, expected in zip(jmh, reference):
        assert np.allclose(cam02ucs.jab_one(*map(float, row)), expected, atol=1e-9)


def test_one_colour_form_formula_values():
    """As ``test_formula_values``: J = 50 -> 62.963; M = 40, h = 90 -> a' = 0, b' = 28.428."""
    j, a, b = cam02ucs.jab_one(50.0, 40.0, 90.0)
    assert j == pytest.approx(62.963, abs=1e-3) and a == pytest.approx(0.0, abs=1e-9)
    assert b == pytest.approx(28.428, abs=1e-3)
