"""Form controls without author colours, enabled and disabled, light and dark, against Chromium.

No standard fixes how a browser colours a button or a disabled field: tinctura's user-agent
stylesheet follows Chromium (common browser practice). Source of truth: headless Chromium's
computed ``color`` and ``background-color`` of each control, composited by the test over the
page's canvas and then the control's background (CSS Compositing and Blending Level 1, simple
alpha compositing, source-over), against the colours of tinctura's sample of the control's
text (a button's label, an input's value, a text area's text, a drop-down's selected option). Found on MkDocs sites themed by mkdocs-bootswatch,
whose disabled buttons tinctura drew in grey on grey (#808080 on #efefef) where Chromium draws
translucent ink (#b4b4b4 on #fafafa on white).
"""
from __future__ import annotations

import pytest

import chromium_reference as ref
from tinctura.colour.convert import to_hex
from tinctura.engine import Options, check_paths

CONTROLS = """<!doctype html><html><head><meta charset="utf-8"><title>Gate controls</title>{style}
</head><body><form>
<button id="open" type="button">Open the gate</button>
<button id="close" type="button" disabled>Close the gate</button>
<input id="submit" type="submit" value="Log the tide" disabled>
<input id="reset" type="reset" value="Clear" disabled>
<input id="field" value="Berth 4">
<input id="locked" value="Berth 9" disabled>
<textarea id="note">Swell from the west</textarea>
<textarea id="sealed" disabled>Swell from the east</textarea>
<select id="pier"><option>North pier</option><option selected>South pier</option></select>
<select id="shut" disabled><option>East pier</option></select>
</form></body></html>"""
DARK = "<style>:root { color-scheme: dark; }</style>"
IDS = ("open", "close", "submit", "reset", "field", "locked", "note", "sealed", "pier", "shut")


def _over(top, under):
    a = top[3]
    return tuple(a * t + (1 - a) * u for t, u in zip(top[:3], under[:3]))


def _rgba(css: str) -> tuple:
    """``rgb(r, g, b)`` or ``rgba(r, g, b, a)`` as getComputedStyle writes it, in 0..1."""
    parts = [float(p) for p in css[css.index("(") + 1:-1].split(",")]
    alpha = parts[3] if len(parts) == 4 else 1.0
    return tuple(p / 255 for p in parts[:3]) + (alpha,)


def _chromium(driver, url, focus=None) -> dict:
    """Chromium's computed colour and background of each element with an id (the element
    ``focus`` names focused first), and the page's canvas."""
    driver.get(url)
    if focus:
        driver.execute_script(f"document.getElementById('{focus}').focus()")
    found = driver.execute_script(
        "const out = {canvas: getComputedStyle(document.documentElement).backgroundColor};"
        "for (const el of document.querySelectorAll('[id]')) {"
        "  const s = getComputedStyle(el); out[el.id] = [s.color, s.backgroundColor]; }"
        "return out;")
    return found


def _light_and_dark(root, page: str):
    """``page`` written as light.html and, under ``color-scheme: dark``, dark.html."""
    (root / "light.html").write_text(page.format(style=""), encoding="utf-8")
    (root / "dark.html").write_text(page.format(style=DARK), encoding="utf-8")
    return root


@pytest.fixture(scope="module")
def pages(tmp_path_factory):
    root = _light_and_dark(tmp_path_factory.mktemp("controls"), CONTROLS)
    with ref.serve(root) as base, ref.browser() as driver:
        chromium = {name: _chromium(driver, f"{base}/{name}") for name in ("light.html",
                                                                          "dark.html")}
    report = check_paths([str(root)], Options(jobs=1, exemptions=(), states=False))
    ours = {}
    for page in report.pages:
        for s in page.samples:
            ours[(s.page, s.xpath.rsplit("/", 1)[-1])] = s
    return chromium, ours


# Chromium paints an html element without a background with the canvas of its used colour
# scheme: white, and #121212 under `color-scheme: dark` (tinctura's system colour table, which
# records the same measurement)
CANVAS = {"light.html": (1.0, 1.0, 1.0), "dark.html": (18 / 255, 18 / 255, 18 / 255)}


@pytest.mark.parametrize("page", ["light.html", "dark.html"])
def test_controls_are_coloured_as_chromium_colours_them(pages, page):
    chromium, ours = pages
    steps = {"open": "button[1]", "close": "button[2]", "submit": "input[1]",
             "reset": "input[2]", "field": "input[3]", "locked": "input[4]",
             "note": "textarea[1]", "sealed": "textarea[2]", "pier": "select[1]",
             "shut": "select[2]"}
    for ident in IDS:
        colour, background = (_rgba(v) for v in chromium[page][ident])
        bg = _over(background, CANVAS[page])
        fg = _over(colour, bg)
        sample = ours[(page, steps[ident])]
        if ident == "pier":  # a closed drop-down shows its selected option
            assert sample.text == "South pier"
        expected = (to_hex(fg), to_hex(bg))
        got = (to_hex(sample.fg), to_hex(sample.bg))
        assert _near(got[0], expected[0]) and _near(got[1], expected[1]), (page, ident, got,
                                                                           expected)


