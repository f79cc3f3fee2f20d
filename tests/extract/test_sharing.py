"""Computed styles are shared between elements and across pages by a structural key: whatever
the cascade can read must be in the key, and nothing else.

Expected colours are the values written in the CSS and HTML below (the cascade in CSS Cascade
4: a class selector beats the inherited value; a presentation attribute is an author-level
declaration below every style rule, SVG 2 "presentation attributes").
"""
from tinctura.colour.convert import to_hex
from tinctura.engine import Options, Site


def colours(site_dir, files: dict, css: str = "") -> dict:
    """{(page, text): foreground hex} for every page, checked in order by one Site."""
    (site_dir / "site.css").write_text(css)
    for name, body in files.items():
        (site_dir / name).write_text(
            f'<!doctype html><html{body[0]}><head><link rel="stylesheet" href="site.css">'
            f'</head><body>{body[1]}</body></html>')
    site = Site(str(site_dir), Options(states=False))
    out = {}
    for rel in site.pages():
        for s in site.check_page(rel).samples:
            out[(rel, s.text)] = to_hex(s.fg_raw[:3])
    return out


def test_svg_fill_attributes_are_not_shared(tmp_path):
    got = colours(tmp_path, {"a.html": ("", '<svg><text fill="#777777">grey</text>'
                                           '<text fill="#000000">black</text></svg>')})
    assert got[("a.html", "grey")] == "#777777"
    assert got[("a.html", "black")] == "#000000"


def test_classes_selectors_name_keep_elements_apart(tmp_path):
    got = colours(tmp_path, {"a.html": ("", '<p class="warn extra1">warned</p>'
                                           '<p class="extra2">plain</p>'
                                           '<p class="warn extra3">warned too</p>')},
                  css=".warn { color: #aa0000 }")
    assert got[("a.html", "warned")] == got[("a.html", "warned too")] == "#aa0000"
    assert got[("a.html", "plain")] == "#000000"


def test_ids_selectors_name_keep_elements_apart(tmp_path):
    got = colours(tmp_path, {"a.html": ("", '<p id="lede">first</p><p id="other">second</p>')},
                  css="#lede { color: #123456 }")
    assert got[("a.html", "first")] == "#123456"
    assert got[("a.html", "second")] == "#000000"


def test_has_styles_are_not_shared_across_pages(tmp_path):
    got = colours(tmp_path, {
        "a.html": ("", '<div class="card"><em>badge</em><p>with badge</p></div>'),
        "b.html": ("", '<div class="card"><i>icon</i><p>without</p></div>'),
    }, css=".card:has(em) p { color: #999999 }")
    assert got[("a.html", "with badge")] == "#999999"
    assert got[("b.html", "without")] == "#000000"


def test_the_root_element_is_keyed_by_its_attributes(tmp_path):
    got = colours(tmp_path, {
        "a.html": (' style="color:#555555"', "<p>grey page</p>"),
        "b.html": ("", "<p>black page</p>"),
    })
    assert got[("a.html", "grey page")] == "#555555"
    assert got[("b.html", "black page")] == "#000000"


# -- keys hold what a selector reads, no more ---------------------------------------------------
# Expected colours: Selectors 4 (:first-child, :nth-child, :nth-of-type, :has, the child and
# next-sibling combinators) applied by hand to the HTML below.

def structural_ids(site_dir, body: str, css: str) -> tuple:
    """(the page's elements by id attribute -> structural id, the RuleSet) of one page."""
    from tinctura.extract.html import parse_html
    from tinctura.extract.structure import PageStructure

    (site_dir / "site.css").write_text(css)
    html = (f'<!doctype html><html><head><link rel="stylesheet" href="site.css"></head>'
            f'<body>{body}</body></html>')
    (site_dir / "a.html").write_text(html)
    site = Site(str(site_dir), Options(states=False))
    root = parse_html(html.encode())
    ruleset, _ = site.loader.ruleset_for(root, str(site_dir / "a.html"))
    page = PageStructure(root, ruleset.structure)
    ids, todo = {}, [root]
    while todo:
        el = todo.pop()
        for child, ident, _ in page.children(el):
            if child.get("id"):
                ids[child.get("id")] = ident
            todo.append(child)
    return ids, ruleset


