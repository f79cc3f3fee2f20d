"""Fidelity on real themes: palette entries a reader can get, inset box shadows.

Sources: CSS Backgrounds and Borders 3 ("box-shadow": an inset shadow is drawn inside the padding
box, above the background and below the content); CSS Compositing 1 (source-over); the WCAG 2.2
contrast-ratio formula (W3C) for the ratios quoted; mkdocs-material's palette script for the
automatic entry (checked against the script itself in tests/browser/test_theme_scripts.py).
"""
import pytest

from tinctura.extract import schemes as scheme_mod
from tinctura.extract.html import parse_html

from conftest import hexes


def _palette(*entries):
    inputs = "".join(
        f'<input class="md-option" type="radio" name="__palette" data-md-color-media="{m}" '
        f'data-md-color-scheme="{s}" data-md-color-primary="{p}" data-md-color-accent="{a}">'
        for m, s, p, a in entries)
    return parse_html(f"<html><body><form>{inputs}</form><p>t</p></body></html>")


def _named(root):
    return [(s.name, dict(s.media)["prefers-color-scheme"],
             tuple(v for _, _, v in s.attributes)) for s in scheme_mod._material_palette(root)]


AUTO = ("(prefers-color-scheme)", "default", "indigo", "indigo")
LIGHT = ("(prefers-color-scheme: light)", "default", "teal", "amber")
DARK = ("(prefers-color-scheme: dark)", "slate", "teal", "amber")


def test_automatic_entry_folds_into_the_entries_it_resolves_to():
    # The theme's script applies the light or the dark entry by the media query: the automatic
    # entry's own (template default) colours are never shown.
    assert _named(_palette(AUTO, LIGHT, DARK)) == [
        ("default", "light", ("default", "teal", "amber")),
        ("slate", "dark", ("slate", "teal", "amber"))]


def test_automatic_entry_alone_keeps_its_colours_for_each_preference():
    # nothing to resolve to: the script leaves the entry's own attributes in place
    assert _named(_palette(AUTO)) == [("default/indigo/indigo/light", "light",
                                      ("default", "indigo", "indigo")),
                                     ("default/indigo/indigo/dark", "dark",
                                      ("default", "indigo", "indigo"))]


def test_automatic_entry_fills_only_the_missing_preference():
    assert [n for n, _, _ in _named(_palette(AUTO, LIGHT))] == ["default/teal", "default/indigo"]


def test_entries_that_set_the_same_colours_are_one_scheme():
    assert [n for n, _, _ in _named(_palette(LIGHT, DARK, DARK))] == ["default", "slate"]


def test_names_stay_unique_and_short():
    other = ("(prefers-color-scheme: light)", "default", "teal", "red")
    assert [n for n, _, _ in _named(_palette(LIGHT, other, DARK))] == [
        "default/teal/amber", "default/teal/red", "slate"]


BOX = "td, p { color: #767676; } table { border-collapse: collapse; }"


def test_inset_shadow_covering_the_box_is_a_backdrop(render):
    # #767676 on white = 4.54:1; a 25 % black inset shadow turns white into 0.75 * 255 = #bfbfbf
    # (source-over), where #767676 reaches only 2.47:1 (WCAG 2.2 formula).
    got = render('<table><tr><td class="s">shaded</td></tr><tr><td>plain</td></tr></table>',
                 BOX + ".s { box-shadow: inset 0 0 0 9999px rgba(0, 0, 0, 0.25); }")
    assert hexes(got[("light", "rest", "shaded")]) == ("#767676", "#bfbfbf")
    assert hexes(got[("light", "rest", "plain")]) == ("#767676", "#ffffff")
    layers = [layer.kind for layer in got[("light", "rest", "shaded")].bg_layers]
    assert layers[0] == "shadow"


def test_inset_shadow_on_a_row_reaches_its_cells(render):
    got = render('<table><tr class="s"><td>row</td></tr></table>',
                 BOX + ".s { box-shadow: inset 0 0 0 9999px rgba(0, 0, 0, 0.25); }")
    # a table row paints behind its cells (CSS 2.1, 17.5.1 table layers)
    assert hexes(got[("light", "rest", "row")]) == ("#767676", "#bfbfbf")


@pytest.mark.parametrize("shadow", ["0 0 12px #000", "2px 2px 0 #000", "none"])
def test_outset_shadows_leave_the_background(render, shadow):
    got = render('<p class="s">out</p>', BOX + f".s {{ box-shadow: {shadow}; }}")
    assert hexes(got[("light", "rest", "out")]) == ("#767676", "#ffffff")
    assert got[("light", "rest", "out")].bg_alternatives == ()


