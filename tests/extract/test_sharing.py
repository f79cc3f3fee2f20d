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