NAV = ('<nav class="side"><ul><li id="a" class="item">A</li>'
       '<li id="b" class="item active">B</li><li id="c" class="item">C</li>'
       '<li id="d" class="item">D</li></ul></nav><ol><li id="e">E</li><li id="f">F</li></ol>')


def test_first_child_reads_only_whether_a_sibling_comes_before(tmp_path):
    ids, _ = structural_ids(tmp_path, NAV, ".side ul > li:not(:first-child) { color: #555 }")
    assert ids["a"] != ids["c"]  # first or not
    assert ids["c"] == ids["d"]  # later items share although their previous siblings differ
    # an <li> outside .side cannot match: its siblings are not in its key
    assert ids["e"] == ids["f"]


def test_nth_child_reads_its_formula_and_plus_reads_the_siblings(tmp_path):
    ids, _ = structural_ids(tmp_path, NAV, "li:nth-child(2n) { color: #555 }")
    # Selectors 4, An+B: positions 2 and 4 are 2n, 1 and 3 are not; nothing else is read
    assert ids["a"] == ids["c"] != ids["b"] == ids["d"]
    ids, _ = structural_ids(tmp_path, NAV, "li:nth-last-of-type(-n+2) { color: #555 }")
    assert ids["a"] == ids["b"] != ids["c"] == ids["d"]  # the last two of their type
    ids, _ = structural_ids(tmp_path, NAV, "li:nth-child(2n of .item) { color: #555 }")
    assert len({ids[k] for k in "abcd"}) == 4  # `of S` reads the siblings themselves
    ids, _ = structural_ids(tmp_path, NAV, ".active + li { color: #555 }")
    assert ids["c"] != ids["d"]  # right after the active item or not


POSITIONS_CSS = ("li:nth-child(2n+1) { color: #111111 } li:nth-last-child(3) { color: #222222 }"
                 " li:first-of-type:not(:last-of-type) { color: #333333 }"
                 " p:nth-of-type(-n+2) { color: #444444 } li:nth-child(n+5) { color: #555555 }")


def test_position_formulas_colour_as_cssselect2_matches(tmp_path):
    # the reference is cssselect2's own matching of each rule on the page (Selectors 4 An+B),
    # the last matching rule winning (equal specificity but for :first-of-type's rule, whose
    # two pseudo-classes only outrank the others where they hold)
    import cssselect2
    from lxml import etree

    lists = ["<ol>" + "".join(f"<li>item {n} of {size}</li>" for n in range(1, size + 1))
             + "</ol>" for size in (1, 2, 3, 6, 7)]
    mixed = "<div><p>p one</p><span>s</span><p>p two</p><p>p three</p></div>"
    pages = {f"{k}.html": ("", "".join(lists[k:] + lists[:k]) + mixed) for k in range(3)}
    got = colours(tmp_path, pages, css=POSITIONS_CSS)
    matcher = cssselect2.Matcher()
    for rule in (r.strip() for r in POSITIONS_CSS.split("}") if r.strip()):
        selector, colour = rule.split("{")
        for compiled in cssselect2.compile_selector_list(selector):
            matcher.add_selector(compiled, colour.split(":")[1].strip())
    for name, (_, body) in pages.items():
        root = etree.fromstring(f"<html><body>{body}</body></html>")
        for wrapper in cssselect2.ElementWrapper.from_xml_root(root).iter_subtree():
            text = wrapper.etree_element.text
            if wrapper.etree_element.tag not in ("li", "p") or not text:
                continue
            matches = matcher.match(wrapper)
            expected = max(matches)[3] if matches else "#000000"
            assert got[(name, text)] == expected, (name, text)


def test_first_child_colours_follow_the_position(tmp_path):
    got = colours(tmp_path, {
        "a.html": ("", '<ul class="n"><li class="x">one</li><li>two</li><li>three</li></ul>'),
        "b.html": ("", '<ul class="n"><li>uno</li><li class="x">dos</li><li>tres</li></ul>'),
    }, css=".n > li:not(:first-child) { color: #555555 }")
    assert got[("a.html", "one")] == got[("b.html", "uno")] == "#000000"
    assert {got[k] for k in [("a.html", "two"), ("a.html", "three"), ("b.html", "dos"),
                             ("b.html", "tres")]} == {"#555555"}


