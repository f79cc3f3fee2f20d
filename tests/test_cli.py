"""The command line: commands, flags, exit statuses, error messages."""
import io
import json
import subprocess
import sys

import jsonschema
import pytest

from tinctura import cli, engine
from tinctura.model import PageResult, Scheme
from tinctura.report.json_report import expand, schema
from tinctura.rules import RULES
from tinctura.rules.examples import make_sample


def call(*argv):
    out, err = io.StringIO(), io.StringIO()
    status = cli.main(list(argv), stdout=out, stderr=err)
    return status, out.getvalue(), err.getvalue()


@pytest.fixture
def fake_engine(monkeypatch, tmp_path):
    """engine.check_paths replaced by a hand-built run; records the Options it was given."""
    calls = []
    samples = {"bad": [make_sample("#777", "white", page="a.html", text="Seed swap on Saturday")],
               "good": [make_sample("#222", "white", page="a.html")]}
    state = {"which": "bad"}

    def check_paths(paths, options, findings_to=None):
        calls.append((paths, options))
        page = PageResult("a.html", samples[state["which"]])
        report = engine.Report(pages=[page], schemes=[Scheme("light")])
        findings = engine.evaluate(page.samples, options)
        if findings_to is None:
            report.findings = findings
        else:
            findings_to(page, findings)
        return report

    def iter_pages(paths, options, judged=False):
        calls.append((paths, options))
        yield PageResult("a.html", list(samples[state["which"]]))

    monkeypatch.setattr(engine, "check_paths", check_paths)
    monkeypatch.setattr(engine, "iter_pages", iter_pages)
    site = tmp_path / "site"
    site.mkdir()
    return calls, state, str(site)


# -- pair ----------------------------------------------------------------------------------


def test_pair_777_on_white():
    # WCAG 2.2 formula: #777777 on #ffffff = 4.478:1 -> shown 4.47, fails AA body text.
    status, out, err = call("pair", "#777", "white")
    assert status == 1 and err == ""  # fails the level selected (AA by default)
    pytest.LineMatcher(out.splitlines()).fnmatch_lines([
        "#777777 on #ffffff: 4.47:1",
        "16 px at weight 400: normal text",
        "  AA  (SC 1.4.3) needs 4.5:1: fail",
        "*nearest passing: text #767676 (4.54:1)*",
        "  AAA (SC 1.4.6) needs 7:1: fail",
    ])


@pytest.mark.parametrize("argv, status, line", [
    # WCAG 2.2 formula: #767676 on white = 4.54:1 (passes 4.5, fails 7); #777777 = 4.47:1.
    (("#767676", "white"), 0, "#767676 on #ffffff: 4.54:1, passes AA (4.5:1)"),
    (("#767676", "white", "--level", "AAA"), 1, "#767676 on #ffffff: 4.54:1, fails AAA (7:1)"),
    (("#777", "white"), 1, "#777777 on #ffffff: 4.47:1, fails AA (4.5:1)"),
])
def test_pair_quiet_prints_the_verdict_and_exits_on_the_level(argv, status, line):
    got, out, err = call("pair", "-q", *argv)
    assert (got, out, err) == (status, line + "\n", "")


def test_version_flags():
    for flag in ("-V", "--version"):
        status, out, _ = call(flag)
        assert status == 0 and out.startswith("tinctura ")


def test_pair_apca_reference_values():
    # APCA 0.0.98G-4g reference values (shared reference values, verified by the formula):
    # #888 on #fff = Lc 63.06, #fff on #888 = Lc -68.54; both pairs are 3.54:1 (WCAG 2.2
    # formula), below AA's 4.5:1, so the command exits 1.
    status, out, _ = call("pair", "#888", "white")
    assert status == 1
    assert "Lc 63.06 (dark on light)" in out
    status, out, _ = call("pair", "#fff", "#888")
    assert status == 1
    assert "Lc -68.54 (light on dark)" in out
    pytest.LineMatcher(out.splitlines()).fnmatch_lines([
        "*meets the levels for: other content text (Lc 60), large headlines (Lc 45)*",
        "*this text is body text: needs Lc 75: fail",
    ])
    assert "needs Lc 90: fail" in call("pair", "#000", "#888", "--lc-levels", "body=90")[1]


