"""The static cascade on small inline documents.

Expected colours are the literals written in each document, chosen by the rules of the cited
specification (W3C CSS Cascading and Inheritance Level 5, Selectors Level 4, CSS Custom
Properties Level 1, CSS Color Level 4/5, HTML Living Standard "Rendering"); the same documents
are cross-checked in headless Chromium by tests/browser.
"""
from conftest import hexes


def light(samples, text):
    return samples[("light", "rest", text)]


def test_specificity_beats_order(render):
    # Selectors 4, 17 Calculating a selector's specificity: (0,1,1) beats (0,0,1)
    s = render('<p class="x">t</p>', "p.x{color:#112233} p{color:#445566}")
    assert hexes(light(s, "t"))[0] == "#112233"


def test_order_of_appearance_breaks_ties(render):
    # Cascade 5, 6.1 "Order of Appearance": the last declaration wins
    s = render('<p>t</p>', "p{color:#112233} p{color:#445566}")
    assert hexes(light(s, "t"))[0] == "#445566"


def test_is_not_where_specificity(render):
    # Selectors 4: :is()/:not() take their most specific argument, :where() counts zero
    s = render('<p id="a" class="x">t</p>',
               ":where(#a){color:#111111} p{color:#222222} :is(.x,#zz){color:#333333}"
               ":not(#zz){color:#444444}")
    # :is(.x,#zz) and :not(#zz) are both (1,0,0); the later one wins
    assert hexes(light(s, "t"))[0] == "#444444"


def test_inline_style_beats_selectors_and_important_beats_inline(render):
    # Cascade 5, 6.1: element-attached styles win over rule-based ones of the same importance;
    # an !important author rule wins over a normal inline declaration
    s = render('<p id="a" style="color:#010203">t</p><p style="color:#010203" class="i">u</p>',
               "#a{color:#aaaaaa} .i{color:#0a0b0c !important}")
    assert hexes(light(s, "t"))[0] == "#010203"
    assert hexes(light(s, "u"))[0] == "#0a0b0c"


def test_layers_normal_and_important(render):
    # Cascade 5, 6.4 Cascade Layers: unlayered normal styles beat layered ones; for !important
    # the order reverses and the first-declared layer wins
    css = ("@layer base, theme;"
           "@layer theme{p{color:#222222} .b{color:#555555 !important}}"
           "@layer base{#x{color:#111111} .b{color:#444444 !important}}"
           "p{color:#333333}")
    s = render('<p id="x">t</p><p class="b">u</p>', css)
    assert hexes(light(s, "t"))[0] == "#333333"
    assert hexes(light(s, "u"))[0] == "#444444"


def test_inheritance_and_background_not_inherited(render):
    # Cascade 5, 3.3 Inheritance: color inherits, background-color does not (its initial
    # value is transparent, so the parent's background shows through)
    s = render('<div style="color:#123456;background:#fedcba"><span>t</span></div>')
    assert hexes(light(s, "t")) == ("#123456", "#fedcba")


def test_custom_properties_fallback_and_cycle(render):
    # Custom Properties 1, 2.2/2.3: var() substitutes; the fallback applies when the property is
    # missing; properties in a cycle are invalid at computed-value time (color then inherits)
    css = (":root{--ink:#224466;--a:var(--b);--b:var(--a)}"
           ".v{color:var(--ink)} .f{color:var(--nope,#665544)} .c{color:var(--a)}")
    s = render('<div style="color:#010101"><p class="v">v</p><p class="f">f</p>'
               '<p class="c">c</p></div>', css)
    assert hexes(light(s, "v"))[0] == "#224466"
    assert hexes(light(s, "f"))[0] == "#665544"
    assert hexes(light(s, "c"))[0] == "#010101"


def test_custom_property_resolved_where_declared(render):
    # Custom Properties 1: a custom property's computed value has its var() already substituted
    # on the element that declares it; descendants inherit that value, not the raw tokens
    css = (":root{--hue:0;--ink:hsl(var(--hue),100%,25%)} .inner{--hue:240}"
           ".inner p{color:var(--ink)}")
    s = render('<div class="inner"><p>t</p></div>', css)
    assert hexes(light(s, "t"))[0] == "#800000"


def test_token_level_substitution_in_colour_function(render):
    # A var() inside a colour function is substituted before the colour is parsed
    s = render('<p>t</p>', ":root{--hue:120deg} p{color:hsla(var(--hue),100%,25%,1)}")
    assert hexes(light(s, "t"))[0] == "#008000"


