"""Hostile and broken input: bounded work, nothing read outside the site, nothing silently lost,
clear errors. Each test builds a small site in a temporary directory and runs the command line
as a user would."""
import io
import os
import random

import pytest

from tinctura import cli, engine
from tinctura.extract import bounds
from tinctura.extract.html import parse_html, parser_warnings


def call(*argv):
    out, err = io.StringIO(), io.StringIO()
    status = cli.main([str(a) for a in argv], stdout=out, stderr=err)
    return status, out.getvalue(), err.getvalue()


def page(body, head='<link rel="stylesheet" href="s.css">'):
    return f"<!doctype html><html><head>{head}</head><body>{body}</body></html>"


def site(tmp_path, files):
    for rel, data in files.items():
        path = tmp_path / rel
        path.parent.mkdir(parents=True, exist_ok=True)
        if isinstance(data, bytes):
            path.write_bytes(data)
        else:
            path.write_text(data, encoding="utf-8")
    return tmp_path


def texts(root, **options):
    """Every sample's text of a site, resting state."""
    report = engine.check_paths([str(root)], engine.Options(states=False, **options))
    return report, [s.text for p in report.pages for s in p.samples]


def messages(report):
    return [d.message for d in report.diagnostics] + [
        d.message for p in report.pages for d in p.diagnostics]


# -- custom properties ------------------------------------------------------------------------

def bomb(levels=30, copies=3):
    lines = [":root {", "  --a0: #767676;"]
    lines += [f"  --a{i}: " + " ".join([f"var(--a{i - 1})"] * copies) + ";"
              for i in range(1, levels + 1)]
    lines += ["}", f"p.bomb {{ color: var(--a{levels}); }}", "p.faint { color: #999; }"]
    return "\n".join(lines) + "\n"


def test_custom_property_bomb_is_bounded_and_named(tmp_path):
    # 3^30 tokens if expanded: must finish at once, name the property and its line, and still
    # find the real fault of the page
    root = site(tmp_path, {"index.html": page('<p class="bomb">Tide tables</p>'
                                              '<p class="faint">Battery low</p>'),
                           "s.css": bomb()})
    status, out, err = call("check", root, "--group", "page", "--color", "never")
    assert status == 1 and "Traceback" not in out + err
    assert "Battery low" in out
    # with the two spaces between copies, --ak holds 3 * size(--a(k-1)) + 2 tokens: 1, 5, 17,
    # 53, 161, 485, 1457, 4373, 13121; --a8 is the first past 10,000, on line 10 of the sheet
    # (":root {" is line 1, --a0 line 2)
    assert "s.css:10: warning: --a8: var() expansion longer than 10000 tokens" in out


def test_bomb_limit_is_configurable(tmp_path):
    root = site(tmp_path, {"index.html": page('<p class="bomb">x</p>'), "s.css": bomb(6, 3)})
    _, out, _ = call("check", root, "--max-var-tokens", "100", "--color", "never")
    assert "--a4: var() expansion longer than 100 tokens" in out  # 161 > 100 >= 53


def test_custom_property_cycle_and_deep_chain(tmp_path):
    # a long chain, declared last link first (resolving it recursively would overflow the
    # stack) and first link first (each value would carry its whole chain: quadratic)
    chain = "\n".join(f"  --c{i}: var(--c{i - 1});" for i in range(3000, 0, -1))
    chain += "\n" + "\n".join(f"  --d{i}: var(--d{i - 1});" for i in range(1, 3001))
    css = (":root {\n  --x: var(--y);\n  --y: var(--x);\n  --c0: #777;\n  --d0: #777;\n" + chain + "\n}\n"
           "p.cyc { color: var(--x, #595959); }\np.deep { color: var(--c3000); }\n"
           "p.long { color: var(--d3000, #595959); }\n")
    root = site(tmp_path, {"index.html": page('<p class="cyc">Cycle</p><p class="deep">Deep</p>'
                                              '<p class="long">Long</p>'),
                           "s.css": css})
    report, found = texts(root)
    assert sorted(found) == ["Cycle", "Deep", "Long"]
    # properties in a cycle hold the guaranteed-invalid value, so var() takes its fallback
    # (CSS Custom Properties 1, sections 2.3 and 3)
    colours = {s.text: s.fg for p in report.pages for s in p.samples}
    assert colours["Cycle"] == pytest.approx((0x59 / 255,) * 3)
    assert colours["Long"] == pytest.approx((0x59 / 255,) * 3)  # too long: invalid, fallback
    assert colours["Deep"] == (0.0, 0.0, 0.0)  # too long and no fallback: inherited
    # declared last link first, the bound is met while resolving: the properties it passes
    # through are invalid too (none of them is used by any real site)
    assert any(m.startswith("--c") and "chain of more than 64 custom properties" in m
               for m in messages(report))
    assert any("--d65: chain of more than 64 custom properties" in m for m in messages(report))


