"""Provenance: which declaration, in which stylesheet and line, produced each colour.

The expected declarations are the ones written in each document, chosen by the cascade rules of
CSS Cascading and Inheritance Level 5 (W3C); lines and columns count from 1 as in the source.
"""
from conftest import hexes


def one(samples, text, scheme="light"):
    return samples[(scheme, "rest", text)]


def test_inherited_colour_names_the_ancestor(render):
    s = render('<div class="box"><p><span>t</span></p></div>', ".box{color:#123456}")
    cause = one(s, "t").fg_cause
    assert cause.declaration.selector == ".box" and cause.declaration.value == "#123456"
    assert cause.inherited_from == "/html/body/div"


def test_inline_style_and_important(render):
    s = render('<p style="color:#010101">a</p><p class="imp" style="color:#010101">b</p>',
               ".imp{color:#020202 !important}")
    a, b = one(s, "a").fg_cause.declaration, one(s, "b").fg_cause.declaration
    assert (a.origin, a.sheet, a.value) == ("inline", "style attribute", "#010101")
    assert (b.origin, b.selector, b.important) == ("author", ".imp", True)


def test_custom_property_chain_outermost_first(render):
    css = ":root{--ink-2:#00000089}\n.x{--body-ink:var(--ink-2)}\n.x p{color:var(--body-ink)}"
    s = render('<div class="x"><p>t</p></div>', css)
    cause = one(s, "t").fg_cause
    assert cause.declaration.value == "var(--body-ink)"
    assert [(d.property, d.value, d.line) for d in cause.chain] == [
        ("--body-ink", "var(--ink-2)", 2), ("--ink-2", "#00000089", 1)]


def test_user_agent_default(render):
    s = render('<a href="#x">t</a>')
    d = one(s, "t").fg_cause.declaration
    # HTML Rendering 15.3.4: :link { color: LinkText } (#0000ee in the light scheme)
    assert (d.origin, d.value) == ("user-agent", "LinkText") and hexes(one(s, "t"))[0] == "#0000ee"


def test_background_from_a_grand_ancestor_and_opacity_layer(render):
    s = render('<section class="band"><div class="fade"><p>t</p></div></section>',
               ".band{background:#203040} .fade{opacity:.5}")
    sample = one(s, "t")
    kinds = [(layer.kind, layer.xpath) for layer in sample.bg_layers]
    assert ("background-color", "/html/body/section") in kinds
    assert ("opacity", "/html/body/section/div") in kinds
    assert sample.bg_cause.declaration.selector == ".band"


def test_xpaths_are_what_lxml_getpath_writes():
    """The walker builds XPaths from its children lists instead of calling lxml's getpath on
    every element; the two must agree (reference: lxml's ``getpath``, libxml2's
    xmlGetNodePath), including same-tag siblings, comments between them and implied tbody."""
    from tinctura.extract.html import parse_html
    from tinctura.extract.ruleset import RuleSet
    from tinctura.extract.structure import PageStructure

    root = parse_html("<html><body><div><p>a</p><!-- c --><p>b</p><span>x</span></div>"
                      "<div><svg><rect/><rect/></svg><o:p>w</o:p></div>"
                      "<table><tr><td>1</td><td>2</td></tr><tr><td>3</td></tr></table>"
                      "<ul><li>1<li>2<li>3</ul><p>end</p></body></html>")
    page = PageStructure(root, RuleSet([], []).structure)
    todo = [root]
    while todo:
        el = todo.pop()
        todo.extend(child for child, *_ in page.children(el))
    getpath = root.getroottree().getpath
    elements = [el for el in root.iter() if isinstance(el.tag, str)]
    assert len(page.paths) == len(elements)
    for el in elements:
        assert page.paths[el] == getpath(el)


def test_column_in_a_large_minified_stylesheet(render):
    """A minified stylesheet is one line, and a large one is parsed in chunks that start inside
    that line: the column named is still counted from the line's start (found here by searching
    the file's text for the declaration)."""
    from tinctura.extract.sheet import CHUNK_CHARS

    filler = "".join(f".f{i}{{color:#{i % 4096:03x}}}" for i in range(30000))
    css = filler + ".target{color:#123456}"
    assert "\n" not in css and len(css) > 2 * CHUNK_CHARS
    s = render('<p class="target">t</p>', head='<link rel="stylesheet" href="big.css">',
               files={"big.css": css})
    declaration = one(s, "t").fg_cause.declaration
    assert (declaration.sheet, declaration.line) == ("big.css", 1)
    assert declaration.column == css.index("color:#123456") + 1


def test_column_of_a_style_block_on_its_tags_line(tmp_path):
    """A ``<style>`` whose CSS starts on its start tag's line (a minified page is one line):
    columns on that line count from the line's start, as in the page's source (found by
    searching the page's text); on the block's later lines from their own start."""
    from tinctura.engine import Options, Site

    html = ('<!doctype html><html><head><title>Tide tables</title><style>.a{color:#123456}\n'
            '.b{color:#654321}</style></head><body><p class="a">a</p><p class="b">b</p>'
            '</body></html>')
    (tmp_path / "index.html").write_text(html)
    result = Site(str(tmp_path), Options(states=False)).check_page("index.html")
    found = {s.text: s.fg_cause.declaration for s in result.samples}
    assert (found["a"].line, found["a"].column) == (1, html.index("color:#123456") + 1)
    line_two = html.split("\n")[1]
    assert (found["b"].line, found["b"].column) == (2, line_two.index("color:#654321") + 1)


def test_a_style_block_moved_along_its_line_shares_one_rule_set(tmp_path):
    """Minified pages whose titles differ put the same ``<style>`` at different columns: they
    still share one rule set (a rule set per page would check every page with cold caches),
    whose sheet names the first page, at that page's column."""
    from tinctura.engine import Options, Site

    pages = {}
    for name, title in (("a", "Berths"), ("b", "Tide tables and berth windows")):
        pages[name] = (f'<!doctype html><html><head><title>{title}</title><style>'
                       f'p{{color:#123456}}</style></head><body><p>t</p></body></html>')
        (tmp_path / name).mkdir()
        (tmp_path / name / "index.html").write_text(pages[name])
    site = Site(str(tmp_path), Options(states=False))
    found = [site.check_page(f"{name}/index.html").samples[0].fg_cause.declaration
             for name in ("a", "b")]
    assert len(site.loader._rulesets) == 1
    assert found[0].sheet == found[1].sheet == "a/index.html <style> #1"
    assert found[1].column == pages["a"].index("color:#123456") + 1
