"""What themes' scripts do, checked against the scripts themselves running in Chromium.

The rest of tests/browser runs Chromium with page scripts off, so that the DOM is the static
HTML. Here scripts are on: the reference is the theme's own script (mkdocs-material's palette
script, MkDocs' theme js/base.js, the readthedocs theme's js/theme.js) and Chromium's painting
(screenshot pixels), compared with tinctura's static model of them
(tinctura.extract.behaviours, tinctura.extract.schemes, inset box shadows).
"""
from __future__ import annotations

import base64
import os
import subprocess
import sys
import time

import pytest

import chromium_reference as ref
import png
from tinctura.colour.convert import to_hex
from tinctura.engine import Options, Site

pytestmark = pytest.mark.slow

TABLE = """# Tide table

| Station | High water |
|---|---|
| North quay | 04:12 |
| Harbour mouth | 04:19 |
| Estuary gauge | 04:31 |
| Weir | 04:40 |
"""


def _build(tmp_path, config: str, page: str = TABLE):
    docs = tmp_path / "docs"
    docs.mkdir()
    (docs / "index.md").write_text(page, encoding="utf-8")
    (tmp_path / "mkdocs.yml").write_text(config, encoding="utf-8")
    site = tmp_path / "site"
    subprocess.run([sys.executable, "-m", "mkdocs", "build", "-q", "-f",
                    str(tmp_path / "mkdocs.yml"), "-d", str(site)],
                   check=True, env=dict(os.environ, NO_MKDOCS_2_WARNING="1"))
    return site


def _screenshot(driver):
    shot = driver.execute_cdp_cmd("Page.captureScreenshot",
                                  {"format": "png", "captureBeyondViewport": True})
    return png.decode(base64.b64decode(shot["data"]))


def _close(hex_a, hex_b, tolerance=2):
    a = [int(hex_a[i:i + 2], 16) for i in (1, 3, 5)]
    b = [int(hex_b[i:i + 2], 16) for i in (1, 3, 5)]
    return max(abs(x - y) for x, y in zip(a, b)) <= tolerance


_CELLS_JS = """
const out = [];
for (const td of document.querySelectorAll('table td')) {
  const r = td.getBoundingClientRect();
  let path = '', el = td;
  while (el && el.nodeType === 1) {
    let i = 1, sib = el;
    while ((sib = sib.previousElementSibling)) if (sib.tagName === el.tagName) i++;
    const same = el.parentElement ? Array.from(el.parentElement.children).filter(c => c.tagName === el.tagName).length : 1;
    path = '/' + el.tagName.toLowerCase() + (same > 1 ? '[' + i + ']' : '') + path;
    el = el.parentElement;
  }
  // the computed colour (alpha left out; compared with tinctura's computed colour)
  const c = getComputedStyle(td).color.match(/[\\d.]+/g).slice(0, 3).map(Number);
  const hex = '#' + c.map(v => Math.round(v).toString(16).padStart(2, '0')).join('');
  out.push([td.textContent.trim(), path, Math.round(r.left + 2), Math.round(r.top + 2), hex]);
}
return out;
"""


CELLS = {"North quay", "04:12", "Harbour mouth", "04:19", "Estuary gauge", "04:31", "Weir",
         "04:40"}


def _browser_cells(driver, url, media="light"):
    driver.execute_cdp_cmd("Emulation.setEmulatedMedia",
                           {"features": [{"name": "prefers-color-scheme", "value": media}]})
    driver.get(url)
    time.sleep(0.5)  # the theme's script runs on load
    driver.execute_script(
        "const s = new CSSStyleSheet(); s.replaceSync(arguments[0]);"
        "document.adoptedStyleSheets = [...document.adoptedStyleSheets, s];", ref.NO_TRANSITIONS)
    cells = driver.execute_script(_CELLS_JS)
    image = _screenshot(driver)
    return {text: (path, png.pixel(image, x, y), fg) for text, path, x, y, fg in cells
            if text in CELLS or text in ("shaded", "tinted", "plain")}


