"""CIECAM02: the forward model, its viewing conditions and the qualitative facts of
simultaneous contrast.

Sources: the worked examples of CIE 159:2004 as tabulated by Luo and Li (2013), values from
memory listed in shared/reference-values.md (tolerance: the table's last digit, 0.05 in J and
C, 0.1 degree in h); colour-science (general-purpose reference library, ``XYZ_to_CIECAM02``)
for the model on many inputs and for the inputs our module builds; common practice for the
qualitative facts.
"""
import subprocess
import sys

import numpy as np
import pytest

from tinctura.colour import ciecam02

colour = pytest.importorskip("colour")

WORKED = [  # XYZ, XYZ_w, L_A, Y_b, J, C, h (Average surround)
    ((19.01, 20.00, 21.78), (95.05, 100.00, 108.88), 318.31, 20, 41.73, 0.10, 219.0),
    ((57.06, 43.06, 31.96), (95.05, 100.00, 108.88), 31.83, 20, 65.96, 48.57, 19.6),
    ((3.53, 6.56, 2.14), (109.85, 100.00, 35.58), 318.31, 20, 21.79, 46.94, 177.1),
    ((19.01, 20.00, 21.78), (109.85, 100.00, 35.58), 31.83, 20, 42.53, 51.92, 248.9),
]


@pytest.mark.parametrize("model", ["ours", "colour-science"])
def test_worked_examples_through_the_batched_call(model):
    """Our forward model, batched as the rules call it, reproduces the worked examples; so
    does the reference library's (which the next test compares ours with)."""
    xyz, white, l_a, y_b, J, C, h = (np.array(col, dtype=float) for col in zip(*WORKED))
    if model == "ours":
        spec = ciecam02.forward(xyz, white, l_a, y_b, "Average")
    else:
        spec = colour.XYZ_to_CIECAM02(xyz, white, l_a, y_b,
                                      colour.VIEWING_CONDITIONS_CIECAM02["Average"])
    assert np.allclose(spec.J, J, atol=0.05)
    assert np.allclose(spec.C, C, atol=0.05)
    assert np.allclose(spec.h, h, atol=0.1)


@pytest.mark.parametrize("surround", ciecam02.SURROUNDS)
def test_forward_model_matches_colour_science(surround):
    """Every correlate the module gives, for random display colours under random whites,
    adapting luminances and backgrounds (colour-science ``XYZ_to_CIECAM02``; tolerance 1e-9
    relative: floating point order only)."""
    rng = np.random.default_rng(7)
    n = 3000
    xyz = ciecam02.srgb_to_xyz(rng.uniform(0, 1, (n, 3)))
    white = ciecam02.adopted_white(ciecam02.srgb_to_xyz(rng.uniform(0, 1, (n, 3))),
                                   rng.uniform(0, 1, (n, 1)))
    l_a, y_b = rng.uniform(0.5, 1000, n), rng.uniform(1, 100, n)
    ours = ciecam02.forward(xyz, white, l_a, y_b, surround)
    ref = colour.XYZ_to_CIECAM02(xyz, white, l_a, y_b,
                                 colour.VIEWING_CONDITIONS_CIECAM02[surround])
    for name in ("J", "C", "h", "s", "Q", "M"):
        assert np.allclose(getattr(ours, name), getattr(ref, name), rtol=1e-9, atol=1e-9), name


def test_surround_factors_are_cie_159():
    """CIE 159:2004 surround factors (reference-values.md): F, c, Nc; colour-science's too."""
    expected = {"Average": (1.0, 0.69, 1.0), "Dim": (0.9, 0.59, 0.9), "Dark": (0.8, 0.525, 0.8)}
    assert ciecam02.SURROUND_FACTORS == expected
    vc = colour.VIEWING_CONDITIONS_CIECAM02
    assert {name: (vc[name].F, vc[name].c, vc[name].N_c) for name in expected} == expected