def _near(a: str, b: str, tolerance: int = 1) -> bool:
    return all(abs(int(a[i:i + 2], 16) - int(b[i:i + 2], 16)) <= tolerance for i in (1, 3, 5))


# List boxes (a select with `multiple` or a size above 1) show their options as rows: each
# row's text on the row's background (a selected row highlighted, differently while the list
# box has focus), over the list box's. Chromium's computed colours, as above.
LIST_BOXES = """<!doctype html><html><head><meta charset="utf-8"><title>Berth lists</title>{style}
</head><body><form>
<select id="berths" size="3"><option id="b1">North berth</option>
<option id="b2" selected>South berth</option><option id="b3" disabled>East berth</option>
<option id="b4" label="West berth"></option><option id="b5" label="Quay berth"></option></select>
<select id="lights" multiple><optgroup id="g1" label="Flashing"><option id="l1">Red flash</option>
<option id="l2" selected>Green flash</option></optgroup>
<optgroup id="g2" label="Fixed" disabled><option id="l3">White light</option></optgroup></select>
</form></body></html>"""
ROWS = {"b1": "select[1]/option[1]", "b2": "select[1]/option[2]", "b3": "select[1]/option[3]",
        "b4": "select[1]/option[4]", "b5": "select[1]/option[5]",
        "g1": "select[2]/optgroup[1]", "l1": "select[2]/optgroup[1]/option[1]",
        "l2": "select[2]/optgroup[1]/option[2]", "g2": "select[2]/optgroup[2]",
        "l3": "select[2]/optgroup[2]/option"}
UNDER = {"b": "berths", "g": "lights", "l": "lights"}  # each row's list box


@pytest.fixture(scope="module")
def list_boxes(tmp_path_factory):
    root = _light_and_dark(tmp_path_factory.mktemp("list-boxes"), LIST_BOXES)
    with ref.serve(root) as base, ref.browser() as driver:
        chromium = {(name, focus): _chromium(driver, f"{base}/{name}", focus)
                    for name in ("light.html", "dark.html") for focus in (None, "berths")}
    report = check_paths([str(root)], Options(jobs=1, exemptions=(), states=True))
    ours = {}
    for page in report.pages:
        for s in page.samples:
            ours[(s.page, s.state, s.xpath.split("/body/form/", 1)[-1])] = s
    return chromium, ours


def _expected(chromium: dict, page: str, row: str) -> tuple:
    canvas = CANVAS[page]
    box = _over(_rgba(chromium[UNDER[row[0]]][1]), canvas)
    bg = _over(_rgba(chromium[row][1]), box)
    return to_hex(_over(_rgba(chromium[row][0]), bg)), to_hex(bg)


@pytest.mark.parametrize("page", ["light.html", "dark.html"])
def test_list_box_rows_are_coloured_as_chromium_colours_them(list_boxes, page):
    chromium, ours = list_boxes
    for row, step in ROWS.items():
        sample = ours[(page, "rest", step)]
        expected = _expected(chromium[(page, None)], page, row)
        got = (to_hex(sample.fg), to_hex(sample.bg))
        assert _near(got[0], expected[0]) and _near(got[1], expected[1]), (page, row, got,
                                                                           expected)
    assert ours[(page, "rest", ROWS["g1"])].text == "Flashing"  # an optgroup shows its label
    # an option with a label and no text shows its label, coloured as a row
    assert [ours[(page, "rest", ROWS[b])].text for b in ("b4", "b5")] == ["West berth",
                                                                           "Quay berth"]
    # a drop-down's options are not rows: its closed box shows the selected one (above)
    assert not any(key[2].startswith("select[3]") for key in ours)


@pytest.mark.parametrize("page", ["light.html", "dark.html"])
def test_focused_list_box_highlights_as_chromium_does(list_boxes, page):
    chromium, ours = list_boxes
    sample = ours[(page, "focus", ROWS["b2"])]  # the selected row of the focused list box
    expected = _expected(chromium[(page, "berths")], page, "b2")
    assert (_near(to_hex(sample.fg), expected[0]) and _near(to_hex(sample.bg), expected[1])), \
        (page, to_hex(sample.fg), to_hex(sample.bg), expected)
    assert expected != _expected(chromium[(page, None)], page, "b2")  # the premise