def _tinctura_cells(site, scheme):
    result = Site(str(site), Options(states=False)).check_page("index.html")
    scheme = scheme or result.schemes[0].name
    return {s.text: s for s in result.samples
            if s.scheme == scheme and s.xpath.split("/")[-1].startswith("td")
            and (s.text in CELLS or s.text in ("shaded", "tinted", "plain"))}


def test_mkdocs_theme_striped_tables(tmp_path):
    """js/base.js adds table-striped and table-hover; Bootstrap stripes odd rows with an inset
    box shadow (`inset 0 0 0 9999px`): the cell backgrounds tinctura computes are the pixels
    Chromium paints with the theme's script running."""
    site = _build(tmp_path, "site_name: Gauge\ntheme:\n  name: mkdocs\n")
    with ref.serve(site) as base, ref.browser(scripts=True) as driver:
        browser = _browser_cells(driver, base + "index.html")
    ours = _tinctura_cells(site, "light")
    assert len(browser) == 8 and set(browser) == set(ours)
    backgrounds = set()
    for text, (path, pixel, fg) in browser.items():
        assert ours[text].xpath == path
        assert _close(pixel, to_hex(ours[text].bg)), (text, pixel, to_hex(ours[text].bg))
        assert _close(fg, to_hex(ours[text].fg_raw[:3])), (text, fg)
        backgrounds.add(pixel)
    assert len(backgrounds) == 2  # striped: the script's classes took effect on both sides


def test_readthedocs_theme_wraps_and_stripes_tables(tmp_path):
    """js/theme_extra.js adds `docutils` to content tables and js/theme.js wraps them in
    div.wy-table-responsive: tinctura's XPaths and backgrounds are the browser's."""
    site = _build(tmp_path, "site_name: Gauge\ntheme:\n  name: readthedocs\n")
    with ref.serve(site) as base, ref.browser(scripts=True) as driver:
        browser = _browser_cells(driver, base + "index.html")
    ours = _tinctura_cells(site, "light")
    assert len(browser) == 8 and set(browser) == set(ours)
    assert all("/div/table" in path for path, _, _ in browser.values())
    for text, (path, pixel, fg) in browser.items():
        assert ours[text].xpath == path
        assert _close(pixel, to_hex(ours[text].bg)), (text, pixel, to_hex(ours[text].bg))
        assert _close(fg, to_hex(ours[text].fg_raw[:3])), (text, fg)
    assert len({pixel for _, pixel, _ in browser.values()}) == 2


MATERIAL_AUTO = """site_name: Gauge
theme:
  name: material
  font: false
  palette:
    - media: "(prefers-color-scheme)"
      toggle: {icon: material/brightness-auto, name: Follow the system}
    - media: "(prefers-color-scheme: light)"
      scheme: default
      primary: teal
      accent: amber
      toggle: {icon: material/brightness-7, name: Dark}
    - media: "(prefers-color-scheme: dark)"
      scheme: slate
      primary: teal
      accent: amber
      toggle: {icon: material/brightness-4, name: Light}
    - media: "(prefers-color-scheme: dark)"
      scheme: slate
      primary: teal
      accent: amber
      toggle: {icon: material/brightness-4, name: Light again}
"""


def test_material_script_wraps_tables_and_drops_no_js(tmp_path):
    """The bundle replaces `no-js` with `js` on <html> and wraps content tables in two divs:
    tinctura's XPaths, colours and html classes are the ones Chromium shows with it running."""
    site = _build(tmp_path, "site_name: Gauge\ntheme:\n  name: material\n  font: false\n")
    with ref.serve(site) as base, ref.browser(scripts=True) as driver:
        browser = _browser_cells(driver, base + "index.html")
        html_class = driver.execute_script("return document.documentElement.className")
    ours = _tinctura_cells(site, None)
    assert len(browser) == 8 and set(browser) == set(ours)
    for text, (path, pixel, fg) in browser.items():
        assert ours[text].xpath == path and "/article/div/div/table/" in path
        assert _close(pixel, to_hex(ours[text].bg)) and _close(fg, to_hex(ours[text].fg_raw[:3]))
    from tinctura.extract import behaviours
    from tinctura.extract.html import parse_html

    root = parse_html((site / "index.html").read_bytes())
    behaviours.apply(root)
    assert set(root.get("class").split()) == set(html_class.split())


