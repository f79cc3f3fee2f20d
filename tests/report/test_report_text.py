"""The terminal report: layout (glob patterns, pytest's habit), numbers, colour decisions."""
import io
import re

import pytest

from tinctura.engine import Options
from tinctura.model import Cause, Declaration, Diagnostic, PageResult, UNDETERMINED
from tinctura.problems import group
from tinctura.report import DISCLAIMER, Header, render
from tinctura.report import messages as m
from tinctura.report.terminal import TerminalWriter, should_colour
from tinctura.rules import run
from tinctura.rules.examples import make_sample


def decl(prop, value, line, selector):
    return Declaration(prop, value, "assets/site.css", line, selector, "author")


MUTED = Cause(decl("color", "var(--muted)", 40, ".note"),
              chain=(decl("--muted", "#777777", 3, ":root"),))
PAPER = Cause(decl("background-color", "#ffffff", 10, "body"))


def pages_of(samples, skipped=None):
    names = sorted({s.page for s in samples})
    return [PageResult(n, [s for s in samples if s.page == n], dict(skipped or {})) for n in names]


def report(samples, group_by="cause", level="AA", schemes=("light",), diagnostics=(),
           skipped=None, extra_pages=()):
    findings = run(samples, Options(level=level))
    problems = group(findings, samples)
    pages = pages_of(samples, skipped) + [PageResult(p) for p in extra_pages]
    out = io.StringIO()
    summary = render(out, "text", Header(level=level, group=group_by, schemes=list(schemes)),
                     pages, findings, problems, list(diagnostics), colour_choice="never")
    return out.getvalue(), summary


def site_samples():
    out = []
    for i in range(5):
        out.append(make_sample("#777777", "#ffffff", fg_cause=MUTED, bg_cause=PAPER,
                               page=f"guide/p{i % 2}.html", line=10 + i,
                               xpath=f"/html/body/main/p[{i + 1}]",
                               text=f"Sow the marsh marigold seeds in autumn, tray {i}"))
    out.append(make_sample("#222222", "#ffffff", page="guide/p0.html", line=3, xpath="/html/body/h1",
                           text="Seed library"))
    out.append(make_sample("#cccccc", "#ffffff", page="guide/p1.html", status=UNDETERMINED,
                           reason="background image"))
    return out


def test_problems_lead_largest_first():
    text, _ = report(site_samples())
    pytest.LineMatcher(text.splitlines()).fnmatch_lines([
        "1 problem (5 occurrences on 2 pages), by severity, largest first",
        "1. Grey text on white is too faint: 4.47:1, needs 4.5:1.",
        "   Where: guide/p0.html:10 \"Sow the marsh marigold seeds in autumn,\u2026\" (\u2026 > body > main >",
        "*p:nth-of-type(1)), #777777 on #ffffff, 4.47:1",
        "          guide/p1.html:11*",
        "          guide/p0.html:12*",
        "          and 2 more occurrences on 2 pages",
        "   Fix: set `--muted` at assets/site.css:3 to #767676: 4.54:1 or more on its background",
        "   Detail:",
        "      error TC100 text-ratio: text contrast 4.47:1 is below the 4.5:1 required for normal*",
        "      text colour: `color: var(--muted)` at assets/site.css:40 (.note), via `--muted: #777777`*",
        "      background: `background-color: #ffffff` at assets/site.css:10 (body)",
        "Checked 2 pages at level AA, 7 text samples; 5 errors, 0 warnings, 0 info; 1 problem; 1 undetermined (background image 1).",
    ])


