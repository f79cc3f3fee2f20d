"""The audit report in a real browser (headless Chromium), offline and with scripts allowed:
hostile page text runs nothing, nothing is fetched, the swatches draw, both schemes apply."""
from __future__ import annotations

import io
import sys
from pathlib import Path

from chromium_reference import browser

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "report"))
from test_report_html import build  # noqa: E402

from tinctura.model import Cause, Declaration  # noqa: E402
from tinctura.report.scope import Scope  # noqa: E402
from tinctura.rules.examples import make_sample  # noqa: E402

ATTACK = ('<script>window.ran = 1; document.title = "ran"</script>'
          '<img src="x" onerror="window.ran = 2">" onfocus="window.ran = 3" autofocus x="'
          "<svg onload=\"window.ran = 4\"></svg>")


def hostile_report(tmp_path) -> Path:
    cause = Cause(Declaration("color", ATTACK, ATTACK, 3, ATTACK, "author"))
    samples = [make_sample("#999", "white", page=ATTACK + ".html", text=ATTACK,
                           fg_cause=cause, scheme=ATTACK),
               make_sample("#777", "#fafafa", page="b.html", text="Neap tide " + ATTACK)]
    html, _, _ = build(samples, scope=Scope(paths=[ATTACK], title=ATTACK))
    path = tmp_path / "audit.html"
    path.write_text(html, encoding="utf-8")
    return path


def test_offline_no_script_runs_and_swatches_draw(tmp_path):
    path = hostile_report(tmp_path)
    control = tmp_path / "control.html"
    control.write_text("<!doctype html><title>c</title><script>window.ran = 1</script>")
    with browser(scripts=True) as driver:
        driver.execute_cdp_cmd("Network.emulateNetworkConditions", {
            "offline": True, "latency": 0, "downloadThroughput": 0, "uploadThroughput": 0})
        driver.get(control.as_uri())  # scripts do run in this browser
        assert driver.execute_script("return window.ran") == 1
        driver.get(path.as_uri())
        assert driver.execute_script("return window.ran === undefined")
        assert driver.execute_script("return document.scripts.length") == 0
        assert driver.title.startswith("Colour contrast audit: ")
        resources = driver.execute_script(
            "return performance.getEntriesByType('resource').map(e => e.name)")
        assert all(name.startswith("data:") for name in resources), resources
        drawn = driver.execute_script(
            "return [...document.images].map(i => i.complete && i.naturalWidth > 0)")
        assert drawn and all(drawn)
        assert ATTACK in driver.execute_script("return document.body.innerText")


def test_both_colour_schemes_apply(tmp_path):
    path = hostile_report(tmp_path)
    backgrounds = {}
    with browser() as driver:
        for scheme in ("light", "dark"):
            driver.execute_cdp_cmd("Emulation.setEmulatedMedia", {
                "features": [{"name": "prefers-color-scheme", "value": scheme}]})
            driver.get(path.as_uri())
            backgrounds[scheme] = driver.execute_script(
                "return getComputedStyle(document.body).backgroundColor")
        driver.execute_cdp_cmd("Emulation.setEmulatedMedia", {
            "media": "print", "features": [{"name": "prefers-color-scheme", "value": "dark"}]})
        driver.get(path.as_uri())
        printed = driver.execute_script("return getComputedStyle(document.body).backgroundColor")
    assert backgrounds["light"] == "rgb(255, 255, 255)"
    assert backgrounds["dark"] == "rgb(21, 23, 28)"  # #15171c, the report's dark page
    assert printed == "rgb(255, 255, 255)"  # paper stays white whatever the screen prefers
