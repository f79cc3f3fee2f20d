"""The audit report (HTML): self-contained, no script, every page string escaped, the sections
and numbers an auditor relies on."""
import io
import re
import types
from urllib.parse import unquote

import lxml.etree
import lxml.html
import pytest

from tinctura.engine import Options
from tinctura.model import Cause, Declaration, Diagnostic, PageResult, UNDETERMINED
from tinctura.problems import group
from tinctura.report import Header, render, swatch
from tinctura.report.scope import Scope
from tinctura.rules import run
from tinctura.rules.examples import make_sample

HOSTILE = ('</p><script>alert("x")</script><img src=x onerror="alert(1)">'
           '" onmouseover="alert(2)\' <b>bold</b> &amp; ]]>')


def decl(prop, value, line, selector=".x"):
    return Declaration(prop, value, "assets/site.css", line, selector, "author")


def build(samples, diagnostics=(), scope=None, fmt="html"):
    findings = run(samples, Options())
    problems = group(findings, samples)
    names = sorted({s.page for s in samples})
    pages = [PageResult(n, [s for s in samples if s.page == n], {"hidden": 2}) for n in names]
    out = io.StringIO()
    header = Header(version="1.2.3", level="AA", schemes=["light", "dark"], scope=scope)
    render(out, fmt, header, pages, findings, problems, list(diagnostics))
    return out.getvalue(), findings, problems


def hostile_samples():
    fg = Cause(decl("color", f"var(--muted) /* {HOSTILE} */", 4, selector=HOSTILE),
               chain=(decl("--muted", "#777", 1),))
    bg = Cause(decl("background-color", "white", 2))
    page = 'guide/"quoted"<page>.html'
    return [
        make_sample("#777", "white", page=page, fg_cause=fg, bg_cause=bg, text=HOSTILE,
                    xpath='/html/body/p[@class="</code><script>"]'),
        make_sample("#999", "white", page="b.html", scheme=HOSTILE, text="Ebb <i>tide</i>"),
        make_sample("#111", "white", page="b.html", status=UNDETERMINED, reason=HOSTILE),
    ]


def test_hostile_page_text_is_escaped_and_nothing_runs():
    html, findings, _ = build(hostile_samples(),
                              [Diagnostic("x.css", HOSTILE, 3, "error")],
                              Scope(paths=[HOSTILE], title=HOSTILE, exclude=[HOSTILE]))
    doc = lxml.html.document_fromstring(html)
    assert not doc.xpath("//script")
    assert not [a for el in doc.iter() if isinstance(el.tag, str)
                for a in el.attrib if a.lower().startswith("on")]
    assert not doc.xpath("//b"), "markup from a page must stay text"
    # every <img> is one of our swatches, drawn from a data: URI
    for img in doc.xpath("//img"):
        assert img.get("class") == "swatch" and img.get("src").startswith("data:image/svg+xml,")
    # the hostile text reaches the reader as text: in the body, the title and the alt texts
    assert HOSTILE in doc.text_content()
    assert HOSTILE in doc.findtext(".//title")
    assert 'guide/"quoted"<page>.html' in doc.text_content()


def test_swatch_images_hold_the_words_escaped():
    html, _, _ = build(hostile_samples())
    doc = lxml.html.document_fromstring(html)
    imgs = doc.xpath("//img[@class='swatch']")
    assert imgs
    for img in imgs:
        svg = lxml.etree.fromstring(unquote(img.get("src").split(",", 1)[1]).encode())
        assert svg.tag == "{http://www.w3.org/2000/svg}svg"
        assert not svg.xpath("//*[local-name()='script']")
        assert [el.tag.split("}")[1] for el in svg.iter()] == ["svg", "rect", "text"]
        assert img.get("alt")


def test_swatch_shows_the_real_colours():
    html, _, _ = build(hostile_samples())
    ns = {"s": "http://www.w3.org/2000/svg"}
    drawn = {}
    for img in lxml.html.document_fromstring(html).xpath("//img[@class='swatch']"):
        svg = lxml.etree.fromstring(unquote(img.get("src").split(",", 1)[1]).encode())
        drawn[(svg.find("s:text", ns).get("fill"), svg.find("s:rect", ns).get("fill"))] = img
    # the published colours of both findings, on their real background
    assert ("#777777", "#ffffff") in drawn and ("#999999", "#ffffff") in drawn
    # WCAG 2.2 contrast ratio of #777777 on #ffffff: 4.478 (tests/wcag_reference.py), floored
    assert "4.47:1" in drawn[("#777777", "#ffffff")].get("alt")


def test_self_contained_no_script_no_external_resource():
    html, _, _ = build(hostile_samples())
    low = html.lower()
    assert "<script" not in low and "<link" not in low and "@import" not in low
    assert "url(" not in re.search(r"<style>(.*?)</style>", html, re.S).group(1)
    doc = lxml.html.document_fromstring(html)
    for el in doc.iter():
        if isinstance(el.tag, str) and el.get("src"):
            assert el.get("src").startswith("data:")
    # links: in-page anchors, or W3C's documents for the reader to follow (never fetched)
    for a in doc.xpath("//a[@href]"):
        assert a.get("href").startswith(("#", "https://www.w3.org/"))


def test_print_and_dark_styles():
    html, _, _ = build(hostile_samples())
    style = re.search(r"<style>(.*?)</style>", html, re.S).group(1)
    assert "@media (prefers-color-scheme: dark)" in style
    assert "@media print" in style
    assert "break-inside:avoid" in style.split("@media print")[1]


