"""What WCAG 2.2 leaves out of SC 1.4.3 / 1.4.6, case by case, from the standard's wording.

Sources named beside each test: WCAG 2.2 (W3C Recommendation) SC 1.4.3 "Incidental" and
"Logotypes", the definition of "text"; the HTML Living Standard (the fieldset element, the label
element); WAI-ARIA 1.2 (aria-disabled, aria-hidden). Every page uses a faint grey (#b0b0b0 on
white, 2.17:1 by the WCAG 2.2 formula) that TC100 would report wherever it judges.
"""
import pytest

from tinctura import engine
from tinctura.extract import exempt

FAINT = "color:#b0b0b0"
PAGE = ('<!doctype html><html lang="en"><head><meta charset="utf-8"><title>t</title></head>'
        '<body style="margin:0;background:#ffffff;color:#1a1a1a">{}</body></html>')


def check(tmp_path, body, **options):
    page = tmp_path / "page.html"
    page.write_text(PAGE.format(body), encoding="utf-8")
    return engine.check_paths([str(page)], engine.Options(**options))


def scope(tmp_path, body, **options) -> dict:
    """text -> (exemption, rules that report it) for every resting sample of the page."""
    report = check(tmp_path, body, **options)
    rules = {}
    for f in report.findings:
        rules.setdefault(f.sample.text, set()).add(f.rule)
    return {s.text: (s.exempt, rules.get(s.text, set()))
            for p in report.pages for s in p.samples if s.state == "rest"}


# -- inactive user interface components (SC 1.4.3 "Incidental") ------------------------------

def test_label_of_a_disabled_input_for_and_wrapping(tmp_path):
    # SC 1.4.3: "part of an inactive user interface component"; HTML: a label's control is
    # the element its `for` names or the control it contains
    got = scope(tmp_path, f'<label for="a" style="{FAINT}">Depth by for</label>'
                          '<input id="a" disabled>'
                          f'<label style="{FAINT}">Depth wrapping <input disabled></label>'
                          f'<label for="b" style="{FAINT}">Depth enabled</label><input id="b">')
    assert got["Depth by for"] == ("inactive-label", set())
    assert got["Depth wrapping"] == ("inactive-label", set())
    assert got["Depth enabled"] == ("", {"TC100"})


def test_disabled_fieldset_but_not_its_first_legend(tmp_path):
    # HTML Living Standard, the fieldset element: a disabled fieldset disables its descendant
    # controls "excluding those that are descendants of the fieldset element's first legend
    # element child"
    got = scope(tmp_path, f'<fieldset disabled style="{FAINT}"><legend>First legend</legend>'
                          '<legend>Second legend</legend><p>Inside the set</p>'
                          '<button>Inside button</button></fieldset>')
    assert got["First legend"] == ("", {"TC100"})
    assert got["Second legend"][0] == "inactive-control"
    assert got["Inside the set"][0] == "inactive-control"
    assert got["Inside button"][0] == "inactive-control"


def test_aria_disabled_on_widget_and_group_roles_only(tmp_path):
    # WAI-ARIA 1.2: aria-disabled applies to widgets, composites and groups; on a div without
    # a role it states nothing, and "false" is not disabled
    got = scope(tmp_path, f'<div style="{FAINT}">'
                          '<span role="button" aria-disabled="true">Widget off</span>'
                          '<div role="group" aria-disabled="true"><span>Group off</span></div>'
                          '<a href="x" aria-disabled="true">Link off</a>'
                          '<div aria-disabled="true"><span>No role</span></div>'
                          '<div role="group" aria-disabled="false"><span>Group on</span></div>'
                          '</div>')
    assert got["Widget off"][0] == got["Group off"][0] == got["Link off"][0] == "inactive-widget"
    assert got["No role"] == ("", {"TC100"})
    assert got["Group on"] == ("", {"TC100"})


