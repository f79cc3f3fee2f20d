"""A page's own trailing <style> blocks laid over its stylesheets' rule set (extract/overlay.py).

The pages share the keys and caches of the stylesheets' rule set; only what their own rules
match is keyed apart. The check must give exactly what it gives with each page on a rule set
of its own (the code before the overlay: ``can_lay_over`` answering no), sample for sample,
whatever page comes first: the same class coloured differently on two pages, rules matching
inside a navigation repeated (and replayed) on every page, an ancestor's colour inherited, a
pseudo-element, a closed <details> opened, a media query, a dark scheme, rules of states.
"""
from __future__ import annotations

import pytest

from tinctura.engine import Options, Site
from tinctura.extract import overlay as overlay_mod
from tinctura.extract.media import Environment

SITE_CSS = """
body { color: #1f2933; background: #ffffff; }
nav a { color: #2b5f8a; }
.state-late { color: #6b4e16; }
.board { --row: #33424f; }
.board td { color: var(--row); }
@media (prefers-color-scheme: dark) {
  body { color: #e4e7eb; background: #1c2026; }
  nav a { color: #9cc3e6; }
}
"""
NAV = "".join(f'<li><a href="p{n}.html">Ferry rotation {n}</a></li>' for n in range(8))
OWN = {
    0: ".state-late { color: #c9a3a3; }",
    1: ".state-late { color: #a3c9a3; }",  # the same class, another colour
    2: ".board td { color: #9a9a9a; }",
    3: ".note::before { content: 'Note: '; color: #b0b0b0; }",
    4: "details[open] p { color: #bbbbbb; }",
    5: "@media (max-width: 600px) { .state-late { color: #ff0000; } }",
    6: "article { color: #8c8c8c; }",  # inherited by everything in the article
    7: "nav li:first-child a { color: #a0a0a0; }",  # inside the replayed navigation
    9: "nav a:hover { color: #b5b5b5; }",  # a state: keyed apart wherever it may match
    10: ".board:focus-within td, a:is(:focus, :hover) { color: #c2c2c2; }",
}
PAGE = """<!doctype html><html><head><link rel="stylesheet" href="site.css"></head><body>
<nav><ul>{nav}</ul></nav>
<article><h1>Berth {n}</h1><p class="state-late">Late arrival at quay {n}.</p>
<table class="board"><tr><td>Gull Meadow</td><td>06:00</td></tr></table>
<p class="note">Pilot boards at the outer buoy.</p>
<details><summary>Tide table</summary><p>High water 04:12.</p></details></article>
{style}</body></html>"""


@pytest.fixture
def site(tmp_path):
    (tmp_path / "site.css").write_text(SITE_CSS, encoding="utf-8")
    for n, css in OWN.items():
        (tmp_path / f"p{n}.html").write_text(
            PAGE.format(nav=NAV, n=n, style=f"<style>{css}</style>"), encoding="utf-8")
    (tmp_path / "p8.html").write_text(PAGE.format(nav=NAV, n=8, style=""), encoding="utf-8")
    return tmp_path


def _samples(site_dir, order) -> dict:
    site = Site(str(site_dir), Options(jobs=1, keep_samples=True))
    return {rel: site.check_page(rel).samples for rel in order}


@pytest.mark.parametrize("reverse", [False, True])
def test_pages_laid_over_give_what_pages_of_their_own_rule_set_give(site, monkeypatch, reverse):
    order = sorted(p.name for p in site.glob("p*.html"))
    if reverse:
        order.reverse()
    laid_over = _samples(site, order)
    monkeypatch.setattr(overlay_mod, "can_lay_over", lambda rules: False)
    own = _samples(site, order)
    for rel in order:
        assert laid_over[rel] == own[rel], rel
    # the planted colours are there: the class coloured per page, the navigation's first link
    # on page 7 only
    colours = {rel: {(s.xpath, s.scheme): s.fg for s in samples}
               for rel, samples in laid_over.items()}
    late = "/html/body/article/p[1]"
    assert colours["p0.html"][(late, "light")] != colours["p1.html"][(late, "light")]
    first = "/html/body/nav/ul/li[1]/a"
    assert colours["p7.html"][(first, "light")] != colours["p8.html"][(first, "light")]
    assert colours["p6.html"][(first, "light")] == colours["p8.html"][(first, "light")]