def test_has_keeps_only_the_elements_it_can_match_apart(tmp_path):
    body = ('<table id="t1"><tr><td><code>x</code></td></tr></table>'
            '<table id="t2"><tr><td>y</td></tr></table><p id="p1">a</p><p id="p2">b</p>'
            '<table id="t3"><tr><td>z <b>w</b> <code>v</code></td></tr></table>')
    ids, ruleset = structural_ids(tmp_path, body, "table:has(code) { color: #555 }")
    assert not ruleset.uses_has  # analysed: sharing stays on
    assert ids["t1"] != ids["t2"]  # :has(code) holds for one, not the other
    assert ids["t1"] == ids["t3"]  # different subtrees, same answer: what the cascade reads
    assert ids["p1"] == ids["p2"]
    # a :has() that reads the following siblings: t2 is right before a <p>, t1 and t3 are not
    ids, ruleset = structural_ids(tmp_path, body, "table:has(+ p) { color: #555 }"
                                  " div:not(:has(+ p)) { color: #666 }")
    assert not ruleset.uses_has and not ruleset.siblings.any  # sharing stays on
    assert ids["t1"] == ids["t3"] != ids["t2"]
    assert ids["p1"] == ids["p2"]
    # a compound naming no tag, class or id: every element keeps its answer, and shares by it
    ids, ruleset = structural_ids(tmp_path, body, ":has(> code) { color: #555 }")
    assert not ruleset.uses_has
    assert ids["t1"] == ids["t2"] == ids["t3"]  # their children are rows, never code
    assert ids["p1"] == ids["p2"]


HAS_CSS = ("p:has(+ ul) { color: #111111 } li:not(:has(~ li.k)) { color: #222222 }"
           " :has(> b) { color: #333333 } [data-x]:has(i) { color: #444444 }"
           " h2:has(em) + p { color: #555555 } div:has(+ div .k) > span { color: #666666 }")


def colours_as_cssselect2_matches(tmp_path, pages: dict, css: str) -> set:
    """Assert that every text of ``pages`` has the colour cssselect2's own matching of each
    rule of ``css`` gives it (the most specific rule winning, then the one written last: CSS
    Cascade 4), inherited from the parent where none matches; returns the colours met."""
    import cssselect2
    from lxml import etree

    got = colours(tmp_path, pages, css=css)
    matcher = cssselect2.Matcher()
    for order, rule in enumerate(r.strip() for r in css.split("}") if r.strip()):
        selector, colour = rule.split("{")
        for compiled in cssselect2.compile_selector_list(selector):
            matcher.add_selector(compiled, (order, colour.split(":")[1].strip()))
    checked = set()
    for name, (_, html) in pages.items():
        root = etree.fromstring(f"<html><body>{html}</body></html>")
        inherited = {}
        for wrapper in cssselect2.ElementWrapper.from_xml_root(root).iter_subtree():
            el = wrapper.etree_element
            matches = matcher.match(wrapper)
            own = max((m[0], m[3]) for m in matches)[1][1] if matches else None
            parent = el.getparent()
            inherited[el] = own or (inherited[parent] if parent is not None else "#000000")
            if (el.text or "").strip() and (name, el.text) in got:
                assert got[(name, el.text)] == inherited[el], (name, el.text)
                checked.add(inherited[el])
    return checked


def test_has_reading_siblings_or_any_element_colours_as_cssselect2_matches(tmp_path):
    # the reference is cssselect2's own matching (Selectors 4 :has() with relative selectors)
    body = ('<p>p before list</p><ul><li>i1</li><li>i2</li><li class="k">ik</li><li>i4</li></ul>'
            '<p>p alone</p><div><p>bold <b>b</b> parent</p></div><section data-x="1">'
            '<span>x with <i>i</i></span></section><section data-x="2"><span>x plain</span>'
            '</section><h2>head <em>e</em></h2><p>after em head</p><h2>plain head</h2>'
            '<p>after plain head</p><div><span>s1</span></div><div><p class="k">deep k</p></div>'
            '<div><span>s3</span></div>')
    pages = {"a.html": ("", body), "b.html": ("", body.replace('<li class="k">ik</li>', "")),
             "c.html": ("", body.replace("<ul>", "<ol>").replace("</ul>", "</ol>")),
             "d.html": ("", body.replace("<em>e</em>", "<i>e</i>"))}  # the same siblings
    assert len(colours_as_cssselect2_matches(tmp_path, pages, HAS_CSS)) >= 6


