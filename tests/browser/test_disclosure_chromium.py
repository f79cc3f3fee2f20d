"""What a reader opens, against Chromium: closed <details> and content tabs on mkdocs-material.

Source of truth: Chromium (chromium_reference.py, page scripts off, the static DOM), with every
closed ``details`` opened (``details.open = true``) and each radio button of a tab set checked in
turn (``radio.checked = true``: the browser's own radio-group exclusivity), the texts it paints
then that it did not paint at rest, or paints in other colours, with their colours
(``collect.js``). tinctura must report the same texts in the state "shown", with the same
colours within 1/255 per channel, and no other.
"""
from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

import chromium_reference as ref
from tinctura.colour.convert import to_hex
from tinctura.engine import Options, check_paths

pytestmark = pytest.mark.slow

OPEN_DETAILS = "document.querySelectorAll('details:not([open])').forEach(d => { d.open = true; });"
# radios beside panels, as extract/disclosure.py takes for tabs
TAB_RADIOS = ("return Array.from(document.querySelectorAll('input[type=radio]'))"
              ".filter(r => r.parentElement.querySelector(':scope > :not(input):not(label)'))"
              ".map(r => Array.from(document.querySelectorAll('input[type=radio]')).indexOf(r));")
CHECK = "document.querySelectorAll('input[type=radio]')[arguments[0]].checked = true;"


def _key(s: dict) -> str:
    pseudo = s.get("pseudo") or ""
    return s["xpath"] + (f"::{pseudo.lstrip(':')}" if pseudo else "")


def _chromium_shown(site: Path, page: str) -> dict:
    """{key: sample} of the texts Chromium paints only (or otherwise) once opened, per scheme."""
    out = {}
    with ref.serve(site) as base, ref.browser() as driver:
        driver.get(base + page)
        ref._prepare(driver)
        for scheme in ref.discover_schemes(driver):
            ref.apply_scheme(driver, scheme)
            driver.get(base + page)  # a fresh DOM: nothing opened yet
            ref._prepare(driver)
            ref.apply_scheme(driver, scheme)
            rest, _ = ref.collect_current(driver, states=())
            at_rest = {_key(s): (s.get("fg"), s.get("bg")) for s in rest}
            shown = {}
            driver.execute_script(OPEN_DETAILS)
            for index in [None] + driver.execute_script(TAB_RADIOS):
                if index is not None:
                    driver.execute_script(CHECK, index)
                for s in ref.collect_current(driver, states=())[0]:
                    if at_rest.get(_key(s)) != (s.get("fg"), s.get("bg")):
                        shown.setdefault(_key(s), s)
            out[scheme["name"]] = shown
    return out


def _close(a: str, b: str) -> bool:
    return all(abs(int(a[i:i + 2], 16) - int(b[i:i + 2], 16)) <= 1 for i in (1, 3, 5))


def test_opened_details_and_tabs_agree_with_chromium(tmp_path):
    source = Path(__file__).resolve().parents[1] / "data" / "material_rich"
    site = tmp_path / "site"
    subprocess.run([sys.executable, "-m", "mkdocs", "build", "-q", "-f",
                    str(source / "mkdocs.yml"), "-d", str(site)],
                   check=True, env=dict(os.environ, NO_MKDOCS_2_WARNING="1"))
    theirs = _chromium_shown(site, "index.html")
    # the harness runs Chromium without page scripts: tinctura leaves theirs out too
    ours = check_paths([str(site / "index.html")], Options(jobs=1, theme_behaviours=False))
    mine = {}
    for s in ours.pages[0].samples:
        if s.state == "shown":
            mine.setdefault(s.scheme, {})[s.xpath] = s
    assert set(theirs) == set(mine)  # every scheme has something to open
    texts = set()
    for scheme, shown in theirs.items():
        determined = {k: s for k, s in shown.items() if s["status"] == "determined"}
        # One tab at a time, a browser also paints the first tab's label unselected; tinctura
        # shows every panel at once (every label selected), so it meets that label's
        # unselected colours only on the other labels at rest: the pair is judged there.
        at_rest = {(to_hex(x.fg), to_hex(x.bg)) for x in ours.pages[0].samples
                   if x.scheme == scheme and x.state == "rest" and x.status == "determined"}
        elsewhere = {k for k, s in determined.items()
                     if k not in mine[scheme] and (s["fg"], s["bg"]) in at_rest}
        assert determined and set(determined) - elsewhere <= set(mine[scheme]), scheme
        assert all(k.endswith("/label[1]") for k in elsewhere), elsewhere
        for key, s in determined.items():
            if key in elsewhere:
                continue
            m = mine[scheme][key]
            assert _close(to_hex(m.fg), s["fg"]) and _close(to_hex(m.bg), s["bg"]), \
                (scheme, key, to_hex(m.fg), to_hex(m.bg), s["fg"], s["bg"])
            texts.add(" ".join(m.text.split()))
        assert set(mine[scheme]) <= set(shown), (scheme, set(mine[scheme]) - set(shown))
    # the premise: the collapsed tip and the second tab's panel are among them
    assert {"Hidden until opened.", "Charge for six hours."} <= texts