def test_a_page_with_its_own_block_is_keyed_by_the_stylesheets_rule_set(site):
    checker = Site(str(site), Options(jobs=1))
    for rel in ("p8.html", "p0.html", "p1.html"):
        checker.check_page(rel)
    (plain,) = [entry[0] for entry in checker.loader._rulesets.values()]
    laid_over = [entry[0] for entry in checker.loader._laid_over.values()]
    assert len(laid_over) == 2 and all(r.base is plain for r in laid_over)
    # made of the stylesheets' rules and index, not a copy of them per page
    assert all(r.rules[:len(plain.rules)] == plain.rules for r in laid_over)
    assert all(x is y for r in laid_over for x, y in zip(r.rules, plain.rules))
    env = Environment(Options().viewport_width)
    assert all(r.index(env).base is plain.index(env) for r in laid_over)
    assert list(checker._caches.keys()) == [plain]  # one set of style caches for the three


@pytest.mark.parametrize("css", [
    "a:not(:hover) { color: #aaaaaa; }",  # a state inside :not(): relaxed, it matches less
    ".board:has(td) { color: #aaaaaa; }",  # reads descendants
    "@layer page { .note { color: #aaaaaa; } }",  # reorders the cascade
])
def test_blocks_that_cannot_be_laid_over_keep_a_rule_set_of_their_own(tmp_path, css):
    (tmp_path / "site.css").write_text(SITE_CSS, encoding="utf-8")
    (tmp_path / "p.html").write_text(PAGE.format(nav=NAV, n=0, style=f"<style>{css}</style>"),
                                     encoding="utf-8")
    checker = Site(str(tmp_path), Options(jobs=1))
    checker.check_page("p.html")
    (entry,) = checker.loader._rulesets.values()
    assert entry[0].base is None


def test_a_block_before_the_last_stylesheet_is_not_laid_over(tmp_path):
    """Its rules come before the stylesheet's in the order of appearance."""
    (tmp_path / "site.css").write_text(SITE_CSS, encoding="utf-8")
    page = PAGE.format(nav=NAV, n=0, style="").replace(
        '<link rel="stylesheet" href="site.css">',
        '<style>.note { color: #aaaaaa; }</style><link rel="stylesheet" href="site.css">')
    (tmp_path / "p.html").write_text(page, encoding="utf-8")
    checker = Site(str(tmp_path), Options(jobs=1))
    checker.check_page("p.html")
    (entry,) = checker.loader._rulesets.values()
    assert entry[0].base is None


def test_what_a_page_alone_keyed_is_let_go_once_it_is_done(site):
    """Styles keyed by a page's own rules serve no other page: the shared cache forgets them
    (and what hangs below them) when the page is done, and keeps the rest."""
    checker = Site(str(site), Options(jobs=1))
    checker.check_page("p8.html")
    (caches,) = checker._caches.values()
    checker.check_page("p0.html")  # the same page with its own block
    for cache in caches.values():
        assert not [key for key in cache.ids if type(key[1]) is tuple]
        live = set(cache.ids.values())
        assert set(cache.styles) <= live
        # nothing below a forgotten key: every key's parent is the root's or a live key
        assert all(parent == 0 or parent in live for parent, _ in cache.ids)


def test_checking_pages_leaves_no_cyclic_garbage(site):
    """The check holds off the cyclic collector while it checks pages (``engine.relaxed_gc``):
    what a page makes and lets go must be freed by reference counting. Custom properties
    resolved (a closure referring to itself) and pseudo-elements' styles let go with their
    page's own keys (a pseudo-element's style points back at its element's) made cycles."""
    import gc

    from tinctura.cyclic_gc import no_collections

    checker = Site(str(site), Options(jobs=1))
    with no_collections():
        gc.collect()
        for rel in sorted(p.name for p in site.glob("p*.html")):
            checker.check_page(rel)
        assert gc.collect() == 0


