"""TC120 link-cue and TC110 ui-ratio, from the wording of WCAG 2.2 and W3C's techniques.

Sources: WCAG 2.2 SC 1.4.1 Use of Color; W3C technique G183 ("Using a contrast ratio of 3:1
with surrounding text and providing additional visual cues on hover and focus") and failure
F73; SC 1.4.11 Non-text Contrast (3:1). Ratios by the WCAG 2.2 formula (tests/wcag_reference.py).
"""
import pytest
from wcag_reference import ratio

from tinctura import engine
from tinctura.model import LinkCues
from tinctura.rules import run
from tinctura.rules.examples import make_sample, rgba

OPTIONS = engine.Options(rules=("TC120",))


def link_sample(link, surround, rest=(), hover=(), focus=("outline",), **fields):
    cues = LinkCues(rgba(surround)[:3], tuple(rest), tuple(hover), tuple(focus))
    return make_sample(link, "#ffffff", link=cues, **fields)


def test_g183_ratio_against_the_surrounding_text():
    # G183: 3:1 between link and surrounding text, plus cues on hover and focus
    assert ratio("#2f5fa8", "#1a1a1a") < 3
    low = run([link_sample("#2f5fa8", "#1a1a1a", hover=("underline",))], OPTIONS)
    assert [f.args["missing"] for f in low] == [()]
    assert low[0].ratio == pytest.approx(ratio("#2f5fa8", "#1a1a1a"), abs=1e-6)
    high = run([link_sample("#1f6feb", "#000000", hover=("underline",))], OPTIONS)
    assert ratio("#1f6feb", "#000000") >= 3 and high == []


def test_f73_needs_a_cue_on_hover_and_on_focus():
    # F73 / G183: colour alone at rest, then no visual enhancement when pointed at or focused
    sample = link_sample("#1f6feb", "#000000", hover=(), focus=())
    assert run([sample], OPTIONS)[0].args["missing"] == ("hover", "focus")


def test_a_resting_cue_is_enough():
    # SC 1.4.1 is met when colour is not the only visual means: an underline at rest
    assert run([link_sample("#2f5fa8", "#1a1a1a", rest=("underline",))], OPTIONS) == []


def test_only_resting_samples_outside_exemptions():
    assert run([link_sample("#2f5fa8", "#1a1a1a", state="hover")], OPTIONS) == []
    assert run([link_sample("#2f5fa8", "#1a1a1a", exempt="inactive-widget")], OPTIONS) == []


def test_icon_glyphs_need_three_to_one():
    # SC 1.4.11: graphical objects "a contrast ratio of at least 3:1 against adjacent color(s)"
    options = engine.Options(rules=("TC110",))
    faint = make_sample("#b8b8b8", "#ffffff", exempt="icon")
    fine = make_sample("#949494", "#ffffff", exempt="icon")
    decorative = make_sample("#b8b8b8", "#ffffff", exempt="decorative-icon")
    assert ratio("#949494", "#ffffff") >= 3 > ratio("#b8b8b8", "#ffffff")
    assert [f.sample for f in run([faint, fine, decorative], options)] == [faint]


PAGE = ('<!doctype html><html lang="en"><head><meta charset="utf-8"><title>t</title><style>'
        'body{{background:#fff;color:#1a1a1a}}a{{color:#2f5fa8;text-decoration:none}}{css}'
        '</style></head><body>{body}</body></html>')


def findings(tmp_path, body, css=""):
    page = tmp_path / "links.html"
    page.write_text(PAGE.format(body=body, css=css), encoding="utf-8")
    report = engine.check_paths([str(page)], engine.Options(rules=("TC120",)))
    return sorted(f.sample.text for f in report.findings)


def test_running_text_but_not_navigation_lists(tmp_path):
    # SC 1.4.1 Understanding: links in a block of text; a list of links is told apart by its
    # layout, not by colour
    body = ('<p>Read the <a href="a">tide table</a> first.</p>'
            '<p>Then <em><a href="b">check the float</a></em> and log it.</p>'
            '<nav><ul><li><a href="c">Installation</a></li><li><a href="d">Calibration</a></li>'
            '</ul></nav>'
            '<p><a href="e">A paragraph holding only the link</a>.</p>'
            '<table><tr><td><a href="f">Cell link</a></td></tr></table>')
    assert findings(tmp_path, body) == ["check the float", "tide table"]


