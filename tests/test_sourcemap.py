"""A finding's text found in its Markdown page (exact or near), or its theme template."""
from tinctura.mkdocs_project import Project
from tinctura.sourcemap import SourceMap, theme_area

MARKDOWN = """\
# Ferry crossings

!!! warning "Tide"
    Boats **do not** sail when the
    [tide gauge](gauge.md) reads below 0.4 m.

| Berth | Depth |
|---|---|
| North pier | 3.0 m |
"""


def source_map(tmp_path):
    (tmp_path / "docs").mkdir()
    (tmp_path / "docs" / "crossings.md").write_text(MARKDOWN, encoding="utf-8")
    project = Project(config_file=str(tmp_path / "mkdocs.yml"), docs_dir=str(tmp_path / "docs"),
                      theme="material", pages={"crossings/index.html": "crossings.md"})
    return SourceMap(project)


def test_text_is_found_with_markup_and_line_breaks_ignored(tmp_path):
    found = source_map(tmp_path).locate("crossings/index.html",
                                        "Boats do not sail when the tide gauge reads below 0.4 m.")
    assert (found.file, found.line, found.near) == ("docs/crossings.md", 4, False)
    assert found.where() == "docs/crossings.md:4"


def test_changed_text_gives_a_near_line_and_short_text_uses_the_element(tmp_path):
    sources = source_map(tmp_path)
    near = sources.locate("crossings/index.html", "North pier (closed in winter) 3.0 m")
    assert (near.line, near.near) == (9, True) and near.where() == "near docs/crossings.md:9"
    marker = sources.locate("crossings/index.html", "3.", fallback_text="North pier")
    assert (marker.line, marker.near) == (9, True)


def test_theme_text_names_the_template(tmp_path):
    header = (("span", ("md-ellipsis",), ""), ("nav", ("md-header__inner",), ""),
              ("header", ("md-header",), ""), ("body", (), ""))
    found = source_map(tmp_path).locate("crossings/index.html", "Ferry crossings", header)
    assert found.template == "partials/header.html" and found.file is None
    assert theme_area((("p", (), ""), ("article", ("md-content__inner",), ""))) is None
    assert theme_area((("a", (), ""), ("footer", (), "")), "mkdocs") == (None, "the footer")


def test_mkdocs_theme_navigation_bar_and_sidebar_are_the_themes():
    # MkDocs' own theme renders its navigation (menus too) in a div.navbar and its table of
    # contents in div.bs-sidebar, with no nav element around them (its base.html, built here)
    menu_item = (("a", ("dropdown-item",), ""), ("li", (), ""), ("ul", ("dropdown-menu",), ""),
                 ("li", ("nav-item", "dropdown"), ""), ("ul", ("nav", "navbar-nav"), ""),
                 ("div", ("navbar-collapse", "collapse"), "navbar-collapse"),
                 ("div", ("container",), ""), ("div", ("navbar", "fixed-top"), ""),
                 ("body", (), ""))
    assert theme_area(menu_item, "mkdocs") == (None, "the navigation bar")
    toc = (("a", ("nav-link",), ""), ("div", ("navbar-expand-md", "bs-sidebar"), ""),
           ("div", ("col-md-3",), ""), ("body", (), ""))
    assert theme_area(toc, "mkdocs") == (None, "the table of contents")