def test_brief_lines_keep_the_sentence_places_fix_and_rule_code():
    """The plugin's log form: fewer places, the rule's code for suppressions, no detail."""
    from tinctura.report.text_report import problem_lines

    samples = site_samples()
    (problem,) = group(run(samples, Options()), samples)
    lines = [text for _, text, _, _ in problem_lines(1, problem, detail=False, most=1)]
    assert lines[0] == "1. Grey text on white is too faint: 4.47:1, needs 4.5:1."
    assert lines[1].startswith("Where: guide/p0.html:10 ")
    assert lines[2] == "       and 4 more occurrences on 2 pages"
    assert lines[3].startswith("Fix: set `--muted` at assets/site.css:3 to #767676")
    assert lines[4:] == ["Rule: TC100 text-ratio (error)"]


def test_lines_are_wrapped_at_the_terminal_width(monkeypatch):
    monkeypatch.setenv("COLUMNS", "64")
    text, _ = report(site_samples())
    block = text.split("\nChecked ")[0]  # the problems (the summary is one line for tools)
    assert max(len(line) for line in block.splitlines()) <= 64
    monkeypatch.setenv("COLUMNS", "200")
    wide, _ = report(site_samples())
    assert len(wide.splitlines()) < len(text.splitlines())


def test_state_and_schemes_are_named_in_the_sentence():
    hover = make_sample("#999999", "#ffffff", state="hover", fg_cause=MUTED, bg_cause=PAPER,
                        xpath="/html/body/a", page="a.html")
    dark = make_sample("#999999", "#ffffff", state="hover", fg_cause=MUTED, bg_cause=PAPER,
                       xpath="/html/body/a", page="a.html", scheme="dark")
    text, _ = report([hover, dark], schemes=("light", "dark"))
    pytest.LineMatcher(text.splitlines()).fnmatch_lines([
        "1. Grey text on white is too faint when hovered: 2.84:1, needs 4.5:1, in 2 schemes (light 2.84:1,*",
        "*dark 2.84:1).",
    ])
    assert text.count("\n1. ") == 1 and "\n2. " not in text  # one problem for both schemes


def test_the_occurrence_the_sentence_describes_is_the_first_example():
    """A problem's sentence gives its worst ratio; its first example is that occurrence, even
    when the pages listed first hold only milder ones."""
    mild = [make_sample("#808080", "#ffffff", fg_cause=MUTED, bg_cause=PAPER, page=f"a{i}.html",
                        xpath="/html/body/p", text="Tide tables") for i in range(3)]
    worst = make_sample("#aaaaaa", "#ffffff", fg_cause=MUTED, bg_cause=PAPER, page="z.html",
                        line=4, xpath="/html/body/p", text="Berth plans")
    text, _ = report(mild + [worst])
    lines = text.splitlines()
    at = next(i for i, line in enumerate(lines) if "too faint: 2.32:1, needs 4.5:1" in line)
    pytest.LineMatcher(lines[at + 1:at + 5]).fnmatch_lines([
        '   Where: z.html:4 "Berth plans" (*), #aaaaaa on #ffffff, 2.32:1',
        '          a0.html:1 "Tide tables" (*), #808080 on #ffffff, 3.94:1',
        '          a1.html:1 *',
        "*and 1 more occurrence on 4 pages",
    ])


def test_ratios_are_truncated_never_rounded_up():
    # #777777 on white is 4.478:1 by the WCAG 2.2 formula: shown as 4.47, not 4.48.
    assert m.ratio(4.478089453577214) == "4.47"
    assert m.ratio(4.4999) == "4.49"
    assert m.ratio(21.0) == "21.00"
    assert m.required(4.5) == "4.5" and m.required(3.0) == "3" and m.required(7.0) == "7"


def test_group_by_page():
    text, _ = report(site_samples(), group_by="page")
    pytest.LineMatcher(text.splitlines()).fnmatch_lines([
        "guide/p0.html (3 findings)",
        "  10: /html/body/main/p[1]  \"Sow the marsh marigold seeds in autumn,\u2026\"",
        "      error TC100 text-ratio: text contrast 4.47:1 is below the 4.5:1 required *",
        "      #777777 on #ffffff, 4.47:1, needs 4.5:1; try text #767676 (4.54:1); no lighter*",
        "*this hue reaches it",
        "guide/p1.html (2 findings)",
        "Checked 2 pages at level AA, 7 text samples; 5 errors, 0 warnings, 0 info; 1 undetermined (background image 1).",
    ])
    assert "problem" not in text.split("Checked")[1]


