"""Fixes checked again: what undoes one, and what the report then says.

Found on a mkdocs-material blog: a post's meta line is coloured by one variable, and its
category link inherits that colour, so the link is told apart by colour alone (TC120, 1.00:1
against the text around it) before any fix and after. That finding must not undo the
variable's TC100 fix; a TC120 finding the fix's own colours bring must, and the report must say
that this is why, as must a paragraph's fix that brings its links within 3:1 of it. And a theme
variable that colours links through two rules is underlined on both. Found on a custom-coloured mkdocs-material handbook: a rule whose selector list colours a
note's title and a collapsible note's summary is fixed on both selectors, and a background
under translucent text (the search field's placeholder) is chosen for what the text
composites to over it.

The sites are written here. Contrast ratios in the comments are WCAG 2 ratios worked by hand
from the sRGB relative luminance (W3C WCAG 2.2, "relative luminance"); the 3:1 between a link
and its text is W3C technique G183.
"""
import io
import json
import re

import jsonschema

from tinctura.cli import main
from tinctura.report.json_report import schema
from tinctura.writer import WriterAid

PAGE = """<!doctype html><html lang="en"><head><title>Ferry bulletin {n}</title>
<link rel="stylesheet" href="../site.css"></head><body><main>
{body}
</main></body></html>"""


def _site(tmp_path, css, body):
    (tmp_path / "site.css").write_text(css, encoding="utf-8")
    for n in range(2):
        (tmp_path / f"p{n}").mkdir(exist_ok=True)
        (tmp_path / f"p{n}" / "index.html").write_text(PAGE.format(n=n, body=body),
                                                       encoding="utf-8")
    return tmp_path


def _fixes(site, *rules):
    out, err = io.StringIO(), io.StringIO()
    status = main(["check", str(site), "--format", "json", "--jobs", "1", "--no-states",
                   "--fail-on", "never", "--select", ",".join(rules)], stdout=out, stderr=err)
    assert status == 0, err.getvalue()
    doc = json.loads(out.getvalue())
    jsonschema.validate(doc, schema())  # the report's own schema, with `not_verified`
    return [(p["rule"], p["fix"]) for p in doc["problems"]]


def _only_fix(site, rule):
    """The fix of the site's one problem of ``rule``."""
    fixes = _fixes(site, rule)
    assert len(fixes) == 1, fixes
    return fixes[0][1]


# the meta line's #a0a0a0 on white: 2.6:1, below 4.5:1; its link inherits it (1.00:1 to the text)
META_CSS = """:root { --muted: #a0a0a0; }
body { color: #202020; background: #ffffff; }
.meta { color: var(--muted); }
.meta a { color: inherit; text-decoration: none; }
"""
META = '<p class="meta">Filed under <a href="../p0/">Operations</a> on the third of May.</p>'


def test_a_link_that_failed_before_the_fix_does_not_undo_it(tmp_path):
    fixes = dict(_fixes(_site(tmp_path, META_CSS, META), "TC100", "TC120"))
    assert set(fixes) == {"TC100", "TC120"}  # the premise: both fail
    assert "--muted:" in fixes["TC100"]["css"]  # the variable, fixed where it is declared
    assert fixes["TC100"]["verified"] is True
    assert "not_verified" not in fixes["TC100"]
    # the links of the block they take their colour from are underlined, not the block
    assert fixes["TC120"]["css"] == ".meta a {\n  text-decoration-line: underline;\n}\n"
    assert fixes["TC120"]["verified"] is True


# as META, but the tag's own rule takes the underline away with more specificity (0,2,0) than
# `.meta a` (0,1,1): the underline must also go on that rule's selector to be seen
TAG_CSS = META_CSS.replace(".meta a {", ".meta .tag {")
TAG = META.replace('<a href="../p0/">', '<a class="tag" href="../p0/">')