def test_pair_red_on_black_names_protanopia():
    # #ff3030 on black: 5.71:1 (WCAG 2.2 formula) passes AA; under protanopia (Machado et al.
    # 2009, severity 1, matrix as tabulated in colour-science) it darkens to 3.80:1.
    status, out, _ = call("pair", "#ff3030", "black")
    assert status == 0
    pytest.LineMatcher(out.splitlines()).fnmatch_lines([
        "#ff3030 on #000000: 5.71:1",
        "  AA  (SC 1.4.3) needs 4.5:1: pass",
        "Colour-vision deficiency*needs 4.5:1*",
        "  protanopia   #* on #000000: 3.80:1, Lc *: fail",
        "  deuteranopia *: pass",
        "Viewing profiles*",
        "  office * 5.71:1, Lc -39.34: pass",
        "  daylight *: fail",
    ])
    assert "protanopia   #ff3030 on #000000: 5.71:1" in call(
        "pair", "#ff3030", "black", "--cvd-severity", "0")[1]  # severity 0: normal vision


@pytest.mark.parametrize("argv, needle", [
    (("--lc-levels", "body"), "expected TIER=LC"),
    (("--lc-levels", "footnote=40"), "unknown text tier 'footnote'"),
    (("--cvd-severity", "2"), "from 0 to 1"),
    (("--profiles", "beach"), "unknown viewing profile 'beach'"),
])
def test_appearance_options_are_checked(tmp_path, argv, needle):
    status, _, err = call("check", str(tmp_path), "--no-config", *argv)
    assert status == 2 and needle in err


def test_pair_large_text_passes_aa():
    # #949494 on white = 3.03:1 (WCAG formula): large text (24 px) meets AA's 3:1.
    status, out, _ = call("pair", "#949494", "#fff", "--size", "24")
    pytest.LineMatcher(out.splitlines()).fnmatch_lines([
        "*: 3.03:1", "*large text", "  AA  (SC 1.4.3) needs 3:1: pass", "  AAA (SC 1.4.6) needs 4.5:1: fail"])


def test_pair_bold_threshold():
    _, out, _ = call("pair", "#949494", "#fff", "--size", "18.67", "--weight", "bold")
    assert "large text" in out


def test_pair_translucent_colours_are_explained():
    _, out, _ = call("pair", "rgb(0 0 0 / 50%)", "rgba(255, 255, 255, 0.5)")
    assert "composited over white" in out
    assert "composited over the background" in out
    # 50 % black over white (source-over in sRGB, CSS Compositing 1) = #808080.
    assert out.startswith("#808080 on #ffffff: ")


@pytest.mark.parametrize("argv, needle", [
    (("pair", "bogus", "white"), "'bogus' is not a CSS colour"),
    (("pair", "#777", "currentcolor"), "currentcolor"),
])
def test_pair_bad_colour(argv, needle):
    status, out, err = call(*argv)
    assert status == 2 and out == ""
    assert needle in err and "Traceback" not in err


@pytest.mark.parametrize("argv", [
    ("pair", "#777", "white", "--size", "0"),
    ("pair", "#777", "white", "--weight", "heavy"),
    ("check", ".", "--level", "A"),
    ("check", ".", "--fail-on", "sometimes"),
    ("frobnicate",),
    (),
])
def test_usage_errors_exit_2(argv):
    status, _, err = call(*argv)
    # one line naming the mistake and where help is
    assert status == 2 and err.count("\n") == 1 and "error:" in err and "--help" in err


# -- rules ---------------------------------------------------------------------------------


def test_rules_lists_every_rule_with_docs():
    status, out, _ = call("rules")
    assert status == 0
    for rule in RULES:
        assert f"{rule.code} {rule.slug}: {rule.title}" in out
    for heading in ("What it checks", "Why", "Failing example", "Passing example", "How to fix", "References"):
        assert heading in out


def test_rules_one_and_unknown():
    status, out, _ = call("rules", "text-ratio")
    assert status == 0 and out.startswith("TC100 text-ratio")
    status, _, err = call("rules", "TC999")
    assert status == 2 and "unknown rule 'TC999'" in err


# -- check ---------------------------------------------------------------------------------


def test_check_passes_the_options_on(fake_engine):
    calls, _, site = fake_engine
    call("check", site, "--level", "aaa", "--viewport-width", "390", "--jobs", "2",
         "--no-states", "--exclude", "drafts/*", "--exclude", "old/*")
    (paths, options), = calls
    assert paths == [site]
    assert (options.level, options.viewport_width, options.jobs, options.states, options.exclude) == (
        "AAA", 390, 2, False, ("drafts/*", "old/*"))


@pytest.mark.parametrize("which, fail_on, status", [
    ("bad", "error", 1), ("bad", "warning", 1), ("bad", "info", 1), ("bad", "never", 0),
    ("good", "error", 0),
])
def test_check_exit_status(fake_engine, which, fail_on, status):
    _, state, site = fake_engine
    state["which"] = which
    assert call("check", site, "--fail-on", fail_on)[0] == status


