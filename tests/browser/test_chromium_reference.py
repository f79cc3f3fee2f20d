"""The Chromium harness on tiny pages whose colours the tests state from the CSS they wrote.

Sources: the expected colours follow from the CSS below by the compositing rules of CSS
Compositing and Blending Level 1 (W3C: simple alpha compositing, source-over) and CSS Color 4
(opacity applies to the element's whole group). Where the harness models painting (opacity,
translucent layers, the canvas), Chromium's own screenshot is the reference. Colour-space
conversions are checked against colour-science (general-purpose reference library); XPaths
against lxml's ``getpath``.
"""
from __future__ import annotations

import base64
import os

import lxml.html
import numpy as np
import pytest

import chromium_reference as ref
import png

PLAIN = [{"name": "light", "media": {"prefers-color-scheme": "light"}, "attributes": []}]
BLOCK = "\u2588"  # a full block glyph: its centre pixel is the text colour at full coverage


@pytest.fixture(scope="module")
def site(tmp_path_factory):
    root = tmp_path_factory.mktemp("site")
    with ref.serve(root) as base, ref.browser() as driver:
        yield root, base, driver


def load(site, name, html, schemes=PLAIN, states=()):
    """Write a page, collect it; returns {scheme name: (samples, skipped)}."""
    root, base, driver = site
    if "charset" not in html:  # the test server sends no charset; the glyphs are not ASCII
        html = html.replace("<head>", '<head><meta charset="utf-8">', 1)
    (root / name).write_text(html, encoding="utf-8")
    return {s["name"]: (samples, skipped)
            for s, samples, skipped in ref.collect_page(driver, base + name, states, schemes)}


def by_text(samples, text, state="rest"):
    found = [s for s in samples if s["text"].startswith(text) and s["state"] == state]
    assert len(found) == 1, (text, state, [(s["text"], s["state"]) for s in samples])
    return found[0]


def screenshot(driver):
    shot = driver.execute_cdp_cmd("Page.captureScreenshot", {"format": "png", "captureBeyondViewport": True})
    return png.decode(base64.b64decode(shot["data"]))


def close(hex_a, hex_b, tolerance=2):
    a = [int(hex_a[i:i + 2], 16) for i in (1, 3, 5)]
    b = [int(hex_b[i:i + 2], 16) for i in (1, 3, 5)]
    return max(abs(x - y) for x, y in zip(a, b)) <= tolerance


# ---- colours stated from the CSS --------------------------------------------------------------

STATED = """<!doctype html><html><head><style>
body { margin: 0; background: #ffffff; color: #000000; font: 16px sans-serif; }
.grey { color: #777; }
.black { background: #000000; }
.half { opacity: 0.5; }
.white { color: #ffffff; }
.veil { background: rgba(255, 255, 255, 0.5); }
.ink { color: rgba(0, 0, 0, 0.5); }
.red { background: #ff0000; }
.mix { color: color-mix(in srgb, #6b7280 50%, #ffffff); }
.fill { color: #000000; -webkit-text-fill-color: #0000ff; }
.big { font-size: 24px; font-weight: 700; }
</style></head><body>
<p class="grey">grey on white</p>
<div class="black"><div class="half"><p class="white">white at half opacity over black</p></div></div>
<div class="black"><div class="veil"><p>black on a half-white veil over black</p></div></div>
<div class="red"><p class="ink">half-black ink on red</p></div>
<p class="mix">mixed grey</p>
<p class="fill">filled blue</p>
<p class="big">big bold</p>
</body></html>"""