def test_summary_counts_skipped_exempt_and_diagnostics():
    samples = site_samples() + [make_sample("#eeeeee", "#ffffff", exempt="disabled control")]
    diag = Diagnostic("assets/remote.css", "remote stylesheet not loaded", line=0)
    text, summary = report(samples, skipped={"hidden": 4}, diagnostics=[diag], extra_pages=["empty.html"])
    assert summary.pages == 4 and summary.samples == 8 and summary.exempt == 1
    assert summary.undetermined == 1 and summary.undetermined_reasons == {"background image": 1}
    pytest.LineMatcher(text.splitlines()).fnmatch_lines([
        "Not everything could be checked:",
        "  assets/remote.css: warning: remote stylesheet not loaded",
        "Checked 4 pages *; 1 undetermined (background image 1); 1 exempt (disabled control 1); 12 skipped (hidden 12); 1 diagnostic.",
    ])


def test_a_diagnostic_met_on_every_page_is_listed_once():
    # a theme links the same remote stylesheet from every page: one line, the other pages named
    remote = "https://fonts.example.net/dune.css: remote stylesheet not loaded"
    diagnostics = [Diagnostic(f"guide/p{i}.html", remote, line=7) for i in range(6)]
    diagnostics.append(Diagnostic("guide/p2.html", "cannot read page: gone", severity="error"))
    diagnostics.append(Diagnostic("guide/p0.html", remote, line=9))  # the same file: listed
    text, summary = report(site_samples(), diagnostics=diagnostics)
    pytest.LineMatcher(text.splitlines()).fnmatch_lines([
        "Not everything could be checked:",
        f"  guide/p0.html:7: warning: {remote}; the same on 5 more pages (guide/p1.html, "
        "guide/p2.html, guide/p3.html, and 2 more)",
        "  guide/p2.html: error: cannot read page: gone",
        f"  guide/p0.html:9: warning: {remote}",
        "Checked *; 8 diagnostics.",
    ])
    assert text.count("remote stylesheet not loaded") == 2


def test_schemes_are_named_only_when_there_are_several():
    one, _ = report(site_samples())
    assert "scheme" not in one
    samples = site_samples() + [make_sample("#777777", "#000000", scheme="dark", fg_cause=MUTED,
                                            bg_cause=PAPER, page="guide/p0.html")]
    two, _ = report(samples, schemes=("light", "dark"))
    pytest.LineMatcher(two.splitlines()).fnmatch_lines([
        "1. Grey text on white is too faint: 4.47:1, needs 4.5:1, in the light scheme.",
        "*[[]scheme light]",
        "*in 2 schemes (light, dark)*",
    ])


def test_clean_run():
    text, summary = report([make_sample("#000000", "#ffffff")])
    assert summary.findings == 0
    pytest.LineMatcher(text.splitlines()).fnmatch_lines([
        "No contrast findings.",
        "Checked 1 page at level AA, 1 text sample; 0 errors, 0 warnings, 0 info; 0 problems; 0 undetermined.",
    ])


def test_disclaimer_once_and_says_what_it_must():
    text, _ = report(site_samples())
    flat = " ".join(text.split())
    assert flat.count(" ".join(DISCLAIMER.split())) == 1
    for needed in ("WCAG", "qualified people", "ISO 3864", "ANSI Z535", "local regulations"):
        assert needed in DISCLAIMER


def test_no_escape_codes_without_colour():
    text, _ = report(site_samples())
    assert "\x1b[" not in text


class FakeTty(io.StringIO):
    def isatty(self):
        return True


