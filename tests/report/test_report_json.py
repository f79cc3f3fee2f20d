"""The JSON report against its JSON Schema (validated with jsonschema, Draft 2020-12)."""
import io
import json

import jsonschema
import pytest

from tinctura.engine import Options
from tinctura.model import Cause, Declaration, Diagnostic, PageResult, UNDETERMINED
from tinctura.problems import group
from tinctura.report import DISCLAIMER, Header, render
from tinctura.report.json_report import expand, places, sample_dict, schema
from tinctura.rules import run
from tinctura.rules.examples import make_sample

VALIDATOR = jsonschema.Draft202012Validator


def decl(prop, value, line):
    return Declaration(prop, value, "assets/site.css", line, ".x", "author")


def build(samples, diagnostics=(), layout="flat"):
    findings = run(samples, Options())
    problems = group(findings, samples)
    names = sorted({s.page for s in samples})
    pages = [PageResult(n, [s for s in samples if s.page == n], {"hidden": 2}) for n in names]
    out = io.StringIO()
    render(out, "json", Header(version="1.2.3", level="AA", schemes=["light", "dark"],
                               findings_layout=layout), pages,
           findings, problems, list(diagnostics))
    return json.loads(out.getvalue())


@pytest.mark.parametrize("layout", ["flat", "compact"])
def test_both_layouts_validate(layout):
    doc = build(samples(), [Diagnostic("x.css", "cannot read", 3, "error")], layout=layout)
    VALIDATOR(schema()).validate(doc)
    assert doc["format_version"] == (1 if layout == "flat" else 3)


def test_compact_layout_holds_the_flat_findings_and_problems():
    """Format 3 writes each situation once; put back together, its findings are format 1's,
    in the same order, and each problem covers the same findings."""
    first = samples()[0]
    again = make_sample("#777", "white", page="b.html", fg_cause=first.fg_cause,
                        bg_cause=first.bg_cause, line=9, xpath="/html/body/p[4]", text="Reap")
    flat = build(samples() + [again])
    compact = build(samples() + [again], layout="compact")
    assert expand(compact) == flat["findings"]
    assert len(compact["situations"]) == len(flat["findings"]) - 1  # one situation, twice
    order = [(page, sid) for page, sid, _, _ in places(compact)]
    for fp, cp in zip(flat["problems"], compact["problems"]):
        assert {k: v for k, v in fp.items() if k != "findings"} == \
            {k: v for k, v in cp.items() if k != "situations"}
        assert fp["findings"] == [i for i, (_, sid) in enumerate(order)
                                  if sid in cp["situations"]]
        assert all(compact["situations"][sid]["problem"] == compact["problems"].index(cp)
                   for sid in cp["situations"])


def samples():
    fg = Cause(decl("color", "var(--muted)", 4), chain=(decl("--muted", "#777", 1),))
    bg = Cause(decl("background-color", "white", 2))
    return [  # in report order, as a run stores them: at one place, the resting state first
        make_sample("#777", "white", page="a.html", fg_cause=fg, bg_cause=bg, line=7,
                    xpath="/html/body/p[1]", text="Sow in spring"),
        make_sample("#777", "white", page="b.html", fg_cause=fg, bg_cause=bg, scheme="dark"),
        make_sample("#fff", "#fafafa", page="b.html", bg_alternatives=("#000",)),
        make_sample("#777", "white", page="b.html", fg_cause=fg, bg_cause=bg, state="hover"),
        make_sample("#111", "white", page="b.html"),
        make_sample("#111", "white", page="b.html", status=UNDETERMINED, reason="image"),
    ]


def test_schema_is_valid_draft_2020_12():
    VALIDATOR.check_schema(schema())


def test_report_validates_and_carries_the_fields():
    doc = build(samples(), [Diagnostic("x.css", "cannot read", 3, "error")])
    VALIDATOR(schema()).validate(doc)
    first = doc["findings"][0]
    assert (first["rule"], first["slug"], first["page"], first["line"], first["text"]) == (
        "TC100", "text-ratio", "a.html", 7, "Sow in spring")
    assert (first["fg"], first["bg"], first["required"], first["level"]) == ("#777777", "#ffffff", 4.5, "AA")
    # WCAG 2.2 formula: #777777 on #ffffff = 4.478:1; the JSON keeps the unrounded value.
    assert 4.478 < first["ratio"] < 4.479
    assert first["fg_cause"]["chain"][0]["property"] == "--muted"
    # grey text on white: only a darker text colour; no lighter background than white exists
    assert {f["target"] for f in first["fix"]} == {"foreground"}
    assert doc["diagnostics"] == [{"path": "x.css", "line": 3, "severity": "error", "message": "cannot read"}]
    assert doc["disclaimer"] == DISCLAIMER
    assert doc["tool"] == {"name": "tinctura", "version": "1.2.3"}