def test_colours_stated_from_css(site):
    samples, _ = load(site, "stated.html", STATED)["light"]
    s = by_text(samples, "grey on white")
    assert (s["fg"], s["bg"], s["status"]) == ("#777777", "#ffffff", "determined")
    # white faded to 50 % over black: 0.5 in every channel (source-over)
    s = by_text(samples, "white at half")
    assert s["fg_float"] == pytest.approx([0.5] * 3) and s["bg"] == "#000000"
    # a 50 % white layer over black: background 0.5 grey, text black above it
    s = by_text(samples, "black on a half-white")
    assert s["bg_float"] == pytest.approx([0.5] * 3) and s["fg"] == "#000000"
    # 50 % black over red: (0.5, 0, 0)
    s = by_text(samples, "half-black ink")
    assert s["fg_float"] == pytest.approx([0.5, 0, 0]) and s["bg"] == "#ff0000"
    # CSS Color 5: color-mix in srgb averages the encoded channels: (107+255)/2, (114+255)/2, (128+255)/2
    s = by_text(samples, "mixed grey")
    assert s["fg_float"] == pytest.approx([362 / 510, 369 / 510, 383 / 510], abs=1e-6)
    # the fill colour paints the glyphs when it differs from color
    assert by_text(samples, "filled blue")["fg"] == "#0000ff"
    s = by_text(samples, "big bold")
    assert (s["font_size_px"], s["font_weight"]) == (24.0, 700)


# ---- painting checked against Chromium's screenshot ------------------------------------------

PAINT = """<!doctype html><html><head><style>
body { margin: 0; background: #ffffff; font: 40px/1.2 "DejaVu Sans", sans-serif; }
.case { padding: 20px; }
.a { background: #000000; } .a > div { opacity: 0.5; } .a p { color: #ffffff; margin: 0; }
.b { background: #336699; } .b > div { background: rgba(255, 255, 255, 0.5); }
.b p { color: rgba(0, 0, 0, 0.6); margin: 0; }
.c { background: #ffcc00; opacity: 0.8; } .c > div { background: rgba(0, 0, 255, 0.5); opacity: 0.5; }
.c p { color: #ffffff; margin: 0; }
.case > div { padding: 20px; }
.d { background: rgba(0, 128, 0, 0.3); } .d p { color: #802020; margin: 0; }
p span { display: inline-block; }
</style></head><body>
<div class="case a" id="a"><div><p><span>A</span>BLOCK</p></div></div>
<div class="case b" id="b"><div><p><span>B</span>BLOCK</p></div></div>
<div class="case c" id="c"><div><p><span>C</span>BLOCK</p></div></div>
<div class="case d" id="d"><p><span>D</span>BLOCK</p></div>
</body></html>""".replace("BLOCK", BLOCK)


def _probe(driver, case_id):
    """Screen pixels: the glyph's centre (text) and a point in the innermost box's padding."""
    return driver.execute_script("""
      const c = document.getElementById(arguments[0]), span = c.querySelector('span');
      const g = span.getBoundingClientRect(), p = c.querySelector('p').getBoundingClientRect();
      return [Math.round(g.right + 12), Math.round((g.top + g.bottom) / 2), Math.round(p.left + 5), Math.round(p.top - 10)];
    """, case_id)


@pytest.mark.parametrize("case", ["a", "b", "c", "d"])
def test_compositing_matches_screenshot(site, case):
    samples, _ = load(site, "paint.html", PAINT)["light"]
    s = {x["xpath"]: x for x in samples if x["text"] == BLOCK}
    driver = site[2]
    image = screenshot(driver)
    tx, ty, bx, by = _probe(driver, case)
    index = "abcd".index(case) + 1
    sample = s[f"/html/body/div[{index}]" + ("/div/p" if case != "d" else "/p")]
    assert close(png.pixel(image, tx, ty), sample["fg"]), (png.pixel(image, tx, ty), sample["fg"])
    # the point 10 px above the paragraph lies in the padding of the innermost layer
    assert close(png.pixel(image, bx, by), sample["bg"]), (png.pixel(image, bx, by), sample["bg"])


CANVAS_DARK = """<!doctype html><html><head><style>
:root { color-scheme: dark; } body { margin: 0; font: 40px "DejaVu Sans", sans-serif; }
p { margin: 20px; color: #ffffff; }
</style></head><body><p>BLOCK</p></body></html>""".replace("BLOCK", BLOCK)

BODY_PROPAGATES = """<!doctype html><html><head><style>
body { margin: 0; background: #000000; opacity: 0.5; font: 40px "DejaVu Sans", sans-serif; }
p { margin: 20px; color: #ffffff; }
</style></head><body><p>BLOCK</p></body></html>""".replace("BLOCK", BLOCK)