def test_generated_content_from_a_custom_property(render):
    # Custom Properties 1: var() substitutes in any property, `content` too (a theme's icon
    # glyphs set per admonition kind, as pydata-sphinx-theme does); an unknown one makes the
    # declaration invalid at computed-value time, and ::before then shows nothing
    css = (':root{--mark:"Tide: "} .note::before{content:var(--mark);color:#224466}'
           ".none::before{content:var(--missing);color:#224466}")
    s = render('<p class="note">high</p><p class="none">low</p>', css)
    assert hexes(light(s, "Tide:"))[0] == "#224466"
    assert [k for k in s if k[2] not in ("high", "low", "Tide:")] == []


def test_keywords_inherit_initial_unset(render):
    # Cascade 5, 7.3: initial resets color to canvastext's initial (black in CSS 2 terms:
    # the initial value of color is CanvasText), unset inherits for inherited properties
    css = (".p{color:#335577} .i{color:initial} .u{color:unset} .h{color:inherit}")
    s = render('<div class="p"><p class="i">i</p><p class="u">u</p><p class="h">h</p></div>',
               css)
    assert hexes(light(s, "i"))[0] == "#000000"
    assert hexes(light(s, "u"))[0] == "#335577"
    assert hexes(light(s, "h"))[0] == "#335577"


def test_currentcolor_in_background(render):
    # CSS Color 4, 6.4: currentcolor is the element's own color value
    s = render('<div style="color:#223344;background:currentcolor"><span style="color:#fff">t'
               '</span></div>')
    assert hexes(light(s, "t")) == ("#ffffff", "#223344")


def test_translucent_text_and_layers_composite(render):
    # CSS Compositing 1, simple alpha compositing (source-over): 50 % black on white is #808080
    s = render('<p style="color:rgba(0,0,0,.5)">t</p>'
               '<div style="background:rgba(0,0,0,.5)"><p>u</p></div>')
    assert hexes(light(s, "t")) == ("#808080", "#ffffff")
    assert hexes(light(s, "u")) == ("#000000", "#808080")


def test_group_opacity_fades_text_and_its_background(render):
    # CSS Color 4, 3.2 opacity: the element and its descendants are composited as a group
    s = render('<div style="background:#000"><div style="opacity:.5;background:#fff">'
               '<p style="color:#000">t</p></div></div>')
    assert hexes(light(s, "t")) == ("#000000", "#808080")


def test_hidden_text_is_skipped(render):
    # HTML Rendering 15.3.1: [hidden] is display:none; visibility:hidden and opacity:0 paint
    # nothing; the clip pattern hides text from sight
    body = ('<p hidden>a</p><p style="display:none">b</p><p style="visibility:hidden">c</p>'
            '<p style="opacity:0">d</p><template><p>e</p></template>'
            '<p style="position:absolute;width:1px;height:1px;overflow:hidden;'
            'clip:rect(0,0,0,0)">f</p><p>shown</p>')
    s = render(body)
    assert [k[2] for k in s] == ["shown"]
    assert render.result.skipped.get("display:none", 0) >= 2


def test_media_queries_at_viewport(render):
    # Media Queries 4: evaluated for a 1280 px wide screen; print rules never apply
    css = ("p{color:#111111} @media (min-width: 1000px){p{color:#222222}}"
           "@media (max-width: 600px){p{color:#333333}} @media print{p{color:#444444}}")
    assert hexes(light(render('<p>t</p>', css), "t"))[0] == "#222222"
    narrow = render('<p>t</p>', css, viewport_width=500)
    assert hexes(light(narrow, "t"))[0] == "#333333"


def test_prefers_color_scheme_makes_two_schemes(render):
    css = "p{color:#111111} @media (prefers-color-scheme: dark){body{background:#000}p{color:#eeeeee}}"
    s = render('<p>t</p>', css)
    assert hexes(s[("light", "rest", "t")]) == ("#111111", "#ffffff")
    assert hexes(s[("dark", "rest", "t")]) == ("#eeeeee", "#000000")


