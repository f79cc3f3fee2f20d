"""Sites built by another generator work with no setting: Sphinx with the furo theme, whose
colour schemes come from a `data-theme` attribute on <body> together with
prefers-color-scheme media queries."""
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
