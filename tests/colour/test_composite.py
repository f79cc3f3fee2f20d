"""Source-over compositing: Porter & Duff (1984) "over", as CSS Compositing and Blending
Level 1 (W3C) defines simple alpha compositing on non-premultiplied sRGB values:
co = Cs as + Cb ab (1 - as), ao = as + ab (1 - as), colour = co / ao.
"""
import pytest

from tinctura.colour import flatten, over, parse_color, to_hex, with_alpha

WHITE = (1.0, 1.0, 1.0, 1.0)


def test_half_black_over_white_is_mid_grey():
    assert over((0.0, 0.0, 0.0, 0.5), WHITE) == pytest.approx((0.5, 0.5, 0.5, 1.0))


def test_material_body_text():
    # measurements.md (measured on mkdocs-material in a browser): #000000de over #fff
    # renders as rgb(33, 33, 33).
    assert to_hex(over(parse_color("#000000de"), WHITE)) == "#212121"


def test_translucent_over_translucent():
    top, bottom = (1.0, 0.0, 0.0, 0.5), (0.0, 0.0, 1.0, 0.5)
    a = 0.5 + 0.5 * 0.5
    expected = ((1.0 * 0.5) / a, 0.0, (1.0 * 0.5 * 0.5) / a, a)
    assert over(top, bottom) == pytest.approx(expected)


def test_edge_alphas():
    assert over((0.2, 0.3, 0.4, 1.0), (0.9, 0.9, 0.9, 0.3)) == (0.2, 0.3, 0.4, 1.0)
    assert over((0.2, 0.3, 0.4, 0.0), (0.9, 0.8, 0.7, 0.3)) == (0.9, 0.8, 0.7, 0.3)
    assert over((0.2, 0.3, 0.4, 0.0), (0.9, 0.8, 0.7, 0.0)) == (0.9, 0.8, 0.7, 0.0)
    assert over((0.2, 0.3, 0.4), (0.9, 0.8, 0.7)) == (0.2, 0.3, 0.4, 1.0)  # rgb counts as opaque


def test_flatten_top_first():
    layers = [(0.0, 0.0, 0.0, 0.5), (1.0, 0.0, 0.0, 0.5)]
    # red 50% over white = (1, .5, .5); then black 50% over that = (.5, .25, .25)
    assert flatten(layers, (1.0, 1.0, 1.0)) == pytest.approx((0.5, 0.25, 0.25))
    # an opaque layer hides everything below it, including the base
    assert flatten([(0.0, 0.0, 0.0, 0.5), (0.0, 0.0, 1.0, 1.0), (1, 0, 0, 1)], (1, 1, 1)) == pytest.approx(
        (0.0, 0.0, 0.5)
    )
    assert flatten([], (0.2, 0.3, 0.4)) == (0.2, 0.3, 0.4)


def test_with_alpha():
    assert with_alpha((0.1, 0.2, 0.3, 0.5), 0.5) == (0.1, 0.2, 0.3, 0.25)
    assert with_alpha((0.1, 0.2, 0.3), 0.4) == (0.1, 0.2, 0.3, 0.4)
