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