def test_a_data_theme_attribute_goes_where_the_selectors_look_for_it(render):
    # A theme's script sets data-theme from the reader's preference: on <html> where its
    # selectors say html[data-theme=...] (pydata-sphinx-theme, whose Bootstrap stylesheet also
    # holds [data-bs-theme] selectors its script never serves), on <body> where they say
    # body[data-theme=...] (Furo); tests/browser/test_theme_scripts.py runs both scripts
    css = ("p{color:#111111} html[data-theme=dark] p{color:#eeeeee}"
           "[data-bs-theme=dark]{--bs-body-color:#dee2e6}")
    s = render('<p>t</p>', css)
    assert hexes(s[("dark", "rest", "t")])[0] == "#eeeeee"
    assert [sch.attributes for sch in render.result.schemes] == [
        (("html", "data-theme", "light"),), (("html", "data-theme", "dark"),)]
    s = render('<p>t</p>', "p{color:#111111} body[data-theme=dark] p{color:#eeeeee}")
    assert hexes(s[("dark", "rest", "t")])[0] == "#eeeeee"
    assert render.result.schemes[1].attributes == (("body", "data-theme", "dark"),)


def test_light_dark_follows_color_scheme(render):
    # CSS Color 5, light-dark(): the used colour scheme picks the branch
    css = ":root{color-scheme:light dark} p{color:light-dark(#101010,#f0f0f0)}"
    s = render('<p>t</p>', css)
    assert hexes(s[("light", "rest", "t")])[0] == "#101010"
    assert hexes(s[("dark", "rest", "t")])[0] == "#f0f0f0"


def test_dynamic_pseudo_classes_do_not_match_at_rest(render):
    # Selectors 4, 9 user action pseudo-classes: nothing is hovered or focused at rest
    css = "a{color:#111111} a:hover{color:#222222} a:not(:focus){background:#eeeeee}"
    s = render('<a href="#">t</a>', css, states=True)
    assert hexes(s[("light", "rest", "t")]) == ("#111111", "#eeeeee")
    assert hexes(s[("light", "hover", "t")])[0] == "#222222"
    assert ("light", "focus", "t") in s  # :not(:focus) stops matching, background changes


def test_bad_selector_does_not_drop_its_neighbours(render):
    s = render('<p class="x">t</p>', "p:unknown-thing, .x{color:#123123}")
    assert hexes(light(s, "t"))[0] == "#123123"


def test_implied_tbody(render):
    # HTML parsing: a <tr> directly in <table> gets an implied <tbody>
    s = render('<table><tr><td>t</td></tr></table>', "tbody td{color:#321321}")
    assert hexes(light(s, "t"))[0] == "#321321"
    assert light(s, "t").xpath == "/html/body/table/tbody/tr/td"


def test_structural_selectors(render):
    css = "li:nth-child(2n){color:#020202} li:last-child{color:#030303} li:first-child{color:#010101}"
    s = render('<ul><li>a</li><li>b</li><li>c</li><li>d</li></ul>', css)
    assert [hexes(light(s, t))[0] for t in "abcd"] == ["#010101", "#020202", "#000000", "#030303"]


def test_gradient_stops_become_alternatives(render):
    s = render('<div style="background:linear-gradient(#000, #fff)"><p style="color:#777">t'
               '</p></div>')
    sample = light(s, "t")
    assert {tuple(sample.bg)} | set(sample.bg_alternatives) == {(0, 0, 0), (1, 1, 1)}


def test_background_image_is_undetermined(render):
    s = render('<div style="background:#fff url(x.png)"><p>t</p></div>')
    assert light(s, "t").status == "undetermined"
    assert "background image" in light(s, "t").reason


def test_import_and_link_media(render):
    files = {"css/main.css": '@import "more.css";', "css/more.css": "p{color:#0a0a0a}",
             "css/print.css": "p{color:#0b0b0b}"}
    head = ('<link rel="stylesheet" href="css/main.css?v=1">'
            '<link rel="stylesheet" href="css/print.css" media="print">'
            '<link rel="stylesheet" href="https://example.invalid/x.css">')
    s = render('<p>t</p>', "", head=head, files=files)
    assert hexes(light(s, "t"))[0] == "#0a0a0a"
    messages = [d.message for d in render.result.diagnostics]
    assert any("remote stylesheet not loaded" in m for m in messages)


def test_font_size_units(render):
    css = "html{font-size:125%} .a{font-size:1.2rem} .b{font-size:18pt} .c{font-size:2em}"
    s = render('<p class="a">a</p><p class="b">b</p><div class="c"><span>c</span></div>', css)
    assert light(s, "a").font_size_px == 24.0
    assert light(s, "b").font_size_px == 24.0
    assert light(s, "c").font_size_px == 40.0


