"""The predicate-based fix search (fix.nearest_foreground_where / nearest_background_where).

The WCAG 2.2 ratio from tests/wcag_reference.py judges the suggestions; the closed-form search
(fix.nearest_passing_foreground) is the comparison for a ratio-only test.
"""
import pytest
from wcag_reference import ratio

from tinctura.colour import fix
from tinctura.colour.convert import to_hex


class AtLeast:
    """A hashable test: the WCAG ratio reaches ``required``."""

    def __init__(self, required):
        self.required = required

    def __call__(self, text, background):
        return ratio(text, background) >= self.required

    def __eq__(self, other):
        return isinstance(other, AtLeast) and other.required == self.required

    def __hash__(self):
        return hash(self.required)


GREY, WHITE, NIGHT = (0x8a / 255,) * 3, (1.0, 1.0, 1.0), (0x22 / 255,) * 3


def test_a_passing_colour_is_kept():
    found = fix.nearest_foreground_where((0.2, 0.2, 0.2), [WHITE], AtLeast(4.5))
    assert found[0] == (0.2, 0.2, 0.2)


def test_ratio_only_test_agrees_with_the_closed_form():
    found = fix.nearest_foreground_where(GREY, [WHITE], AtLeast(4.5))
    closed = fix.nearest_passing_foreground(GREY, WHITE, 4.5)
    assert ratio(found[0], WHITE) >= 4.5
    # the walk settles within one 8-bit step of the exact answer (#767676, 4.54:1)
    assert abs(int(to_hex(found[0])[1:3], 16) - int(to_hex(closed[0])[1:3], 16)) <= 1


def test_every_background_is_met_or_none():
    found = fix.nearest_foreground_where(GREY, [WHITE, (0.9, 0.9, 0.9)], AtLeast(4.5))
    assert all(ratio(found[0], bg) >= 4.5 for bg in (WHITE, (0.9, 0.9, 0.9)))
    # no grey reaches 7:1 on both white and black (L <= 0.1 and L >= 0.3 at once)
    assert fix.nearest_foreground_where(GREY, [WHITE, (0.0, 0.0, 0.0)], AtLeast(7.0)) is None


def test_background_search_swaps_the_roles():
    text, panel = (0x77 / 255,) * 3, (0x33 / 255,) * 3  # 3.3:1 (WCAG 2.2 formula)
    found = fix.nearest_background_where(text, panel, AtLeast(4.5))
    assert ratio(text, found[0]) >= 4.5 and found[0][0] < panel[0]  # a darker panel


def test_hue_is_kept():
    red = (0.9, 0.1, 0.1)
    found = fix.nearest_foreground_where(red, [WHITE], AtLeast(7.0))
    r, g, b = found[0]
    assert r > g and r > b and ratio(found[0], WHITE) >= 7.0