def _load_preferring(driver, url: str, media: str) -> None:
    """Load ``url`` with the reader's preference ``media`` (light or dark) emulated, and give
    the theme's script time to apply it."""
    driver.execute_cdp_cmd("Emulation.setEmulatedMedia", {"features": [
        {"name": "prefers-color-scheme", "value": media}]})
    driver.get(url)
    time.sleep(0.5)


def test_material_automatic_palette_entry_resolves_like_the_theme_script(tmp_path):
    """With the automatic entry selected (the first, as on a first visit), the theme's script
    applies the light or the dark entry by the system preference: tinctura offers exactly those
    schemes, once each, and no scheme with the template's default colours."""
    site = _build(tmp_path, MATERIAL_AUTO)
    seen = {}
    with ref.serve(site) as base, ref.browser(scripts=True) as driver:
        for media in ("light", "dark"):
            _load_preferring(driver, base + "index.html", media)
            seen[media] = tuple(driver.execute_script(
                "return ['scheme', 'primary', 'accent'].map("
                "k => document.body.getAttribute('data-md-color-' + k))"))
    result = Site(str(site), Options(states=False)).check_page("index.html")
    ours = {(dict(s.media)["prefers-color-scheme"], tuple(v for _, _, v in s.attributes))
            for s in result.schemes}
    assert ours == {(media, attrs) for media, attrs in seen.items()}
    assert [s.name for s in result.schemes] == ["default", "slate"]


INSET = """<!doctype html><html><head><meta charset="utf-8"><style>
body { margin: 0; background: #ffffff; font: 20px "DejaVu Sans", sans-serif; }
td { color: #767676; padding: 8px; }
table { border-spacing: 0 16px; }
.whole td { box-shadow: inset 0 0 0 9999px rgba(0, 0, 0, 0.25); }
.tint td { box-shadow: inset 0 0 0 9999px rgba(0, 96, 255, 0.2), 0 0 6px #000; }
</style></head><body><table>
<tr class="whole"><td>shaded</td></tr><tr class="tint"><td>tinted</td></tr><tr><td>plain</td></tr>
</table></body></html>"""


def test_inset_shadow_backdrop_matches_the_screenshot(tmp_path):
    """CSS Backgrounds 3: an inset shadow paints above the background, below the content.
    #767676 on white is 4.54:1; under a 25 % black inset shadow the cell is #bfbfbf (2.47:1)."""
    (tmp_path / "index.html").write_text(INSET, encoding="utf-8")
    with ref.serve(tmp_path) as base, ref.browser() as driver:
        browser = _browser_cells(driver, base + "index.html")
    ours = _tinctura_cells(tmp_path, "light")
    for text in ("shaded", "tinted", "plain"):
        assert _close(browser[text][1], to_hex(ours[text].bg)), (text, browser[text][1])
        assert ours[text].xpath == browser[text][0]
    assert to_hex(ours["shaded"].bg) == "#bfbfbf"


TABS = """# Mounting

=== "Quay wall"

    Bolt the bracket to the quay wall.

=== "Pile"

    Clamp the bracket to the pile.
"""

_LABELS_JS = """
const out = [];
for (const label of document.querySelectorAll('.tabbed-labels > label')) {
  const el = label.firstElementChild || label;
  let path = '', up = el;
  while (up && up.nodeType === 1) {
    let i = 1, sib = up;
    while ((sib = sib.previousElementSibling)) if (sib.tagName === up.tagName) i++;
    const same = up.parentElement ? Array.from(up.parentElement.children).filter(c => c.tagName === up.tagName).length : 1;
    path = '/' + up.tagName.toLowerCase() + (same > 1 ? '[' + i + ']' : '') + path;
    up = up.parentElement;
  }
  const c = getComputedStyle(el).color.match(/[\\d.]+/g).slice(0, 3).map(Number);
  out.push([el.textContent.trim(), path, '#' + c.map(v => Math.round(v).toString(16).padStart(2, '0')).join('')]);
}
return out;
"""