def test_thin_inset_ring_is_an_edge_not_a_backdrop(render):
    got = render('<p class="s">ring</p>', BOX + ".s { box-shadow: inset 0 0 0 1px #000; }")
    assert got[("light", "rest", "ring")].bg_alternatives == ()


def test_partial_inset_shadow_is_one_more_background(render):
    got = render('<p class="s">part</p>', BOX + ".s { box-shadow: inset 0 24px 0 0 #000; }")
    s = got[("light", "rest", "part")]
    assert hexes(s) == ("#767676", "#ffffff")
    assert s.bg_alternatives == ((0.0, 0.0, 0.0),)


def test_partial_shadow_that_disagrees_makes_the_text_undetermined(tmp_path):
    from tinctura.engine import Options, check_paths

    (tmp_path / "index.html").write_text(
        "<html><head><style>p { color: #555; box-shadow: inset 0 30px 0 0 #333; }</style>"
        "</head><body><p>part</p></body></html>")
    report = check_paths([str(tmp_path)], Options(states=False))
    sample = report.pages[0].samples[0]
    assert sample.status == "undetermined" and "inset shadow" in sample.reason
    assert report.findings == []


def test_user_behaviours_apply_before_the_cascade(render):
    from tinctura.extract.behaviours import from_setting

    behaviours = from_setting([{"action": "add-class", "selector": "article p", "value": "dim"},
                               {"action": "wrap", "selector": "pre", "value": "div.frame"}])
    got = render("<article><p>note</p><pre>code</pre></article>",
                 ".dim { color: #999; } .frame pre { color: #123456; }", behaviours=behaviours)
    assert hexes(got[("light", "rest", "note")])[0] == "#999999"
    code = got[("light", "rest", "code")]
    assert hexes(code)[0] == "#123456" and code.xpath.endswith("/article/div/pre")


def test_a_scroll_spys_mark_is_walked_in_turn(render):
    # a site's own scroll spy (the action "current"): each entry is walked with the class,
    # one at a time, and only what its look changes is reported, in the state "current"; the
    # tree keeps no mark (the other entries and the rest of the page are as they are)
    from tinctura.extract.behaviours import from_setting

    spy = from_setting([{"action": "current", "selector": "li", "value": "here",
                         "within": "nav.toc"}])
    css = ".toc a { color: #333333; } .toc li.here > a { color: #9a9a9a; }"
    body = ('<nav class="toc"><ul><li><a href="#a">Berths</a></li>'
            '<li class="here"><a href="#b">Tides</a></li></ul></nav><p>text</p>')
    got = render(body, css, behaviours=spy, states=True)
    assert hexes(got[("light", "rest", "Berths")])[0] == "#333333"
    assert hexes(got[("light", "current", "Berths")])[0] == "#9a9a9a"
    # marked already at rest (the page as built): nothing new when marked again
    assert hexes(got[("light", "rest", "Tides")])[0] == "#9a9a9a"
    assert ("light", "current", "Tides") not in got
    assert {state for _, state, _ in got} == {"rest", "current"}
    # with states off, no entry is walked marked
    assert {state for _, state, _ in render(body, css, behaviours=spy)} == {"rest"}


@pytest.mark.parametrize("entry, message", [
    ({"action": "paint", "selector": "p", "value": "x"}, "action must be one of"),
    ({"action": "wrap", "selector": "", "value": "div"}, "selector must be a non-empty"),
    ({"action": "wrap", "selector": "p[", "value": "div"}, "invalid selector"),
    ({"action": "wrap", "selector": "p", "value": "div", "colour": "red"}, "unknown keys colour"),
    ({"action": "current", "selector": "li", "value": "on", "within": "nav["}, "invalid selector"),
])
def test_bad_behaviours_are_named(entry, message):
    from tinctura.extract.behaviours import from_setting

    with pytest.raises(ValueError, match=message):
        from_setting([entry])


def test_builtin_behaviours_can_be_turned_off(tmp_path):
    from tinctura.engine import Options, Site

    (tmp_path / "index.html").write_text(
        '<html data-bs-theme="light"><head><style>.table-striped td { color: #aaa; }</style>'
        '</head><body><table><tr><td>cell</td></tr></table><script src="js/base.js"></script>'
        "</body></html>")
    on = Site(str(tmp_path), Options(states=False)).check_page("index.html")
    off = Site(str(tmp_path), Options(states=False, theme_behaviours=False)).check_page(
        "index.html")
    cell = {s.scheme: hexes(s)[0] for s in on.samples if s.text == "cell"}
    assert set(cell.values()) == {"#aaaaaa"}
    assert {hexes(s)[0] for s in off.samples if s.text == "cell"} == {"#000000"}
    assert any("mkdocs theme" in d.message for d in on.diagnostics)


