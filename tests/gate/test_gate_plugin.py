"""The plugin takes the same baseline, report and selection options as the command line."""
import json
import os
import subprocess
import sys

import pytest

PAGE = ("# Casting\n\nLet the mould cool for three days.\n{: .faint }\n\n"
        "Lift the bell with the overhead crane.\n")


def build(project, **options):
    lines = ["site_name: Kestrow handbook", "theme: {name: mkdocs}", "extra_css: [extra.css]",
             "markdown_extensions: [attr_list]", "plugins:", "  - tinctura:",
             "      states: false", "      jobs: 1"]
    lines += [f"      {key}: {json.dumps(value)}" for key, value in options.items()]
    (project / "mkdocs.yml").write_text("\n".join(lines) + "\n")
    env = dict(os.environ, NO_MKDOCS_2_WARNING="1")
    return subprocess.run([sys.executable, "-m", "mkdocs", "build", "-q"], cwd=project, env=env,
                          capture_output=True, text=True, timeout=300)


@pytest.mark.slow
def test_plugin_baseline_gates_only_new_findings(tmp_path):
    docs = tmp_path / "docs"
    docs.mkdir()
    (docs / "extra.css").write_text(".faint { color: #949494; }\n")  # 3.03:1 on white (WCAG)
    (docs / "index.md").write_text(PAGE)
    assert build(tmp_path).returncode == 1  # fail_on: error (the theme adds findings too)
    done = build(tmp_path, fail_on="never", report=["baseline:ci/base.json"])
    assert done.returncode == 1 and "cannot write" in done.stderr  # no ci/ folder: named
    (tmp_path / "ci").mkdir()
    assert build(tmp_path, fail_on="never", report=["baseline:ci/base.json"]).returncode == 0
    recorded = json.loads((tmp_path / "ci" / "base.json").read_text())["findings"]
    assert "Let the mould cool for three days." in [e["text"] for e in recorded]

    (docs / "index.md").write_text("Wear leather gloves.\n\n" + PAGE)
    assert build(tmp_path, baseline="ci/base.json").returncode == 0
    (docs / "index.md").write_text(PAGE + "\nPolish the crown last.\n{: .faint }\n")
    done = build(tmp_path, baseline="ci/base.json")
    assert done.returncode == 1 and "1 contrast finding at or above" in done.stderr
    assert f"1 new, {len(recorded)} unchanged (not failing), 0 gone" in done.stderr
    assert build(tmp_path, baseline="ci/base.json", severity={"TC100": "warning"}).returncode == 0
