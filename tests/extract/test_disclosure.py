"""Closed <details> and tabs made of radio buttons: their text is checked as a reader who opens
them sees it, in the state "shown"; what the page shows already is not reported twice.

The pages are written here. How a browser hides the content is the HTML Living Standard's (the
details element's rendering) and the theme's CSS (`:checked` tabs), both modelled by the
user-agent stylesheet and the cascade that tests/browser/ compares with Chromium.
"""
from lxml import html

from tinctura.engine import Options, check_paths
from tinctura.extract.disclosure import Disclosure

# #b0b0b0 on white: 2.1685:1 (WCAG 2 contrast ratio, worked by hand: relative luminance 0.4342)
CSS = """.faint { color: #b0b0b0; }
.tabs > .panels > div { display: none; }
.tabs > input:nth-of-type(1):checked ~ .panels > div:nth-child(1),
.tabs > input:nth-of-type(2):checked ~ .panels > div:nth-child(2) { display: block; }
"""
PAGE = """<!doctype html><html lang="en"><head><title>Sail loft</title>
<link rel="stylesheet" href="site.css"></head><body>
<p class="faint">Seen at once.</p>
<details><summary>Splicing</summary><p class="faint">Behind a closed summary.</p>
 <details><summary>Inner</summary><p class="faint">Nested, closed too.</p></details></details>
<details open><summary>Whipping</summary><p class="faint">Open already.</p></details>
<div class="tabs"><input type="radio" name="t" id="t1" checked><input type="radio" name="t" id="t2">
 <label for="t1">Canvas</label><label for="t2">Dacron</label>
 <div class="panels"><div><p class="faint">First tab.</p></div>
  <div><p class="faint">Second tab.</p></div></div></div>
<form class="switch"><input type="radio" name="mode" checked><label>Day</label>
 <input type="radio" name="mode"><label>Night</label></form>
</body></html>"""


def test_the_text_a_reader_opens_is_checked_once_as_shown(tmp_path):
    (tmp_path / "site.css").write_text(CSS, encoding="utf-8")
    (tmp_path / "index.html").write_text(PAGE, encoding="utf-8")
    report = check_paths([str(tmp_path)], Options(jobs=1, states=False, rules=("TC100",)))
    found = sorted((f.sample.text, f.sample.state) for f in report.findings)
    assert found == [("Behind a closed summary.", "shown"), ("First tab.", "rest"),
                     ("Nested, closed too.", "shown"), ("Open already.", "rest"),
                     ("Second tab.", "shown"), ("Seen at once.", "rest")]
    assert all(abs(f.ratio - 2.1685) < 0.001 for f in report.findings)


def test_targets_are_the_outermost_closed_details_and_tab_sets():
    root = html.fromstring(PAGE)
    found = Disclosure(root)
    names = [(el.tag, el.get("class")) for el in found.targets]
    assert names == [("details", None), ("div", "tabs")]  # not the inner details, not the switch
    changed, restore = found.apply()
    assert len(changed) == 3 and all(el.get("open") or el.get("checked") for el in changed)
    restore()
    assert html.tostring(root) == html.tostring(html.fromstring(PAGE))
    assert not Disclosure(html.fromstring("<p>plain</p>"))


MENU_CSS = """body { color: #222222; background: #ffffff; }
.dropdown-menu { display: none; background: #ffffff; }
.dropdown-menu.show { display: block; }
.dropdown-item { color: #b0b0b0; }
.dropdown-item:hover { color: #c8c8c8; }
"""
MENU_PAGE = """<!doctype html><html lang="en"><head><title>Rigging</title>
<link rel="stylesheet" href="../site.css"></head><body>
<nav><ul><li><a href="#" data-bs-toggle="dropdown">Guides</a>
 <ul class="dropdown-menu"><li><a class="dropdown-item" href="../p0/">Knots</a></li>
  <li><a class="dropdown-item" href="../p1/">Blocks</a></li></ul></li></ul></nav>
<p>Main text {n}.</p></body></html>"""


def test_a_theme_menu_is_checked_open_on_every_page_with_its_links_hovered(tmp_path):
    # a repeated menu is replayed from the second page on: the same findings on each page
    (tmp_path / "site.css").write_text(MENU_CSS, encoding="utf-8")
    for n in range(4):
        (tmp_path / f"p{n}").mkdir()
        (tmp_path / f"p{n}" / "index.html").write_text(MENU_PAGE.replace("{n}", str(n)),
                                                       encoding="utf-8")
    report = check_paths([str(tmp_path)], Options(jobs=1, rules=("TC100",)))
    found = sorted({(f.sample.text, f.sample.state) for f in report.findings})
    assert found == [("Blocks", "hover"), ("Blocks", "shown"), ("Knots", "hover"),
                     ("Knots", "shown")]
    per_page = sorted(f.sample.page for f in report.findings)
    assert per_page == sorted(f"p{n}/index.html" for n in range(4) for _ in range(4))
    # without the theme's toggle, a hidden list is not a menu a reader can open
    page = MENU_PAGE.replace('data-bs-toggle="dropdown"', "").replace("{n}", "0")
    assert not Disclosure(html.fromstring(page)).menus


def test_a_details_repeated_on_every_page_gives_each_page_the_same_findings(tmp_path):
    # from the third page on the walk replays what it met twice: a summary seen at rest must
    # not come back as "shown"
    (tmp_path / "site.css").write_text(".faint { color: #b0b0b0; }\n", encoding="utf-8")
    for n in range(5):
        (tmp_path / f"p{n}").mkdir()
        (tmp_path / f"p{n}" / "index.html").write_text(
            '<!doctype html><html lang="en"><head><title>t</title><link rel="stylesheet" '
            f'href="../site.css"></head><body><p>Page {n}</p><details><summary><span '
            'class="faint">Faint summary</span></summary><div><ul><li class="faint">Hidden '
            'item</li></ul></div></details></body></html>', encoding="utf-8")
    report = check_paths([str(tmp_path)], Options(jobs=1, rules=("TC100",)))
    per_page = {}
    for f in report.findings:
        per_page.setdefault(f.sample.page, []).append((f.sample.text, f.sample.state))
    assert len(per_page) == 5 and all(sorted(v) == [("Faint summary", "rest"),
                                                    ("Hidden item", "shown")]
                                      for v in per_page.values())


def test_links_in_opened_content_are_hovered_once(tmp_path):
    # the summary's link is hovered by the resting walk; the hidden one only once opened
    (tmp_path / "site.css").write_text("a { color: #222222; } a:hover { color: #c8c8c8; }\n",
                                       encoding="utf-8")
    (tmp_path / "index.html").write_text(
        '<!doctype html><html lang="en"><head><title>t</title><link rel="stylesheet" '
        'href="site.css"></head><body><details><summary>Mooring <a href="#a">lines</a>'
        '</summary><p>See <a href="#b">the cleat chart</a>.</p></details></body></html>',
        encoding="utf-8")
    report = check_paths([str(tmp_path)], Options(jobs=1, rules=("TC100",)))
    found = sorted((f.sample.text, f.sample.state) for f in report.findings)
    assert found == [("lines", "hover"), ("the cleat chart", "hover")]