@pytest.mark.parametrize("name, html, stated", [
    ("canvas-dark.html", CANVAS_DARK, {"fg": "#ffffff"}),
    # white faded to 50 % over the black canvas: 0.5 grey
    ("propagates.html", BODY_PROPAGATES, {"bg": "#000000", "fg_float": [0.5, 0.5, 0.5]}),
])
def test_canvas_matches_screenshot(site, name, html, stated):
    """The dark canvas colour, and the body background painting the canvas (CSS Backgrounds 3,
    root element backgrounds): opacity on body does not fade the canvas."""
    dark = [{"name": "dark", "media": {"prefers-color-scheme": "dark"}, "attributes": []}]
    (s,) = load(site, name, html, schemes=dark)["dark"][0]
    for key, value in stated.items():
        assert s[key] == (pytest.approx(value) if isinstance(value, list) else value)
    image = screenshot(site[2])
    assert close(png.pixel(image, 600, 5), s["bg"], tolerance=1)
    x, y = site[2].execute_script(
        "const r = document.querySelector('p').getBoundingClientRect();"
        "return [Math.round(r.left + 12), Math.round((r.top + r.bottom) / 2)];")
    assert close(png.pixel(image, x, y), s["fg"])


# ---- what counts as rendered text -------------------------------------------------------------

HIDDEN = """<!doctype html><html><head><style>
.vh { position: absolute; width: 1px; height: 1px; overflow: hidden; clip: rect(0 0 0 0); }
.vh2 { position: absolute; clip-path: inset(50%); }
</style><title>not text</title></head><body>
<p style="display:none">gone</p>
<div style="display:none"><p>gone inside</p></div>
<p style="visibility:hidden">invisible</p>
<p hidden>hidden attribute</p>
<div style="opacity:0"><p>transparent</p></div>
<p><span class="vh">clipped</span>shown</p>
<span class="vh2">clipped too</span>
<details><summary>summary shown</summary><p>closed content</p></details>
<script>var x = "script text";</script>
<noscript>no script</noscript>
<svg width="100" height="40"><title>svg title</title><text x="0" y="20">svg text</text></svg>
<p>  </p>
</body></html>"""


def test_hidden_text_is_skipped_and_counted(site):
    samples, skipped = load(site, "hidden.html", HIDDEN)["light"]
    assert sorted(s["text"] for s in samples) == ["shown", "summary shown", "svg text"]
    assert skipped == {"display-none": 2, "visibility": 1, "hidden-attribute": 1, "opacity": 1,
                       "clipped": 2, "closed-details": 1}
    assert by_text(samples, "svg text")["kind"] == "svg-text"


# ---- undetermined backgrounds ----------------------------------------------------------------

UNDETERMINED = """<!doctype html><html><head><style>
body { background: #ffffff; }
.g { background-image: linear-gradient(90deg, #ffffff, #000000); color: #777777; }
.i { background: #ffffff url("nothing.png"); }
.s { text-shadow: 0 0 2px #000; }
.covered { background: linear-gradient(#000, #fff); } .covered p { background: #ffffff; }
</style></head><body>
<div class="g"><p>on a gradient</p></div>
<div class="i"><p>on an image</p></div>
<p class="s">with a shadow</p>
<div class="covered"><p>covered gradient</p></div>
</body></html>"""


def test_gradients_images_and_effects_are_undetermined(site):
    samples, _ = load(site, "undetermined.html", UNDETERMINED)["light"]
    g = by_text(samples, "on a gradient")
    assert (g["status"], g["reason"]) == ("undetermined", "gradient")
    # the text over each stop: #777777 over #ffffff and over #000000
    assert [(x["stop"], x["fg"], x["bg"]) for x in g["stops"]] == [
        ("#ffffff", "#777777", "#ffffff"), ("#000000", "#777777", "#000000")]
    assert by_text(samples, "on an image")["reason"] == "image"
    assert by_text(samples, "with a shadow")["reason"] == "text-shadow"
    # an opaque layer above the gradient hides it
    c = by_text(samples, "covered gradient")
    assert (c["status"], c["bg"]) == ("determined", "#ffffff")


