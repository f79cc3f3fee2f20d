"""The example site's README table of planted faults agrees with what Chromium found.

example_site/expected_findings.json comes from Chromium (tests/browser/); the README table is
written by hand from the CSS. The ratios are recomputed here with the WCAG 2.2 formula (W3C
Recommendation, definitions "relative luminance" and "contrast ratio").
"""
from __future__ import annotations

import json
import re
from pathlib import Path

import pytest
import yaml

EXAMPLE = Path(__file__).resolve().parents[1] / "example_site"
README = (EXAMPLE / "README.md").read_text(encoding="utf-8")
EXPECTED = json.loads((EXAMPLE / "expected_findings.json").read_text(encoding="utf-8"))
from wcag_reference import ratio  # noqa: E402

MARGIN = 0.3  # every fault fails, every clean text passes, by at least this much


def wcag_ratio(a: str, b: str) -> float:
    return ratio(a, b)  # WCAG 2.2 formulas, tests/wcag_reference.py


def table(name: str) -> list[dict]:
    block = re.search(rf"<!-- {name}:start -->\n(.*?)<!-- {name}:end -->", README, re.S).group(1)
    lines = [line for line in block.strip().splitlines() if line.startswith("|")]
    head = [c.strip() for c in lines[0].strip("|").split("|")]
    rows = []
    for line in lines[2:]:
        cells = [c.strip() for c in re.split(r"(?<!\\)\|", line.strip().strip("|"))]
        rows.append(dict(zip(head, cells)))
    return rows


def _match(rows, entries, keys):
    """Pair README rows with JSON entries one to one by page, scheme, state and text prefix."""
    left = list(entries)
    pairs = []
    for row in rows:
        hits = [e for e in left if all(row[k] == e[k] for k in keys) and e["text"].startswith(row["text starts with"])]
        assert len(hits) == 1, row
        left.remove(hits[0])
        pairs.append((row, hits[0]))
    assert not left, f"found by Chromium but missing from the README: {left}"
    return pairs


def test_every_planted_fault_and_nothing_else():
    for row, entry in _match(table("findings"), EXPECTED["findings"], ("page", "scheme", "state")):
        assert (row["fg"], row["bg"]) == (entry["fg"], entry["bg"]), row
        assert float(row["ratio"]) == pytest.approx(wcag_ratio(row["fg"], row["bg"]), abs=0.006), row
        assert float(row["ratio"]) == pytest.approx(entry["ratio"], abs=0.006), row
        assert entry["ratio"] <= (3.0 if entry["large"] else 4.5) - MARGIN, row


def test_exempt_controls():
    for row, entry in _match(table("exempt"), EXPECTED["exempt"], ("page", "scheme", "state")):
        assert (row["fg"], row["bg"]) == (entry["fg"], entry["bg"]), row
        assert float(row["ratio"]) == pytest.approx(wcag_ratio(row["fg"], row["bg"]), abs=0.006), row


def test_icons_below_three_to_one():
    """TC110 rows: Chromium's icon glyphs below 3:1 (WCAG 2.2 SC 1.4.11)."""
    for row, entry in _match(table("nontext"), EXPECTED["nontext"], ("page", "scheme", "state")):
        assert (row["fg"], row["bg"]) == (entry["fg"], entry["bg"]), row
        assert float(row["ratio"]) == pytest.approx(wcag_ratio(row["fg"], row["bg"]), abs=0.006)
        assert entry["ratio"] <= 3.0 - MARGIN, row


def test_boundary_rows():
    """Control boundaries below 3:1 (WCAG 2.2 SC 1.4.11), by the WCAG 2.2 formula."""
    rows = table("boundary")
    assert rows
    for row in rows:
        assert float(row["ratio"]) == pytest.approx(wcag_ratio(row["border"], row["around"]),
                                                    abs=0.006), row
        assert float(row["ratio"]) <= 3.0 - MARGIN, row


def test_link_rows_compare_link_and_text_colours():
    """TC120 rows: the ratio between link and surrounding text (W3C technique G183: 3:1)."""
    rows = table("linkcue")
    assert rows
    for row in rows:
        assert float(row["ratio"]) == pytest.approx(wcag_ratio(row["link"], row["surrounding text"]),
                                                    abs=0.006), row
        assert float(row["ratio"]) <= 3.0 - MARGIN, row


def test_undetermined_backgrounds():
    entries = [dict(e, state="rest") for e in EXPECTED["undetermined"]]
    for row, entry in _match(table("undetermined"), entries, ("page", "scheme")):
        verdict = row["expected verdict"]
        if verdict.startswith("image"):
            assert entry["reason"] == "image"
        else:
            assert verdict.startswith(entry["verdict"]), (row, entry)


def test_configuration():
    config = yaml.safe_load((EXAMPLE / "mkdocs.yml").read_text(encoding="utf-8"))
    assert config["theme"]["name"] == "material"
    assert config["theme"]["font"] is False  # no web fonts from the internet
    media = [(p["scheme"], p["media"]) for p in config["theme"]["palette"]]
    assert media == [("default", "(prefers-color-scheme: light)"), ("slate", "(prefers-color-scheme: dark)")]
    assert all("toggle" in p for p in config["theme"]["palette"])
    names = [p if isinstance(p, str) else next(iter(p)) for p in config["plugins"]]
    assert names == ["search", "tinctura"]
    assert "stylesheets/extra.css" in config["extra_css"]


def test_site_sources_reach_no_network():
    for path in (EXAMPLE / "docs").rglob("*"):
        if path.suffix in (".md", ".css", ".svg", ".html", ".js"):
            text = path.read_text(encoding="utf-8")
            assert not re.search(r"(?<![\w.])(https?:)?//[a-z0-9-]+\.[a-z]", text.replace("http://www.w3.org/2000/svg", "")), path
