"""Rule sets kept for later pages, and let go (extract/loader.py, engine.py).

A site whose pages each carry their own ``<style>`` block gets a rule set per page; the check
of a whole site runs with the cyclic garbage collector held off (``engine.relaxed_gc``), so a
rule set must be freed by reference counting alone once the loader lets it go, its style
caches with it.
"""
from __future__ import annotations

import weakref

from tinctura import engine, overrides
from tinctura.extract import loader as loader_mod
from tinctura.extract.html import parse_html
from tinctura.extract.loader import SheetLoader
from tinctura.cyclic_gc import no_collections

PAGE = ("<html><head><style>.c{n} {{ color: #767676; background: #fff }}</style></head>"
        "<body><p class='c{n}'>Torque the valve cover bolts</p></body></html>")


def _write_pages(root, count: int) -> list:
    names = []
    for n in range(count):
        (root / f"p{n}.html").write_text(PAGE.format(n=n), encoding="utf-8")
        names.append(f"p{n}.html")
    return names


def test_a_page_of_its_own_style_lets_go_of_the_oldest_rule_set(tmp_path, monkeypatch):
    monkeypatch.setattr(loader_mod, "RULESETS_KEPT", 2)
    site = engine.Site(str(tmp_path), engine.Options(states=False))
    with no_collections():
        first = None
        for n, rel in enumerate(_write_pages(tmp_path, 4)):
            site.check_page(rel)
            if n == 0:
                (first,) = [entry[0] for entry in site.loader._rulesets.values()]
                gone = weakref.ref(first)
                (cache,) = site._caches[first].values()
                caches = weakref.ref(cache)
                cache = None
                first = None
        assert len(site.loader._rulesets) == 2
        # freed without a collection: no cycle through its index or structure
        assert gone() is None and caches() is None


def test_rule_sets_are_let_go_beyond_a_number_of_rules(tmp_path, monkeypatch):
    """A few rule sets of many rules (pages checked again with thousands of overrides) are
    bounded by their rules, not only by their number; the newest always stays."""
    monkeypatch.setattr(loader_mod, "RULES_KEPT", 1)
    loader = SheetLoader(str(tmp_path))
    for n in range(3):
        loader.ruleset_for(parse_html(PAGE.format(n=n)), str(tmp_path / f"p{n}.html"))
        assert len(loader._rulesets) == 1
    assert loader._kept_rules == next(iter(loader._rulesets.values()))[2]


def test_a_page_seen_again_gets_its_kept_rule_set_and_keeps_it_longer(tmp_path, monkeypatch):
    monkeypatch.setattr(loader_mod, "RULESETS_KEPT", 2)
    loader = SheetLoader(str(tmp_path))

    def ruleset(n):
        return loader.ruleset_for(parse_html(PAGE.format(n=n)), str(tmp_path / "p.html"))[0]

    first = ruleset(0)
    ruleset(1)
    assert ruleset(0) is first  # used again: now the most recent
    ruleset(2)  # lets go of page 1's, not page 0's
    assert ruleset(0) is first


def test_a_style_block_shared_by_pages_is_parsed_once(tmp_path, monkeypatch):
    """The overrides injected into every page checked again (``overrides.verify``) are one
    sheet, parsed once, named as the injected block, at the line and column it has."""
    parsed = []
    real = loader_mod.parse_stylesheet
    monkeypatch.setattr(loader_mod, "parse_stylesheet",
                        lambda css, name, **kw: parsed.append(name) or real(css, name, **kw))
    css = ".note { color: #595959; }"
    loader = SheetLoader(str(tmp_path))
    overrides._same_line_for_overrides(loader)
    sets = [loader.ruleset_for(parse_html(overrides.inject(PAGE.format(n=n), css)),
                               str(tmp_path / f"p{n}.html"))[0] for n in range(3)]
    assert parsed.count(overrides.OVERRIDES_SHEET) == 1
    assert len(parsed) == 4  # and each page's own block once
    for ruleset in sets:
        (injected,) = [r for r in ruleset.rules if r.selector_text == ".note"]
        assert injected.sheet == overrides.OVERRIDES_SHEET
        # the block's first line pinned to 1 (``_same_line_for_overrides``); the rule on the
        # line after the <style> tag
        assert (injected.decls[0].text, injected.decls[0].line) == ("#595959", 2)