def test_an_underline_goes_where_it_beats_the_rule_that_removes_it(tmp_path):
    fixes = dict(_fixes(_site(tmp_path, TAG_CSS, TAG), "TC100", "TC120"))
    selectors = [s.strip() for s in fixes["TC120"]["css"].split("{")[0].split(",")]
    assert selectors == [".meta a", ".meta .tag"]
    assert fixes["TC120"]["verified"] is True


# a focus ring #cccccc on white: 1.6:1, below 3:1 (WCAG 2.2 SC 1.4.11); the fix may change
# only its colour: `outline: #xxxxxx` would also reset its style to none, removing the ring
RING_CSS = """body { color: #202020; background: #ffffff; }
a { color: #1a4d8f; }
a:focus-visible { outline: 3px solid #cccccc; }
"""
RING = '<p>Board at the <a href="../p1/">north ramp</a>.</p>'


def test_a_shorthand_outline_is_fixed_by_its_colour_alone(tmp_path):
    site = _site(tmp_path, RING_CSS, RING)
    out = io.StringIO()
    main(["check", str(site), "--jobs", "1", "--fail-on", "never", "--select", "TC110",
          "--color", "never"], stdout=out, stderr=io.StringIO())
    # the writer's own declaration: its value with the new colour, width and style kept
    assert re.search(r"set `outline` at site\.css:3:\d+ to `3px solid #[0-9a-f]{6}`",
                     out.getvalue()), out.getvalue()
    # a theme's (a minified asset): its colour alone, in the writer's stylesheet
    for n in range(2):
        page = site / f"p{n}" / "index.html"
        page.write_text(page.read_text().replace("../site.css", "../assets/theme.min.css"))
    (site / "assets").mkdir()
    (site / "assets" / "theme.min.css").write_text(RING_CSS.replace("\n", " "))
    fix = _only_fix(site, "TC110")
    assert re.search(r"a:focus-visible \{\s*outline-color: #[0-9a-f]{6};\s*\}", fix["css"]), \
        fix["css"]
    assert fix["verified"] is True  # checked again: the ring is still drawn, and passes


# one border colour for fields on white and on a #555555 panel: 3:1 against both needs a
# relative luminance (WCAG 2.2's formula, worked by hand) at least 0.37 (against the panel's
# 0.09) and at most 0.30 (against white's 1.0), so none exists; the fix must not repaint the panel or the page to make room for one
FIELDS_CSS = """body { color: #202020; background: #ffffff; }
.panel { background: #555555; color: #ffffff; padding: 8px; }
input { border: 1px solid #dddddd; background: #ffffff; color: #202020; }
"""
FIELDS = '<p><input value="Berth 4"></p><div class="panel"><input value="Berth 9"></div>'


def test_a_graphics_problem_without_one_passing_colour_gets_advice_only(tmp_path):
    fixes = _fixes(_site(tmp_path, FIELDS_CSS, FIELDS), "TC110")
    assert fixes and all(rule == "TC110" and fix is None for rule, fix in fixes), fixes


# links #6fa8ff on white: 2.4:1, below 4.5:1; against the #3a3a3a text 4.7:1, above 3:1. Any blue
# of the same hue dark enough for 4.5:1 on white comes within 3:1 of that text.
LINK_CSS = """:root { --link: #6fa8ff; }
body { color: #3a3a3a; background: #ffffff; }
a { color: var(--link); text-decoration: none; }
"""
LINKS = '<p>Board at the north ramp, then read <a href="../p1/">the crossing log</a> again.</p>'


# as LINKS, the link's words in a span (Sphinx writes cross-references so): the span inherits
# the link's own colour, which is no block's; the underline goes on the links' rule
SPAN = LINKS.replace("the crossing log</a>", '<span class="ref">the crossing log</span></a>')


def test_text_inside_a_link_inherits_no_blocks_colour(tmp_path):
    fix = _only_fix(_site(tmp_path, LINK_CSS, SPAN), "TC120")
    assert fix["css"].split("{")[0].strip() == "a", fix["css"]
    assert fix["verified"] is True


