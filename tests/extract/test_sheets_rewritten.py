"""Stylesheets rewritten on disk while they are read (extract/loader.py).

MkDocs copies every stylesheet again after converting the Markdown, while the plugin's worker
checks pages ahead from the copies put in place earlier (plugin/ahead.py). A copy truncates
the file, then writes it: a check that reads it in between sees part of it, and when the
write lands within the same tick of the clock that stamps modification times, the mtime does
not change (Linux stamps files from a coarse clock: common practice, not a published value).
"""
from __future__ import annotations

import os

from tinctura.extract.html import parse_html
from tinctura.extract.loader import SheetLoader

WHOLE = ".dark { background: #1e2530; color: #ffffff; }\n"
PAGE = '<html><head><link rel="stylesheet" href="{href}"></head><body><p>x</p></body></html>'


def _rewrite_in_the_same_tick(path, text: str) -> None:
    """``text`` written to ``path``, its mtime left as it was (one tick of the clock)."""
    before = os.stat(path)
    path.write_text(text, encoding="utf-8")
    os.utime(path, ns=(before.st_atime_ns, before.st_mtime_ns))


def _selectors(ruleset) -> set:
    return {rule.selector_text for rule in ruleset.rules}


def test_a_sheet_rewritten_within_one_clock_tick_is_read_again(tmp_path):
    css = tmp_path / "site.css"
    css.write_text("", encoding="utf-8")  # read as MkDocs truncated it
    loader = SheetLoader(str(tmp_path))
    assert loader.sheet(str(css))[0].rules == []
    _rewrite_in_the_same_tick(css, WHOLE)
    assert loader.changed()
    assert [r.selector_text for r in loader.sheet(str(css))[0].rules] == [".dark"]
    assert not loader.changed()


def test_a_rule_set_from_a_sheet_since_rewritten_is_built_again(tmp_path):
    """The next page gets a rule set of the sheet as it is now, not the one built for the
    page before from the sheet half written."""
    css = tmp_path / "site.css"
    css.write_text(".dark {", encoding="utf-8")  # half of it
    loader = SheetLoader(str(tmp_path))
    page = str(tmp_path / "a.html")
    first, _ = loader.ruleset_for(parse_html(PAGE.format(href="site.css")), page)
    assert ".dark" not in _selectors(first)
    css.write_text(WHOLE, encoding="utf-8")
    second, _ = loader.ruleset_for(parse_html(PAGE.format(href="site.css")), page)
    assert ".dark" in _selectors(second)
    third, _ = loader.ruleset_for(parse_html(PAGE.format(href="site.css")), page)
    assert third is second  # unchanged since: the same rule set


def test_a_rule_set_is_built_again_when_a_sheet_it_imports_was_rewritten(tmp_path):
    (tmp_path / "main.css").write_text('@import "parts.css";\n', encoding="utf-8")
    parts = tmp_path / "parts.css"
    parts.write_text("", encoding="utf-8")
    loader = SheetLoader(str(tmp_path))
    page = str(tmp_path / "a.html")
    first, _ = loader.ruleset_for(parse_html(PAGE.format(href="main.css")), page)
    assert ".dark" not in _selectors(first)
    _rewrite_in_the_same_tick(parts, WHOLE)
    second, _ = loader.ruleset_for(parse_html(PAGE.format(href="main.css")), page)
    assert ".dark" in _selectors(second)
