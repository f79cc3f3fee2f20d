"""Fixes as tinctura writes them, cascaded by Chromium: an override that leaves out the elements
of a rule it would otherwise take over (``a:hover:where(:not(.menu a))``, no specificity
added by ``:where``) colours the texts Chromium colours with it, and no others; a focus ring's
fix by its colour alone (``outline-color``) keeps the ring Chromium draws.

Source of truth: Chromium's computed colours with ``:hover`` forced (chromium_reference.py).
"""
from __future__ import annotations

import io
import json
import sys
from pathlib import Path

from chromium_reference import run_site
from tinctura.cli import main
from tinctura.colour.convert import to_hex
from tinctura.engine import Options, check_paths

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
from test_problems_end_to_end import MENU_CSS, MENU_PAGE  # noqa: E402


def test_a_fix_that_keeps_out_of_a_menu_cascades_as_in_chromium(tmp_path):
    site = tmp_path / "site"
    site.mkdir()
    (site / "site.css").write_text(MENU_CSS)
    (site / "p0").mkdir()
    (site / "p0" / "index.html").write_text(MENU_PAGE.format(n=0))
    out = tmp_path / "report.json"
    main(["check", str(site), "--no-config", "--select", "TC100", "--fail-on", "never",
          "--format", f"json:{out}"], stdout=io.StringIO(), stderr=io.StringIO())
    (problem,) = json.loads(out.read_text())["problems"]
    css = problem["fix"]["css"]
    assert ":where(:not(.menu a))" in css
    (site / "site.css").write_text(MENU_CSS + css)
    chromium = {(r["xpath"], r.get("state", "rest")): r["fg"]
                for r in run_site(site, states=("hover",))
                if r["type"] == "sample" and r["scheme"] == "light" and r["xpath"].endswith("/a")}
    ours = {(s.xpath, s.state): to_hex(s.fg)
            for p in check_paths([str(site)], Options(jobs=1, keep_samples=True)).pages
            for s in p.samples if s.xpath.endswith("/a")}
    menu, content = "/html/body/nav/a", "/html/body/p/a"
    # where hovering changes nothing, both keep the resting sample only (the harness and
    # tinctura alike)
    assert chromium.get((menu, "hover"), chromium[(menu, "rest")]) == \
        ours.get((menu, "hover"), ours[(menu, "rest")]) == "#d9d9d9"
    assert chromium[(content, "hover")] == ours[(content, "hover")] == \
        css.split("color: ")[1][:7]


def test_a_fix_by_style_attribute_cascades_as_in_chromium(tmp_path):
    # the fix for a colour pasted as a style attribute names that attribute as written, with
    # ``i`` (Selectors 4: the value compared ASCII case-insensitively) and ``!important`` (an
    # author's important declaration beats a style attribute's normal one, CSS Cascade 5):
    # Chromium gives the pasted spans the new colour on every page, and leaves the span whose
    # style attribute sets only a background as it was
    from test_problems_end_to_end import _inline_site

    site = tmp_path / "site"
    site.mkdir()
    _inline_site(site)
    out = tmp_path / "report.json"
    main(["check", str(site), "--no-config", "--select", "TC100", "--fail-on", "never",
          "--format", f"json:{out}"], stdout=io.StringIO(), stderr=io.StringIO())
    (problem,) = json.loads(out.read_text())["problems"]
    css = problem["fix"]["css"]
    (site / "site.css").write_text((site / "site.css").read_text() + css)
    new = css.split("{")[1].split("color: ")[1][:7]  # (the selector holds "color: " too)
    chromium = {(r["page"], r["xpath"]): r["fg"] for r in run_site(site)
                if r["type"] == "sample" and r["scheme"] == "light"
                and r["xpath"].endswith("/span")}
    ours = {(p.page, s.xpath): to_hex(s.fg)
            for p in check_paths([str(site)], Options(jobs=1, keep_samples=True)).pages
            for s in p.samples if s.xpath.endswith("/span")}
    assert chromium == ours
    for n in range(3):
        pasted = f"/html/body/p[{n + 1}]/span"
        banded = f"/html/body/p[{n + 2}]/span"
        assert chromium[(f"p{n}/index.html", pasted)] == new
        assert chromium[(f"p{n}/index.html", banded)] == "#222222"