MKDOCS_THEME = """site_name: Theme check
docs_dir: {docs}
theme:
  name: mkdocs
markdown_extensions: [admonition, tables, attr_list, md_in_html]
"""
TOGGLES = "return document.querySelectorAll('[data-bs-toggle=dropdown]').length;"
MENU_XPATHS = """
const out = [];
for (const m of document.querySelectorAll('.dropdown-menu.show')) {
  const parts = [];
  for (let n = m; n && n.nodeType === 1; n = n.parentElement) {
    const same = Array.from(n.parentElement ? n.parentElement.children : [n])
      .filter(c => c.tagName === n.tagName);
    parts.unshift(n.tagName.toLowerCase() + (same.length > 1 ? `[${same.indexOf(n) + 1}]` : ''));
  }
  out.push('/' + parts.join('/'));
}
return out;
"""


def test_menus_opened_by_the_themes_script_agree_with_chromium(tmp_path):
    """MkDocs' own theme: Bootstrap's script opens a navigation dropdown on a click (the menu
    gets "show"); Chromium runs it (page scripts on), each dropdown is clicked in turn, and the
    colours it paints in the open menu are those tinctura reports in the state "shown"."""
    cfg = tmp_path / "mkdocs.yml"
    cfg.write_text(MKDOCS_THEME.format(
        docs=Path(__file__).resolve().parents[2] / "example_site" / "docs"))
    site = tmp_path / "site"
    subprocess.run([sys.executable, "-m", "mkdocs", "build", "-q", "-f", str(cfg), "-d",
                    str(site)], check=True, env=dict(os.environ, NO_MKDOCS_2_WARNING="1"))
    theirs = {}
    with ref.serve(site) as base, ref.browser(scripts=True) as driver:
        driver.execute_cdp_cmd("Emulation.setEmulatedMedia", {"features": [
            {"name": "prefers-color-scheme", "value": "light"}]})
        driver.get(base + "index.html")
        ref._prepare(driver)
        toggles = driver.execute_script(TOGGLES)
        for n in range(toggles):
            driver.execute_script(
                "document.querySelectorAll('[data-bs-toggle=dropdown]')[arguments[0]].click();", n)
            (menu,) = driver.execute_script(MENU_XPATHS)  # the script opened exactly one
            for s in ref.collect_current(driver, states=())[0]:
                if s["xpath"].startswith(menu + "/") and s["status"] == "determined":
                    theirs[_key(s)] = s
    ours = check_paths([str(site / "index.html")], Options(jobs=1, states=False))
    mine = {s.xpath: s for p in ours.pages for s in p.samples
            if s.scheme == "light" and s.state == "shown"}
    assert toggles and len(theirs) >= 5  # the premise: a navigation of several entries
    assert set(theirs) == set(mine)
    for key, s in theirs.items():
        m = mine[key]
        assert _close(to_hex(m.fg), s["fg"]) and _close(to_hex(m.bg), s["bg"]), \
            (key, to_hex(m.fg), to_hex(m.bg), s["fg"], s["bg"])