def test_a_fix_whose_colour_makes_a_link_fail_says_so(tmp_path):
    css = LINK_CSS + "a:hover, a:focus { text-decoration-line: underline; }\n"
    fixes = dict(_fixes(_site(tmp_path, css, LINKS), "TC100", "TC120"))
    assert set(fixes) == {"TC100"}  # the premise: the link is told apart by colour today
    fix = fixes["TC100"]
    assert fix["verified"] is False
    assert fix["not_verified"] == ("the problem is gone with it applied, but its values cause "
                                   "new findings: TC120 link-cue")


# the note's #aaaaaa on white: 2.3:1, below 4.5:1; its link #333333 against that text 5.4:1,
# above 3:1. Any grey dark enough for 4.5:1 on white (#767676 or darker) comes within 3:1 of
# the link (#767676 against #333333: 2.8:1): the text's fix makes the link fail TC120.
FAINT_CSS = """body { color: #202020; background: #ffffff; }
.faint { color: #aaaaaa; }
a { color: #333333; text-decoration: none; }
a:hover, a:focus { text-decoration-line: underline; }
"""
FAINT = '<p class="faint">Tickets bought on board cost more; see <a href="../p1/">fares</a>.</p>'


def test_a_text_fix_that_brings_its_links_within_3_to_1_says_so(tmp_path):
    fixes = dict(_fixes(_site(tmp_path, FAINT_CSS, FAINT), "TC100", "TC120"))
    assert set(fixes) == {"TC100"}  # the premise: the link stands apart from the text today
    fix = fixes["TC100"]
    assert ".faint" in fix["css"]
    assert fix["verified"] is False
    assert fix["not_verified"] == ("the problem is gone with it applied, but its values cause "
                                   "new findings: TC120 link-cue")


def test_fixes_are_checked_together(tmp_path):
    # without a hover cue the link fails TC120 before the fix too; its underline, checked with
    # the colour fix, tells the darker link apart from the text
    fixes = dict(_fixes(_site(tmp_path, LINK_CSS, LINKS), "TC100", "TC120"))
    assert set(fixes) == {"TC100", "TC120"}
    assert fixes["TC100"]["verified"] is True and fixes["TC120"]["verified"] is True


# one variable colours the article's links and the tags: #2b6cb0 against the #404040 text,
# 1.91:1, below 3:1
TWO_RULES_CSS = """:root { --link: #2b6cb0; }
body { color: #404040; background: #ffffff; }
.prose a { color: var(--link); text-decoration: none; }
.tag { color: var(--link); text-decoration: none; }
"""
TWO_RULES = ('<div class="prose"><p>Check the tide, see <a href="../p1/">the tide table</a>.</p>'
             '</div><p class="byline">Filed under <a class="tag" href="../p0/">Tides</a> '
             'by the harbour office.</p>')


def test_links_coloured_by_two_rules_are_underlined_on_both(tmp_path):
    fix = _only_fix(_site(tmp_path, TWO_RULES_CSS, TWO_RULES), "TC120")  # one variable
    assert fix["verified"] is True
    selectors = fix["css"].split("{")[0]
    assert ".prose a" in selectors and ".tag" in selectors


# readthedocs' Sphinx theme: one rule gives the titles of warnings and of to-do notes an orange
# #f0b37e under white text, 1.83:1; only a darker background reaches 4.5:1 for white
TITLES_CSS = """body { color: #404040; background: #ffffff; }
.note-title { color: #ffffff; }
.warning .note-title, .todo .note-title { background: #f0b37e; }
"""
TITLES = ('<div class="warning"><p class="note-title">Warning</p></div>'
          '<div class="todo"><p class="note-title">To do</p></div>')


