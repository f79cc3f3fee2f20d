"""The maintainer's loop on the example site (mkdocs-material), through the plugin:
record a baseline, then edits elsewhere and reordered pages pass, a new planted fault fails,
and a suppression comment in the Markdown silences exactly its element."""
import json
import os
import pathlib
import shutil
import subprocess
import sys

import jsonschema
import pytest

from tinctura.report.json_report import expand

EXAMPLE = pathlib.Path(__file__).resolve().parents[2] / "example_site"
SARIF_SCHEMA = pathlib.Path(__file__).resolve().parents[1] / "data" / "sarif-schema-2.1.0.json"
FAINT = "Fault: the sensor cable is rated for 12 m of water and no more."


def build(project, options: str, config: str | None = None):
    config = config or (EXAMPLE / "mkdocs.yml").read_text(encoding="utf-8")
    config = config.replace("      fail_on: never\n", options)
    (project / "mkdocs.yml").write_text(config, encoding="utf-8")
    env = dict(os.environ, NO_MKDOCS_2_WARNING="1")
    return subprocess.run([sys.executable, "-m", "mkdocs", "build", "-q"], cwd=project, env=env,
                          capture_output=True, text=True, timeout=600)


@pytest.mark.slow
def test_baseline_and_suppression_on_the_example_site(tmp_path):
    shutil.copytree(EXAMPLE / "docs", tmp_path / "docs")
    text_md = tmp_path / "docs" / "faults" / "text.md"
    (tmp_path / "ci").mkdir()
    gate = ("      jobs: 1\n      baseline: ci/base.json\n"
            "      report: [sarif-findings:ci/r.sarif, json:ci/r.json]\n")
    done = build(tmp_path, "      fail_on: never\n      jobs: 1\n"
                           "      report: [baseline:ci/base.json, sarif-findings:ci/r.sarif, html:ci/r.html,"
                           " sarif:ci/p.sarif]\n")
    assert done.returncode == 0, done.stderr
    # the plugin's audit report records how the run was made: the site and its title
    audit = (tmp_path / "ci" / "r.html").read_text()
    assert 'id="scope"' in audit and "Tidewell" in audit and "not recorded" not in audit
    sarif = json.loads((tmp_path / "ci" / "r.sarif").read_text())
    jsonschema.validate(sarif, json.loads(SARIF_SCHEMA.read_text()))
    results = sarif["runs"][0]["results"]
    assert results and all(r["partialFingerprints"]["tinctura/v1"] for r in results)
    assert {r["locations"][0]["physicalLocation"]["artifactLocation"]["uri"]
            for r in results} >= {"docs/faults/text.md", "docs/faults/schemes.md"}
    # the planted fault points at its line in the Markdown (found in the file itself)
    line = next(n for n, text in enumerate(text_md.read_text().splitlines(), 1) if FAINT in text)
    faint = [r["locations"][0]["physicalLocation"] for r in results
             if FAINT[:30] in r["message"]["text"] and r["ruleId"] == "TC100"]
    assert faint and all(p["artifactLocation"]["uri"] == "docs/faults/text.md"
                         and p["region"]["startLine"] == line for p in faint)

    # by problem: one result each (far fewer), at its worst occurrence's Markdown line
    by_problem = json.loads((tmp_path / "ci" / "p.sarif").read_text())
    jsonschema.validate(by_problem, json.loads(SARIF_SCHEMA.read_text()))
    grouped = by_problem["runs"][0]["results"]
    assert 0 < len(grouped) < len(results) / 5
    assert all(r["partialFingerprints"]["tinctura-problem/v1"] for r in grouped)
    assert sum(r["properties"]["occurrences"] for r in grouped) == len(results)
    (faint_problem,) = [r for r in grouped if r["ruleId"] == "TC100" and r["locations"][0][
        "physicalLocation"] == {"artifactLocation": {"uri": "docs/faults/text.md"},
                                "region": {"startLine": line}}]
    assert "Fix:" in faint_problem["message"]["text"]

    # a paragraph added above the faults, and two pages swapped in the navigation
    text_md.write_text(text_md.read_text().replace(
        "## Faint text", "A note on units: metres and volts.\n\n## Faint text"))
    nav = (EXAMPLE / "mkdocs.yml").read_text()
    swapped = nav.replace("      - Text colours: faults/text.md\n", "").replace(
        "      - Hidden text: faults/hidden.md\n",
        "      - Hidden text: faults/hidden.md\n      - Text colours: faults/text.md\n")
    assert swapped != nav
    done = build(tmp_path, gate, swapped)
    assert done.returncode == 0, done.stderr

    # a new planted fault fails the build
    text_md.write_text(text_md.read_text() + '\n<p class="tw-faint">Keep the lid shut.</p>\n')
    assert build(tmp_path, gate, swapped).returncode == 1

    # a suppression comment silences exactly the element after it
    text_md.write_text(text_md.read_text().replace(
        '\n<p class="tw-faint">Keep the lid shut.</p>',
        '\n<!-- tinctura: allow TC100 reason="lid label mirrors the printed decal" -->\n'
        '<p class="tw-faint">Keep the lid shut.</p>'))
    assert build(tmp_path, gate, swapped).returncode == 0
    report = json.loads((tmp_path / "ci" / "r.json").read_text())
    suppressed = [(f["text"], f.get("suppressed")) for f in expand(report) if f.get("suppressed")]
    assert suppressed == [("Keep the lid shut.", "lid label mirrors the printed decal")]
    faint = [f for f in expand(report) if f["text"].startswith(FAINT[:30])]
    assert faint and all(f["baseline"] == "unchanged" for f in faint)