def test_check_text_report(fake_engine):
    _, _, site = fake_engine
    status, out, err = call("check", site)
    assert status == 1 and err == ""
    pytest.LineMatcher(out.splitlines()).fnmatch_lines([
        "1 problem (1 occurrence on 1 page), by severity, largest first",
        "1. Grey text on white is too faint: 4.47:1, needs 4.5:1.",
        "   Where: a.html:1 \"Seed swap on Saturday\"*",
        "Checked 1 page at level AA, 1 text sample; 1 error, 0 warnings, 0 info; 1 problem; 0 undetermined.",
        "*ISO 3864*",
    ])
    assert "\x1b[" not in out  # not a terminal: no colour


def test_check_forced_colour(fake_engine, monkeypatch):
    _, _, site = fake_engine
    monkeypatch.setenv("FORCE_COLOR", "1")
    monkeypatch.delenv("NO_COLOR", raising=False)
    assert "\x1b[" in call("check", site)[1]
    assert "\x1b[" not in call("check", site, "--color", "never")[1]


def test_check_json_to_file(fake_engine, tmp_path):
    _, _, site = fake_engine
    target = tmp_path / "report.json"
    status, out, _ = call("check", site, "--format", "json", "--output", str(target))
    assert status == 1 and out == ""
    doc = json.loads(target.read_text(encoding="utf-8"))
    jsonschema.Draft202012Validator(schema()).validate(doc)
    assert doc["summary"]["findings"] == 1 and doc["schemes"] == ["light"]


def test_check_leaves_the_collector_as_it_found_it(fake_engine, monkeypatch):
    # what the check keeps is frozen out of the collections while reports are written
    # (engine.kept_out_of_collections), then thawed; a caller's frozen objects stay frozen
    import gc

    _, _, site = fake_engine
    frozen_while_reporting = []
    real = cli.outputs.write_reports
    monkeypatch.setattr(cli.outputs, "write_reports", lambda *a, **k: (
        frozen_while_reporting.append(gc.get_freeze_count()), real(*a, **k))[1])
    gc.unfreeze()
    call("check", site)
    assert frozen_while_reporting[0] > 0 and gc.get_freeze_count() == 0
    gc.freeze()
    try:
        mine = gc.get_freeze_count()
        call("check", site)
        assert frozen_while_reporting[1] == mine and gc.get_freeze_count() == mine
    finally:
        gc.unfreeze()


def test_check_group_by_page(fake_engine):
    _, _, site = fake_engine
    _, out, _ = call("check", site, "--group", "page")
    assert out.startswith("a.html (1 finding)")


def test_check_missing_path(tmp_path):
    missing = tmp_path / "nowhere"
    status, out, err = call("check", str(missing))
    assert status == 2 and out == ""
    assert err == f"tinctura: error: {missing}: no such file or directory\n"


def test_check_not_html(tmp_path):
    other = tmp_path / "notes.txt"
    other.write_text("x")
    status, _, err = call("check", str(other))
    assert status == 2 and "not an HTML file" in err


def test_check_site_without_pages(tmp_path):
    # The real engine reports a directory without HTML pages as an input error.
    status, _, err = call("check", str(tmp_path))
    assert status == 2 and f"tinctura: error: {tmp_path}: " in err and "Traceback" not in err


def test_check_unwritable_output(fake_engine, tmp_path):
    _, _, site = fake_engine
    status, _, err = call("check", site, "--output", str(tmp_path / "no" / "such" / "dir.json"))
    assert status == 2 and "cannot write" in err and "Traceback" not in err


def test_internal_error_exits_2_with_traceback(fake_engine, monkeypatch):
    _, _, site = fake_engine

    def broken(paths, options, findings_to=None):
        raise RuntimeError("boom")

    monkeypatch.setattr(engine, "check_paths", broken)
    status, _, err = call("check", site)
    assert status == 2 and "internal error" in err and "RuntimeError: boom" in err


# -- pairs ---------------------------------------------------------------------------------


def test_pairs_prints_json_lines(fake_engine):
    _, _, site = fake_engine
    status, out, _ = call("pairs", site)
    assert status == 0
    (line,) = [json.loads(x) for x in out.splitlines()]
    assert (line["page"], line["fg"], line["bg"], line["status"]) == ("a.html", "#777777", "#ffffff", "determined")


# -- the real engine, end to end ------------------------------------------------------------


def test_check_real_pages(tmp_path):
    rule = RULES[0]
    (tmp_path / "bad.html").write_text(rule.docs.bad.html, encoding="utf-8")
    (tmp_path / "good.html").write_text(rule.docs.good.html, encoding="utf-8")
    status, out, _ = call("check", str(tmp_path), "--no-states", "--format", "json")
    doc = json.loads(out)
    assert status == 1
    assert [(f["page"], f["rule"]) for f in expand(doc)] == [("bad.html", rule.code)]
    _, flat, _ = call("check", str(tmp_path), "--no-states", "--format", "json",
                      "--flat-findings")
    assert json.loads(flat)["findings"] == expand(doc)
    assert call("check", str(tmp_path / "good.html"), "--no-states")[0] == 0