# the fixes' overrides, injected into every page verified (``overrides.verify``): a block the
# loader knows is shared (``SheetLoader.shared_styles``)
SHARED = "nav a { color: #3d3d3d; } .state-late { background: #fffdf5; } a:hover { color: #222; }"


def _shared_site(tmp_path):
    (tmp_path / "site.css").write_text(SITE_CSS, encoding="utf-8")
    for n in (0, 1, 8):
        own = f"<style>{OWN[n]}</style>" if n in OWN else ""
        (tmp_path / f"p{n}.html").write_text(
            PAGE.format(nav=NAV, n=n, style=f"{own}<style>{SHARED}</style>"), encoding="utf-8")
    return tmp_path


def _checker(site_dir, options):
    checker = Site(str(site_dir), options)
    checker.loader.shared_styles = {SHARED: "tinctura-verify <style>"}
    return checker


def test_keys_only_a_shared_block_marks_are_kept_for_the_next_page(tmp_path, monkeypatch):
    """What only the shared block's rules match (the navigation's links, by the overrides) is
    keyed the same on every page that carries it: kept, it serves the next page verified;
    what a page's own block matches is let go. The samples are those of pages on rule sets
    of their own."""
    site_dir = _shared_site(tmp_path)
    order = ["p8.html", "p0.html", "p1.html"]
    checker = _checker(site_dir, Options(jobs=1, keep_samples=True))
    laid_over = {rel: checker.check_page(rel).samples for rel in order}
    (caches,) = checker._caches.values()
    marked = [key for cache in caches.values() for key in cache.ids if type(key[1]) is tuple]
    assert marked and all(type(key[1][1]) is overlay_mod.Kept for key in marked)
    # forgotten: what the pages' own blocks match too (page 0's late arrival, say)
    assert all(part[0] == "tinctura-verify <style>" for key in marked for part in key[1][1])
    monkeypatch.setattr(overlay_mod, "can_lay_over", lambda rules: False)
    own = _checker(site_dir, Options(jobs=1, keep_samples=True))
    for rel in order:
        assert laid_over[rel] == own.check_page(rel).samples, rel
    late = "/html/body/article/p[1]"
    colours = {rel: {(s.xpath, s.scheme): s.fg for s in samples}
               for rel, samples in laid_over.items()}
    assert colours["p0.html"][(late, "light")] != colours["p8.html"][(late, "light")]


def test_the_shared_block_is_laid_over_once_for_the_pages_that_carry_it(tmp_path,
                                                                          monkeypatch):
    """The block every page verified carries is expanded, numbered and indexed once for them
    all, and comes after each page's own rules: a page's own rule as specific as one of the
    block's loses to it, and a rule of the block reading a scheme's attribute marks per
    scheme. The samples are those of pages on rule sets of their own."""
    from tinctura import overrides

    css = SITE_CSS.split("@media")[0] + ('html[data-theme="dark"] body { color: #e4e7eb; '
                                         'background: #1c2026; }\n')
    (tmp_path / "site.css").write_text(css, encoding="utf-8")
    shared = SHARED + ' html[data-theme="dark"] nav a { color: #d4d4d4; }'
    own = {0: OWN[0], 1: "nav a { color: #7a2e2e; }", 8: ""}  # (page 1's: as specific)
    pages = {}
    for n, block in own.items():
        style = f"<style>{block}</style>" if block else ""
        (tmp_path / f"p{n}.html").write_text(PAGE.format(nav=NAV, n=n, style=style),
                                             encoding="utf-8")
        # as the fixes are verified: the block injected last, on its own lines
        pages[f"p{n}.html"] = overrides.inject(PAGE.format(nav=NAV, n=n, style=style), shared)
    made = []
    init = overlay_mod.SharedBlock.__init__
    monkeypatch.setattr(overlay_mod.SharedBlock, "__init__",
                        lambda self, *a: made.append(1) or init(self, *a))

    def checked(rel, checker):
        overrides._same_line_for_overrides(checker.loader)
        return checker.check_page(rel, html=pages[rel]).samples

    order = ["p1.html", "p8.html", "p0.html"]
    checker = Site(str(tmp_path), Options(jobs=1, keep_samples=True))
    laid_over = {rel: checked(rel, checker) for rel in order}
    assert made == [1]
    link = "/html/body/nav/ul/li[1]/a"
    colours = {(s.page, s.scheme): s.fg for rels in laid_over.values() for s in rels
               if s.xpath == link and s.state == "rest"}
    assert colours[("p1.html", "light")] == colours[("p8.html", "light")]  # the block's
    assert colours[("p1.html", "dark")] != colours[("p1.html", "light")]
    monkeypatch.setattr(overlay_mod, "can_lay_over", lambda rules: False)
    plain = Site(str(tmp_path), Options(jobs=1, keep_samples=True))
    for rel in order:
        assert laid_over[rel] == checked(rel, plain), rel


