"""Machado, Oliveira and Fernandes 2009 colour-vision-deficiency simulation."""
import numpy as np
import pytest

from tinctura.colour import cvd

# The published severity-1.0 matrices, as listed in shared/reference-values.md (Machado et al.
# 2009, supplementary table; values from memory, identical to colour-science's tabulation).
PUBLISHED = {
    "protanopia": [[0.152286, 1.052583, -0.204868], [0.114503, 0.786281, 0.099216],
                   [-0.003882, -0.048116, 1.051998]],
    "deuteranopia": [[0.367322, 0.860646, -0.227968], [0.280085, 0.672501, 0.047413],
                     [-0.011820, 0.042940, 0.968881]],
    "tritanopia": [[1.255528, -0.076749, -0.178779], [-0.078411, 0.930809, 0.147602],
                   [0.004733, 0.691367, 0.303900]],
}


@pytest.mark.parametrize("name", sorted(PUBLISHED))
def test_matrices_are_the_published_ones(name):
    # Source: Machado et al. 2009 (reference-values.md); tolerance: the table's 6 decimals.
    np.testing.assert_allclose(cvd.matrix(name, 1.0), PUBLISHED[name], atol=5e-7)


def test_matches_colour_science_on_a_batch():
    # Source: colour-science (general-purpose reference library): its matrix applied in linear
    # sRGB with its own sRGB transfer functions; tolerance 1e-9 (same arithmetic).
    import colour

    rng = np.random.default_rng(7)
    rgb = rng.random((50, 3))
    for name, cs_name in cvd.DEFICIENCIES.items():
        for severity in (0.3, 1.0):
            m = colour.blindness.matrix_cvd_Machado2009(cs_name, severity)
            lin = colour.models.eotf_sRGB(rgb)
            want = colour.models.eotf_inverse_sRGB(np.clip(lin @ np.asarray(m).T, 0, 1))
            np.testing.assert_allclose(cvd.simulate(rgb, name, severity), want, atol=1e-9)
            # the plain-Python form the rules use, colour by colour
            one = [cvd.simulate_one(tuple(c), name, severity) for c in rgb]
            np.testing.assert_allclose(one, want, atol=1e-9)


def test_dichromats_need_no_library_other_severities_do():
    """The severity-1 matrices are kept here (the published table, compared with colour-science
    above): simulating them never imports colour-science, any other severity does."""
    import subprocess
    import sys

    code = ("import sys; from tinctura.colour import cvd\n"
            "cvd.simulate_one((1.0, 0.2, 0.2), 'protanopia', {severity})\n"
            "print('colour' in sys.modules)\n")
    seen = [subprocess.run([sys.executable, "-c", code.format(severity=severity)],
                           capture_output=True, text=True, timeout=120).stdout.strip()
            for severity in (1.0, 0.6)]
    assert seen == ["False", "True"]


def test_severity_zero_is_normal_vision():
    # Machado et al. 2009: severity 0 is the identity (normal trichromacy).
    rgb = np.array([[0.8, 0.2, 0.1], [0.1, 0.6, 0.3]])
    for name in cvd.DEFICIENCIES:
        np.testing.assert_allclose(cvd.simulate(rgb, name, 0.0), rgb, atol=1e-12)


def test_red_and_green_collapse_for_deuteranopia():
    # Common practice: saturated red and green look alike (both yellowish-brown) to a
    # deuteranope; their simulated colours differ far less than the originals do.
    red, green = (0.8, 0.1, 0.1), (0.1, 0.6, 0.1)
    before = np.linalg.norm(np.subtract(red, green))
    after = np.linalg.norm(np.subtract(cvd.simulate_one(red, "deuteranopia"),
                                       cvd.simulate_one(green, "deuteranopia")))
    assert after < before / 3


def test_grey_is_unchanged():
    # Each published matrix's rows sum to 1 (Machado et al. 2009): greys keep their value.
    for name in cvd.DEFICIENCIES:
        assert cvd.simulate_one((0.5, 0.5, 0.5), name) == pytest.approx((0.5,) * 3, abs=1e-5)


def test_bad_arguments_are_named():
    with pytest.raises(ValueError, match="unknown colour-vision deficiency"):
        cvd.matrix("achromatopsia")
    with pytest.raises(ValueError, match="severity"):
        cvd.matrix("protanopia", 1.5)
