"""Property-based tests (hypothesis): on any input, no exception escapes and results stay in
range. Examples are few and without deadline: the suite runs on a shared 2-core machine."""
import math
import os

import pytest
import tinycss2
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from tinctura.colour import wcag
from tinctura.colour.composite import flatten, over
from tinctura.colour.parse import CURRENTCOLOR, parse_color
from tinctura.extract import sheet as sheet_mod
from tinctura.extract.ruleset import RuleSet
from tinctura.extract.sheet import parse_declarations, parse_stylesheet
from tinctura.extract.style import ROOT_PARENT, Resolver, cascade

FAST = settings(max_examples=int(os.environ.get("TINCTURA_EXAMPLES", 60)), deadline=None,
                suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])

unit = st.floats(0.0, 1.0, allow_nan=False)
rgba = st.tuples(unit, unit, unit, unit)
# numbers as CSS writes them, absurd ones included
numbers = st.one_of(
    st.integers(-1000, 1000).map(str),
    st.floats(allow_nan=False, allow_infinity=False, width=32).map(lambda f: f"{f:g}"),
    st.sampled_from(["1e999", "-1e999", "1e-999", "NaN", "nan", "infinity", "-infinity",
                     "calc(1/0)", ".", "+-1", "1e", "0x10", "00000000000000000001"]))
units = st.sampled_from(["", "%", "deg", "turn", "rad", "px", "em"])
component = st.builds(lambda n, u: n + u, numbers, units)
spaces = st.sampled_from(["srgb", "srgb-linear", "display-p3", "a98-rgb", "prophoto-rgb",
                          "rec2020", "xyz", "xyz-d50", "xyz-d65", "lab", "oklab", "lch",
                          "oklch", "hsl", "hwb", "nonsense"])
functions = st.sampled_from(["rgb", "rgba", "hsl", "hsla", "hwb", "lab", "lch", "oklab",
                             "oklch"])
named = st.sampled_from(["red", "transparent", "currentcolor", "canvastext", "linktext",
                         "rebeccapurple", "notacolour", "#fff", "#12345678", "#ggg", "#1234"])


@st.composite
def colour_text(draw, depth=2):
    kind = draw(st.integers(0, 5 if depth > 0 else 2))
    if kind == 0:
        return draw(named)
    if kind == 1:
        args = draw(st.lists(component, min_size=0, max_size=5))
        sep = draw(st.sampled_from([" ", ", ", " / "]))
        return f"{draw(functions)}({sep.join(args)})"
    if kind == 2:
        args = " ".join(draw(st.lists(component, min_size=3, max_size=4)))
        return f"color({draw(spaces)} {args})"
    if kind == 3:
        a, b = draw(colour_text(depth - 1)), draw(colour_text(depth - 1))
        pa, pb = draw(st.sampled_from(["", " 30%", " 0%", " 150%", " -5%"])), \
            draw(st.sampled_from(["", " 70%", " 0%"]))
        hue = draw(st.sampled_from(["", " longer hue", " shorter hue", " increasing hue"]))
        return f"color-mix(in {draw(spaces)}{hue}, {a}{pa}, {b}{pb})"
    if kind == 4:
        return f"light-dark({draw(colour_text(depth - 1))}, {draw(colour_text(depth - 1))})"
    return draw(st.text(max_size=30))  # anything at all


def in_range(value):
    return all(isinstance(c, float) and 0.0 <= c <= 1.0 and not math.isnan(c) for c in value)


@FAST
@given(colour_text(), rgba, st.sampled_from(["light", "dark"]))
def test_colour_parser_is_total_and_in_range(text, current, scheme):
    value = parse_color(text, current=current, scheme=scheme)
    assert value is None or value == CURRENTCOLOR or (len(value) == 4 and in_range(value))
    # the same value given as tokens gives the same answer
    tokens = tinycss2.parse_component_value_list(text)
    assert parse_color(tokens, current=current, scheme=scheme) == value


@FAST
@given(colour_text())
def test_colour_parser_without_current_colour(text):
    value = parse_color(text)
    assert value is None or value == CURRENTCOLOR or in_range(value)