def test_rows_a_page_colours_take_what_the_stylesheets_match_from_other_pages(tmp_path,
                                                                             monkeypatch):
    """A page's rows coloured by classes of that page are keyed apart, with every cell below
    them, yet the stylesheets' rules match them as they match the rows of another page of the
    same structure: matched once (``StyleCache.base_matches``), by the keys they would have
    without the page's rules, sibling facts included. The samples are those of pages on rule
    sets of their own."""
    css = SITE_CSS + ".board tr + tr td { color: #1a1a1a; }\n"
    (tmp_path / "site.css").write_text(css, encoding="utf-8")

    def board(n):
        rows = "".join(f'<tr class="row-{n}-{k}"><td>Berth {k}</td><td>0{k}:00</td></tr>'
                       for k in range(3))
        return (f'<table class="board">{rows}</table><style>'
                + " ".join(f".row-{n}-{k} {{ background: #f{k}f{k}f{k}; }}" for k in range(3))
                + f" table.board tr.row-{n}-2 td {{ color: #6{n}6{n}6{n}; }}</style>")

    for n in (1, 2):
        (tmp_path / f"p{n}.html").write_text(PAGE.format(nav=NAV, n=n, style=board(n)),
                                             encoding="utf-8")
    order = ["p1.html", "p2.html"]
    calls = []
    match = overlay_mod.LaidOverIndex.match_over
    monkeypatch.setattr(overlay_mod.LaidOverIndex, "match_over",
                        lambda self, w, found: calls.append(found) or match(self, w, found))
    checker = Site(str(tmp_path), Options(jobs=1, keep_samples=True))
    laid_over, fresh = {}, {}
    for rel in order:
        before = {id(m) for cache in checker._caches.values() for c in cache.values()
                  for m in c.base_matches.values()}
        del calls[:]
        laid_over[rel] = checker.check_page(rel).samples
        fresh[rel] = sum(id(found) not in before for found in calls)
    assert fresh["p1.html"] > 0 and fresh["p2.html"] == 0  # the rows of page 1 serve page 2
    monkeypatch.setattr(overlay_mod, "can_lay_over", lambda rules: False)
    plain = Site(str(tmp_path), Options(jobs=1, keep_samples=True))
    for rel in order:
        assert laid_over[rel] == plain.check_page(rel).samples, rel
    cells = {(s.page, s.xpath): s.fg for rels in laid_over.values() for s in rels
             if s.scheme == "light" and s.state == "rest" and "/table" in s.xpath}
    cell = "/html/body/table/tbody/tr[3]/td[1]"
    assert cells[("p1.html", cell)] != cells[("p2.html", cell)]  # each page's own colour