def test_sections_and_caution():
    html, findings, problems = build(hostile_samples())
    doc = lxml.html.document_fromstring(html)
    ids = [s.get("id") for s in doc.xpath("//section")]
    assert ids == ["caution", "glance", "scope", "criteria", "rules", "ratios", "pages",
                   "problems", "not-judged", "limits"]
    text = " ".join(doc.text_content().split())
    for phrase in ("qualified people", "ISO 3864", "ANSI Z535", "not WCAG 2 requirements"):
        assert phrase in text
    assert len(doc.xpath("//article[@class='problem']")) == len(problems)
    assert [h.tag for h in doc.xpath("//h1|//h2|//h3")][0] == "h1"
    assert len(doc.xpath("//h1")) == 1


def test_criteria_statuses():
    html, _, _ = build(hostile_samples())
    doc = lxml.html.document_fromstring(html)

    def status(number):
        row = doc.xpath(f"//tr[@data-criterion='{number}']")[0]
        return row.xpath(".//span[contains(@class,'status')]")[0].text_content()

    assert status("1.4.3") == "Fail"
    assert status("1.4.6") == "Not checked by this tool"  # an AAA criterion at level AA
    # TC120 checks links told apart by colour (part of 1.4.1): no failure, texts not judged
    assert status("1.4.1") == "Needs review"
    assert status("2.4.7") == "Not checked by this tool"
    clean, _, _ = build([make_sample("#111", "white")])
    doc = lxml.html.document_fromstring(clean)
    assert status("1.4.3") == "Pass"
    review, _, _ = build([make_sample("#111", "white"),
                          make_sample("#111", "white", status=UNDETERMINED, reason="image")])
    doc = lxml.html.document_fromstring(review)
    assert status("1.4.3") == "Needs review"


def test_colour_vision_rows_when_a_simulation_is_available(monkeypatch):
    fake = types.SimpleNamespace(DEFICIENCIES={"protanopia": 0, "tritanopia": 0},
                                 simulate_one=lambda rgb, name: (0.5, 0.5, 0.5))
    monkeypatch.setattr(swatch, "_cvd", fake)
    html, _, problems = build(hostile_samples())
    doc = lxml.html.document_fromstring(html)
    rows = doc.xpath("//article[@id='problem-1']//table[@class='pictures']/tbody/tr/th")
    assert [r.text_content() for r in rows] == [
        "Full colour vision", "Protanopia (simulated)", "Tritanopia (simulated)"]
    monkeypatch.setattr(swatch, "_cvd", None)
    html, _, _ = build(hostile_samples())
    assert "previews are not available" in html


def test_no_findings_report():
    html, _, _ = build([make_sample("#111", "white")])
    assert "No contrast problems were found" in html
    assert "No page has findings" in html


def test_source_locations_from_whatever_the_run_knows():
    from tinctura.report.html_report import source_of

    s = make_sample("#777", "white", page="guide/index.html")
    assert source_of(s) == ""
    located = types.SimpleNamespace(source=types.SimpleNamespace(file="docs/guide.md", line=12))
    assert source_of(s, types.SimpleNamespace(locate=lambda sample: located)) == "docs/guide.md:12"
    assert source_of(s, types.SimpleNamespace(source={"guide/index.html": ("docs/guide.md", 3)})) \
        == "docs/guide.md:3"
    assert source_of(s, types.SimpleNamespace(source=lambda page, line: ("docs/guide.md", 0))) \
        == "docs/guide.md"


def test_same_run_same_document():
    scope = Scope(paths=["site"], date="2026-01-01 00:00 UTC")
    first, _, _ = build(hostile_samples(), scope=scope)
    again, _, _ = build(hostile_samples(), scope=scope)
    assert first == again


def test_severity_counts_read_as_words():
    # "36 error, 755 warning" read as labels cut short; the text summary says it in words
    samples = [make_sample("#777777", "#ffffff", page=f"p{i}.html") for i in range(2)]
    html, _, _ = build(samples)
    text = " ".join(lxml.html.document_fromstring(html).text_content().split())
    assert re.search(r"Findings by severity: 2 errors, \d+ warnings?, \d+ info\.", text), text


def test_a_non_text_problem_is_not_labelled_text():
    # a field's border (TC110): its colour row named "Text colour" before
    border = Cause(decl("border", "1px solid #d0d0d0", 5))
    sample = make_sample("#d0d0d0", "#ffffff", kind="boundary", text="input boundary",
                         xpath="/html/body/input::boundary", fg_cause=border)
    sample.surround = sample.bg
    html, findings, _ = build([sample])
    assert [f.rule for f in findings] == ["TC110"]  # the premise: 1.54:1 against 3:1
    doc = lxml.html.document_fromstring(html)
    labels = [dt.text_content() for dt in doc.xpath("//article//dl[@class='cause']//dt")]
    assert labels[0] == "Control boundary colour", labels
    captions = doc.xpath("//article//table[@class='pictures']/caption/text()")
    assert captions == ["The control boundary as readers see it"]
    # the row is headed "Fix at the cause": its text does not say it again
    fix = doc.xpath("//article//dl[@class='cause']/div[dt='Fix at the cause']/dd")[0]
    assert fix.text_content().startswith("set border at"), fix.text_content()  # (code)


def test_occurrences_in_several_schemes_name_their_scheme():
    # two rows of one page and line, one per scheme, read as the same row twice
    samples = [make_sample("#777777", "#ffffff", page="a.html", line=7, scheme=name)
               for name in ("light", "dark")]
    html, _, _ = build(samples)
    doc = lxml.html.document_fromstring(html)
    places = doc.xpath("//table[@class='occurrences']//th[@scope='row']")
    assert sorted(th.text_content() for th in places) == \
        ["a.html:7 (scheme dark)", "a.html:7 (scheme light)"]