@FAST
@given(colour_text(), colour_text(), st.integers(-10, 110), spaces)
def test_color_mix_stays_in_range(a, b, pct, space):
    value = parse_color(f"color-mix(in {space}, {a} {pct}%, {b})", current=(0.2, 0.4, 0.6, 1.0))
    assert value is None or in_range(value)


@FAST
@given(rgba, rgba, st.lists(rgba, max_size=5))
def test_compositing_stays_in_range(top, bottom, layers):
    assert in_range(over(top, bottom))
    result = flatten(layers, (bottom[0], bottom[1], bottom[2], 1.0))
    assert in_range(result)
    opaque = over(top, (bottom[0], bottom[1], bottom[2], 1.0))
    assert opaque[3] == pytest.approx(1.0)
    ratio = wcag.contrast_ratio(opaque[:3], bottom[:3])
    assert 1.0 <= ratio <= 21.0 + 1e-9  # WCAG 2 contrast ratio range


# -- custom properties and the cascade -----------------------------------------------------------

names = st.sampled_from(["--a", "--b", "--c", "--d"])


@st.composite
def custom_value(draw):
    parts = draw(st.lists(st.one_of(
        names.map(lambda n: f"var({n})"),
        st.tuples(names, named).map(lambda p: f"var({p[0]}, {p[1]})"),
        named, component, st.sampled_from(["(", ")", "{", "}", ";", "!", "var(", "var()",
                                           "var(x)", "var(--a,)", "calc(", "/*"])),
        max_size=6))
    return " ".join(parts)


@FAST
@given(st.lists(st.tuples(names, custom_value()), max_size=6), custom_value(),
       st.integers(1, 200))
def test_custom_property_substitution_is_total_and_bounded(decls, colour, limit):
    css = "; ".join(f"{n}: {v}" for n, v in decls) + f"; color: {colour}"
    ruleset = RuleSet([], [])
    resolver = Resolver(ruleset, "light")
    resolver.max_var_tokens = limit
    winners = cascade([], parse_declarations(css), ruleset)
    style = resolver.compute(winners, ROOT_PARENT, True)
    assert len(style.color) == 4 and in_range(style.color)
    for tokens, _decl, chain in style.custom.values.values():
        assert tokens is not None and len(chain) <= 64


@FAST
@given(st.lists(st.tuples(st.sampled_from(["p", ".x", "#y", "div p", "*", "p:hover",
                                           ":root", "[data-a]", "p::before", "!!", ""]),
                          custom_value()), max_size=8))
def test_cascade_of_any_stylesheet_gives_a_colour(rules):
    from tinctura.extract.html import parse_html
    from tinctura.extract.loader import SheetLoader

    css = "\n".join(f"{sel} {{ color: {val}; background: {val} }}" for sel, val in rules)
    root = parse_html(f'<html><head><style>{css}</style></head><body><div>'
                      f'<p class="x" id="y" data-a>t</p></div></body></html>')
    ruleset, _ = SheetLoader("/nonexistent").ruleset_for(root, "/nonexistent/index.html")
    from tinctura.extract.media import Environment
    from tinctura.extract.samples import PageWalker, StyleCache

    walker = PageWalker("index.html", root, ruleset.index(Environment(1280)), ruleset,
                        "light", "light", StyleCache(), 1280, {})
    for sample in walker.walk(states=True):
        assert sample.fg is None or in_range(sample.fg)
        assert sample.bg is None or in_range(sample.bg)


# -- stylesheets: parsing is total, and the chunked parse equals the whole parse ---------------

css_pieces = st.sampled_from([
    "p{color:red}", "a, b:hover { color: #777 !important }", "@media (max-width: 600px) {",
    "}", "{", "/* { */", "/*", '"', "'{'", '"}\n', "\\{", "url(a{b)", "@import 'x.css';",
    "@layer a, b;", "@layer {", "@supports (color: red) {", ":root { --x: var(--x) }",
    ".a::before { content: '}' }", "@unknown foo { bar }", "p { color: 1e999px }", "\x00",
    "\ufeff", "<!--", "-->", "}}}", "p {", "\n", "div > p + .x ~ #y { background: #0000 }",
])


