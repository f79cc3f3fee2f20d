"""What form fields show as text: an input's value, a text area's text, a closed drop-down's
selected option, a list box's rows (its options, its option groups' labels); a placeholder only
when the field is empty.

Source: HTML Living Standard (the select element: with no option marked selected, the first
is shown; the last marked one wins; ``multiple`` or a ``size`` above 1 makes a list box; an
option's ``label`` is shown instead of its text; the placeholder shows while the value is
empty). Their colours are compared with Chromium in tests/browser/test_form_controls_chromium.py.
"""
import pytest

from tinctura import engine

PAGE = "<!doctype html><html><head><title>Fields</title></head><body><form>{}</form></body></html>"


def shown(tmp_path, body) -> list:
    page = tmp_path / "index.html"
    page.write_text(PAGE.format(body), encoding="utf-8")
    report = engine.check_paths([str(page)], engine.Options(jobs=1, states=False))
    return [(s.kind, s.text) for p in report.pages for s in p.samples]


@pytest.mark.parametrize("body, expected", [
    ("<select><option>North</option><option>South</option></select>", [("value", "North")]),
    ("<select><option selected>North</option><option selected>South</option></select>",
     [("value", "South")]),
    ('<select><option label="N">North pier</option></select>', [("value", "N")]),
    # a list box: every option a row (its label if it has one), option groups' labels too
    ("<select multiple><option>North</option></select>", [("value", "North")]),
    ('<select size="3"><option label="N">North pier</option><option>South</option></select>',
     [("value", "N"), ("value", "South")]),
    ('<select size="2"><optgroup label="Piers"><option>North</option></optgroup></select>',
     [("value", "Piers"), ("value", "North")]),
    # an option with a label and no text: its label, in the second list box too (whose style
    # is known from the first: the walk once skipped the element as empty)
    ('<select size="2"><option label="N"></option></select>'
     '<select size="2"><option label="S"></option></select>', [("value", "N"), ("value", "S")]),
    ('<select size="1"><option>North</option><option>South</option></select>',
     [("value", "North")]),  # a size of 1: a drop-down
    ("<select></select>", []),
    ("<textarea>Swell  from\nthe west</textarea>", [("value", "Swell from the west")]),
    ('<textarea placeholder="Your note"></textarea>', [("placeholder", "Your note")]),
    ('<input value=" " placeholder="Berth">', []),  # a blank value hides the placeholder
    ('<input placeholder="Berth">', [("placeholder", "Berth")]),
])
def test_what_a_field_shows(tmp_path, body, expected):
    assert shown(tmp_path, body) == expected
