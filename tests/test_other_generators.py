"""Sites built by another generator work with no setting: Sphinx with the furo theme, whose
colour schemes come from a `data-theme` attribute on <body> together with
prefers-color-scheme media queries, and with pydata-sphinx-theme, whose come from one on
<html>."""
import subprocess
import sys
from pathlib import Path

import pytest

from tinctura.colour.convert import to_hex
from tinctura.engine import Options, check_paths

SOURCE = Path(__file__).resolve().parent / "data" / "sphinx_site"
pytestmark = pytest.mark.slow


@pytest.fixture(scope="module")
def sphinx_site(tmp_path_factory):
    pytest.importorskip("sphinx")
    pytest.importorskip("furo")
    out = tmp_path_factory.mktemp("sphinx")
    subprocess.run([sys.executable, "-m", "sphinx", "-q", "-b", "html", str(SOURCE), str(out)],
                   check=True)
    return out


def test_sphinx_furo_schemes_and_planted_fault(sphinx_site):
    report = check_paths([str(sphinx_site)], Options(jobs=1))
    assert {s.name for s in report.schemes} == {"light", "dark"}
    faint = [f for f in report.findings if f.sample.text == "Faint planted text."]
    # WCAG 2.2 formula: #aaaaaa on furo's light background #ffffff = 2.32:1
    assert [(f.sample.scheme, to_hex(f.sample.fg)) for f in faint if f.sample.scheme == "light"] \
        == [("light", "#aaaaaa")]
    assert not any(d.severity == "error" for p in report.pages for d in p.diagnostics)
    # Furo's script changes nothing tinctura leaves unmodelled (its scroll spy's mark is
    # walked: tests/browser/test_scroll_spies_chromium.py): no note
    assert not [d for p in report.pages for d in p.diagnostics if "furo theme" in d.message]


def test_sphinx_fixes_go_into_the_writers_stylesheet_not_the_themes(sphinx_site, tmp_path):
    # The site lists its own _static/lamp.css (html_css_files); furo writes its stylesheets to
    # _static/styles/ and Sphinx its _static/pygments.css, which every build writes again.
    # Fixes go into lamp.css: checked overrides, and the advice rules' values for furo's
    # declarations; a declaration of lamp.css itself is changed where it is.
    import io
    import json

    from tinctura.cli import main

    out = io.StringIO()
    status = main(["check", str(sphinx_site), "--fail-on", "never", "--format", "json",
                   "--write-fixes", str(tmp_path / "fixes.css")], stdout=out,
                  stderr=(err := io.StringIO()))
    assert status == 0, err.getvalue()
    problems = json.loads(out.getvalue())["problems"]
    overrides = [p["fix"]["file"] for p in problems if p["fix"]]
    advice = [p["fix_at_cause"] for p in problems if (p["fix_at_cause"] or {}).get("own_css")]
    themes = {f["declaration"]["sheet"] for f in advice}
    assert overrides and set(overrides) == {"_static/lamp.css"}
    assert {"_static/styles/furo.css", "_static/pygments.css"} <= themes
    assert {f["own_css"]["file"] for f in advice} == {"_static/lamp.css"}
    lamp = [p for p in problems if p["rule"] == "TC100"
            and (p["fix_at_cause"] or {}).get("declaration", {}).get("sheet") == "_static/lamp.css"]
    assert lamp and not lamp[0]["fix_at_cause"].get("own_css")  # edited in place
    assert "html_css_files" in err.getvalue() and "mkdocs.yml" not in err.getvalue()


def test_pydata_sphinx_theme_dark_mode_and_what_its_script_does(tmp_path):
    # pydata-sphinx-theme's script sets data-theme on <html> (its stylesheets also hold
    # Bootstrap's unused data-bs-theme selectors): the dark scheme is the theme's dark mode
    # (tests/browser/test_theme_scripts.py compares it with Chromium running the script)
    pytest.importorskip("sphinx")
    pytest.importorskip("pydata_sphinx_theme")
    out = tmp_path / "pydata"
    subprocess.run([sys.executable, "-m", "sphinx", "-q", "-b", "html", "-D",
                    "html_theme=pydata_sphinx_theme", str(SOURCE), str(out)], check=True)
    report = check_paths([str(out)], Options(jobs=1, states=False))
    assert [(s.name, s.attributes) for s in report.schemes] == [
        ("light", (("html", "data-theme", "light"),)), ("dark", (("html", "data-theme", "dark"),))]
    dark = {to_hex(s.bg) for p in report.pages for s in p.samples if s.scheme == "dark"}
    assert dark and "#ffffff" not in dark  # (its light look, white, showed before)
    notes = [d.message for p in report.pages for d in p.diagnostics if "theme:" in d.message]
    assert notes == ["pydata-sphinx-theme theme: the theme's script also shows the nested "
                     "entries of the table-of-contents entry in view and darkens dropdown menus "
                     "in the dark scheme; those looks are not checked"]
    # its Jinja macros, copied into _static/, are no page
    macros = [p for p in report.pages if p.page == "_static/webpack-macros.html"]
    assert [p.skipped for p in macros] == [{"unrendered template": 1}]