# -- nothing outside the site -------------------------------------------------------------------

@pytest.fixture
def outside(tmp_path):
    out = tmp_path / "elsewhere"
    out.mkdir()
    (out / "secret.css").write_text("p { color: #eee }\n")
    (out / "imported.css").write_text("p { color: #ddd }\n")
    (out / "page.html").write_text(page("<p>SECRET PAGE TEXT</p>", ""))
    return out


def test_symbolic_links_out_of_the_site_are_not_read(tmp_path, outside):
    root = site(tmp_path / "site", {
        "index.html": page("<p>Mooring guide</p>",
                           '<link rel="stylesheet" href="s.css">'
                           '<link rel="stylesheet" href="i.css">'),
        "i.css": '@import "inner/imp.css";\n'})
    (root / "inner").mkdir()
    os.symlink(outside / "secret.css", root / "s.css")
    os.symlink(outside / "imported.css", root / "inner" / "imp.css")
    os.symlink(outside / "page.html", root / "other.html")
    os.symlink(outside, root / "linked-dir")
    status, out, err = call("check", root, "--group", "page", "--color", "never")
    assert "SECRET" not in out + err
    assert "No contrast findings" in out  # the #eee and #ddd of the outside sheets never apply
    assert "s.css: stylesheet is a symbolic link leading outside the site directory" in out
    assert "@import inner/imp.css: stylesheet is a symbolic link leading outside" in out
    assert "other.html: warning: page not checked: a symbolic link leading outside" in out
    assert "linked-dir" not in out  # directories linked in are not walked
    assert status == 0


def test_links_inside_the_site_are_followed(tmp_path):
    root = site(tmp_path, {"index.html": page("<p>Flood gate</p>"),
                           "css/real.css": "p { color: #999 }\n"})
    os.symlink(root / "css" / "real.css", root / "s.css")
    status, out, _ = call("check", root, "--color", "never")
    assert status == 1 and "#999999" in out


def test_read_inside_refuses_fifos_and_large_files(tmp_path):
    os.mkfifo(tmp_path / "pipe.html")  # opening it would block the run
    with pytest.raises(bounds.Refused, match="not a regular file"):
        bounds.read_inside(str(tmp_path / "pipe.html"), str(tmp_path))
    (tmp_path / "big.css").write_bytes(b"p{}" * 100)
    with pytest.raises(bounds.Refused, match="larger than the limit of 100 bytes"):
        bounds.read_inside(str(tmp_path / "big.css"), str(tmp_path), max_bytes=100)


def test_a_file_that_grows_after_its_size_was_read_is_read_whole_or_refused(tmp_path,
                                                                            monkeypatch):
    (tmp_path / "grown.css").write_bytes(b"p{}" * 100)  # 300 bytes, stated as 30
    real_stat = os.stat

    def stale(path, *args, **kwargs):
        info = real_stat(path, *args, **kwargs)
        if str(path).endswith("grown.css"):
            return os.stat_result((info.st_mode, *info[1:6], 30, *info[7:]))
        return info

    monkeypatch.setattr(bounds.os, "stat", stale)
    assert bounds.read_inside(str(tmp_path / "grown.css"), str(tmp_path)) == b"p{}" * 100
    with pytest.raises(bounds.Refused, match="larger than the limit of 100 bytes"):
        bounds.read_inside(str(tmp_path / "grown.css"), str(tmp_path), max_bytes=100)