def test_the_schemes_of_a_page_share_its_marks_unless_its_rules_read_theirs(tmp_path,
                                                                           monkeypatch):
    """The schemes' walks of a page mark the same tree, but for the attributes a scheme
    sets: what the page's own rules match is worked out once for them all (and once more
    for the tree opened), unless a rule reads one of those attributes: then each scheme
    marks its own, and the samples stay those of pages on rule sets of their own."""
    css = SITE_CSS.split("@media")[0] + ('html[data-theme="dark"] body { color: #e4e7eb; '
                                         'background: #1c2026; }\n'
                                         'html[data-theme="dark"] nav a { color: #9cc3e6; }\n')
    (tmp_path / "site.css").write_text(css, encoding="utf-8")
    own = {0: '.state-late { color: #c9a3a3; }',
           1: 'html[data-theme="dark"] .state-late { color: #5a2020; }',
           # both: the first marks once for the schemes, the second per scheme
           2: '.state-late { color: #c9a3a3; } html[data-theme="dark"] nav a { color: #5a2020; }'}
    for n, block in own.items():
        (tmp_path / f"p{n}.html").write_text(
            PAGE.format(nav=NAV, n=n, style=f"<style>{block}</style>"), encoding="utf-8")
    (tmp_path / "p8.html").write_text(PAGE.format(nav=NAV, n=8, style=""), encoding="utf-8")
    calls = []
    matched = overlay_mod._Group.matched
    monkeypatch.setattr(overlay_mod._Group, "matched",
                        lambda self, *a: calls.append(1) or matched(self, *a))
    order = ["p1.html", "p8.html", "p0.html", "p2.html"]
    checker = Site(str(tmp_path), Options(jobs=1, keep_samples=True))
    laid_over, counts = {}, {}
    for rel in order:
        calls.clear()
        result = checker.check_page(rel)
        laid_over[rel], counts[rel] = result.samples, len(calls)
        assert len(result.schemes) == 2
    # (each at rest and opened)
    assert counts == {"p1.html": 4, "p8.html": 0, "p0.html": 2, "p2.html": 2 + 4}
    monkeypatch.setattr(overlay_mod, "can_lay_over", lambda rules: False)
    plain = Site(str(tmp_path), Options(jobs=1, keep_samples=True))
    for rel in order:
        assert laid_over[rel] == plain.check_page(rel).samples, rel


@pytest.mark.parametrize("attribute, rule", [
    ("class", ".dark .state-late { color: #5a2020; }"),
    ("id", "#dark .state-late { color: #5a2020; }"),
])
def test_a_scheme_set_as_a_class_or_an_id_is_read_by_rules_that_name_one(tmp_path, attribute,
                                                                         rule):
    """A scheme of the setting may set ``class`` or ``id`` (``html.dark``): a rule reading it
    names neither attribute, yet marks per scheme; shared from the light scheme, the dark
    one's style of the element went into the cache the pages without the block share."""
    from tinctura.model import Scheme

    (tmp_path / "site.css").write_text(SITE_CSS.split("@media")[0], encoding="utf-8")
    (tmp_path / "p0.html").write_text(
        PAGE.format(nav=NAV, n=0, style=f"<style>{rule}</style>"), encoding="utf-8")
    (tmp_path / "p8.html").write_text(PAGE.format(nav=NAV, n=8, style=""), encoding="utf-8")
    schemes = [Scheme(name, attributes=(("html", attribute, name),), source="setting")
               for name in ("light", "dark")]
    order = ["p0.html", "p8.html"]
    checker = Site(str(tmp_path), Options(jobs=1, keep_samples=True, schemes=schemes))
    laid_over = {rel: checker.check_page(rel).samples for rel in order}
    late = {(s.page, s.scheme): s.fg for rels in laid_over.values() for s in rels
            if s.xpath == "/html/body/article/p[1]"}
    assert late[("p0.html", "dark")] != late[("p8.html", "dark")]  # the page's own colour
    assert late[("p8.html", "dark")] == late[("p8.html", "light")]
    with pytest.MonkeyPatch.context() as mp:
        mp.setattr(overlay_mod, "can_lay_over", lambda rules: False)
        plain = Site(str(tmp_path), Options(jobs=1, keep_samples=True, schemes=schemes))
        for rel in order:
            assert laid_over[rel] == plain.check_page(rel).samples, rel


def test_a_page_verified_with_the_overrides_keeps_no_rule_set(tmp_path):
    """A page checked with the fixes' overrides injected (a block every page verified shares)
    is checked once a round: its rule set is not kept for later pages (1,800 overrides made
    each kept rule set about 0.7 MB)."""
    site_dir = _shared_site(tmp_path)
    (site_dir / "p2.html").write_text(PAGE.format(nav=NAV, n=2, style=f"<style>{OWN[2]}</style>"),
                                      encoding="utf-8")
    checker = _checker(site_dir, Options(jobs=1))
    for rel in ("p0.html", "p8.html", "p2.html"):
        checker.check_page(rel)
    (kept,) = checker.loader._laid_over.values()  # p2's, which carries no shared block
    assert OWN[2] in {r.selector_text + " { color: #9a9a9a; }" for r in kept[0].colour_rules}