def test_a_background_override_covers_every_selector_of_the_list_its_texts_matched(tmp_path):
    fix = _only_fix(_site(tmp_path, TITLES_CSS, TITLES), "TC100")
    assert fix["css"].split("{")[0].strip() == ".warning .note-title, .todo .note-title"
    assert "background-color:" in fix["css"]
    assert fix["verified"] is True


def test_stylesheets_linked_below_the_sites_path_are_the_sites(tmp_path):
    # mkdocs-material's 404 page links its stylesheets from the site_url's path
    (tmp_path / "stylesheets").mkdir()
    (tmp_path / "stylesheets" / "ferry.css").write_text("p { color: #222; }")
    (tmp_path / "404.html").write_text(
        '<html><head><link rel="stylesheet" href="/ferry/stylesheets/ferry.css">'
        '<link rel="stylesheet" href="stylesheets/ferry.css"></head><body></body></html>')
    assert WriterAid(str(tmp_path)).sheet_order("404.html") == ["stylesheets/ferry.css"] * 2


def test_a_theme_templates_links_name_no_stylesheet(tmp_path):
    # pydata-sphinx-theme copies its Jinja macros into _static/ (the first page in path order):
    # their links are no stylesheet a fix could go into
    (tmp_path / "_static").mkdir()
    (tmp_path / "_static" / "macros.html").write_text(
        "{% macro head() %}<link href=\"{{ pathto('_static/theme.css', 1) }}?digest=9\" "
        "rel=\"stylesheet\">{% endmacro %}")
    assert WriterAid(str(tmp_path)).sheet_order("_static/macros.html") == []
    # the fixes' stylesheet is then told by the next page that links any
    (tmp_path / "_static" / "quay.css").write_text("p { color: #222; }")
    (tmp_path / "index.html").write_text(
        '<html><head><link rel="stylesheet" href="_static/quay.css"></head><body></body></html>')
    assert WriterAid(str(tmp_path))._linked_sheets(["_static/macros.html", "index.html"]) == [
        "_static/quay.css"]


def test_a_colour_an_override_gives_keeps_the_cause_it_replaces():
    # checked with a variable's fix, the link that takes the text's colour fails TC120 as
    # before, its cause now the fix's own value: still the problem it was, not a new one
    from tinctura.model import Cause, Declaration
    from tinctura.overrides import Override, Rule, _remaining
    from tinctura.problems import Problem, cause_key

    muted = Declaration("--muted", "#a0a0a0", "site.css", 1, 9, ":root", "author")
    text = Cause(Declaration("color", "var(--muted)", "site.css", 3, 1, ".meta", "author"),
                 None, (muted,))
    white = Cause(Declaration("background-color", "#fff", "site.css", 2, 1, "body", "author"))
    fixed = Problem("TC100", "text-ratio", "error", "light", text, white)
    fix = Override("site.css", [Rule(":root", (("--muted", "#767676", False),))])
    left = {("TC120", ("<style>#1", 2, 3, "--muted", "#767676"), cause_key(white),
             (":root", "--muted"), None)}
    assert _remaining([fixed], [fix], left) == {("TC120", cause_key(text), cause_key(white))}


# -- fixes that reach every text of their problem ---------------------------------------------

# #b39b6b on #f6efe0: 2.34:1, below 4.5:1; one rule colours a note's title and a collapsible
# note's summary
LIST_CSS = """body { color: #202020; background: #ffffff; }
.note > .title, .note > summary { color: #b39b6b; background: #f6efe0; }
"""
LIST = ('<div class="note"><p class="title">Grain moisture</p><p>Keep it under 14 %.</p></div>'
        '<details class="note"><summary>Older stones</summary><p>Dress them in spring.</p>'
        '</details>')


def test_a_rule_with_a_selector_list_is_fixed_on_every_selector_its_texts_matched(tmp_path):
    fix = _only_fix(_site(tmp_path, LIST_CSS, LIST), "TC100")  # one declaration
    assert fix["verified"] is True
    selectors = {s.strip() for s in fix["css"].split("{")[0].split(",")}
    assert selectors == {".note > .title", ".note > summary"}