# ---- XPaths agree with lxml -------------------------------------------------------------------

XPATHS = """<!doctype html><html><head></head><body>
<div><p>one</p></div>
<div><p>a</p><p>b</p><p>c</p><span>s</span></div>
<table><tbody><tr><td>cell</td></tr></tbody></table>
<svg width="50" height="20"><g><text y="10">t1</text><text y="20">t2</text></g></svg>
</body></html>"""


def test_xpaths_match_lxml_getpath(site):
    samples, _ = load(site, "xpaths.html", XPATHS)["light"]
    got = {s["text"]: s["xpath"] for s in samples}
    assert got["c"] == "/html/body/div[2]/p[3]"
    assert got["s"] == "/html/body/div[2]/span"
    tree = lxml.html.fromstring(XPATHS).getroottree()
    for el in tree.iter():
        if isinstance(el.tag, str) and el.text and el.text.strip() and el.tag not in ("head", "title"):
            assert got[el.text.strip()] == tree.getpath(el), el.text


# ---- generated text, controls and forced states ---------------------------------------------------

STATES = """<!doctype html><html><head><style>
body { background: #ffffff; color: #000000; }
a { color: #0000ee; }
a:hover { color: #ff0000; }
a:not(.in-box):focus { color: #ffffff; background: #000000; }
.nav:hover span { color: #00aa00; }
.skip { opacity: 0; } .skip:focus { opacity: 1; }
.note::before { content: "Note: "; color: #999999; }
button:disabled { color: #aaaaaa; }
.row:hover { background: #ffff00; }
.box:focus-within { background: #00ffff; }
</style></head><body>
<div class="row"><a class="in-row" href="#r">row link</a></div>
<div class="box"><a class="in-box" href="#b">box link</a></div>
<p><a href="#x">plain link</a></p>
<p><a class="nav" href="#y"><span>nested label</span></a></p>
<p><a class="skip" href="#z">skip link</a></p>
<p class="note">generated</p>
<button>steady</button> <button disabled>off</button>
</body></html>"""


def test_forced_states_and_generated_text(site):
    samples, _ = load(site, "states.html", STATES, states=("hover", "focus"))["light"]
    assert by_text(samples, "plain link")["fg"] == "#0000ee"
    assert by_text(samples, "plain link", "hover")["fg"] == "#ff0000"
    focus = by_text(samples, "plain link", "focus")
    assert (focus["fg"], focus["bg"]) == ("#ffffff", "#000000")
    # the label inside the hovered link changes with it
    assert by_text(samples, "nested label", "hover")["fg"] == "#00aa00"
    # invisible at rest, shown on focus
    assert not [s for s in samples if s["text"] == "skip link" and s["state"] == "rest"]
    assert by_text(samples, "skip link", "focus")["fg"] == "#ffffff"
    # nothing changes on the plain button: no state samples
    assert [s["state"] for s in samples if s["text"] == "steady"] == ["rest"]
    assert by_text(samples, "off")["disabled"] is True
    # a pointer over the link also hovers its row; focus sets :focus-within on the ancestors
    assert by_text(samples, "row link", "hover")["bg"] == "#ffff00"
    assert by_text(samples, "box link", "focus")["bg"] == "#00ffff"
    assert by_text(samples, "box link", "rest")["bg"] == "#ffffff"
    gen = [s for s in samples if s["kind"] == "generated"]
    assert [(s["text"], s["pseudo"], s["fg"]) for s in gen] == [("Note:", "::before", "#999999")]


# ---- schemes ------------------------------------------------------------------------------------

MATERIAL_LIKE = """<!doctype html><html><head><style>
body { background: #ffffff; color: #111111; }
[data-md-color-scheme="slate"] { background: #202020; color: #eeeeee; }
@media (prefers-color-scheme: dark) { .m { color: #cccccc; } }
</style></head>
<body data-md-color-scheme="default" data-md-color-primary="indigo" data-md-color-accent="indigo">
<form><input class="md-option" data-md-color-media="(prefers-color-scheme: light)" data-md-color-scheme="default"
 data-md-color-primary="indigo" data-md-color-accent="indigo" type="radio" name="p">
<input class="md-option" data-md-color-media="(prefers-color-scheme: dark)" data-md-color-scheme="slate"
 data-md-color-primary="teal" data-md-color-accent="lime" type="radio" name="p"></form>
<p>body text</p><p class="m">media text</p></body></html>"""


