"""tinctura's static cascade against headless Chromium on the example site, per scheme.

Source of truth: Chromium's computed `color`, backgrounds and opacity, painted by the harness in
chromium_reference.py (the reference engine). At least 99 % of the samples both sides call
determined must agree within 1/255 per channel; every disagreement is printed.
"""
from __future__ import annotations

import pytest

from chromium_reference import run_site
from example_build import build_example_site
from tinctura.colour.convert import to_hex
from tinctura.engine import Options, check_paths

pytestmark = pytest.mark.slow


MKDOCS_THEME = """site_name: Theme check
docs_dir: {docs}
theme:
  name: mkdocs
  color_mode: auto
  user_color_mode_toggle: true
markdown_extensions: [admonition, tables, attr_list, md_in_html]
"""


def _mkdocs_theme_site(tmp_path_factory):
    """The example's pages built with MkDocs' own theme (Bootstrap, data-bs-theme schemes)."""
    import os
    import subprocess
    import sys
    from pathlib import Path

    cfg = tmp_path_factory.mktemp("cfg") / "mkdocs.yml"
    docs = Path(__file__).resolve().parents[2] / "example_site" / "docs"
    cfg.write_text(MKDOCS_THEME.format(docs=docs))
    out = tmp_path_factory.mktemp("site")
    subprocess.run([sys.executable, "-m", "mkdocs", "build", "-q", "-f", str(cfg), "-d", str(out)],
                   check=True, env=dict(os.environ, NO_MKDOCS_2_WARNING="1"))
    return out


def _mkdocs_theme_fixed_site(tmp_path_factory):
    """The same, rebuilt with the fixes tinctura wrote for it added last to extra_css, as the
    writer is told: its overrides are scoped to a scheme with :where() (no specificity added)
    and selector lists, which Chromium must cascade as tinctura does."""
    import io
    import os
    import shutil
    import subprocess
    import sys
    from pathlib import Path

    from tinctura.cli import main

    site = _mkdocs_theme_site(tmp_path_factory)
    docs = tmp_path_factory.mktemp("docs")
    shutil.copytree(Path(__file__).resolve().parents[2] / "example_site" / "docs", docs,
                    dirs_exist_ok=True)
    main(["check", str(site), "--no-config", "--select", "TC100", "--fail-on", "never",
          "--write-fixes", str(docs / "fixes.css")], stdout=io.StringIO(), stderr=io.StringIO())
    assert ":where(" in (docs / "fixes.css").read_text()
    cfg = tmp_path_factory.mktemp("cfg") / "mkdocs.yml"
    cfg.write_text(MKDOCS_THEME.format(docs=docs) + "extra_css: [fixes.css]\n")
    out = tmp_path_factory.mktemp("fixed")
    subprocess.run([sys.executable, "-m", "mkdocs", "build", "-q", "-f", str(cfg), "-d", str(out)],
                   check=True, env=dict(os.environ, NO_MKDOCS_2_WARNING="1"))
    return out


def _sphinx_site(tmp_path_factory):
    """A small Sphinx project with the furo theme (data-theme on <body> + media queries)."""
    import subprocess
    import sys
    from pathlib import Path

    pytest.importorskip("sphinx")
    pytest.importorskip("furo")
    source = Path(__file__).resolve().parents[1] / "data" / "sphinx_site"
    out = tmp_path_factory.mktemp("sphinx")
    subprocess.run([sys.executable, "-m", "sphinx", "-q", "-b", "html", str(source), str(out)],
                   check=True)
    return out


def _material_rich_site(tmp_path_factory):
    """mkdocs-material with other palettes (teal/amber, deep orange/lime) and many extensions:
    content tabs, annotations, task lists, critic marks, keys, footnotes, line numbers."""
    import os
    import subprocess
    import sys
    from pathlib import Path

    source = Path(__file__).resolve().parents[1] / "data" / "material_rich"
    out = tmp_path_factory.mktemp("rich")
    subprocess.run([sys.executable, "-m", "mkdocs", "build", "-q", "-f",
                    str(source / "mkdocs.yml"), "-d", str(out)],
                   check=True, env=dict(os.environ, NO_MKDOCS_2_WARNING="1"))
    return out


@pytest.fixture(scope="module",
                params=["mkdocs-material", "material-rich", "mkdocs", "mkdocs-fixed",
                        "sphinx-furo"])
def both(request, tmp_path_factory):
    if request.param == "mkdocs-material":
        site = build_example_site(tmp_path_factory.mktemp("site"), tmp_path_factory.mktemp("cfg"))
    elif request.param == "material-rich":
        site = _material_rich_site(tmp_path_factory)
    elif request.param == "mkdocs":
        site = _mkdocs_theme_site(tmp_path_factory)
    elif request.param == "mkdocs-fixed":
        site = _mkdocs_theme_fixed_site(tmp_path_factory)
    else:
        site = _sphinx_site(tmp_path_factory)
    chromium = [r for r in run_site(site) if r["type"] == "sample"]
    # The harness runs Chromium with page scripts off (the static DOM), so tinctura leaves out
    # what theme scripts change too; test_theme_scripts.py compares those with scripts on.
    ours = check_paths([str(site)], Options(jobs=1, theme_behaviours=False))
    return chromium, ours, request.param


def _channels(hex_colour):
    return [int(hex_colour[i:i + 2], 16) for i in (1, 3, 5)]


def _close(a, b):
    return all(abs(x - y) <= 1 for x, y in zip(_channels(a), _channels(b)))


def test_samples_agree_with_chromium_per_scheme(both):
    chromium, ours, theme = both
    mine = {(s.page, s.scheme, s.state, s.xpath): s for p in ours.pages for s in p.samples}
    compared, disagree, missing, rest = {}, {}, [], {}
    for ref in chromium:
        if ref.get("status") != "determined":
            continue
        scheme = ref["scheme"]
        pseudo = ref.get("pseudo") or ""  # generated text: tinctura names it element::before
        key = (ref["page"], scheme, ref.get("state", "rest"),
               ref["xpath"] + (f"::{pseudo.lstrip(':')}" if pseudo else ""))
        if key[2] == "rest":
            rest[scheme] = rest.get(scheme, 0) + 1
        s = mine.get(key)
        if s is None:
            if key[2] == "rest":
                missing.append(key)
            continue
        if s.status != "determined":
            continue
        compared[scheme] = compared.get(scheme, 0) + 1
        fg, bg = to_hex(s.fg), to_hex(s.bg)
        if not (_close(fg, ref["fg"]) and _close(bg, ref["bg"])):
            disagree.setdefault(scheme, []).append(
                f"{key}: tinctura {fg} on {bg}, chromium {ref['fg']} on {ref['bg']}")
    for lines in disagree.values():
        for line in lines:
            print("DISAGREE", line)
    for key in missing:
        print("MISSING IN TINCTURA", key)
    schemes = {r["scheme"] for r in chromium}
    assert schemes == ({"default", "slate"} if "material" in theme else {"light", "dark"})
    assert {s.scheme for p in ours.pages for s in p.samples} == schemes
    for scheme in schemes:  # at least 99 % agreement in every scheme, not just overall
        assert compared.get(scheme, 0) > {"sphinx-furo": 25}.get(theme, 150), scheme
        assert len(disagree.get(scheme, [])) <= 0.01 * compared[scheme], \
            "\n".join(disagree[scheme])
        lost = [k for k in missing if k[1] == scheme]
        assert len(lost) <= 0.01 * rest[scheme], "\n".join(map(str, lost))
