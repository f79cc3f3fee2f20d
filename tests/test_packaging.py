"""The wheel carries every subpackage under the one namespace `tinctura`."""
import pathlib
import subprocess
import sys
import zipfile

import pytest

ROOT = pathlib.Path(__file__).resolve().parents[1]


def _packages_on_disk():
    found = set()
    for base, name in ((ROOT / "src" / "tinctura", "tinctura"), (ROOT / "rules", "tinctura.rules"),
                       (ROOT / "plugin", "tinctura.plugin")):
        for init in base.rglob("__init__.py"):
            rel = init.parent.relative_to(base)
            found.add(".".join([name, *rel.parts]) if rel.parts else name)
    return found


@pytest.mark.slow
def test_wheel_contains_every_subpackage(tmp_path):
    subprocess.run([sys.executable, "-m", "pip", "wheel", "--no-deps", "--no-build-isolation",
                    "-q", "-w", str(tmp_path), str(ROOT)], check=True)
    wheel = next(tmp_path.glob("tinctura-*.whl"))
    names = zipfile.ZipFile(wheel).namelist()
    in_wheel = {n.rsplit("/", 1)[0].replace("/", ".") for n in names if n.endswith("__init__.py")}
    assert _packages_on_disk() <= in_wheel
    assert "tinctura/data/user-agent.css" in names
    assert "tinctura/data/report-schema.json" in names
    assert not any(n.startswith(("rules/", "plugin/")) for n in names)


def test_mkdocs_floor_turns_the_plugin_off_with_enabled():
    """The README turns the plugin off with `enabled: !ENV [CI, false]`, an option MkDocs
    itself handles for every plugin since 1.6.0 (MkDocs' release notes, recalled from memory).
    MkDocs 1.5.3 warned "Unrecognised configuration name: enabled" and ran the plugin anyway
    (tests/test_plugin.py::test_enabled_is_left_to_mkdocs under 1.5.3, 2026-12-05), so the
    package does not accept it."""
    import re

    text = (ROOT / "pyproject.toml").read_text(encoding="utf-8")
    floor = re.search(r'"mkdocs>=(\d+)\.(\d+)', text)
    assert floor is not None, "the mkdocs requirement names its lowest version"
    assert (int(floor.group(1)), int(floor.group(2))) >= (1, 6)