def test_srgb_white_is_d65_at_y_100():
    """sRGB white is D65: XYZ (95.047, 100, 108.883) (IEC 61966-2-1, from memory; the
    chromaticity x 0.3127, y 0.3290 the project uses gives it within 0.03)."""
    assert np.allclose(ciecam02.srgb_to_xyz([1, 1, 1]), [95.047, 100.0, 108.883], atol=0.03)
    expected = colour.sRGB_to_XYZ([0.2, 0.5, 0.8]) * 100
    assert np.allclose(ciecam02.srgb_to_xyz([0.2, 0.5, 0.8]), expected, atol=5e-3)


def test_neutral_background_is_plain_ciecam02():
    """On a grey background the inputs are the published model's: D65 white, L_A = 16 cd/m2,
    Y_b the background's luminance factor (colour-science computes the reference)."""
    grey, fg = [0.5, 0.5, 0.5], [0.8, 0.3, 0.1]
    spec = ciecam02.appearance([fg], [grey])
    ref = colour.XYZ_to_CIECAM02(ciecam02.srgb_to_xyz(fg), ciecam02.srgb_to_xyz([1, 1, 1]), 16.0,
                                 ciecam02.srgb_to_xyz(grey)[1],
                                 colour.VIEWING_CONDITIONS_CIECAM02["Average"])
    assert np.allclose(spec.J, ref.J, atol=1e-6) and np.allclose(spec.h, ref.h, atol=1e-6)


def test_same_grey_is_lighter_on_black_than_on_white():
    """Simultaneous lightness contrast (common practice)."""
    spec = ciecam02.appearance([[0.5] * 3, [0.5] * 3], [[0, 0, 0], [1, 1, 1]])
    assert spec.J[0] > spec.J[1] + 5


@pytest.mark.parametrize("surround, opposite", [
    ((0.9, 0.1, 0.1), (150, 260)),  # red surround: the grey turns towards cyan/green-blue
    ((0.1, 0.7, 0.1), (280, 360)),  # green surround: towards magenta/purple
])
def test_chromatic_surround_pushes_towards_the_opponent_hue(surround, opposite):
    """Chromatic induction (common practice): a grey on a coloured surround takes on the
    opponent hue, and gains colourfulness."""
    spec = ciecam02.appearance([[0.5] * 3, [0.5] * 3], [surround, [0.5] * 3])
    low, high = opposite
    assert low <= spec.h[0] <= high
    assert spec.M[0] > spec.M[1] + 3


def test_black_background_stays_defined():
    spec = ciecam02.appearance([[0.9, 0.6, 0.0]], [[0, 0, 0]])
    assert np.isfinite(spec.J).all() and spec.J[0] > 0


@pytest.mark.parametrize("bad", [dict(surround="Bright"), dict(white_luminance=0),
                                 dict(background_weight=2)])
def test_bad_conditions_are_refused(bad):
    with pytest.raises(ValueError):
        ciecam02.ViewingConditions(**bad)


def test_site_appearance_rules_do_not_import_colour_science(tmp_path):
    """The site-level rules (TC300, TC310) run after the last page, on the critical path:
    importing colour-science there took a fifth of a 200-page check."""
    page = tmp_path / "p.html"
    page.write_text('<style>.tag.caution{color:#b26b00} .tag.fault{color:#c62828}'
                    ' .panel{background:#263238}</style>'
                    '<p>Berth 4: <span class="tag caution">tide falling</span></p>'
                    '<div class="panel"><span class="tag fault">pilot late</span></div>',
                    encoding="utf-8")
    code = (
        "import sys\nfrom tinctura import engine\n"
        f"report = engine.check_paths([{str(page)!r}], engine.Options())\n"
        "assert report.palette, 'no palette uses: the site-level rules would not run'\n"
        "assert 'colour' not in sys.modules, 'colour-science imported'\n"
    )
    subprocess.run([sys.executable, "-c", code], check=True)


def test_text_ratio_alone_does_not_import_colour_science(tmp_path):
    page = tmp_path / "p.html"
    page.write_text('<p style="color:#777">Low tide at 14:05</p>', encoding="utf-8")
    code = (
        "import sys\nfrom tinctura import engine\n"
        f"engine.check_paths([{str(page)!r}], engine.Options(rules=('TC100',)))\n"
        "assert 'colour' not in sys.modules, 'colour-science imported'\n"
    )
    subprocess.run([sys.executable, "-c", code], check=True)