INNER_CSS = (".box :not(li + li) > code { color: #111111 } .box :is(h2 + p, h3 ~ p) em"
             " { color: #222222 } :where(.a ~ .b) span { color: #333333 }"
             " .box li:not(.k + li) { color: #444444 }")


def test_sibling_combinators_inside_is_and_not_colour_as_cssselect2_matches(tmp_path):
    # the reference is cssselect2's own matching (Selectors 4 :is(), :not(), :where() with
    # complex selectors); only the elements their rightmost compounds can match read siblings
    body = ('<div class="box"><ul><li><code>c1</code></li><li><code>c2</code></li>'
            '<li class="k"><code>c3</code></li><li><code>c4</code></li></ul>'
            '<h2>h</h2><p>one <em>e1</em></p><p>two <em>e2</em></p><h3>h3</h3><div>x</div>'
            '<p>three <em>e3</em></p></div><ul><li><code>out1</code></li><li><code>out2</code>'
            '</li></ul><p class="a">a</p><p class="b">b <span>s1</span></p>'
            '<p class="b">b2 <span>s2</span></p><p><span>s3</span></p>')
    pages = {"a.html": ("", body), "b.html": ("", body.replace('<h2>h</h2>', "")),
             "c.html": ("", body.replace('class="a"', 'class="z"'))}
    assert len(colours_as_cssselect2_matches(tmp_path, pages, INNER_CSS)) >= 4
    # the navigation-like list outside .box keeps its items alike: not every element reads
    # its siblings because of one such selector
    ids, ruleset = structural_ids(tmp_path, NAV, INNER_CSS)
    assert not ruleset.siblings.any
    assert ids["e"] == ids["f"]


RELATION_CSS = ("h2 ~ p { color: #111111 } .n h3 + p { color: #222222 }"
                " [data-x] ~ span { color: #333333 } .w h1 ~ * { color: #444444 }"
                " .w h1 + p + p { color: #555555 } section :is(b, i) + :is(span, em)"
                " { color: #666666 } :where(h3, h4) ~ :is(p) { color: #777777 }")


def test_sibling_relations_colour_as_cssselect2_matches(tmp_path):
    # the reference is cssselect2's own matching (Selectors 4, the next-sibling and
    # subsequent-sibling combinators); the keys hold whether the relation holds, no more
    body = ('<div><p>p0</p><h2>h</h2><p id="p1">p1</p><p id="p2">p2</p><div><p>in</p></div>'
            '<p>p3</p></div><div class="n"><p>n0</p><h3>h3</h3><p>n1</p><p>n2</p></div>'
            '<section><span>s0</span><b data-x="1">x</b><span>s1</span><span>s2</span>'
            '<i>i</i><em>e1</em><em>e2</em></section><div class="w"><p>w0</p><h1>t</h1>'
            '<p>w1</p><p>w2</p><p>w3</p><em>w4</em></div>')
    pages = {"a.html": ("", body),
             "b.html": ("", body.replace("<h2>h</h2>", "").replace("<p>p3</p>",
                                                                   "<h2>h</h2><p>p3</p>")),
             "c.html": ("", body.replace(' data-x="1"', "").replace("<h3>h3</h3>", "<h4>4</h4>")),
             "d.html": ("", body.replace("<h1>t</h1>", "<h5>t</h5>"))}
    assert len(colours_as_cssselect2_matches(tmp_path, pages, RELATION_CSS)) >= 8
    ids, ruleset = structural_ids(tmp_path, body, RELATION_CSS)
    assert not ruleset.siblings.any
    assert ids["p1"] == ids["p2"]  # both after the h2: their other siblings do not count
    from tinctura.extract.siblings import has_compounds
    # a hovered link before a span: the span keeps whether its previous sibling is a hovered
    # link, not the siblings themselves; :root is the html element, the only one whose
    # :has() answers are kept
    ids, _ = structural_ids(tmp_path, '<p><b>x</b><span id="s1">1</span><a href="#">l</a>'
                            '<span id="s2">2</span><i>y</i><span id="s3">3</span></p>',
                            "a:hover + span { color: #666 } :root:has(input:checked) p"
                            " { color: #777 }")
    assert ids["s1"] == ids["s2"] == ids["s3"]  # (no link is hovered at rest)
    # a compound that names its elements only through :is() is those elements: a
    # <div> after a heading keeps nothing of its siblings, a <p> keeps whether one came before
    ids, ruleset = structural_ids(tmp_path, '<h2>h</h2><div id="d1">x</div><p id="q1">a</p>'
                                  '<div id="d2">y</div><p id="q2">b</p>',
                                  ":is(h1, h2, h3) + :is(p, ul) { color: #888 }"
                                  " :is(h2, h3):has(+ p) { color: #999 }")
    assert ids["d1"] == ids["d2"] and not ruleset.siblings.free
    import tinycss2
    reqs = has_compounds(tinycss2.parse_component_value_list(":is(h2, h3):has(+ p)"))
    assert sorted(req.tag for req, _ in reqs) == ["h2", "h3"]
    (req, _), = has_compounds(tinycss2.parse_component_value_list(":root:has(input:checked) p"))
    assert req.tag == "html"


