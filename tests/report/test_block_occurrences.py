"""A page's replayed fragments written a block at a time must give the very text that writing
its records one by one gives (``json_report.encoded_occurrences``, whose format the compact JSON
tests check against the schema): the reference here is that function on the same page."""
from __future__ import annotations

import itertools
import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
from test_fragments import CSS, page_html  # noqa: E402

from tinctura.engine import Options, Site, judge_page  # noqa: E402
from tinctura.report import block_occurrences as blocks  # noqa: E402
from tinctura.report.json_report import encoded_occurrences, levels_up  # noqa: E402
from tinctura.situations import _rebased  # noqa: E402


def _site(tmp_path, html):
    (tmp_path / "site.css").write_text(CSS)
    for n in range(12):
        (tmp_path / f"p{n}").mkdir()
        (tmp_path / f"p{n}" / "index.html").write_text(html(n))
    return Site(str(tmp_path), Options(keep_samples=False))


@pytest.mark.parametrize("html", [
    page_html,  # navigation moved by a banner and by blank lines; two schemes; two states
    lambda n: page_html(n, sections=12),  # li[1] and li[10] sort apart from document order
    lambda n: page_html(n, sections=12).replace("\n", ""),  # one line: ordered by XPath only
    # a per cent sign in the texts (blocks are filled by %-formatting)
    lambda n: page_html(n).replace(">Page ", ">100% Page ").replace("pages<", "pages %d%%<"),
], ids=["moving", "many-sections", "one-line", "per-cent"])
def test_blocks_are_written_as_their_records(tmp_path, html):
    site = _site(tmp_path, html)
    by_block = 0
    for rel in site.pages():
        found = judge_page(site, rel, site.options)[1]
        lazy = found.blocks()
        by_block += lazy is not None and blocks._runs(lazy) is not None
        text = blocks.encoded_page(found)
        assert text == encoded_occurrences(list(found.records))
    assert by_block  # pages written by block were compared


def test_a_block_that_does_not_stand_apart_is_written_record_by_record():
    # records (number, XPath, line): a walked sample's between a block's first and last
    before = [(0, "/html/body/p", 5), (0, "/html/body/nav/ul/li[2]", 7)]
    runs = [((6, "/html/body/nav"), (9, "/html/body/nav/ul/li[3]"))]
    assert not blocks._apart(before, runs)
    assert blocks._apart(before[:1], runs)
    # two places' runs overlapping each other
    runs = [((6, "/a"), (9, "/a/b")), ((9, "/a/b"), (12, "/a/c"))]
    assert not blocks._apart([], runs)


SPECS = [(0, None), (0, ""), (0, "/html/body/div[9]"), (1, ""), (1, "/li[2]"),
         (1, "/li[2]/a"), (1, "::before"), (2, "", 1), (2, "", 3), (2, "/li[2]", 1),
         (2, "/li[2]", 2), (2, "/li[2]", 4), (2, "/li[2]/nav", 2), (2, "/li[2]/nav", 5)]
BASES = ["/html/body/div[3]/main/nav/ul", "/html/body/nav/ul[2]/li[4]/nav/ul",
         "/html/body/div/div/div/div/div"]
RELS = ["", "/li[2]", "/li[2]/a", "/li[2]/a/span", "/li[2]/nav/a::before", "::after"]


@pytest.mark.parametrize("spec", SPECS)
def test_canonical_inherited_xpaths_give_the_ups_of_the_rebased_ones(spec):
    form = blocks._canonical(spec)
    for base in BASES:
        assert base.count("/") > (form[1] if form[0] == "above" else 0)
        rebased = _rebased(spec, base)
        for rel in RELS:
            up, per_place = blocks._up(rel, form, spec)
            if not rebased:
                assert up == ""
            elif up is not None:  # the same at every place: "up" as levels_up gives it
                assert up == "," + str(levels_up(base + rel, rebased))
            else:
                assert per_place == spec


def test_canonical_forms_are_equal_exactly_when_the_xpaths_are():
    for a, b in itertools.combinations(SPECS, 2):
        same = blocks._canonical(a) == blocks._canonical(b)
        for base in BASES:
            assert same == (_rebased(a, base) == _rebased(b, base)), (a, b, base)
