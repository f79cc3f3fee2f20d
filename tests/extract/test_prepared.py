"""Stylesheets parsed ahead in another process (extract/prepared.py): the loader takes a result
only for the same bytes, and otherwise parses as before."""
from __future__ import annotations

import os
from contextlib import contextmanager

import pytest

from tinctura.extract import loader as loader_mod
from tinctura.extract import prepared
from tinctura.extract.loader import SheetLoader

pytestmark = pytest.mark.skipif(not hasattr(os, "fork"), reason="needs fork()")

CSS = "/* theme */\n.note { color: #6f6f6f; background: #fff }\n@media (prefers-color-scheme: dark) {\n  .note { color: #c0c0c0 }\n}\n"


def _site(tmp_path, site_css=CSS, source_css=CSS):
    """A site folder with one stylesheet, and its source outside it (as MkDocs copies it)."""
    site, src = tmp_path / "site", tmp_path / "theme"
    (site / "css").mkdir(parents=True)
    src.mkdir()
    (site / "css" / "theme.css").write_text(site_css, encoding="utf-8")
    (src / "theme.css").write_text(source_css, encoding="utf-8")
    return str(site / "css" / "theme.css"), str(src / "theme.css"), str(site)


def _rules(parsed) -> list:
    return [(r.selector_text, r.specificity, [(d.name, d.text, d.line, d.column) for d in r.decls],
             r.media) for r in parsed.rules]


def _finished(ready) -> None:
    ready.process.join(10)


@contextmanager
def _ahead(root, path, source):
    """A loader of ``root`` whose sheet ``path`` was parsed ahead from ``source`` (the process
    finished); closed after."""
    loader = SheetLoader(root)
    loader.prepared = prepared.start(SheetLoader(root), [(path, source)])
    _finished(loader.prepared)
    try:
        yield loader
    finally:
        loader.prepared.close()


def test_a_sheet_parsed_ahead_is_taken_and_not_parsed_again(tmp_path, monkeypatch):
    path, source, root = _site(tmp_path)
    expected, _ = SheetLoader(root).sheet(path)

    def not_here(*args, **kwargs):
        raise AssertionError("parsed in this process")

    with _ahead(root, path, source) as loader:
        monkeypatch.setattr(loader_mod, "parse_stylesheet", not_here)
        parsed, diags = loader.sheet(path)
        assert loader.prepared.taken == 1
        assert diags == []
        assert _rules(parsed) == _rules(expected) and parsed.name == expected.name == "css/theme.css"
        assert parsed.uses_color_scheme_media
    assert not os.path.exists(loader.prepared.folder)


def test_a_sheet_rewritten_on_its_way_to_the_site_is_parsed_here(tmp_path):
    """A plugin may rewrite a stylesheet as MkDocs copies it: the bytes differ, the result of
    the source is not used."""
    changed = CSS.replace("#6f6f6f", "#222222")
    path, source, root = _site(tmp_path, site_css=changed)
    with _ahead(root, path, source) as loader:
        parsed, _ = loader.sheet(path)
        assert loader.prepared.taken == 0
        assert parsed.rules[0].decls[0].text == "#222222"


def test_a_sheet_read_half_written_takes_its_result_when_read_whole(tmp_path):
    """MkDocs copies the sheets again while the plugin's worker checks pages ahead: a read
    between the copy's truncation and its write sees other bytes; the whole file, read next,
    still takes the result parsed ahead."""
    path, source, root = _site(tmp_path, site_css="")
    with _ahead(root, path, source) as loader:
        assert loader.sheet(path)[0].rules == [] and loader.prepared.taken == 0
        with open(path, "w", encoding="utf-8") as fh:
            fh.write(CSS)
        parsed, _ = loader.sheet(path)
        assert loader.prepared.taken == 1
        assert parsed.rules[0].decls[0].text == "#6f6f6f"


def test_undecodable_bytes_give_the_same_diagnostic_either_way(tmp_path):
    path, source, root = _site(tmp_path)
    for name in (path, source):
        with open(name, "ab") as fh:
            fh.write(b".x { content: '\xff' }\n")
    _, here = SheetLoader(root).sheet(path)
    with _ahead(root, path, source) as loader:
        _, ahead = loader.sheet(path)
        assert loader.prepared.taken == 1
        assert [d.message for d in ahead] == [d.message for d in here]
        assert any("not valid UTF-8" in d.message for d in ahead)


def test_nothing_to_take_for_other_paths_or_missing_sources(tmp_path):
    path, _, root = _site(tmp_path)
    ready = prepared.start(SheetLoader(root), [(path, str(tmp_path / "gone.css"))])
    _finished(ready)
    try:
        assert ready.take(str(tmp_path / "other.css"), b"\0" * 20) is None
        assert ready.take(path, b"\0" * 20) is None  # its source could not be read
    finally:
        ready.close()


def test_selectors_this_process_has_tried_are_handed_over_too(tmp_path):
    """Equal selectors are compiled once per process (``sheet._COMPILED``); one whose test was
    built here (a lambda, which pickle cannot write) is written without it and built again."""
    import cssselect2
    from lxml import html as lxml_html

    from tinctura.extract.sheet import parse_stylesheet

    path, source, root = _site(tmp_path)
    here = parse_stylesheet(CSS, "css/theme.css")
    tree = lxml_html.fromstring('<div><p class="note">Tide tables</p><p>Moorings</p></div>')
    wrapper = cssselect2.ElementWrapper.from_html_root(tree)
    matched = [[bool(r.compiled.test(w)) for w in wrapper.iter_subtree()] for r in here.rules]
    assert "test" in vars(here.rules[0].compiled)  # built, and shared with the next parse
    with _ahead(root, path, source) as loader:
        parsed, _ = loader.sheet(path)
        assert loader.prepared.taken == 1
        assert [[bool(r.compiled.test(w)) for w in wrapper.iter_subtree()]
                for r in parsed.rules] == matched == [[False, True, False]] * 2


class _Working:
    """A parsing process still running."""

    def __init__(self):
        self.ended = False

    def is_alive(self):
        return not self.ended

    def terminate(self):
        self.ended = True

    def join(self):
        pass


def test_the_loader_never_waits_for_a_sheet_not_written_yet(tmp_path):
    """Handing a large sheet over costs up to half of parsing it: one the process has not
    finished is parsed here. Closing ends the process and removes its folder."""
    import pickle

    folder = tmp_path / "ahead"
    folder.mkdir()
    first, second = str(tmp_path / "a.css"), str(tmp_path / "b.css")
    working = _Working()
    ready = prepared.Prepared(working, str(folder), {first: "0.pickle", second: "1.pickle"})
    with open(folder / "0.pickle", "wb") as fh:
        pickle.dump((b"a", "parsed a", ["diagnostic"]), fh)
    assert ready.take(second, b"b") is None and ready.take(second, b"b") is None
    assert ready.take(first, b"a") == ("parsed a", ["diagnostic"]) and ready.taken == 1
    ready.close()
    assert working.ended and not folder.exists()
