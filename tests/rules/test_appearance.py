"""TC300 surround-shift and TC310 lookalike on small sites, through the engine and the reports.

The colour facts asserted are the qualitative ones of simultaneous contrast (common practice: a
colour looks lighter on a dark surround) and of deuteranopia (Machado 2009: a red and a green
of similar lightness collapse); the numbers compared are thresholds, never values the code
produced itself.
"""
import io
import json

import jsonschema
import pytest

from tinctura import engine, palette
from tinctura.cli import main
from tinctura.report.json_report import expand, schema
from tinctura.rules import appearance
from site_pages import write_pages

CSS = """
body { background: #ffffff; color: #1a1a1a; }
.card { background: #ffffff; padding: 8px; }
.panel { background: #1e2530; color: #e8e8e8; padding: 8px; }
.chip { color: #ffffff; }
.chip.ok { background: #2e7d32; }
.chip.fault { background: #c62828; }
.chip.caution { background: #e0a000; color: #1a1a1a; }
.card p, .panel p { margin: 0; }
"""


def board(n):
    # the same status strip on every page (a repeated subtree: recorded once, replayed after)
    strip = ('<div class="strip card"><p><span class="chip ok">Pump running</span> '
             '<span class="chip fault">Pump stopped</span> '
             '<span class="chip caution">Battery low</span></p></div>')
    dark = ('<div class="panel"><p>Night mode: <span class="chip caution">Battery low</span>'
            '</p></div>') if n % 2 else ""
    return (f'<!doctype html><html><head><link rel="stylesheet" href="../site.css"></head>'
            f'<body>{strip}<h1>Station {n}</h1>{dark}<p>Reading {n}</p></body></html>')


@pytest.fixture
def status_site(tmp_path):
    return write_pages(tmp_path, CSS, board, 6, prefix="s")


def _check(site, **options):
    options.setdefault("states", False)
    return engine.check_paths([str(site)], engine.Options(**options))


def _by_rule(report, code):
    return [f for f in report.findings if f.rule == code]


def test_caution_fill_shifts_between_light_card_and_dark_panel(status_site):
    shifts = _by_rule(_check(status_site, keep_samples=False), "TC300")
    assert [f.args["entry"] for f in shifts] == [".chip.caution"]
    f = shifts[0]
    assert f.severity == "warning"
    assert f.args["delta"] > f.args["threshold"] == appearance.SHIFT_THRESHOLD
    # simultaneous contrast: on the dark panel the amber looks lighter (common practice)
    assert "lighter" in f.args["terms"]
    assert {c["bg"] for c in f.args["contexts"]} == {(1.0, 1.0, 1.0), (30 / 255, 37 / 255,
                                                                          48 / 255)}
    # every context once, counted over all pages (replayed strips included)
    light = next(c for c in f.args["contexts"] if c["bg"] == (1.0, 1.0, 1.0))
    assert light["count"] == 6


def test_red_green_pair_collapses_under_deuteranopia(status_site):
    looks = _by_rule(_check(status_site, keep_samples=False), "TC310")
    pairs = {(f.args["entry"], f.args["other"]): f for f in looks}
    assert (".chip.fault", ".chip.ok") in pairs
    f = pairs[(".chip.fault", ".chip.ok")]
    assert "deuteranopia" in f.args["conditions"]
    assert "normal vision" not in f.args["conditions"]


def test_fragments_judged_once_give_the_findings_of_a_full_walk(status_site):
    def summary(report):
        return sorted((f.rule, f.args["entry"], f.args.get("other"), round(f.args["delta"], 6),
                       tuple(sorted((c["bg"], c["count"], c["schemes"])
                                    for c in f.args["contexts"])))
                      for f in report.findings if f.rule in ("TC300", "TC310"))

    judged = summary(_check(status_site, keep_samples=False))
    walked = summary(_check(status_site, keep_samples=True, replay=False))
    assert judged and judged == walked


def test_only_text_ratio_gathers_no_palette(status_site):
    report = _check(status_site, rules=("TC100",), keep_samples=False)
    assert not report.palette
    assert not _by_rule(report, "TC300")


def test_pages_kept_to_the_end_hold_no_palette_of_their_own(status_site):
    """``check_paths`` keeps every page's result to the end: the palette uses merged
    site-wide leave them, and the pages share their schemes (memory flat in page count)."""
    report = _check(status_site, keep_samples=False)
    assert report.palette and all(not p.palette for p in report.pages)
    schemes = {id(s) for p in report.pages for s in p.schemes}
    assert len(schemes) == len({s for p in report.pages for s in p.schemes})


def test_declared_palette_entries_name_the_findings(status_site):
    setting = palette.palette_setting({"fault": "#c62828", "running": "#2e7d32"})
    looks = _by_rule(_check(status_site, palette=setting, rules=("TC310",)), "TC310")
    assert [(f.args["entry"], f.args["other"]) for f in looks] == [("fault", "running")]


