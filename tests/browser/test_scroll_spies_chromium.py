"""Scroll spies: the table-of-contents entry a theme's script marks as the section in view,
against Chromium running the theme's own script and scrolled to a section.

Source of truth: the colours Chromium paints for the marked entry's link once the page is
scrolled (this folder's harness, chromium_reference.collect_current, with page scripts on),
against tinctura's sample of that link in the state "current" (its look marked), or at rest
where marking changes nothing. The marks themselves (which element, which class) are read from
the scrolled page and compared with tinctura's table (extract/behaviours.py).
"""
from __future__ import annotations

import os
import subprocess
import sys
import time

import pytest

import chromium_reference as ref
from tinctura.colour.convert import to_hex
from tinctura.engine import Options, Site

pytestmark = pytest.mark.slow

WORDS = "Read the gauge at slack water and log the height against the quay datum. " * 25
SECTIONS = range(1, 7)
MARKDOWN = "# Gauge book\n\n" + "\n\n".join(
    f"## Section {n}\n\n{WORDS}\n\n{WORDS}\n\n{WORDS}" for n in SECTIONS)
RST = "Gauge book\n==========\n\n" + "\n\n".join(
    f"Section {n}\n---------\n\n{WORDS}\n\n{WORDS}\n\n{WORDS}" for n in SECTIONS)
# what each theme's scroll spy adds, and where (read from the scrolled page below)
MARKED = {"mkdocs-material": "md-nav__link--active", "mkdocs": "active", "furo": "scroll-current",
          "pydata_sphinx_theme": "active"}


def _mkdocs(tmp_path, theme: str):
    docs = tmp_path / "docs"
    docs.mkdir()
    (docs / "index.md").write_text(MARKDOWN, encoding="utf-8")
    (docs / "other.md").write_text(MARKDOWN.replace("Gauge book", "Quay book"), encoding="utf-8")
    name = "material" if theme == "mkdocs-material" else theme
    (tmp_path / "mkdocs.yml").write_text(f"site_name: Gauges\ntheme:\n  name: {name}\n",
                                         encoding="utf-8")
    site = tmp_path / "site"
    subprocess.run([sys.executable, "-m", "mkdocs", "build", "-q", "-f",
                    str(tmp_path / "mkdocs.yml"), "-d", str(site)],
                   check=True, env=dict(os.environ, NO_MKDOCS_2_WARNING="1"))
    return site


def _sphinx(tmp_path, theme: str):
    pytest.importorskip("sphinx")
    pytest.importorskip(theme)
    source = tmp_path / "src"
    source.mkdir()
    (source / "conf.py").write_text('project = "Gauges"\n', encoding="utf-8")
    (source / "index.rst").write_text(RST, encoding="utf-8")
    out = tmp_path / "out"
    subprocess.run([sys.executable, "-m", "sphinx", "-q", "-b", "html", "-D",
                    f"html_theme={theme}", str(source), str(out)], check=True)
    return out


def _scrolled(site, mark: str):
    """Chromium's samples of index.html scrolled to Section 4, its scripts running, and the
    XPaths its scroll spy marked."""
    with ref.serve(site) as base, ref.browser(scripts=True) as driver:
        driver.execute_cdp_cmd("Emulation.setEmulatedMedia", {"features": [
            {"name": "prefers-color-scheme", "value": "light"}]})
        driver.get(base + "index.html")
        time.sleep(0.5)
        driver.execute_script("document.getElementById('section-4').scrollIntoView()")
        time.sleep(1.0)
        marked = ref.xpaths_of(driver, f".{mark}")
        samples, _ = ref.collect_current(driver, states=())
    return samples, marked


@pytest.mark.parametrize("theme", ["mkdocs-material", "mkdocs", "furo", "pydata_sphinx_theme"])
def test_the_entry_in_view_looks_as_chromium_paints_it(tmp_path, theme):
    site = _sphinx(tmp_path, theme) if theme in ("furo", "pydata_sphinx_theme") \
        else _mkdocs(tmp_path, theme)
    chromium, marked = _scrolled(site, MARKED[theme])
    result = Site(str(site), Options()).check_page("index.html")
    ours = {(s.state, s.xpath): s for s in result.samples if s.scheme == "light"}
    # the entry of Section 4, as Chromium paints it scrolled there (its text: a link, or a
    # span in it; MkDocs' theme gives it a text shadow, which the harness calls undetermined:
    # the colours are compared all the same)
    entry = [s for s in chromium if s.get("text") == "Section 4" and s.get("fg")
             and any(s["xpath"].startswith(x) for x in marked)]
    assert entry, (marked, theme)
    changed = 0
    for s in entry:
        mine = ours.get(("current", s["xpath"]))
        changed += mine is not None
        mine = mine or ours.get(("rest", s["xpath"]))  # marking changes nothing it shows
        assert mine is not None, s["xpath"]
        assert _near(to_hex(mine.fg), s["fg"]) and _near(to_hex(mine.bg), s["bg"]), \
            (theme, s["xpath"], to_hex(mine.fg), to_hex(mine.bg), s["fg"], s["bg"])
    # every theme here but MkDocs' own colours the entry in view otherwise (its look there:
    # the same colour)
    assert bool(changed) == (theme != "mkdocs"), theme


def test_no_entry_is_marked_at_rest_nor_without_states(tmp_path):
    # the marks are walked in turn and taken off: the resting samples are the page's own;
    # with states off (--no-states) no entry is walked marked
    site = _sphinx(tmp_path, "furo")
    with_states = Site(str(site), Options()).check_page("index.html")
    without = Site(str(site), Options(states=False)).check_page("index.html")
    rest = sorted((s.scheme, s.xpath, s.kind, s.fg, s.bg) for s in with_states.samples
                  if s.state == "rest")
    assert rest == sorted((s.scheme, s.xpath, s.kind, s.fg, s.bg) for s in without.samples)
    assert any(s.state == "current" for s in with_states.samples)


def _near(a: str, b: str, tolerance: int = 1) -> bool:
    return all(abs(int(a[i:i + 2], 16) - int(b[i:i + 2], 16)) <= tolerance for i in (1, 3, 5))