def test_a_focus_ring_fix_keeps_the_ring_in_chromium(tmp_path):
    # a theme's `outline: 3px solid #cccccc` (1.6:1 on white) fixed by its colour alone in the
    # writer's stylesheet, loaded after the theme's: Chromium still draws the ring, solid and
    # 3px wide, in the fix's colour, as tinctura's check with the fix applied says
    import re

    import chromium_reference as ref
    from test_fix_verification_causes import RING, RING_CSS, _site

    site = _site(tmp_path, RING_CSS, RING)
    out = tmp_path / "report.json"
    main(["check", str(site), "--no-config", "--select", "TC110", "--fail-on", "never",
          "--no-states", "--format", f"json:{out}"], stdout=io.StringIO(), stderr=io.StringIO())
    (problem,) = json.loads(out.read_text())["problems"]
    css = problem["fix"]["css"]
    colour = re.search(r"outline-color: (#[0-9a-f]{6})", css).group(1)
    (site / "fixes.css").write_text(css)
    page = site / "p0" / "index.html"
    page.write_text(page.read_text().replace(
        '<link rel="stylesheet" href="../site.css">',
        '<link rel="stylesheet" href="../site.css"><link rel="stylesheet" href="../fixes.css">'))
    with ref.serve(site) as base, ref.browser() as driver:
        driver.get(base + "p0/index.html")
        drawn = driver.execute_script(
            "const a = document.querySelector('main a'); a.focus();"
            "const s = getComputedStyle(a);"
            "return [a.matches(':focus-visible'), s.outlineStyle, s.outlineWidth, s.outlineColor];")
    hexed = "#" + "".join(f"{int(v):02x}" for v in re.findall(r"\d+", drawn[3])[:3])
    assert drawn[:3] == [True, "solid", "3px"] and hexed == colour, drawn
    ring = [s for p in check_paths([str(site)], Options(jobs=1)).pages
            for s in p.samples if s.kind == "focus-ring" and s.page == "p0/index.html"]
    assert [to_hex(s.fg) for s in ring] == [colour]


TIDE_CSS = """body { background: #ffffff; color: #111111; }
.dusk { background: #222222; }
.dawn { background: #eeeeee; }
.tide-note { color: #777777; }
"""
TIDE_PAGE = """<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Tide notes</title>
<link rel="stylesheet" href="site.css"></head><body><main>
<div class="dusk"><p class="tide-note">High water at the north quay after dusk.</p>
<p>Moorings are lit.</p></div>
<div class="dawn"><p class="tide-note">Low water at the south quay before dawn.</p></div>
</main></body></html>"""


def test_a_fix_per_background_beats_the_texts_own_rule_as_in_chromium(tmp_path):
    # one grey on a dark and on a light panel: no one colour passes on both, so each panel
    # gets its own value. Set on the panel alone it would reach only texts without a colour
    # rule of their own; the note has one (`.tide-note`), so the fix names it below the
    # panel's rule too (more specific than it). Chromium gives each note its panel's value,
    # and the panel's other text the value on the panel (inherited).
    site = tmp_path / "site"
    site.mkdir()
    (site / "site.css").write_text(TIDE_CSS)
    (site / "index.html").write_text(TIDE_PAGE)
    out = tmp_path / "report.json"
    main(["check", str(site), "--no-config", "--select", "TC100", "--fail-on", "never",
          "--format", f"json:{out}"], stdout=io.StringIO(), stderr=io.StringIO())
    problems = json.loads(out.read_text())["problems"]  # (the body's text on .dusk too)
    fixes = {p["bg_cause"]["declaration"]["selector"]: p["fix"] for p in problems
             if p["fg_cause"]["declaration"]["selector"] == ".tide-note"}
    assert set(fixes) == {".dusk", ".dawn"} and all(f["verified"] for f in fixes.values())
    assert fixes[".dusk"]["css"].startswith(".dusk .tide-note, .dusk {")
    (site / "site.css").write_text(TIDE_CSS + "".join(f["css"] for f in fixes.values()))
    chromium = {r["xpath"]: r["fg"] for r in run_site(site)
                if r["type"] == "sample" and r["scheme"] == "light"}
    value = {name: fix["css"].split("color: ")[1][:7] for name, fix in fixes.items()}
    assert chromium["/html/body/main/div[1]/p[1]"] == value[".dusk"]
    assert chromium["/html/body/main/div[1]/p[2]"] == value[".dusk"]  # .dusk's, inherited
    assert chromium["/html/body/main/div[2]/p"] == value[".dawn"]