@pytest.mark.parametrize("env, tty, expected", [
    ({}, False, False),
    ({}, True, True),
    ({"TERM": "dumb"}, True, False),
    ({"NO_COLOR": "1"}, True, False),
    ({"NO_COLOR": ""}, True, True),  # no-color.org: only a non-empty value counts
    ({"FORCE_COLOR": "1"}, False, True),
    ({"FORCE_COLOR": "1", "TERM": "dumb"}, False, True),
    ({"NO_COLOR": "1", "FORCE_COLOR": "1"}, True, False),
])
def test_colour_decision(env, tty, expected):
    stream = FakeTty() if tty else io.StringIO()
    assert should_colour(stream, env) is expected


def test_explicit_choice_wins():
    assert should_colour(io.StringIO(), {}, "always") is True
    assert should_colour(FakeTty(), {"FORCE_COLOR": "1"}, "never") is False


def test_writer_marks_up_only_when_colouring():
    out = io.StringIO()
    tw = TerminalWriter(out, colour=True)
    tw.line("fail", "red", "bold")
    assert out.getvalue() == "\x1b[31;1mfail\x1b[0m\n"
    assert TerminalWriter(io.StringIO(), colour=False).markup("fail", "red") == "fail"


def test_css_path_and_excerpt():
    assert m.css_path("/html/body/main/div[2]/p[3]") == "\u2026 > main > div:nth-of-type(2) > p:nth-of-type(3)"
    assert m.css_path("/html/body") == "html > body"
    assert m.excerpt("  a\n  b  ") == "a b"
    assert m.excerpt("x" * 50, 10) == "x" * 9 + "\u2026"


def test_schemes_found_in_samples_when_the_header_has_none():
    samples = site_samples() + [make_sample("#777777", "#ffffff", scheme="dark", page="guide/p0.html")]
    text, _ = report(samples, schemes=())
    assert "[scheme light]" in text and "in 2 schemes (dark, light)" in text


def test_appearance_findings_say_what_they_measured():
    # #b0b0b0 on #1a1a1a: 8.03:1 (WCAG 2.2 formula) but APCA Lc -58.21 (reference formula,
    # tests/colour/test_apca.py), below the body-text level 75.
    night = Cause(decl("color", "#b0b0b0", 12, ".night"))
    panel = Cause(decl("background-color", "#1a1a1a", 11, ".panel"))
    sample = make_sample("#b0b0b0", "#1a1a1a", weight=300, fg_cause=night, bg_cause=panel)
    out, _ = report([sample])
    pytest.LineMatcher(out.splitlines()).fnmatch_lines([
        "*Grey text on black is too faint: Lc -58.21, needs Lc 75 (light on dark).",
        "*Where: *#b0b0b0 on #1a1a1a, Lc -58.21",
        # the fix says what it reaches in the problem's own measure (it read "11.2:1 or more",
        # and "no single value reaches 4.5:1" of a colour at 8:1)
        "*Fix: set `color` at assets/site.css:12 to #*: reaches Lc 75 (light on dark) on its",
        "*background (*:1)",
        "*warning TC200 text-lc: lightness contrast Lc -58.21 (light on dark) is below the Lc 75*",
    ])
    out, _ = report([sample], group_by="page")
    assert "#b0b0b0 on #1a1a1a, Lc -58.21, needs Lc 75 (light on dark); try text #" in out


def cvd_finding(ratio, lc):
    """A TC400 finding as the rule makes it (the numbers are given, not computed)."""
    from tinctura.model import Finding

    return Finding("TC400", "cvd-ratio", "warning", make_sample("#9a5b00", "#ffffff"), ratio,
                   4.5, args={"deficiency": "deuteranopia", "lc": lc, "lc_required": 75.0})


