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


def _chromium(driver, url) -> dict:
    driver.get(url)
    found = driver.execute_script(
        "const out = {canvas: getComputedStyle(document.documentElement).backgroundColor};"
        "for (const el of document.querySelectorAll('[id]')) {"
        "  const s = getComputedStyle(el); out[el.id] = [s.color, s.backgroundColor]; }"
        "return out;")
    return found


@pytest.fixture(scope="module")
def pages(tmp_path_factory):
    root = tmp_path_factory.mktemp("controls")
    (root / "light.html").write_text(CONTROLS.format(style=""), encoding="utf-8")
    (root / "dark.html").write_text(CONTROLS.format(style=DARK), encoding="utf-8")
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