def test_outlining_text_shadow_is_a_second_background(render):
    # An outline-like shadow (offsets <= 2px, blur <= 4px; common practice) hugs the glyphs,
    # so the text must read against the shadow colour too; a drop shadow leaves it alone.
    s = render('<p style="color:#fff;text-shadow:0 0 2px #000">a</p>'
               '<p style="color:#777;text-shadow:4px 4px 8px #000">b</p>')
    outlined, dropped = light(s, "a"), light(s, "b")
    assert outlined.status == "determined" and outlined.bg_alternatives == ((0.0, 0.0, 0.0),)
    assert dropped.status == "determined" and dropped.bg_alternatives == ()


def test_text_shadow_with_a_functional_colour(render):
    # the commas inside rgba() do not separate shadows
    s = render('<div style="background:#2fa4e7"><p style="color:#fff;'
               'text-shadow:0 1px 0 rgba(0,0,0,.05)">a</p></div>')
    (alt,) = light(s, "a").bg_alternatives
    assert hexes(light(s, "a"))[1] == "#2fa4e7" and alt != (1.0, 1.0, 1.0)


def test_svg_text_fill_and_shapes_behind(render):
    # SVG 2, 13.2 'fill': initial value black; presentation attributes count as author
    # declarations of specificity 0; earlier shapes in the same <svg> may lie under the text
    body = ('<svg width="200" height="60"><text x="5" y="20">plain</text>'
            '<text x="5" y="40" fill="#777777">attr</text></svg>'
            '<svg><rect width="200" height="60" fill="#000"/><text fill="#fff">on shape</text></svg>')
    s = render(body, "svg text.x{fill:#123456}")
    assert hexes(light(s, "plain"))[0] == "#000000"
    assert hexes(light(s, "attr"))[0] == "#777777"
    assert light(s, "attr").fg_cause.declaration.origin == "presentation"
    on_shape = light(s, "on shape")
    assert on_shape.bg_alternatives == ((0.0, 0.0, 0.0),)


def test_a_diagrams_shapes_are_each_fill_once(render):
    # a diagram of many shapes in a few fills: each fill is one possible background, once
    # (every shape was one before: 2,000 shapes made each later label cost 2,000 judgements)
    fills = ("#000000", "#ffffff", "#ff0000")
    rects = "".join(f'<rect width="9" height="9" fill="{fills[i % 3]}"/>' for i in range(60))
    s = render(f'<svg>{rects}<text fill="#777777">label</text></svg>')
    assert light(s, "label").bg_alternatives == ((0.0, 0.0, 0.0), (1.0, 1.0, 1.0),
                                                 (1.0, 0.0, 0.0))


def test_numbered_list_markers_are_text(render):
    # HTML Rendering 15.3.8: ol is list-style-type decimal, li is display list-item; the
    # marker takes the li's colour unless ::marker sets one (CSS Lists 3)
    s = render('<ol start="3"><li>a</li><li class="m">b</li></ol><ul><li>c</li></ul>',
               "li{color:#222222} li.m::marker{color:#aaaaaa}")
    assert hexes(light(s, "3."))[0] == "#222222"
    assert hexes(light(s, "4."))[0] == "#aaaaaa"
    assert light(s, "4.").xpath == "/html/body/ol/li[2]::marker"
    assert not any(k[2].endswith(".") and k[2] != "3." and k[2] != "4." for k in s)


def test_cue_rules_are_tried_only_where_a_selector_could_match(render):
    """Borders and outlines of a focusable link are found through the index of cue rules: the
    outline of its own class wins, and a cue rule for a class no element has is never compiled
    (on a large stylesheet, compiling every cue rule's selector for each control cost seconds
    and tens of megabytes)."""
    from tinctura.extract import sheet

    unused = "a.tw-never-used-cue-7"
    css = (f"{unused} {{ outline: 2px solid #ff0000 }}\n"
           ".tw-ring a:focus { outline: 2px solid #1f4e8c }\n")
    s = render('<p class="tw-ring"><a href="#x">Berth list</a></p>', css)
    ring = next(v for k, v in s.items() if k[2] and "focus" in k[2])
    assert ring.fg_cause.declaration.selector == ".tw-ring a:focus"
    compiled, _ = sheet._COMPILED[unused]
    assert "test" not in vars(compiled)  # (a cached_property, set once compiled)