def test_a_deficiency_finding_names_the_measure_it_lost():
    # TC400 reports a text that keeps the WCAG 2 ratio under a deficiency but falls below the
    # APCA level normal vision reaches; "5.01:1, needs 4.5:1" would read as a pass
    assert m.measure(cvd_finding(5.01, 74.49)) == \
        "Lc 74.49 under deuteranopia, needs Lc 75"
    assert m.measure(cvd_finding(4.17, 67.82)) == "4.17:1 under deuteranopia, needs 4.5:1"
    assert m.measured(cvd_finding(5.01, 74.49)) == "Lc 74.49 under deuteranopia"


def test_a_deficiency_headline_never_shows_a_passing_ratio_as_the_failure():
    # #9a5b00 on white: 5.43:1 for normal vision (WCAG 2 relative luminance, worked by hand:
    # L = 0.2126 * 0.3231 + 0.7152 * 0.1046 = 0.1435); APCA's body-text level is Lc 75
    # (APCA readability levels, recalled from memory: ../shared/reference-values.md)
    out, _ = report([make_sample("#9a5b00", "#ffffff")])
    headlines = [line for line in out.splitlines() if "under deuteranopia" in line
                 and line[:1].isdigit()]
    assert headlines, out  # TC400 judges the pair (the premise of this test)
    # no declaration to name (the sample's colour has no traced cause): said as a sentence
    assert "Fix: give the text the colour #" in out and " to #" not in out
    for line in headlines:
        ratio = re.search(r"([\d.]+):1 under", line)
        assert ratio is None or float(ratio.group(1)) < 4.5, line


def test_site_level_problems_are_wrapped_and_worded_as_sentences(tmp_path):
    # TC300/TC310 problems had unwrapped lines of up to 190 characters and a headline that
    # began in lower case, unlike every other problem
    from tinctura.cli import main

    (tmp_path / "site.css").write_text(
        ":root{--chip-ok:#2e7d32;--chip-stop:#c62828}"
        ".chip{padding:2px}.chip.ok{background:var(--chip-ok);color:#fff}"
        ".chip.stop{background:var(--chip-stop);color:#fff}.dark{background:#1e2530}",
        encoding="utf-8")
    chips = '<span class="chip ok">running</span> <span class="chip stop">stopped</span>'
    (tmp_path / "index.html").write_text(
        '<!doctype html><html lang="en"><head><meta charset="utf-8"><title>t</title>'
        f'<link rel="stylesheet" href="site.css"></head><body><p>{chips}</p>'
        f'<div class="dark"><p>{chips}</p></div></body></html>', encoding="utf-8")
    out = io.StringIO()
    main(["check", str(tmp_path), "--no-states", "--jobs", "1", "--fail-on", "never",
          "--color", "never", "--no-config"], out, io.StringIO())
    text = out.getvalue()
    headlines = [line for line in text.splitlines() if re.match(r"\d+\. Palette colour", line)]
    assert headlines, text  # the premise: a site-level problem is reported
    problems = text.split("\nChecked ")[0]  # (the summary line is one line by design)
    assert all(len(line) < 100 for line in problems.splitlines()), text
    out = io.StringIO()  # grouped by page, the site-level findings come under the whole site
    main(["check", str(tmp_path), "--no-states", "--jobs", "1", "--fail-on", "never",
          "--color", "never", "--no-config", "--group", "page"], out, io.StringIO())
    by_page = out.getvalue().split("\nChecked ")[0]
    assert "TC300 surround-shift" in by_page or "TC310 lookalike" in by_page, by_page
    assert all(len(line) < 100 for line in by_page.splitlines()), by_page