def test_material_script_links_content_tab_labels(tmp_path):
    """The bundle wraps each content-tab label's content in a link (and marks the labels
    linked): the label texts tinctura checks are those links, with the browser's colours."""
    config = ("site_name: Gauge\ntheme:\n  name: material\n  font: false\nmarkdown_extensions:\n"
              "  - pymdownx.superfences\n  - pymdownx.tabbed:\n      alternate_style: true\n")
    site = _build(tmp_path, config, TABS)
    with ref.serve(site) as base, ref.browser(scripts=True) as driver:
        driver.get(base + "index.html")
        time.sleep(0.5)
        browser = {text: (path, fg) for text, path, fg in driver.execute_script(_LABELS_JS)}
    result = Site(str(site), Options(states=False)).check_page("index.html")
    ours = {s.text: s for s in result.samples if s.scheme == result.schemes[0].name}
    assert set(browser) == {"Quay wall", "Pile"}
    for text, (path, fg) in browser.items():
        assert path.endswith("/label[1]/a") or path.endswith("/label[2]/a"), path
        assert ours[text].xpath == path
        assert _close(fg, to_hex(ours[text].fg_raw[:3])), (text, fg)


def _sphinx(tmp_path, theme: str):
    """tests/data/sphinx_site built with ``theme``."""
    from pathlib import Path

    pytest.importorskip("sphinx")
    pytest.importorskip(theme)
    source = Path(__file__).resolve().parents[1] / "data" / "sphinx_site"
    out = tmp_path / theme
    subprocess.run([sys.executable, "-m", "sphinx", "-q", "-b", "html", "-D",
                    f"html_theme={theme}", str(source), str(out)], check=True)
    return out


# the table-of-contents entries a scroll spy marked as the section in view (class "active" in
# a nav or aside: pydata-sphinx-theme; "scroll-current": Furo)
_ACTIVE = "nav .active, aside .active, .scroll-current"


@pytest.mark.parametrize("theme", ["furo", "pydata_sphinx_theme"])
def test_sphinx_themes_scripts_set_data_theme_where_tinctura_sets_it(tmp_path, theme):
    """A theme's script gives the reader's preference to a data-theme attribute (Furo's on
    <body>, pydata-sphinx-theme's on <html>; the latter's stylesheets also carry Bootstrap's
    data-bs-theme selectors, which its script never uses). With the script running in Chromium and the preference emulated,
    the colours it paints are the ones tinctura finds in the scheme of that name."""
    site = _sphinx(tmp_path, theme)
    result = Site(str(site), Options(states=False, theme_behaviours=False)).check_page(
        "index.html")
    ours = {s.name: s for s in result.schemes}
    assert set(ours) == {"light", "dark"}
    mine = {(s.scheme, s.xpath): s for s in result.samples}
    with ref.serve(site) as base, ref.browser(scripts=True) as driver:
        for media in ("light", "dark"):
            _load_preferring(driver, base + "index.html", media)
            holders = driver.execute_script(
                "return [document.documentElement.getAttribute('data-theme'),"
                " document.body.getAttribute('data-theme')]")
            set_on = {"html": holders[0], "body": holders[1]}
            # (Furo's script writes "auto" and leaves the preference to its media queries)
            (element, attribute, value), = ours[media].attributes
            assert (attribute, value) == ("data-theme", media)
            assert set_on[element] in (media, "auto"), (holders, element)
            samples, _ = ref.collect_current(driver, states=())
            # the themes' scroll spies mark the section in view in the page's table of
            # contents: a change of their scripts' that tinctura does not model
            scrolled = set(ref.xpaths_of(driver, _ACTIVE))
            compared = disagree = 0
            for s in samples:
                if s["status"] != "determined" or s.get("pseudo") or \
                        any(s["xpath"].startswith(x) for x in scrolled):
                    continue
                found = mine.get((media, s["xpath"]))
                if found is None or found.status != "determined":
                    continue
                compared += 1
                if not (_close(to_hex(found.fg), s["fg"], 1) and
                        _close(to_hex(found.bg), s["bg"], 1)):
                    disagree += 1
            assert compared >= 20 and disagree <= 0.01 * compared, (media, compared, disagree)