def test_a_link_placeholder_marked_disabled(tmp_path):
    # HTML Living Standard, the a element (quoted from memory): without href it "represents a
    # placeholder for where a link might otherwise have been placed, if it had been relevant".
    # MkDocs' own theme writes the first page's Previous as <a class="nav-link disabled">.
    # With an href, or without the class, it is judged (the class read as a perceived
    # inactive control is our judgement: README, "What WCAG exempts")
    got = scope(tmp_path, f'<nav><a class="nav-link disabled" style="{FAINT}"><i></i> Previous</a>'
                          f'<a class="nav-link disabled" href="#n" style="{FAINT}">Disabled with '
                          f'href</a><a class="nav-link" style="{FAINT}">No href, no class</a>'
                          f'<a class="disabledish" style="{FAINT}">Other class</a></nav>')
    assert got["Previous"][0] == "inactive-link"
    assert got["Disabled with href"] == ("", {"TC100"})
    assert got["No href, no class"] == ("", {"TC100"})
    assert got["Other class"] == ("", {"TC100"})


def test_element_named_by_aria_labelledby_of_a_disabled_control(tmp_path):
    # SC 1.4.3 "Incidental": the visible name of an inactive control is part of it
    got = scope(tmp_path, f'<span id="n" style="{FAINT}">Sync clock</span>'
                          '<button aria-labelledby="n" disabled>Go</button>'
                          f'<span id="m" style="{FAINT}">Sync enabled</span>'
                          '<button aria-labelledby="m">Go</button>')
    assert got["Sync clock"][0] == "inactive-label"
    assert got["Sync enabled"] == ("", {"TC100"})


# -- incidental: not visible to anyone, pure decoration; logotypes --------------------------

def test_invisible_only_when_colour_equals_background_and_hidden(tmp_path):
    # SC 1.4.3 "Incidental": text "that [is] not visible to anyone"
    got = scope(tmp_path, '<p aria-hidden="true" style="color:#ffffff">Hidden keywords</p>'
                          '<p style="color:#ffffff">Read aloud keywords</p>'
                          f'<p aria-hidden="true" style="{FAINT}">Seen words</p>')
    assert got["Hidden keywords"] == ("invisible", set())
    assert got["Read aloud keywords"] == ("", {"TC100"})  # screen readers read it
    assert got["Seen words"] == ("", {"TC100"})  # aria-hidden alone does not hide it from sight


def test_decoration_is_hidden_and_wordless(tmp_path):
    # SC 1.4.3 "Incidental": "pure decoration"
    got = scope(tmp_path, f'<p aria-hidden="true" style="{FAINT}">* * *</p>'
                          f'<p style="{FAINT}">~ ~ ~</p>')
    assert got["* * *"] == ("decoration", set())
    assert got["~ ~ ~"] == ("", {"TC100"})


def test_logotypes_only_where_configured(tmp_path):
    # SC 1.4.3 "Logotypes": "Text that is part of a logo or brand name has no contrast
    # requirement."
    body = f'<p class="brand" style="{FAINT}">Quorrin</p>'
    assert scope(tmp_path, body)["Quorrin"] == ("", {"TC100"})
    assert scope(tmp_path, body, logotypes=(".brand",))["Quorrin"] == ("logotype", set())


# -- not text in a human language (definition of "text") -------------------------------------

def test_single_glyph_in_a_named_button_is_an_icon(tmp_path):
    # WCAG 2.2 definition of text: "expressing something in human language"; the button's
    # name says what the glyph stands for. Judged as a graphical object at 3:1 (SC 1.4.11).
    got = scope(tmp_path, f'<button aria-label="Close" style="{FAINT}">×</button>'
                          f'<button style="{FAINT}">+</button>'
                          f'<a href="p2" aria-label="Page 2" style="{FAINT}">2</a>')
    assert got["×"] == ("icon", {"TC110"})
    assert got["+"] == ("", {"TC100"})  # no name: the glyph is the label
    assert got["2"] == ("", {"TC100"})  # a digit is language