def test_a_has_that_reads_a_state_is_answered_in_each_state_walk(tmp_path):
    # Selectors 4: `tr:has(a:hover)` holds while the link is hovered, not while another
    # control of the row is (`:hover` also holds for the row itself in both): the row's
    # background differs between the two
    from tinctura.engine import check_paths

    (tmp_path / "site.css").write_text(
        "body { background: #ffffff } tr:has(a:hover) { background: #000000 }"
        " a:hover, span:hover { color: #ffffff }")
    (tmp_path / "a.html").write_text(
        '<!doctype html><html><head><link rel="stylesheet" href="site.css"></head><body>'
        '<table><tr><td><a href="#x">link text</a> <span tabindex="0">span text</span>'
        '</td></tr></table></body></html>')
    report = check_paths([str(tmp_path)], Options())
    seen = {(s.text, s.state): (to_hex(s.fg), to_hex(s.bg)) for p in report.pages
            for s in p.samples}
    assert seen[("link text", "hover")] == ("#ffffff", "#000000")
    assert seen[("span text", "hover")] == ("#ffffff", "#ffffff")


def test_simple_has_answers_agree_with_cssselect2():
    # the reference is cssselect2's own test of each compound (its :has() walks wrappers of
    # the whole subtree); tinctura answers A:has(B) and A:has(> B) with lxml's tag iteration,
    # or an XPath of the elements with B's id, a class of B or a state B needs; each in the
    # tree at rest and in the states a walk puts in force (on a target, and on its ancestors)
    import cssselect2
    from lxml import etree

    from tinctura.extract.sheet import compile_one, mark_states, unmark_states
    from tinctura.extract.siblings import _has_simple, _simple_has

    root = etree.fromstring(
        '<html><body><table class="t"><!-- a comment --><tr><td><code>x</code></td></tr>'
        '</table><table><tr><td>y<CODE class="k">z</CODE></td></tr></table>'
        '<div class="admonition"><p>p</p><ul><li>i</li></ul></div>'
        '<div class="admonition"><p><ul><li>deep</li></ul></p></div>'
        '<div class="admonition note"><span class="k x">s</span><p>q</p></div>'
        '<form><input id="i1" type="checkbox" checked><input type="radio"></form></body></html>',
        etree.HTMLParser())
    compounds = ["table:has(code)", ".admonition:has(> ul)", "div:has(.k)",
                 "div.note:has(span.k.x)", "table.t:has(> tr)", "table:has(code.k)",
                 "div:has(> p[class])", "table:has(+ table)", "table:has(~ div.admonition)",
                 ":has(> li)", "p:has(+ ul)", "div:has(~ div.note)", ":has(+ [class])",
                 ":has(> p):not(ul)", "*:has(> li)", "div:has(> span:is(.k, .x))",
                 "div:where(.admonition):has(ul)", "body:has(input:checked)",
                 ":root:has(input:checked)", "html:root:has(.k)", ":root:has(> body)",
                 ":root:has(#i1:checked)", "form:has(> input#i1)",
                 # states: needed by B itself, by each of an :is() list, or inside :not()
                 "div:has(~ p:hover)", ":root:has(p:hover)", "body:has(input:focus)",
                 "body:has(#i1:focus-visible)", "body:has(input:is(:focus, :hover))",
                 "div:has(> p:not(:hover))", "div:has(span.k:hover)", "table:has(+ table:hover)",
                 "form:has(> :focus-within)", "div:has(.x:is(:hover, .k))",
                 # lists: any of their selectors
                 "div:has(b, p)", "body:has(a:hover, input:hover)", "div:has(> p, + ul)",
                 "table:has(+ table:focus, code.k)"]
    marks = [((), ()), (("hover",), ("hover",)), (("focus", "focus-visible"), ("focus-within",))]
    targets = [root.find(".//input"), root.find(".//span"), root.find(".//p"),
               root.findall(".//table")[1]]
    checked = 0
    for target in targets:
        for on_self, on_path in marks:
            marked = mark_states(target, on_self, on_path)
            for wrapper in cssselect2.ElementWrapper.from_html_root(root).iter_subtree():
                for compound in compounds:
                    spec = _simple_has(compound)
                    assert spec is not None, compound
                    expected = compile_one(compound)[0].test(wrapper)
                    assert _has_simple(wrapper.etree_element, spec) == expected, \
                        (compound, on_self, target.tag)
                    checked += expected
            unmark_states(marked)
    assert checked >= 150  # some of them match
    for compound in ("div:has(.a .b)", "a:hover:has(b)", "div:has(b, i p)", "li:first-child:has(a)",
                     "div:has(+ p span)", "div:has(a:hover span)", "div:has(> p):first-child",
                     "div:has(:is(p span))"):
        assert _simple_has(compound) is None, compound