def test_a_fix_split_by_backgrounds_says_what_the_problem_needs():
    # a text colour at 8.89:1 on its darkest background (it passes the WCAG 2 ratio) that no
    # single value brings to an APCA level everywhere: "no single value reaches 4.5:1" read as
    # if the ratio were the trouble
    from tinctura.problems import CauseFix, Context
    from tinctura.report.text_report import cause_fix_lines

    dark, light = (0.12, 0.13, 0.16), (0.94, 0.95, 0.97)
    fix = CauseFix(decl("--fg", "#bfc1c7", 1, ":root"), 4.5, (dark, light), None, None,
                   contexts=(Context((dark,), (0.84, 0.84, 0.87), 8.12),
                             Context((light,), (0.36, 0.36, 0.39), 5.89)))
    lines = cause_fix_lines(fix, "Lc 75 (light on dark)")
    assert lines[0] == ("no single value of `--fg` reaches Lc 75 (light on dark) on both "
                        "backgrounds it is used on; one value per group of backgrounds:")
    assert cause_fix_lines(fix)[0].startswith("no single value of `--fg` reaches 4.5:1 on both")


def test_examples_on_one_theme_template_are_shown_once():
    # the navigation's link on every page is one place in the writer's sources (the theme
    # template): three identical "Where:" lines said nothing; other places fill in instead
    from tinctura.sourcemap import Source
    from tinctura.report.text_report import problem_lines
    from tinctura.writer import Location

    samples = [make_sample("#777777", "#ffffff", page=f"p{i}.html", xpath="/html/body/nav/a",
                           text="Home", fg_cause=MUTED, bg_cause=PAPER) for i in range(4)]
    samples.append(make_sample("#777777", "#ffffff", page="p1.html", xpath="/html/body/nav/b",
                               text="Setup", fg_cause=MUTED, bg_cause=PAPER))
    (problem,) = group(run(samples, Options()), samples)

    def locate(sample):
        return Location(sample.xpath.rsplit("/", 1)[1], Source(None, template="partials/nav.html"))

    where = [text for _, text, _, _ in problem_lines(1, problem, locate)
             if "theme template" in text]
    assert len(where) == 2 and where[0] != where[1], where
    assert any("and 3 more occurrences" in text for _, text, _, _ in
               problem_lines(1, problem, locate))


def test_the_sentence_names_an_area_only_where_the_examples_all_are():
    from tinctura.report.text_report import problem_lines
    from tinctura.writer import Location

    samples = [make_sample("#777777", "#ffffff", page=p, fg_cause=MUTED, bg_cause=PAPER)
               for p in ("404.html", "index.html")]
    (problem,) = group(run(samples, Options()), samples)
    where = {"404.html": (("p", (), ""), ("footer", (), "")),
             "index.html": (("p", (), ""), ("article", (), ""))}

    def locate(sample):
        return Location("p", None, where[sample.page])

    assert problem_lines(1, problem, locate)[0][1] == \
        "1. Grey text on white is too faint: 4.47:1, needs 4.5:1."
    where["index.html"] = where["404.html"]
    assert problem_lines(1, problem, locate)[0][1] == \
        "1. Grey text on white in the footer is too faint: 4.47:1, needs 4.5:1."


def test_by_page_a_situation_is_described_once_then_referred_to():
    # a theme's link colour failing on every page repeated its whole description on every
    # page (247 MB for 200 pages with styles of their own): written in full once, then one
    # line naming the colours, the measure and where the full description is
    samples = [make_sample("#777777", "#ffffff", fg_cause=MUTED, bg_cause=PAPER,
                           page=f"guide/p{i % 2}.html", line=10 + i,
                           xpath=f"/html/body/main/p[{i + 1}]", text=f"Tray {i}")
               for i in range(4)]
    samples.append(make_sample("#5a6270", "#2b2f36", page="guide/p1.html", line=30,
                               xpath="/html/body/main/p[9]", text="Dark tray"))
    text, _ = report(samples, group_by="page")
    assert text.count("text contrast 4.47:1 is below") == 1
    assert text.count("text contrast 2.18:1 is below") == 1  # another situation: in full
    pytest.LineMatcher(text.splitlines()).fnmatch_lines([
        "guide/p0.html (2 findings)",
        "  10: /html/body/main/p[1]  \"Tray 0\"",
        "      error TC100 text-ratio: text contrast 4.47:1 is below the 4.5:1 required *",
        "      #777777 on #ffffff, 4.47:1, needs 4.5:1; try text #767676 (4.54:1)*",
        "*",
        "  12: /html/body/main/p[3]  \"Tray 2\"",
        "      error TC100 text-ratio: #777777 on #ffffff, 4.47:1, as at guide/p0.html:10",
        "guide/p1.html (3 findings)",
        "  11: /html/body/main/p[2]  \"Tray 1\"",
        "      error TC100 text-ratio: #777777 on #ffffff, 4.47:1, as at guide/p0.html:10",
    ])