def test_problems_point_at_findings():
    doc = build(samples())
    covered = sorted(i for p in doc["problems"] for i in p["findings"])
    assert covered == list(range(len(doc["findings"])))
    for p in doc["problems"]:
        assert p["occurrences"] == len(p["findings"])
        for i in p["findings"]:
            assert doc["findings"][i]["rule"] == p["rule"]
            assert doc["findings"][i]["scheme"] in [s["name"] for s in p["schemes"]]


def test_gradient_finding_reports_its_worst_background():
    doc = build(samples())
    (white_text,) = [f for f in doc["findings"] if f["fg"] == "#ffffff"]
    assert white_text["bg"] == "#fafafa"  # white on #fafafa is far worse than on black


def test_summary_counts():
    s = build(samples())["summary"]
    assert (s["pages"], s["samples"], s["findings"], s["undetermined"]) == (2, 6, 4, 1)
    assert s["by_rule"] == {"TC100": 4}
    assert s["by_page"] == {"a.html": 1, "b.html": 3}
    assert s["by_scheme"] == {"dark": 1, "light": 3}
    assert s["by_severity"] == {"error": 4, "warning": 0, "info": 0}
    assert s["skipped"] == {"hidden": 4}


def test_schema_rejects_a_rounded_colour_or_unknown_rule():
    doc = build(samples())
    bad = json.loads(json.dumps(doc))
    bad["findings"][0]["fg"] = "#777"
    with pytest.raises(jsonschema.ValidationError):
        VALIDATOR(schema()).validate(bad)
    bad = json.loads(json.dumps(doc))
    bad["findings"][0]["rule"] = "XX1"
    with pytest.raises(jsonschema.ValidationError):
        VALIDATOR(schema()).validate(bad)


def test_sample_line_has_the_pairs_fields():
    fg = Cause(decl("color", "rgb(0 0 0 / 50%)", 4))
    s = make_sample("rgb(0 0 0 / 50%)", "white", fg_cause=fg, text="x" * 100, kind="placeholder")
    line = json.loads(json.dumps(sample_dict(s)))
    for key in ("page", "scheme", "state", "xpath", "line", "text", "kind", "fg", "bg",
                "fg_alpha_raw", "font_size_px", "font_weight", "status", "reason", "exempt",
                "fg_cause", "bg_layers"):
        assert key in line
    assert len(line["text"]) == 60
    assert line["fg_alpha_raw"] == 0.5
    # 50 % black over white, source-over in sRGB (CSS Compositing 1): 127.5 -> #808080.
    assert line["fg"] == "#808080" and line["bg"] == "#ffffff"
    assert line["fg_cause"]["declaration"]["value"] == "rgb(0 0 0 / 50%)"


def test_appearance_findings_validate():
    """TC200/TC400/TC500 findings keep a WCAG 2 ratio in ``ratio`` and carry their own numbers in
    the message (colours from the rules' documented examples; ratios by the WCAG 2.2 formula)."""
    appearance = [
        make_sample("#b0b0b0", "#1a1a1a", page="c.html", weight=300),  # TC200: Lc -58.21
        make_sample("#ff3030", "#000", page="c.html", xpath="/html/body/p[2]"),  # TC400
        make_sample("#6b6b6b", "#fff", page="c.html", xpath="/html/body/p[3]"),  # TC500
    ]
    doc = build(appearance)
    VALIDATOR(schema()).validate(doc)
    by_rule = {}
    for f in doc["findings"]:
        by_rule.setdefault(f["rule"], []).append(f)
    assert {"TC200", "TC400", "TC500"} <= set(by_rule)
    assert any("Lc -58.21 (light on dark)" in f["message"] for f in by_rule["TC200"])
    assert any("under protanopia" in f["message"] for f in by_rule["TC400"])
    assert any("in daylight viewing" in f["message"] for f in by_rule["TC500"])
    assert "TC100" not in by_rule  # every pair meets the WCAG 2 ratio