def test_a_has_of_a_state_on_the_body_reads_only_the_elements_in_a_state(tmp_path,
                                                                           monkeypatch):
    # `body:has(a:focus)` is asked again at state walks' targets (its answer changes with the
    # state): answered from the elements with a state's attribute, found by libxml2, not by
    # cssselect2 reading the whole page (on a 200-page manual it made the check three times
    # slower); the samples equal those of cssselect2's own test of every :has(), and a
    # focused link's list turns dark
    from tinctura.engine import check_paths
    from tinctura.extract.siblings import _simple_has

    (_, _, _, finder), = _simple_has("body:has(a:focus)")[1]
    assert "@data-tinctura-state-focus" in finder.path
    (tmp_path / "site.css").write_text(
        "body { background: #ffffff } body:has(a:focus) ul { background: #202020 }"
        " a { color: #444444 } a:focus { color: #eeeeee }")
    links = "".join(f'<li><a href="#p{i}">page {i}</a></li>' for i in range(30))
    (tmp_path / "a.html").write_text(
        '<!doctype html><html><head><link rel="stylesheet" href="site.css"></head><body>'
        f'<ul>{links}</ul></body></html>')

    def samples():
        report = check_paths([str(tmp_path)], Options(jobs=1))
        return sorted((s.xpath, s.state, s.scheme, to_hex(s.fg), to_hex(s.bg))
                      for p in report.pages for s in p.samples)

    fast = samples()
    assert ("/html/body/ul/li[3]/a", "focus", "light", "#eeeeee", "#202020") in fast
    assert ("/html/body/ul/li[3]/a", "rest", "light", "#444444", "#ffffff") in fast
    monkeypatch.setattr("tinctura.extract.siblings._simple_has", lambda compound: None)
    assert samples() == fast  # (cssselect2 answers every :has() then)


def test_sibling_needs_are_the_same_with_and_without_ancestry_numbers(tmp_path):
    # (with them, each child's answer is kept by its ancestry and candidates: the lists of
    # other lengths and mixes under one ancestry below are answered from the first one's)
    from tinctura.extract.html import parse_html

    css = (".n > li:not(:first-child) { color: #555 } .m li + li { color: #666 }"
           " ul > :last-child { color: #777 } .z p:nth-child(2) { color: #888 }")
    body = ('<div class="m"><ul class="n"><li>a</li><li>b</li></ul><ul><li>c</li><li>d</li></ul>'
            '<ul class="n"><li>i</li><li>j</li><li class="k">k</li><b>l</b></ul></div>'
            '<div class="z"><p>e</p><p>f</p><section><p>g</p><p>h</p></section>'
            '<section><p>m</p><em>n</em><p>o</p><p>p</p></section></div>')
    (tmp_path / "site.css").write_text(css)
    page = tmp_path / "a.html"
    page.write_text(f'<!doctype html><html><head><link rel="stylesheet" href="site.css">'
                    f'</head><body>{body}{body}</body></html>')
    site = Site(str(tmp_path), Options(states=False))
    root = parse_html(page.read_bytes())
    ruleset, _ = site.loader.ruleset_for(root, str(page))
    index = ruleset.siblings
    chains = {}
    found = 0
    for el in root.iter():
        kids = [c for c in el if isinstance(c.tag, str)]
        if kids:
            plain = index.needs_children(el, kids)
            assert index.needs_children(el, kids, chains) == plain
            found += plain is not None
    assert found >= 4