def test_python_dash_m(tmp_path):
    done = subprocess.run([sys.executable, "-m", "tinctura", "pair", "#777", "white"],
                          capture_output=True, text=True, timeout=60)
    assert done.returncode == 1 and done.stdout.startswith("#777777 on #ffffff: 4.47:1")


def test_the_command_ends_at_once_after_flushing_and_exit_handlers(tmp_path):
    # cli.end_now skips the heap's teardown: the status, the output written to a pipe and to
    # a file, and what exit handlers do (temporary folders, pools) must all survive it
    report = tmp_path / "r.json"
    (tmp_path / "index.html").write_text(
        '<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Kiln log</title>'
        '</head><body><main><p style="color:#aaa">Fire the kiln to cone six.</p></main>'
        '</body></html>')
    done = subprocess.run([sys.executable, "-m", "tinctura", "check", str(tmp_path), "--jobs",
                           "1", "--no-config", "--format", "text", "--format",
                           f"json:{report}"], capture_output=True, text=True, timeout=120)
    assert done.returncode == 1 and "too faint" in done.stdout
    assert json.loads(report.read_text())["summary"]
    code = ("import atexit, sys; from tinctura import cli; "
            "atexit.register(lambda: open(sys.argv[1], 'w').write('handled')); "
            "print('buffered', end=''); cli.end_now(3)")
    mark = tmp_path / "handler"
    done = subprocess.run([sys.executable, "-c", code, str(mark)], capture_output=True,
                          text=True, timeout=60)
    assert (done.returncode, done.stdout, mark.read_text()) == (3, "buffered", "handled")
    # a thread that is not a daemon still running: Python's own exit, which waits for it
    code = ("import sys, threading, time; from tinctura import cli; "
            "threading.Thread(target=lambda: (time.sleep(0.3), "
            "open(sys.argv[1], 'w').write('finished'))).start(); cli.end_now(None)")
    done = subprocess.run([sys.executable, "-c", code, str(mark)], capture_output=True,
                          text=True, timeout=60)
    assert (done.returncode, mark.read_text()) == (0, "finished")


def test_check_config_mkdocs_yml_that_mkdocs_cannot_load(fake_engine, tmp_path):
    _, _, site = fake_engine
    broken = tmp_path / "broken" / "mkdocs.yml"
    broken.parent.mkdir()
    broken.write_text("site_name: Brindlemoor\ntheme:\n  name: no-such-theme\n")
    status, out, err = call("check", site, "--config", str(broken))
    assert status == 1 and "Grey text on white is too faint" in out  # the check goes on
    assert "note:" in err and "cannot read the MkDocs configuration" in err


def test_write_fixes_says_how_to_add_the_file(fake_engine, tmp_path):
    _, _, site = fake_engine
    target = tmp_path / "colour-fixes.css"
    status, _, err = call("check", site, "--write-fixes", str(target))
    assert status == 1
    assert "Automated checks cover only part of WCAG" in target.read_text()
    assert f"wrote 0 verified fixes to {target}" in err  # the fake site has no stylesheet
    assert "extra_css:\n    - stylesheets/colour-fixes.css" in err


def test_a_contrast_check_does_not_import_numpy(tmp_path):
    # numpy is imported on use (the appearance rules, the vectorised forms): a TC100 run, its
    # suggested colours ranked by CAM02-UCS distance included, does without it
    (tmp_path / "index.html").write_text(
        '<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Kiln log</title>'
        '</head><body><main><p style="color:#f08c28">Fire the kiln to cone six.</p>'
        '<p style="color:#3cb4e6">Glaze the lids after the first firing.</p></main></body></html>')
    code = ("import sys; from tinctura import cli; from tinctura.colour import ucs_distance; "
            "cli.main(sys.argv[1:]); "
            "print('numpy', 'numpy' in sys.modules, ucs_distance.from_srgb.cache_info().currsize,"
            " file=sys.stderr)")
    done = subprocess.run([sys.executable, "-c", code, "check", str(tmp_path), "--select", "TC100",
                           "--jobs", "1", "--no-config", "--fail-on", "never", "--format",
                           f"json:{tmp_path / 'r.json'}"], capture_output=True, text=True)
    _, imported, ranked = done.stderr.strip().splitlines()[-1].split()
    assert int(ranked) > 0  # the ranking ran
    assert imported == "False"
