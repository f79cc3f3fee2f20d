"""The example site in Chromium: the committed expectations still hold, and Chromium's XPaths
point at the same elements in lxml's tree of the static HTML (lxml: reference HTML parser)."""
from __future__ import annotations

import json

import lxml.html
import pytest

import chromium_reference as ref
import expected_findings as ef
from example_build import EXAMPLE, build_example_site

pytestmark = pytest.mark.slow


@pytest.fixture(scope="module")
def chromium_records(tmp_path_factory):
    work = tmp_path_factory.mktemp("example")
    site = build_example_site(work / "site", work)
    return site, list(ref.run_site(site))


def _comparable(result):
    """Everything but the browser version, which changes with Debian updates."""
    strip = lambda entries: [{k: v for k, v in e.items() if k != "source"} for e in entries]  # noqa: E731
    return {key: strip(result[key]) for key in ("findings", "exempt", "undetermined")}


def test_expected_findings_are_current(chromium_records):
    """example_site/expected_findings.json is what Chromium finds on the site as it is now
    (regenerate it with the two scripts in tests/browser/ when the site changes)."""
    _, records = chromium_records
    committed = json.loads((EXAMPLE / "expected_findings.json").read_text(encoding="utf-8"))
    assert _comparable(ef.build(records)) == _comparable(committed)


def test_chromium_xpaths_resolve_in_lxml(chromium_records):
    site, records = chromium_records
    trees = {}
    for r in records:
        if r["type"] != "sample":
            continue
        if r["page"] not in trees:
            trees[r["page"]] = lxml.html.parse(str(site / r["page"]))
        found = trees[r["page"]].xpath(r["xpath"])
        assert len(found) == 1, (r["page"], r["xpath"])
        el = found[0]
        assert el.tag == r["tag"], (r["page"], r["xpath"], el.tag)
        if r["kind"] != "generated":
            own = " ".join("".join([el.text or ""] + [c.tail or "" for c in el]).split())[:60]
            assert own == r["text"], (r["page"], r["xpath"])