def test_blocks_with_media_imports_and_earlier_blocks_are_laid_over_as_they_read(tmp_path,
                                                                                monkeypatch):
    """A trailing block for print only, one importing a sheet, and one after a block that
    comes before the stylesheet (the trailing one is then the page's second: its rules name
    it so): the samples, causes and their sheets' names included, are those of pages on
    rule sets of their own."""
    (tmp_path / "site.css").write_text(SITE_CSS, encoding="utf-8")
    (tmp_path / "extra.css").write_text(".board td { color: #777777; }", encoding="utf-8")
    pages = {
        "print.html": PAGE.format(nav=NAV, n=0, style='<style media="print">'
                                  '.state-late { color: #ff0000; }</style>'),
        "import.html": PAGE.format(nav=NAV, n=1, style='<style>@import url("extra.css");\n'
                                   '.note { color: #999999; }</style>'),
        "second.html": PAGE.format(nav=NAV, n=2, style="<style>.state-late { color: #a0a0a0; }"
                                   "</style>").replace(
            '<link rel="stylesheet" href="site.css">',
            '<style>.note { color: #555555; }</style><link rel="stylesheet" href="site.css">'),
    }
    for rel, html in pages.items():
        (tmp_path / rel).write_text(html, encoding="utf-8")
    checker = Site(str(tmp_path), Options(jobs=1, keep_samples=True))
    laid_over = {rel: checker.check_page(rel).samples for rel in pages}
    assert len(checker.loader._laid_over) == 3
    monkeypatch.setattr(overlay_mod, "can_lay_over", lambda rules: False)
    plain = Site(str(tmp_path), Options(jobs=1, keep_samples=True))
    for rel in pages:
        assert laid_over[rel] == plain.check_page(rel).samples, rel
    sheets = {s.fg_cause.declaration.sheet for s in laid_over["second.html"]
              if s.fg_cause is not None and s.fg_cause.declaration is not None}
    assert "second.html <style> #2" in sheets
    cells = [s.fg for s in laid_over["import.html"] if s.xpath.endswith("tr/td[1]")]
    assert cells and all(fg == pytest.approx((0x77 / 255,) * 3) for fg in cells)  # imported


@pytest.mark.parametrize("own", [
    ".late { color: #aa0000; }",
    'body[data-theme="dark"] .late { color: #ffaaaa; }',  # the holder: body, with the base's
    "@media (prefers-color-scheme: dark) { .late { color: #ffaaaa; } }",
    ".late { color: light-dark(#aa0000, #ffaaaa); }",
    '[data-bs-theme="dark"] .late { color: #ffaaaa; }',
])
def test_the_scheme_facts_of_a_page_laid_over_are_those_of_its_whole_rule_set(own):
    """Worked out from the stylesheets' facts and the page's own rules (the stylesheets'
    rules are not read again for each page): the same as from every rule at once."""
    from tinctura.extract.loader import user_agent_sheet
    from tinctura.extract.ruleset import RuleSet
    from tinctura.extract.schemes import SchemeFacts
    from tinctura.extract.sheet import parse_stylesheet

    base_rules = user_agent_sheet().rules + parse_stylesheet(
        'html[data-theme="dark"] body { color: #eeeeee; }', "site.css").rules
    own_rules = parse_stylesheet(own, "p.html <style> #1").rules
    base = RuleSet(list(base_rules), [])
    laid = overlay_mod.LaidOver(base, list(own_rules), overlay_mod.marking(own_rules))
    whole = SchemeFacts([r for r in base_rules + own_rules if r.decls])
    fields = ("data_bs_theme", "data_theme", "data_theme_holder", "media", "light_dark")
    assert [getattr(laid.scheme_facts, f) for f in fields] == \
        [getattr(whole, f) for f in fields]