def test_by_page_findings_of_one_place_name_it_once():
    sample = make_sample("#757575", "#ffffff", page="tide.html", line=3, xpath="/html/body/p",
                         text="Tide gauge")
    text, _ = report([sample], group_by="page")
    assert text.count('3: /html/body/p  "Tide gauge"') == 1
    pytest.LineMatcher(text.splitlines()).fnmatch_lines([
        "tide.html (2 findings)",
        '  3: /html/body/p  "Tide gauge"',
        "      warning TC200 text-lc: *",
        "*",
        "      info TC500 glare-ratio: *",
    ])


def test_by_page_the_occurrences_of_a_situation_are_described_at_one_cost(monkeypatch):
    # occurrences rebuilt from one situation share its arguments and fixes: its message is
    # made once, however many pages it is on
    from tinctura.report import text_report
    from tinctura.situations import occurrence

    samples = [make_sample("#777777", "#ffffff", fg_cause=MUTED, bg_cause=PAPER,
                           page=f"guide/p{i:02}.html", line=5, xpath="/html/body/p",
                           text=f"Tray {i}") for i in range(30)]
    (template,) = run(samples[:1], Options())
    findings = [occurrence(template, s) for s in samples]
    made = []
    original = text_report.m.message
    monkeypatch.setattr(text_report.m, "message", lambda f: made.append(f) or original(f))
    out = io.StringIO()
    render(out, "text", Header(level="AA", group="page", schemes=["light"]), pages_of(samples),
           findings, group(findings, samples), [], colour_choice="never")
    assert len(made) == 1
    assert out.getvalue().count(", as at guide/p00.html:5") == 29


@pytest.mark.parametrize("text", [
    "error TC100 text-ratio: text contrast 4.47:1 is below the 4.5:1 required",
    "  leading spaces kept", "trailing spaces dropped   ", "a\ttab", "a line\nbreak",
    "no\u00a0break\u00a0spaces", "x" * 98, "x" * 99, "x" * 120, "", "   ",
    "#777777 on #ffffff, 4.47:1, needs 4.5:1; try text #767676 (4.54:1); no lighter background",
])
@pytest.mark.parametrize("indent", [0, 1, 3])
def test_wrapping_gives_what_textwrap_gives(text, indent):
    # most lines fit the width and skip textwrap; the result is textwrap's all the same
    import textwrap

    from tinctura.report.text_report import INDENT, wrapped

    lead = INDENT * indent
    want = textwrap.wrap(text, 99, initial_indent=lead, subsequent_indent=lead + "  ",
                         break_long_words=False, break_on_hyphens=False) or [lead]
    assert wrapped(indent, text, 100) == want