# white at 70 % over #937c4f composites to about #dfd8cb: 2.8:1 against it; even opaque white
# gives 4.0:1 there, so the background must change, and the text's composite with it
BAR_CSS = """body { color: #202020; background: #ffffff; }
.bar { background-color: #937c4f; color: rgba(255, 255, 255, 0.7); }
"""
BAR = '<div class="bar"><p>Mill open from six until the bell.</p></div>'


def test_a_background_under_translucent_text_is_chosen_for_what_it_composites_to(tmp_path):
    fix = _only_fix(_site(tmp_path, BAR_CSS, BAR), "TC100")
    assert fix["css"].startswith(".bar {\n  background-color: #")
    assert fix["verified"] is True


# a navigation bar drawn by a gradient (MkDocs' own theme's, from Bootstrap's Cerulean) over a
# background colour set !important by a utility class: the brand in white (2.3:1 on the lightest
# stop, #50b3eb), its links in white at 80 % (2.0:1); no lighter text exists
BAR_GRADIENT_CSS = """body { color: #202020; background: #ffffff; }
.bg-primary { background-color: #2fa4e7 !important; }
.navbar.bg-primary { background-image: linear-gradient(#50b3eb, #2fa4e7 60%, #2c9ad9); }
.brand { color: #ffffff; }
.navbar a.link { color: rgba(255, 255, 255, 0.8); text-decoration: none; }
"""
BAR_GRADIENT = ('<div class="navbar bg-primary"><span class="brand">Fernbank ferries</span> '
                '<a class="link" href="../p0/">Timetables</a></div>')


def test_a_gradient_becomes_one_colour_that_every_text_on_it_passes(tmp_path):
    fixes = _fixes(_site(tmp_path, BAR_GRADIENT_CSS, BAR_GRADIENT), "TC100")
    assert len(fixes) == 2  # the brand and the link: two text colours, one background
    css = {fix["css"] for _, fix in fixes}
    assert len(css) == 1  # one value for both: the darker of the two each would need
    one = css.pop()
    # a gradient from one colour to itself paints over the !important background colour
    assert re.fullmatch(r"\.navbar\.bg-primary \{\n  background-image: "
                        r"linear-gradient\((#[0-9a-f]{6}), \1\);\n\}\n", one)
    assert all(fix["verified"] for _, fix in fixes)
    assert all("gradient becomes one colour" in fix["note"] for _, fix in fixes)


# a signal legend whose cells carry both colours in their style attributes: white on yellow
# (1.2:1), white on green (2.8:1), white on red (3.7:1); one `color: #ffffff` as written in all
LEGEND = ('<table><tr><td style="background:#ffeb3b;color:#ffffff">Caution</td></tr>'
          '<tr><td style="background:#4caf50;color:#ffffff">Clear</td></tr>'
          '<tr><td style="background:#f44336;color:#ffffff">Danger</td></tr></table>')


def test_a_legend_of_style_attributes_is_fixed_cell_by_cell(tmp_path):
    fixes = dict((fix["css"].split(" {")[0], fix) for _, fix in
                 _fixes(_site(tmp_path, "body { color: #202020; }\n", LEGEND), "TC100"))
    yellow = 'td[style="background:#ffeb3b;color:#ffffff" i]'
    green = 'td[style="background:#4caf50;color:#ffffff" i]'
    red = 'td[style="background:#f44336;color:#ffffff" i]'
    assert set(fixes) == {yellow, green, red}  # each cell by its attribute as written
    assert "color: #" in fixes[yellow]["css"]  # a darker text is the nearer fix there
    for cell in (green, red):  # no lighter text than white: a darker background
        assert "background-color: #" in fixes[cell]["css"]
        assert "background is set by a style attribute" in fixes[cell]["note"]
    assert all(fix["verified"] for fix in fixes.values())
