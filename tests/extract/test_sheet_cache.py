"""Parsed stylesheets kept between runs (extract/sheet_cache.py): taken back only for the same
bytes, path and code; bounded; never trusted from a folder others can write; never a reason
for a run to fail."""
import os
import stat

import pytest

from tinctura.engine import Options, Site
from tinctura.extract import loader as loader_mod
from tinctura.extract import sheet_cache

PAGE = ('<html><head><link rel="stylesheet" href="site.css"></head>'
        '<body><p class="x">faint words</p></body></html>')
CSS = ".x { color: #bbbbbb; }\n"


def _site(tmp_path, css=CSS):
    site = tmp_path / "site"
    site.mkdir(exist_ok=True)
    (site / "index.html").write_text(PAGE)
    (site / "site.css").write_text(css)
    return site


def _parses(monkeypatch) -> list:
    """The sheets the loader really parses (not taken from the cache)."""
    parsed = []
    original = loader_mod.SheetLoader.parsed

    def counting(self, css, path):
        parsed.append(os.path.basename(path))
        return original(self, css, path)

    monkeypatch.setattr(loader_mod.SheetLoader, "parsed", counting)
    return parsed


def _check(site, cache_dir):
    checked = Site(str(site), Options(cache_dir=str(cache_dir)))
    result = checked.check_page("index.html")
    return checked, [(s.xpath, s.scheme, s.fg, s.bg) for s in result.samples], \
        [d.message for d in result.diagnostics]


def test_a_second_run_takes_the_sheet_parsed_by_the_first(tmp_path, monkeypatch):
    parses = _parses(monkeypatch)
    site, cache = _site(tmp_path), tmp_path / "cache"
    first, found, notes = _check(site, cache)
    second, again, notes_again = _check(site, cache)
    assert parses == ["site.css"]  # once, by the first run
    assert (second.loader.cache.hits, second.loader.cache.misses) == (1, 0)
    assert again == found and notes_again == notes
    assert found and found[0][2] == (0xbb / 255,) * 3  # the sheet's colour, as parsed


def test_other_bytes_are_parsed_again(tmp_path, monkeypatch):
    parses = _parses(monkeypatch)
    cache = tmp_path / "cache"
    _check(_site(tmp_path), cache)
    _, found, _ = _check(_site(tmp_path, ".x { color: #222222; }\n"), cache)
    assert parses == ["site.css", "site.css"]
    assert found[0][2] == (0x22 / 255,) * 3


def test_parse_diagnostics_come_back_with_the_cached_sheet(tmp_path):
    # what decoding the bytes said (not valid UTF-8) is kept with the entry; what parsing said
    # is read from the parsed sheet on every load
    site, cache = _site(tmp_path, ".x { color: #bbbbbb; \n p { color: }\n"), tmp_path / "cache"
    (site / "site.css").write_bytes(b"/* caf\xe9 */ .x { color: #bbbbbb; }\n p { color: }\n")
    _, _, notes = _check(site, cache)
    again, _, notes_again = _check(site, cache)
    assert again.loader.cache.hits == 1 and any("UTF-8" in n for n in notes)
    assert notes_again == notes


def test_no_cache_folder_no_cache(tmp_path):
    checked = Site(str(_site(tmp_path)), Options())
    assert checked.loader.cache is None


def test_an_unreadable_entry_is_parsed_again(tmp_path, monkeypatch):
    parses = _parses(monkeypatch)
    site, cache = _site(tmp_path), tmp_path / "cache"
    _check(site, cache)
    for entry in cache.iterdir():
        entry.write_bytes(b"not a pickle")
    _, found, _ = _check(site, cache)
    assert parses == ["site.css", "site.css"] and found


@pytest.mark.skipif(not hasattr(os, "getuid"), reason="POSIX permissions")
def test_a_folder_others_can_write_is_not_used(tmp_path):
    folder = tmp_path / "shared"
    folder.mkdir()
    folder.chmod(0o777)
    cache = sheet_cache.SheetCache(str(folder))
    assert not cache and "others can write" in cache.refused
    cache.put(("k",), 1)
    assert cache.get(("k",)) is None and not list(folder.iterdir())


def test_a_new_folder_is_private(tmp_path):
    cache = sheet_cache.SheetCache(str(tmp_path / "new" / "tinctura"))
    assert cache
    assert stat.S_IMODE(os.stat(cache.folder).st_mode) & 0o077 == 0


def test_a_folder_that_cannot_be_made_is_reported_not_raised(tmp_path):
    blocker = tmp_path / "file"
    blocker.write_text("x")
    cache = sheet_cache.SheetCache(str(blocker / "tinctura"))
    assert not cache and cache.refused
    assert cache.get(("k",)) is None


def test_the_folder_keeps_the_most_recent_entries(tmp_path, monkeypatch):
    monkeypatch.setattr(sheet_cache, "MAX_ENTRIES", 3)
    cache = sheet_cache.SheetCache(str(tmp_path / "c"))
    for n in range(5):
        cache.put(("sheet", n), n)
        os.utime(cache._path(("sheet", n)), (1000 + n, 1000 + n))  # written in this order
    kept = [n for n in range(5) if cache.get(("sheet", n)) is not None]
    assert kept == [2, 3, 4]


def test_a_value_too_large_is_not_kept(tmp_path, monkeypatch):
    monkeypatch.setattr(sheet_cache, "MAX_ENTRY_BYTES", 100)
    cache = sheet_cache.SheetCache(str(tmp_path / "c"))
    cache.put(("big",), "x" * 1000)
    cache.put(("small",), "x")
    assert cache.get(("big",)) is None and cache.get(("small",)) == "x"


def test_the_default_folder_follows_the_environment(monkeypatch, tmp_path):
    monkeypatch.setenv("TINCTURA_CACHE_DIR", str(tmp_path / "mine"))
    assert sheet_cache.default_folder() == str(tmp_path / "mine")
    monkeypatch.delenv("TINCTURA_CACHE_DIR")
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "xdg"))
    assert sheet_cache.default_folder() == str(tmp_path / "xdg" / "tinctura")
    monkeypatch.delenv("XDG_CACHE_HOME")
    monkeypatch.setenv("HOME", str(tmp_path / "home"))
    assert sheet_cache.default_folder() == str(tmp_path / "home" / ".cache" / "tinctura")


def _cli(*argv):
    import io

    from tinctura import cli

    out, err = io.StringIO(), io.StringIO()
    status = cli.main(list(argv), stdout=out, stderr=err)
    return status, out.getvalue()


def test_the_command_line_keeps_sheets_unless_told_not_to(tmp_path, monkeypatch):
    parses = _parses(monkeypatch)
    site = _site(tmp_path)
    monkeypatch.setenv("TINCTURA_CACHE_DIR", str(tmp_path / "cache"))
    args = ("check", str(site), "--no-config", "--fail-on", "never", "--jobs", "1")
    first = _cli(*args)
    second = _cli(*args)
    assert parses == ["site.css"] and first == second
    monkeypatch.setenv("TINCTURA_CACHE_DIR", str(tmp_path / "other"))
    assert _cli(*args, "--no-cache") == first
    assert parses == ["site.css", "site.css"] and not (tmp_path / "other").exists()


def test_an_entry_of_other_code_is_not_read(tmp_path, monkeypatch):
    cache = sheet_cache.SheetCache(str(tmp_path / "c"))
    cache.put(("sheet",), "parsed by this code")
    assert cache.get(("sheet",)) == "parsed by this code"
    monkeypatch.setattr(sheet_cache, "_CODE_DIGEST", "an edited parser")
    assert cache.get(("sheet",)) is None