# -- nothing silently lost ---------------------------------------------------------------------

def test_deep_nesting_keeps_the_deep_and_the_following_text(tmp_path):
    body = "<div>" * 5000 + "<span>Deep reading</span>" + "</div>" * 5000
    body += '<p style="color:#aaa">Shallow after</p>'
    root = site(tmp_path, {"index.html": page(body, "")})
    report, found = texts(root)
    assert found == ["Deep reading", "Shallow after"]
    status, out, err = call("check", root, "--color", "never")
    assert status == 1 and "Traceback" not in out + err
    assert "deep-nesting parser" in out


def test_deep_builder_gives_the_shape_lxml_gives():
    # the fallback builder is only used past lxml's depth limit; on an ordinary page it must
    # build the tree lxml builds (implied ends of p, li, cells, rows; void elements)
    from tinctura.extract.html import _DeepTreeBuilder
    import lxml.etree

    html = ("<html lang=en><head><title>T</title><link rel=stylesheet href=a.css></head>"
            "<body class=b><p>one<p>two<div>three</div><ul><li>a<li>b</ul>"
            "<table><tr><td>1<td>2<tr><td>3</table><br><img src=x.png>tail"
            "<dl><dt>k<dd>v</dl></body></html>")
    ours = lxml.etree.tostring(_DeepTreeBuilder().build(html))
    theirs = lxml.etree.tostring(lxml.etree.fromstring(html, lxml.etree.HTMLParser()))
    assert ours == theirs


def test_binary_page_is_reported_not_sampled(tmp_path):
    rng = random.Random(15)
    root = site(tmp_path, {"index.html": bytes(rng.randrange(256) for _ in range(20000)),
                           "logo.html": b"\x89PNG\r\n\x1a\n" + b"\x00" * 100,
                           "ok.html": page("<p>Gauge</p>", "")})
    report, found = texts(root)
    assert found == ["Gauge"]
    status, out, err = call("check", root, "--color", "never")
    assert status == 2  # pages that could not be checked make the run fail
    assert "index.html: error: page not checked: not HTML" in out
    assert "logo.html: error: page not checked: not HTML: the file is a PNG image" in out
    status, out, err = call("check", root, "--color", "never", "--allow-unchecked")
    assert status == 0 and "logo.html: error: page not checked" in out  # reported, not failing


@pytest.mark.parametrize("data", [
    b"<p>a stray \x00 NUL</p>", b"\xef\xbb\xbf<p>BOM</p>", "<p>UTF-16</p>".encode("utf-16"),
    b"<p>latin-1 \xe9t\xe9</p>", b"plain text, no markup",
])
def test_broken_but_textual_pages_are_checked(data):
    assert bounds.not_text(data) is None


def test_element_limit(tmp_path):
    root = site(tmp_path, {"index.html": page("<p>x</p>" * 300, ""),
                           "small.html": page("<p>y</p>", "")})
    report, found = texts(root, max_elements=200)
    assert found == ["y"]
    assert any("above the limit of 200 per page (--max-elements)" in m
               for m in messages(report))


def test_rule_and_size_limits(tmp_path):
    css = "".join(f".r{i}, .s{i} {{ color: #333 }}\n" for i in range(100))
    root = site(tmp_path, {"index.html": page('<p class="s99">x</p>'), "s.css": css})
    status, out, _ = call("check", root, "--max-rules", "50", "--color", "never")
    assert status == 2 and "more than 50 style rules" in out
    status, out, _ = call("check", root, "--max-file-size", "1K", "--color", "never")
    assert status == 2 and "larger than the limit of 1,024 bytes" in out


def test_stylesheet_that_cannot_be_parsed_is_named(tmp_path, monkeypatch):
    from tinctura.extract import loader

    def broken(*args, **kwargs):
        raise RecursionError("maximum recursion depth exceeded")

    monkeypatch.setattr(loader, "parse_stylesheet", broken)
    root = site(tmp_path, {"index.html": page("<p>x</p>"), "s.css": "p{}"})
    status, out, _ = call("check", root, "--color", "never")
    assert status == 2 and "s.css: error: cannot parse stylesheet: maximum recursion" in out