@FAST
@given(st.lists(css_pieces, max_size=40), st.integers(1, 64), st.sampled_from(["\n", ""]))
def test_stylesheet_parsing_is_total_and_chunks_change_nothing(pieces, chunk, joint):
    """Cut into chunks or not, the same rules with the same lines and columns (a minified
    sheet, joined without newlines, is one line that a chunk starts inside)."""
    css = joint.join(pieces)
    whole = parse_stylesheet(css, "s.css")
    pieces_seen = list(sheet_mod._chunks(css, size=chunk))
    assert "".join(p for _, _, p in pieces_seen) == css
    chunked = sheet_mod.ParsedSheet("s.css")
    sheet_mod.parse_chunks(css, chunked, size=chunk)

    def shape(sheet):
        return ([(r.selector_text, [(d.name, d.text, d.line, d.column) for d in r.decls],
                  r.media, r.layer) for r in sheet.rules if not isinstance(r, tuple)],
                [r for r in sheet.rules if isinstance(r, tuple)], sheet.errors,
                sheet.layer_names)

    assert shape(chunked) == shape(whole)


@pytest.mark.parametrize("css", [
    "\\{url(a{b)p{color:red}p{color:red}",  # `\{url(` is a function (found by the test above)
    "xurl(a{b)p{color:red}p{color:red}",  # a longer name: a function too
    "#url(a b{c).}}}p{color:red}p{color:red}",  # a hash, then an open ( block
    "5url(a{b)p{color:red}p{color:red}",  # a dimension, then a ( block
    "\\31 url(a{b)p{color:red}p{color:red}",  # a hex escape and its space, then more name
    "<!--url(a{b)p{color:red}p{color:red}",  # after <!--: a url
    "url(a\\)b{c)p{color:red}p{color:red}",  # an escaped ) inside a url
    "url(a\"b{c)p{color:red}p{color:red}",  # a bad url runs to its )
    'p{background:url( "a)b{" )}p{color:red}p{color:red}',  # a quoted url is a string
    "a(b{c}d)p{color:red}p{color:red}",  # a } inside an open ( block closes nothing
    "[a{b}]p{color:red}p{color:red}",
])
def test_chunks_are_cut_where_tinycss2_ends_a_top_level_rule(css):
    # the whole parse is tinycss2's reading; cut into the smallest chunks, the same rules
    whole = parse_stylesheet(css, "s.css")
    chunked = sheet_mod.ParsedSheet("s.css")
    sheet_mod.parse_chunks(css, chunked, size=1)
    assert [(r.selector_text, [(d.name, d.text, d.line, d.column) for d in r.decls])
            for r in chunked.rules] == \
        [(r.selector_text, [(d.name, d.text, d.line, d.column) for d in r.decls])
         for r in whole.rules]
    assert chunked.errors == whole.errors


def test_name_character_classes_hold_every_code_point_of_the_syntax():
    # CSS Syntax Module Level 3, 4.2 Definitions: an ident-start code point is a letter, `_`
    # or a non-ASCII code point; an ident code point is one of those, a digit or `-` (U+0000
    # reads as U+FFFD, non-ASCII). The classes are written as what they exclude: every code
    # point is checked against that definition.
    import re

    from tinctura.extract import ruleset as ruleset_mod

    def start(c):
        return c == "_" or ("a" <= c.lower() <= "z") or ord(c) >= 0x80

    def name(c):
        return start(c) or "0" <= c <= "9" or c == "-"

    first, rest = re.compile(ruleset_mod._IDENT_START), re.compile(ruleset_mod._IDENT_REST)
    name_or_nul = re.compile(sheet_mod._NAME)
    hash_at = re.compile(sheet_mod._NAME_HASH_AT)
    for n in range(0x110000):
        c = chr(n)
        assert bool(first.fullmatch(c)) == start(c), hex(n)
        assert bool(rest.fullmatch(c)) == name(c), hex(n)
        assert bool(name_or_nul.fullmatch(c)) == (name(c) or n == 0), hex(n)
        assert bool(hash_at.fullmatch(c)) == (name(c) or n == 0 or c in "#@"), hex(n)
    assert ruleset_mod.CLASS_IN_SELECTOR.findall(".b\u00e9-1.x_ .-a .1x") == ["b\u00e9-1", "x_", "-a"]
