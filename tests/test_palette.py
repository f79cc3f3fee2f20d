"""The example places the site-level rules' palette uses keep: a page's first places in (line,
XPath) order, whatever order its texts were walked or replayed in."""
import itertools

import lxml.etree

from tinctura import palette
from tinctura.extract.html import parse_html


def test_a_page_keeps_its_first_places_in_line_and_xpath_order():
    places = [("p.html", 30, "/html/body/p[3]", "c"), ("p.html", 12, "/html/body/p[2]", "b"),
              ("p.html", 40, "/html/body/p[4]", "d"), ("p.html", 12, "/html/body/p[10]", "a"),
              ("p.html", 5, "/html/body/p[1]", "e")]
    kept = set()
    for order in itertools.permutations(places):
        use = palette.Use()
        for place in order + order[:2]:  # offered twice: kept once
            palette.offer(use, place)
        kept.add(tuple(use.where))
    # '/html/body/p[10]' sorts before '/html/body/p[2]' as text, as the reports order XPaths
    assert kept == {(places[4], places[3], places[1])}


PAGE = """<!doctype html><html><body>
<p>intro</p>{gap}
<ul class="legend">
  <li><span class="late">Late</span></li>
  <li><span class="ok">On time</span></li><li><span class="late">Late</span></li>
  <li><span class="late">Late</span></li>
  <li><span class="late">Late</span></li>
</ul>
</body></html>"""


def test_a_replayed_subtree_offers_its_own_places_in_document_order():
    """The places are recorded once, relative to the subtree's root, and placed at each
    replay's base with the lines of that page's elements; a replay stops at the first place
    past the page's examples."""
    recorded = parse_html(PAGE.format(gap=""))
    anchor = recorded.find(".//ul")
    base = recorded.getroottree().getpath(anchor)
    rels = ["/li[5]/span", "/li[1]/span", "/li[3]/span", "/li[4]/span"]  # walk order
    replay = palette.ReplayPlaces({"late": [(rel, True, "Late") for rel in rels]}, anchor)

    page = parse_html(PAGE.format(gap="\n" * 20))  # the same subtree, 20 lines further down
    there = page.find(".//ul")
    uses = {"late": palette.Use(count=4)}
    replay.offer(uses, "q.html", there, "/html/body/ul")
    lines = [el.sourceline for el in there.iter("span") if el.get("class") == "late"]
    assert uses["late"].where == [("q.html", lines[0], "/html/body/ul/li[1]/span", "Late"),
                                  ("q.html", lines[1], "/html/body/ul/li[3]/span", "Late"),
                                  ("q.html", lines[2], "/html/body/ul/li[4]/span", "Late")]
    assert lines[0] == anchor.find("li/span").sourceline + 20
    assert base == "/html/body/ul"

    uses = {"late": palette.Use(count=3, where=[
        ("q.html", 2, "/html/body/p", "intro"), ("q.html", 3, "/html/body/p/a", "x"),
        ("q.html", 4, "/html/body/p/b", "y")])}
    replay.offer(uses, "q.html", there, "/html/body/ul")  # every place past the third
    assert [w[1] for w in uses["late"].where] == [2, 3, 4]


def test_places_without_a_line_come_first():
    root = lxml.etree.fromstring("<ul><li><span>a</span></li><li><span>b</span></li></ul>")
    replay = palette.ReplayPlaces({"k": [("/li[2]/span", True, "b"), ("/li[1]/span::before",
                                                                      False, "•")]}, root)
    uses = {"k": palette.Use(count=2)}
    replay.offer(uses, "p.html", root, "/ul")
    assert [(w[1], w[2]) for w in uses["k"].where] == [(0, "/ul/li[1]/span::before"),
                                                       (1, "/ul/li[2]/span")]