def test_material_palette_schemes(site):
    got = load(site, "material.html", MATERIAL_LIKE, schemes=None)
    assert list(got) == ["default", "slate"]
    light, dark = got["default"][0], got["slate"][0]
    assert (by_text(light, "body text")["fg"], by_text(light, "body text")["bg"]) == ("#111111", "#ffffff")
    assert (by_text(dark, "body text")["fg"], by_text(dark, "body text")["bg"]) == ("#eeeeee", "#202020")
    assert by_text(light, "media text")["fg"] == "#111111"
    assert by_text(dark, "media text")["fg"] == "#cccccc"


def test_scheme_names_when_entries_share_a_scheme(site):
    html = MATERIAL_LIKE.replace('data-md-color-scheme="slate"\n data-md-color-primary="teal"',
                                 'data-md-color-scheme="default"\n data-md-color-primary="teal"')
    assert list(load(site, "material2.html", html, schemes=None)) == ["default/indigo", "default/teal"]


def test_media_and_bootstrap_schemes(site):
    plain = ("<!doctype html><html><head><style>@media (prefers-color-scheme: dark) "
             "{ body { background: #000; color: #fff; } }</style></head><body><p>t</p></body></html>")
    got = load(site, "plain.html", plain, schemes=None)
    assert {k: (v[0][0]["fg"], v[0][0]["bg"]) for k, v in got.items()} == {
        "light": ("#000000", "#ffffff"), "dark": ("#ffffff", "#000000")}
    boot = ('<!doctype html><html data-bs-theme="light"><head><style>[data-bs-theme="dark"] body '
            "{ background: #111; color: #eee; }</style></head><body><p>t</p></body></html>")
    got = load(site, "boot.html", boot, schemes=None)
    assert {k: v[0][0]["bg"] for k, v in got.items()} == {"light": "#ffffff", "dark": "#111111"}


# ---- colour spaces against colour-science ---------------------------------------------------

def _colour_science_srgb(kind, values):
    os.environ.setdefault("COLOUR_SCIENCE__FILTER_USAGE_WARNINGS", "True")  # no matplotlib here
    import colour

    d50 = colour.CCS_ILLUMINANTS["CIE 1931 2 Degree Standard Observer"]["D50"]
    if kind == "lab":
        xyz = colour.Lab_to_XYZ(np.array(values), illuminant=d50)
        rgb = colour.XYZ_to_sRGB(xyz, illuminant=d50, chromatic_adaptation_transform="Bradford")
    elif kind == "oklab":
        rgb = colour.XYZ_to_sRGB(colour.Oklab_to_XYZ(np.array(values)))
    elif kind == "display-p3":
        rgb = colour.RGB_to_RGB(np.array(values), "Display P3", "sRGB", apply_cctf_decoding=True,
                                apply_cctf_encoding=True)
    return np.clip(rgb, 0, 1)


@pytest.mark.parametrize("css, kind, values", [
    ("lab(50 20 -30)", "lab", [50, 20, -30]),
    ("lab(72 -18 25)", "lab", [72, -18, 25]),
    ("oklab(0.6 0.05 -0.08)", "oklab", [0.6, 0.05, -0.08]),
    ("oklch(0.7 0.1 150)", "oklab", [0.7, 0.1 * np.cos(np.radians(150)), 0.1 * np.sin(np.radians(150))]),
    ("color(display-p3 0.4 0.6 0.3)", "display-p3", [0.4, 0.6, 0.3]),
])
def test_colour_spaces_against_colour_science(site, css, kind, values):
    samples, _ = load(site, "space.html", f'<!doctype html><p style="color: {css}">x</p>')["light"]
    expected = _colour_science_srgb(kind, values)
    assert samples[0]["fg_float"] == pytest.approx(list(expected), abs=2e-3)