def test_by_page_the_places_every_page_shares_are_listed_once():
    # the navigation of every page is the same places: a link colour failing there made each
    # page list the same findings (65 MB for 200 pages); listed under the first page, then
    # counted, where a page has the same text at the same place in the same colours
    def nav(page, line, text="Tide tables", fg="#777777"):
        return make_sample(fg, "#ffffff", fg_cause=MUTED, bg_cause=PAPER, page=page,
                           line=line, xpath="/html/body/nav/a[1]", text=text)

    samples = [nav("a.html", 4), nav("b.html", 6), nav("c.html", 6),
               nav("c.html", 6, fg="#888888"),  # other colours: listed
               nav("d.html", 6, text="Tide gauges")]  # other text: listed
    text, _ = report(samples, group_by="page")
    pytest.LineMatcher(text.splitlines()).fnmatch_lines([
        "a.html (1 finding)",
        "  4: /html/body/nav/a[1]  \"Tide tables\"",
        "      error TC100 text-ratio: text contrast 4.47:1 is below *",
        "*",
        "b.html (1 finding)",
        "  and 1 more as under a.html (the same text at the same place, in the same*",
        "c.html (2 findings)",
        "  6: /html/body/nav/a[1]  \"Tide tables\"",
        "      error TC100 text-ratio: text contrast * is below *",
        "*",
        "  and 1 more as under a.html (the same text at the same place, in the same*",
        "d.html (1 finding)",
        "  6: /html/body/nav/a[1]  \"Tide gauges\"",
        "      error TC100 text-ratio: #777777 on #ffffff, 4.47:1, as at a.html:4",
    ])
    assert text.count("Tide tables") == 2


def test_by_page_a_page_lists_a_few_findings_described_alike_and_counts_the_rest():
    # a code listing's tokens in one colour made hundreds of findings a page described alike
    from tinctura.report import text_report

    samples = [make_sample("#777777", "#ffffff", fg_cause=MUTED, bg_cause=PAPER,
                           page="code.html", line=10 + i, xpath=f"/html/body/pre/span[{i + 1}]",
                           text=f"token{i}") for i in range(text_report.PLACES_SHOWN + 5)]
    samples.append(make_sample("#888888", "#ffffff", page="code.html", line=99,
                               xpath="/html/body/p", text="Other colours"))
    text, _ = report(samples, group_by="page")
    assert text.count('"token') == text_report.PLACES_SHOWN
    pytest.LineMatcher(text.splitlines()).fnmatch_lines([
        f"code.html ({text_report.PLACES_SHOWN + 6} findings)",
        '  10: /html/body/pre/span[1]  "token0"',
        '  99: /html/body/p  "Other colours"',
        "  and 5 more in the same colours on this page: error TC100 text-ratio, #777777 on "
        "#ffffff, 4.47:1",
    ])


def test_by_page_a_block_met_on_an_earlier_page_is_counted_unread(tmp_path, monkeypatch):
    # 6.2 million findings of 1,000 pages, mostly the navigation's, were read one by one: a
    # replayed block placed as on an earlier page is counted from what that page listed
    # (``TextFormatter._credit``), unread, and the report is the one reading them gives
    from tinctura import cli
    from tinctura.report.store import FindingStore
    from tinctura.report.text_report import TextFormatter

    nav = "".join(f'<li><a href="p{n}.html">Sluice gate {n}</a></li>' for n in range(40))
    for n in range(6):
        (tmp_path / f"p{n}.html").write_text(
            "<html><head><style>nav a { color: #999999 } p { color: #777777 }</style></head>"
            f"<body><nav><ul>{nav}</ul></nav><p>Gate {n} opens at high water.</p></body>"
            "</html>")

    def report():
        out = io.StringIO()
        cli.main(["check", str(tmp_path), "--group", "page", "--jobs", "1", "--color",
                  "never", "--no-config", "--fail-on", "never"], out, io.StringIO())
        return out.getvalue()

    unread = []
    occurrences = FindingStore.occurrences

    def counting(self, page, met=None):
        def asked(block, count):
            got = met(block, count)
            if got is True:
                unread.append(count)
            return got
        return occurrences(self, page, asked if met is not None else None)

    monkeypatch.setattr(FindingStore, "occurrences", counting)
    counted = report()
    assert unread  # (blocks of the navigation, counted unread on the later pages)
    monkeypatch.setattr(TextFormatter, "_credit", lambda self, block, records: None)
    del unread[:]
    assert report() == counted and not unread
    assert "p5.html (" in counted and "more as under p0.html" in counted
