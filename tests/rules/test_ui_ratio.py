"""TC110 ui-ratio on pages: WCAG 2.2 SC 1.4.11 Non-text Contrast, "a contrast ratio of at least
3:1 against adjacent color(s)" for "visual information required to identify user interface
components and states" and "parts of graphics required to understand the content", "except
for inactive components or where the appearance of the component is determined by the user
agent and not modified by the author". Ratios by the WCAG 2.2 formula (tests/wcag_reference.py).
"""
from wcag_reference import ratio

from tinctura import engine

PAGE = ('<!doctype html><html lang="en"><head><meta charset="utf-8"><title>t</title><style>'
        'body{{background:#fff;color:#222}}{css}</style></head><body>{body}</body></html>')


def found(tmp_path, body, css=""):
    page = tmp_path / "ui.html"
    page.write_text(PAGE.format(body=body, css=css), encoding="utf-8")
    report = engine.check_paths([str(page)], engine.Options(rules=("TC110",)))
    return sorted((f.sample.kind, "/".join(f.sample.xpath.split("::")[0].split("/")[-2:]))
                  for f in report.findings)


def test_text_field_boundaries(tmp_path):
    assert ratio("#d0d0d0", "#ffffff") < 3 <= ratio("#767676", "#ffffff")
    css = (".faint{border:1px solid #d0d0d0}.ok{border:1px solid #767676}"
           ".filled{border:0;background:#595959;color:#fff}")
    body = ('<input class="faint" value="a"><input class="ok" value="b">'
            '<input class="filled" value="c"><input value="user agent">'
            '<input class="faint" value="off" disabled><button class="faint">Go</button>')
    # the faint field only: the dark fill identifies the third; the fourth keeps the user
    # agent's look; the fifth is inactive; a button's text identifies it
    assert found(tmp_path, body, css) == [("boundary", "body/input[1]")]


def test_author_focus_outline(tmp_path):
    css = "a.faint:focus{outline:2px solid #cccccc}a.ok:focus{outline:2px solid #333}" \
          "a.inset:focus{outline:2px solid #ccc;outline-offset:-2px}"
    body = ('<p><a class="faint" href="#">One</a> <a class="ok" href="#">Two</a> '
            '<a class="inset" href="#">Three</a> <a href="#">Four</a></p>')
    assert found(tmp_path, body, css) == [("focus-ring", "p/a[1]")]


def test_outline_and_border_colours_from_custom_properties(tmp_path):
    # Custom Properties 1: var() substitutes in a shorthand too (pydata-sphinx-theme draws its
    # focus ring as `outline: var(--pst-color-accent) solid .1875rem`); the faint ring and
    # border fail, the dark ones pass, whatever the links' and fields' own text colour
    assert ratio("#cccccc", "#ffffff") < 3 <= ratio("#333333", "#ffffff")
    css = (":root{--ring:#cccccc;--edge:#333333}"
           "a:focus-visible{outline:var(--ring) solid 3px}a{color:#222}"
           ".dark a:focus-visible{outline:var(--edge) solid 3px}"
           "input{border:1px solid var(--ring);color:#222}input.ok{border-color:var(--edge)}")
    body = ('<p><a href="#">One</a></p><p class="dark"><a href="#">Two</a></p>'
            '<input value="a"><input class="ok" value="b">')
    assert found(tmp_path, body, css) == [("boundary", "body/input[1]"),
                                          ("focus-ring", "p[1]/a")]


def test_svg_icons_that_carry_meaning(tmp_path):
    css = ".ico{fill:#c8c8c8}"
    path = '<path d="M0 0h9v9z"/>'
    body = (f'<a href="#"><svg class="ico" aria-label="Home">{path}</svg></a>'
            f'<p><svg class="ico">{path}</svg> decoration beside words</p>'
            f'<button aria-label="Play"><svg class="ico" aria-hidden="true">{path}</svg></button>'
            f'<a href="#"><svg class="ico" aria-hidden="true">{path}</svg> Export</a>'
            f'<svg class="ico" role="img" aria-label="Tide rising">{path}</svg>')
    # the named link icon, the hidden icon that is all a named button shows, the named image
    assert found(tmp_path, body, css) == [("svg-icon", "a[1]/svg"), ("svg-icon", "body/svg"),
                                          ("svg-icon", "button/svg")]


def _icon_status(tmp_path, body, css=""):
    page = tmp_path / "ui.html"
    page.write_text(PAGE.format(body=body, css=css), encoding="utf-8")
    report = engine.check_paths([str(page)], engine.Options(rules=("TC110",)))
    return [(s.status, s.reason) for p in report.pages for s in p.samples
            if s.kind == "svg-icon"], [f.sample.kind for f in report.findings]


def test_an_icon_drawn_from_a_symbol_is_judged_by_what_the_symbol_draws(tmp_path):
    # Sphinx's Furo theme draws its icons as <use href="#svg-eye"> of symbols stroked with
    # currentColor (SVG 2, "The use element": the symbol's content is rendered in its place);
    # on a dark page the <svg>'s own initial black fill is not what a reader sees
    sprite = ('<svg style="display:none"><symbol id="svg-eye" viewBox="0 0 24 24">'
              '<svg fill="none" stroke="currentColor"><path d="M1 12a11 11 0 0 1 22 0"/></svg>'
              '</symbol></svg>')
    css = "body{background:#131416;color:#cfd0d0}"
    body = sprite + '<a href="#" title="View this page"><svg><use href="#svg-eye"></use></svg></a>'
    statuses, findings = _icon_status(tmp_path, body, css)
    assert statuses == [("undetermined", "icon drawn with strokes or several fills: geometry "
                                         "decides")]
    assert findings == []
    # a symbol in another file (a sprite sheet): not here to read
    body = '<a href="#" title="View"><svg><use href="icons.svg#eye"></use></svg></a>'
    assert _icon_status(tmp_path, body, css)[0] == [("undetermined",
                                                     "icon drawn from a symbol in another file")]