def test_palette_setting_refuses_what_is_not_a_colour():
    with pytest.raises(ValueError, match="'alarm'"):
        palette.palette_setting({"alarm": "loud"})
    assert palette.palette_setting({"caution": "--tw-caution"}) == (
        ("caution", "property", "--tw-caution"),)
    assert palette.palette_setting({"caution": "var(--tw-caution)"}) == (
        ("caution", "property", "--tw-caution"),)


def test_a_lone_modifier_counts_but_a_lone_class_does_not(tmp_path):
    (tmp_path / "p.html").write_text(
        '<style>.tag.new{color:#1565c0}.old{color:#1565c0}.dark{background:#101418}</style>'
        '<p><span class="tag new">New</span> <span class="old">Old</span></p>'
        '<div class="dark"><span class="tag new">New</span> <span class="old">Old</span></div>')
    report = _check(tmp_path / "p.html")
    assert [f.args["entry"] for f in _by_rule(report, "TC300")] == [".tag.new"]


def test_text_and_json_reports_list_every_context(status_site):
    out, err = io.StringIO(), io.StringIO()
    assert main(["check", str(status_site), "--no-states", "--jobs", "1", "--format", "json",
                 "--fail-on", "never"], out, err) == 0, err.getvalue()
    doc = json.loads(out.getvalue())
    jsonschema.Draft202012Validator(schema()).validate(doc)
    shift = next(f for f in expand(doc) if f["rule"] == "TC300")
    assert shift["appearance"]["entry"] == ".chip.caution"
    assert {c["background"] for c in shift["appearance"]["contexts"]} == {"#ffffff", "#1e2530"}
    assert all(c["declaration"].startswith("site.css:") for c in shift["appearance"]["contexts"])

    out = io.StringIO()
    main(["check", str(status_site), "--no-states", "--jobs", "1", "--fail-on", "never",
          "--color", "never"], out, io.StringIO())
    text = out.getvalue()
    assert "Palette colour .chip.caution shifts with its surround" in text
    assert "#e0a000 on #1e2530" in text and "#e0a000 on #ffffff" in text
    assert "look alike" in text and "deuteranopia" in text
    assert "ISO 3864" in text and "not a WCAG 2 failure" in text


def test_cli_palette_option(status_site):
    out, err = io.StringIO(), io.StringIO()
    assert main(["check", str(status_site), "--palette", "nonsense"], out, err) == 2
    assert "NAME=COLOUR" in err.getvalue()
    out = io.StringIO()
    main(["check", str(status_site), "--no-states", "--jobs", "1", "--fail-on", "never",
          "--format", "json", "--palette", "stop=#c62828", "--palette", "go=#2e7d32"],
         out, io.StringIO())
    doc = json.loads(out.getvalue())
    looks = [f["appearance"] for f in expand(doc) if f["rule"] == "TC310"]
    assert [(a["entry"], a["other"]) for a in looks] == [("go", "stop")]


def test_pair_on_and_vs():
    """Simultaneous contrast (common practice): amber looks lighter on a dark panel; a red and
    a green of similar lightness collapse under deuteranopia (Machado 2009)."""
    out = io.StringIO()
    main(["pair", "#e0a000", "white", "--on", "#1e2530", "--color", "never"], out,
         io.StringIO())  # exit status: the pair's contrast verdict
    text = out.getvalue()
    assert "lightness J" in text and "colourfulness M" in text and "hue h" in text
    assert "on #1e2530 it looks lighter" in text and "over the 10 units of TC300" in text
    out = io.StringIO()
    main(["pair", "#c62828", "white", "--vs", "#2e7d32", "--color", "never"], out, io.StringIO())
    lines = {line.split(":")[0].strip(): line for line in out.getvalue().splitlines()}
    assert "looks alike" in lines["deuteranopia"]
    assert "looks alike" not in lines["normal vision"]
    err = io.StringIO()
    assert main(["pair", "#000", "white", "--on", "nope"], io.StringIO(), err) == 2
    assert "'nope' is not a CSS colour" in err.getvalue()


@pytest.mark.parametrize("surround, expected", [
    ((0.9, 0.1, 0.1), {"greener"}),  # red surround -> towards green (opponent of red)
    ((0.1, 0.1, 0.8), {"yellower"}),  # blue surround -> towards yellow (opponent of blue)
    ((0.0, 0.0, 0.0), {"lighter"}),  # black surround (vs a grey one) -> lighter
])
def test_shifts_are_explained_in_opponent_terms(surround, expected):
    """Simultaneous contrast (common practice): a mid grey moved from a grey surround to a
    chromatic one takes on the opponent hue; to a black one it looks lighter."""
    shift = appearance.shift_between((0.5, 0.5, 0.5), (0.5, 0.5, 0.5), surround)
    assert expected <= set(shift["terms"])


def test_worker_processes_give_the_same_site_findings(status_site):
    def summary(report):
        return sorted((f.rule, f.args["entry"], f.args.get("other"), round(f.args["delta"], 6))
                      for f in report.findings if f.rule in ("TC300", "TC310"))

    one = summary(_check(status_site, keep_samples=False, jobs=1))
    assert one and summary(_check(status_site, keep_samples=False, jobs=2)) == one