def test_a_has_reading_a_state_holds_its_answers_at_rest_while_other_elements_are_in_one(
        tmp_path, monkeypatch):
    # `body:has(input:focus + label)` changes only while an input is focused: at the links'
    # state walks no element in a state is an input, so the body's answers are those with
    # none in a state, kept (cssselect2 read the whole page for each link before). The
    # samples equal those of asking cssselect2 every time, and the input focused turns dark
    from tinctura.engine import check_paths
    from tinctura.extract.siblings import HasIndex

    (tmp_path / "site.css").write_text(
        "body { background: #ffffff } input { background: #ffffff; color: #444444 }"
        " body:has(input:focus + label) input { background: #202020; color: #eeeeee }"
        " a { color: #444444 } a:hover, a:focus { color: #555555 }")
    # (links of classes of their own: each link's states walked, not shared)
    links = "".join(f'<li><a class="l{i}" href="#p{i}">page {i}</a></li>' for i in range(20))

    def page(name, attrs=""):
        (tmp_path / name).write_text(
            '<!doctype html><html><head><link rel="stylesheet" href="site.css"></head><body>'
            f'<form><input type="text" value="tide"{attrs}><label>Find</label></form>'
            f'<ul>{links}</ul></body></html>')

    page("a.html")
    asked = []
    real = HasIndex.answers_of

    def counted(self, el, candidates, wrapper_of):
        if el.tag == "body":
            asked.append(el)
        return real(self, el, candidates, wrapper_of)

    def samples():
        asked.clear()
        report = check_paths([str(tmp_path)], Options(jobs=1))
        return sorted((p.page, s.xpath, s.state, to_hex(s.fg), to_hex(s.bg))
                      for p in report.pages for s in p.samples
                      if s.bg is not None and s.fg is not None)

    monkeypatch.setattr(HasIndex, "answers_of", counted)
    kept = samples()
    assert ("a.html", "/html/body/form/input", "focus", "#eeeeee", "#202020") in kept
    assert ("a.html", "/html/body/ul/li[2]/a", "focus", "#555555", "#ffffff") in kept
    kept_asked = len(asked)
    monkeypatch.setattr(HasIndex, "unmoved", lambda self, candidates, marked: False)
    assert samples() == kept
    assert kept_asked < len(asked)  # (more on a real page: a scroll spy, menus opened)


def test_every_element_of_a_has_listing_tags_keeps_its_answer_in_its_key(tmp_path):
    # `:is(p, li):has(> a)` can match a p or an li: each must carry whether it matches in its
    # key. Only the list's first tag did: an li matched on one page served its style to an li
    # that does not on the next (the order pages were checked in changed the report)
    from tinctura.engine import check_paths

    (tmp_path / "site.css").write_text(
        "body { background: #ffffff; color: #222222 } :is(p, li):has(> a) { color: #aa0000 }")
    for name, item in (("a.html", "plain item"), ("b.html", '<a href="#x">link</a> item')):
        (tmp_path / name).write_text(
            '<!doctype html><html><head><link rel="stylesheet" href="site.css"></head><body>'
            f'<ul><li>{item}</li></ul><p>{item}</p></body></html>')
    report = check_paths([str(tmp_path)], Options(jobs=1))
    seen = {(p.page, s.xpath): to_hex(s.fg) for p in report.pages for s in p.samples
            if s.state == "rest"}
    assert seen[("a.html", "/html/body/ul/li")] == seen[("a.html", "/html/body/p")] == "#222222"
    assert seen[("b.html", "/html/body/ul/li")] == seen[("b.html", "/html/body/p")] == "#aa0000"