# -- clear errors --------------------------------------------------------------------------------

@pytest.mark.parametrize("argv, needle", [
    (("trace", "{page}", "/html/body/p["), "not a valid XPath"),
    (("trace", "{page}", "/html/body/@class"), "no element matches"),
    (("pair", "#12345", "white"), "is not a CSS colour"),
    (("pair", "#777", "white", "--weight", "2000"), "font weight must be 1 to 1000"),
    (("check", "{root}", "--max-elements", "many"), "expected a whole number"),
    (("check", "{root}", "--schemes", "{root}/missing.json"), "cannot read"),
    (("check", "{root}", "--output", "{root}/no/such/dir/out.txt"), "cannot write"),
])
def test_user_mistakes_give_one_line_and_exit_2(tmp_path, argv, needle):
    root = site(tmp_path, {"index.html": page('<p class="x">Slack water</p>', "")})
    argv = [a.format(root=root, page=root / "index.html") for a in argv]
    status, out, err = call(*argv)
    assert status == 2 and needle in err and "Traceback" not in err
    assert err.count("\n") == 1


def test_internal_error_is_short_and_traceback_only_with_debug(tmp_path, monkeypatch):
    def crash(*args, **kwargs):
        raise ZeroDivisionError("planted")

    monkeypatch.setattr(cli, "run_pair", crash)
    for parser_flag in ((), ("--debug",)):
        status, out, err = call(*parser_flag, "pair", "#777", "white")
        assert status == 2 and "internal error: ZeroDivisionError: planted" in err
        assert "please report" in err
        assert ("Traceback" in err) == bool(parser_flag)


def test_internal_error_in_a_page_fails_the_run_without_traceback(tmp_path, monkeypatch):
    from tinctura.extract import samples

    def crash(self, *args, **kwargs):
        raise RuntimeError("planted walk failure")

    monkeypatch.setattr(samples.PageWalker, "walk", crash)
    root = site(tmp_path, {"index.html": page("<p>x</p>", "")})
    status, out, err = call("check", root, "--color", "never")
    assert status == 2 and "planted walk failure" in out + err and "please report" in out
    assert "Traceback" not in out + err
    status, out, err = call("check", root, "--color", "never", "--debug")
    assert "Traceback" in out + err


def test_parse_html_empty_and_deep_warnings():
    with pytest.raises(ValueError):
        parse_html(b"   ")
    parse_html("<p>shallow</p>")
    assert parser_warnings() == []


def test_a_page_writing_the_attributes_the_check_sets_has_them_ignored_and_is_told(tmp_path):
    # the check marks elements with attributes of its own while it walks (a state in force, a
    # link in running text, an exemption decided): a page writing them itself would put its
    # link in a state at rest or in running text. They are taken off, and the page is told;
    # the samples are those of the page without them
    css = ("body { background: #ffffff; color: #222222 } a { color: #3355cc }"
           " a:hover { color: #cc3355 }")
    clean = page('<nav><a href="#a">menu entry</a></nav><p><b>bold</b></p>')
    written = page('<nav><a href="#a" data-tinctura-state-hover="" data-tinctura-running="">'
                   'menu entry</a></nav><p><b data-tinctura-exempt-logotype="">bold</b></p>')
    found = {}
    for name, body in (("clean", clean), ("written", written)):
        root = site(tmp_path / name, {"s.css": css, "a.html": body})
        report = engine.check_paths([str(root)], engine.Options())
        found[name] = sorted((s.xpath, s.state, s.fg, s.bg) for p in report.pages
                             for s in p.samples)
        notes = [d.message for p in report.pages for d in p.diagnostics]
    assert found["written"] == found["clean"]
    assert any("data-tinctura-state-hover (1 element)" in n and "data-tinctura-running" in n
               and "data-tinctura-exempt-logotype" in n for n in notes), notes