def test_cues_from_the_stylesheet(tmp_path):
    body = '<p>Read the <a href="a">tide table</a> first.</p>'
    assert findings(tmp_path, body, "p a{text-decoration:underline}") == []
    assert findings(tmp_path, body, "p a{border-bottom:1px solid}") == []
    assert findings(tmp_path, body, "p a{font-weight:700}") == []
    # 2.75:1 against the text, even with an underline on hover and focus
    assert findings(tmp_path, body, "a:hover,a:focus{text-decoration:underline}") == \
        ["tide table"]
    # a strong colour difference still needs the hover cue (G183)
    assert findings(tmp_path, body.replace("1a1a1a", "000000"),
                    "p{color:#000}a{color:#5c8ee6}") == ["tide table"]
    assert ratio("#5c8ee6", "#000000") >= 3
    assert findings(tmp_path, body, "p{color:#000}a{color:#5c8ee6}"
                                    "a:hover{text-decoration:underline}") == []
    # removing the focus ring leaves keyboard focus without a cue
    assert findings(tmp_path, body, "p{color:#000}a{color:#5c8ee6}"
                                    "a:hover{text-decoration:underline}a:focus{outline:none}") \
        == ["tide table"]


RUNNING_CASES = """
<p>See <a href="#a">the table</a> below.</p>
<p><a href="#b">Alone</a></p>
<p><em><a href="#c">In emphasis</a></em>, then words.</p>
<p><span><em><strong><a href="#d">Three inline levels</a></strong></em></span> then words.</p>
<p>Words <em><strong><a href="#e">two inline levels, words above them</a></strong></em></p>
<ul><li><a href="#f">Navigation</a></li><li>\u00a0<a href="#g">after a no-break space</a></li></ul>
<table><tr><td><a href="#h">Cell</a>,</td></tr></table>
<div>text<!-- a comment -->  <a href="#i">after a comment</a></div>
<p><a href="#j">first</a> <a href="#k">second</a></p><p>&#8203;<a href="#l">zero-width</a></p>
<a href="#m">top level</a> tail words <a name="n">no href</a> words
<nav><ul><li><a href="#o"><span>Nested</span></a><ul><li><a href="#p">Deeper</a></li></ul></li>
</ul></nav><p>A <a href="#q"><span>wrapped</span> link</a> in a sentence.</p>
"""


def test_which_links_stand_in_running_text():
    # text beside the link, or beside its inline wrappers (up to two levels up); a blank
    # text (spaces, a no-break space) or one without letters or digits is not running text
    from lxml import html as lxml_html

    from tinctura.extract import links

    root = lxml_html.fromstring(f"<html><body>{RUNNING_CASES}</body></html>")
    links.mark_running(root)
    assert [a.get("href") for a in root.iter("a") if a.get(links.RUNNING) is not None] == [
        "#a", "#c", "#e", "#i", "#m", "#q"]


def test_a_page_marks_the_same_links_keeping_what_earlier_scans_found():
    # a code listing's line-number links are 500 siblings of one element: each scan of a
    # link's earlier siblings read back to the first. ``page_marker`` keeps, for the next link
    # of the same parent, what the scan found; the links marked are the same
    from lxml import html as lxml_html

    from tinctura.extract import links

    listing = "".join(f'<a href="#l{n}"><span>{n}</span></a><span class="k">x</span>\n'
                      for n in range(200))
    body = (f"{RUNNING_CASES}<pre><code>{listing}</code></pre>"  # no text beside: none marked
            f"<p>Words first, then {listing.replace('#l', '#t')}</p>"  # far back: all marked
            f'<p>{listing.replace("#l", "#z")} words <a href="#z-last">last</a></p>'
            '<p><b><a href="#w0">a</a><a href="#w1">b</a></b>, then <i>x</i>'
            '<a href="#w2">c</a></p>')

    def marked(mark):
        root = lxml_html.fromstring(f"<html><body>{body}</body></html>")
        for a in root.iter("a"):
            if a.get("href") is not None:
                mark(a)
        return [a.get("href") for a in root.iter("a") if a.get(links.RUNNING) is not None]

    alone = marked(links.consider)
    assert marked(links.page_marker()) == alone
    assert not any(h.startswith("#l") for h in alone)
    assert sum(h.startswith("#t") for h in alone) == 200
    assert "#z-last" in alone and not any(h.startswith("#z") and h != "#z-last"
                                          for h in alone)
    assert {"#a", "#c", "#w2"} <= set(alone)