def test_private_use_glyphs(tmp_path):
    # icon fonts put their glyphs in the Unicode Private Use Areas (no meaning as text)
    got = scope(tmp_path, f'<a href="x" style="{FAINT}">\ue0a1</a>'
                          f'<p><span style="{FAINT}">\ue0a2</span> Tide table</p>'
                          f'<a href="y"><span aria-hidden="true" style="{FAINT}">\ue0a3</span> '
                          'Export</a>'
                          f'<a href="z" aria-label="Export"><span aria-hidden="true" '
                          f'style="{FAINT}">\ue0a4</span></a>')
    assert got["\ue0a1"] == ("icon", {"TC110"})  # a link's only label
    assert got["\ue0a2"] == ("decorative-icon", set())  # no control, no name
    assert got["\ue0a3"] == ("decorative-icon", set())  # beside the link's own words
    assert got["\ue0a4"] == ("icon", {"TC110"})  # hidden, yet the only thing one sees


def test_private_use_glyph_in_generated_content(tmp_path):
    page = ('<style>.i::before{content:"\\e0a1";color:#b0b0b0}</style>'
            '<a href="x" aria-label="Settings" class="i"></a><p class="i">Plain</p>')
    report = check(tmp_path, page)
    generated = {s.xpath.rsplit("/", 1)[-1]: s.exempt for p in report.pages for s in p.samples
                 if s.kind == "generated"}
    assert generated == {"a::before": "icon", "p::before": "decorative-icon"}


# -- switches, and what the caches must keep apart ------------------------------------------

def test_each_exemption_can_be_switched_off(tmp_path):
    body = (f'<button disabled style="{FAINT}">Off</button>'
            f'<button aria-label="Close" style="{FAINT}">×</button>')
    got = scope(tmp_path, body, exemptions=tuple(i for i in exempt.IDS if i != "icon"))
    assert got["Off"][0] == "inactive-control"
    assert got["×"] == ("", {"TC100"})
    got = scope(tmp_path, body, exemptions=())
    assert got["Off"] == ("", {"TC100"})
    with pytest.raises(ValueError, match="unknown exemption"):
        exempt.enabled_set(["disabled"])


def test_disabled_and_enabled_twins_share_no_cached_verdict(tmp_path):
    # the same subtree under the same parents, once disabled by a fieldset around it and once
    # by nothing: styles, state results and replayed fragments must not carry one's verdict
    # to the other (the exemption is part of the style key)
    item = ('<div class="row"><label for="{id}" style="' + FAINT + '">Level {n}</label>'
            '<input id="{id}"{off}></div>')
    rows = "".join(item.format(id=f"i{n}", n=n, off=" disabled" if n % 2 else "")
                   for n in range(6))
    for replay in (True, False):
        got = scope(tmp_path, rows, replay=replay)
        assert [got[f"Level {n}"][0] for n in range(6)] == \
            ["", "inactive-label"] * 3, replay


def test_exemption_examples_run(tmp_path):
    """Each exemption's documented examples: exempt as documented, and judged (reported by
    TC100) when the one condition differs."""
    for e in exempt.EXEMPTIONS:
        logos = (".brand",) if e.id == "logotype" else ()
        for html, wanted in ((e.exempt_example, e.id), (e.judged_example, "")):
            page = tmp_path / f"{e.id}.html"
            page.write_text(html, encoding="utf-8")
            report = engine.check_paths([str(page)], engine.Options(
                logotypes=logos if wanted else ()))
            subject = [s for p in report.pages for s in p.samples
                       if s.state == "rest" and s.fg != (0x1a / 255,) * 3]
            assert subject and {s.exempt for s in subject} == {wanted}, (e.id, subject)
            rules = {f.rule for f in report.findings}
            if wanted:
                assert "TC100" not in rules, e.id
                assert ("TC110" in rules) == (e.judged_by == "TC110"), e.id
            else:
                assert "TC100" in rules, e.id