def test_thresholds_are_options(status_site):
    report = _check(status_site, keep_samples=False, shift_threshold=30.0,
                    lookalike_threshold=2.0)
    assert not _by_rule(report, "TC300") and not _by_rule(report, "TC310")


PROPERTY_PAGE = (
    '<!doctype html><html><head><style>'
    ':root { --amber: #e0a000; --state-ok: #2e7d32; --state-fault: #c62828; }'
    '.dark { background: #1e2530; }'
    '.warn { background: var(--amber); color: #1a1a1a; }'
    '.ok { color: var(--state-ok); } .fault { color: var(--state-fault); }'
    '</style></head><body style="background:#ffffff">'
    '<p><span class="warn">Battery low</span> <span class="ok">Level logged</span> '
    '<span class="fault">Level missing</span></p>'
    '<div class="dark"><p><span class="warn">Battery low</span></p></div></body></html>'
)


def test_custom_properties_declared_and_discovered(tmp_path):
    page = tmp_path / "p.html"
    page.write_text(PROPERTY_PAGE, encoding="utf-8")
    # a lone property is a style until declared; a family of two (--state-*) is a code
    report = _check(page, keep_samples=False)
    assert not _by_rule(report, "TC300")
    looks = _by_rule(report, "TC310")
    assert [(f.args["entry"], f.args["other"]) for f in looks] == [
        ("--state-fault", "--state-ok")]
    assert "deuteranopia" in looks[0].args["conditions"]
    declared = _check(page, keep_samples=False,
                      palette=palette.palette_setting({"caution": "--amber"}))
    shifts = _by_rule(declared, "TC300")
    assert [f.args["entry"] for f in shifts] == ["caution"]
    assert shifts[0].args["contexts"][0]["declaration"].startswith("p.html")


VARIANT_PAGE = (
    '<!doctype html><html><head><style>'
    '.dark { background: #1e2530; }'
    '.board .ok { color: #2e7d32; } .board .fault { color: #c62828; }'
    '.board .tint { background: #c628281a; } .board .tint2 { background: #2e7d321a; }'
    '.lone { color: #1565c0; }'
    '</style></head><body style="background:#ffffff">'
    '<div class="board"><p><span class="ok">Logged</span> <span class="fault">Missing</span> '
    '<span class="tint">Tinted</span> <span class="tint2">Tinted</span> '
    '<span class="lone">Blue</span></p>'
    '<div class="dark"><p><span class="tint">Tinted</span> <span class="lone">Blue</span></p>'
    '</div></div></body></html>'
)


def test_selector_variants_are_a_family_but_tints_and_lone_classes_are_not(tmp_path):
    page = tmp_path / "p.html"
    page.write_text(VARIANT_PAGE, encoding="utf-8")
    report = _check(page, keep_samples=False)
    looks = _by_rule(report, "TC310")
    assert [(f.args["entry"], f.args["other"]) for f in looks] == [(".board .fault",
                                                                    ".board .ok")]
    # the translucent tints differ on each background by design; `.lone` has no family
    assert not _by_rule(report, "TC300")


def test_html_and_csv_reports_carry_the_appearance_findings(status_site):
    out = io.StringIO()
    assert main(["check", str(status_site), "--no-states", "--jobs", "1", "--fail-on", "never",
                 "--format", "html"], out, io.StringIO()) == 0
    html = out.getvalue()
    assert "Palette colours and contexts" in html
    assert "CAM02-UCS units between its contexts, over 10" in html
    assert "ISO 3864" in html
    out = io.StringIO()
    main(["check", str(status_site), "--no-states", "--jobs", "1", "--fail-on", "never",
          "--format", "csv"], out, io.StringIO())
    assert "TC300" in out.getvalue() and "TC310" in out.getvalue()


# a signal legend written with style attributes (Markdown tables with inline HTML), a lone
# inline colour elsewhere, and a highlighter that writes its colours inline
LEGEND_PAGE = """<!doctype html><html><head><style>body { background: #ffffff; color: #1a1a1a; }
</style></head><body>
<table><tr><td style="background:#2e7d32;color:#ffffff">Clear</td></tr>
<tr><td style="background:#c62828;color:#ffffff">Danger</td></tr></table>
<p><span style="color:#1565c0">Blue flags mark the ferry berth.</span></p>
<pre><code><span style="color:#2e7d32">ok</span> <span style="color:#c62828">stop</span></code></pre>
</body></html>"""


def test_colours_written_in_style_attributes_are_a_palette(tmp_path):
    page = tmp_path / "legend.html"
    page.write_text(LEGEND_PAGE, encoding="utf-8")
    looks = _by_rule(_check(page, keep_samples=False), "TC310")
    pairs = {(f.args["entry"], f.args["other"]): f for f in looks}
    # the legend's cells are one family: its red and green collapse for readers with
    # deuteranopia (Machado 2009), as the classes' chips do
    pair = ('style="background-color: #2e7d32"', 'style="background-color: #c62828"')
    assert pair in pairs and "deuteranopia" in pairs[pair].args["conditions"]
    # the lone blue text has no partner; the code's inline colours are a highlighter's
    assert list(pairs) == [pair]