def test_stylesheet_under_the_site_url_prefix_resolves_inside_the_site(tmp_path):
    from tinctura.engine import Options, Site

    (tmp_path / "assets").mkdir()
    (tmp_path / "assets" / "site.css").write_text("p { color: #767676; }")
    # a page section named like the prefix, with its own stylesheet: without the prefix the
    # absolute link would resolve to it
    (tmp_path / "project" / "assets").mkdir(parents=True)
    (tmp_path / "project" / "assets" / "site.css").write_text("p { color: #ff0000; }")
    (tmp_path / "index.html").write_text(
        '<html><head><link rel="stylesheet" href="/project/assets/site.css"></head>'
        "<body><p>text</p></body></html>")
    result = Site(str(tmp_path), Options(states=False, site_url="https://docs.invalid/project/")
                  ).check_page("index.html")
    assert hexes(result.samples[0])[0] == "#767676" and not result.diagnostics
    guessed = Site(str(tmp_path), Options(states=False)).check_page("index.html")
    assert hexes(guessed.samples[0])[0] == "#ff0000"


def test_unmodelled_script_changes_are_noted_once_per_site(tmp_path):
    # with --jobs 2 each worker's Site notes the theme once: the run keeps one
    from tinctura.engine import Options, check_paths

    page = ('<html data-bs-theme="light"><body><p>text</p><script src="js/base.js"></script>'
            "</body></html>")
    for n in range(6):
        (tmp_path / f"p{n}.html").write_text(page)
    for jobs in (1, 2):
        report = check_paths([str(tmp_path)], Options(states=False, jobs=jobs))
        notes = [d for p in report.pages for d in p.diagnostics if "mkdocs theme" in d.message]
        assert len(notes) == 1, jobs


# The page's text tells which behaviours cannot match (a tag or attribute it never mentions):
# the reference for what each selector matches is cssselect2 on the parsed tree.
MENTIONS_PAGE = ('<!doctype html><HTML><body><DIV Data-Tabs="1"><div class="tabbed-labels">'
                 '<label for="t1">one</label></div></div><p>text<table><tr><td>x</td></tr>'
                 '</table></body></html>')


@pytest.mark.parametrize("selector", [
    "[data-tabs] > .tabbed-labels > label[for]", "table:not([class])", "tbody > tr",
    "html[data-bs-theme]", "section p", "body p, aside", "[data-absent], div[data-tabs]",
    "div.made[data-made] span"])
def test_selectors_the_page_never_mentions_are_skipped_only_when_they_cannot_match(selector):
    import cssselect2

    from tinctura.extract.behaviours import _Mentions, apply, from_setting
    from tinctura.extract.html import parse_html

    root = parse_html(MENTIONS_PAGE)
    matched = [w for w in cssselect2.ElementWrapper.from_html_root(root).iter_subtree()
               if any(c.test(w) for c in cssselect2.compile_selector_list(selector))]
    if matched:
        assert _Mentions(MENTIONS_PAGE).may_match(selector)
    # elements a behaviour made are mentioned from then on
    made = from_setting([{"action": "wrap-children", "selector": "td",
                          "value": "div.made[data-made=1] > span"},
                         {"action": "add-class", "selector": selector, "value": "hit"}])
    plain, filtered = parse_html(MENTIONS_PAGE), parse_html(MENTIONS_PAGE)
    apply(plain, made)
    apply(filtered, made, MENTIONS_PAGE)
    hits = [el.tag for el in filtered.iter() if "hit" in (el.get("class") or "").split()]
    assert hits == [el.tag for el in plain.iter() if "hit" in (el.get("class") or "").split()]
    if selector.startswith("div.made"):
        assert hits == ["span"]


@pytest.mark.parametrize("selector", [
    "[data-tabs] table", "div label", "body div > div label[for]", "div div label",
    "html table td", "div > div label, table td", "div *", "p td", "section label"])
def test_select_finds_what_cssselect2_matches(selector):
    # the reference is cssselect2's matching of each element of the parsed page
    import cssselect2

    from tinctura.extract.behaviours import select

    root = parse_html(MENTIONS_PAGE)
    compiled = cssselect2.compile_selector_list(selector)
    expected = [w.etree_element for w in cssselect2.ElementWrapper.from_html_root(root)
                .iter_subtree() if any(c.test(w) for c in compiled)]
    assert select(root, selector) == expected
    # below a subtree's root, as cssselect's own translation reads it there
    from cssselect import HTMLTranslator
    from lxml import etree

    inner = root.find("body")
    plain = etree.XPath(HTMLTranslator().css_to_xpath(selector, prefix="descendant-or-self::"))
    assert select(inner, selector) == plain(inner)
