"""SARIF, JUnit and CI annotations; several reports at once; escaping of page text."""
import io
import json
import os
import pathlib
import xml.etree.ElementTree as ET

import jsonschema
import pytest

from tinctura import engine, fingerprint
from tinctura.model import Diagnostic, PageResult
from tinctura.report import FORMATS, Header, outputs
from tinctura.report.annotations import escape_data, escape_property
from tinctura.report.json_report import schema as report_schema
from tinctura.report.json_report import expand
from tinctura.rules.examples import make_sample

# SARIF 2.1.0 JSON Schema, OASIS; copied unmodified from the OASIS SARIF TC repository
# (tests/data/README.md names the commit).
SARIF_SCHEMA = json.loads((pathlib.Path(__file__).resolve().parents[1] / "data" /
                           "sarif-schema-2.1.0.json").read_text(encoding="utf-8"))
NASTY = 'Bell <b>"metal"</b> & \'tin\'\r\nline two\x1b[31m red\x00 ::error file=x::boom 100%, a:b'


def run(texts=("Let the mould cool.", "Polish the crown."), marks=None, gone=(), first=10):
    """Hand-built findings on one page; ``marks`` sets (suppressed, baseline) per finding;
    ``first``: the line before the first text."""
    samples = [make_sample("#949494", "white", page="casting/index.html", text=t,
                           xpath=f"/html/body/main/p[{n}]", line=first + n)
               for n, t in enumerate(texts, 1)]
    findings = engine.evaluate(samples, engine.Options())
    fingerprint.assign(findings)
    for f, (suppressed, baseline) in zip(findings, marks or [("", "")] * len(findings)):
        f.suppressed, f.baseline = suppressed, baseline
        if suppressed:
            f.args = {**f.args, "suppressed_by": "comment"}
    pages = [PageResult("casting/index.html", samples), PageResult("alloys/index.html")]
    header = Header(version="0.1.0", schemes=["light"], rules=("TC100",), gone=list(gone))
    return header, pages, findings


def render(fmt, header, pages, findings, diagnostics=()):
    from tinctura import problems

    found = problems.group([f for f in findings if outputs.active(f)])
    stream = io.StringIO()
    outputs.write_reports([(fmt, None)], stream, header, pages, findings, found, diagnostics,
                          colour_choice="never")
    return stream.getvalue()


def sarif(*args, fmt="sarif-findings", **kwargs):
    doc = json.loads(render(fmt, *run(*args, **kwargs)))
    jsonschema.validate(doc, SARIF_SCHEMA)  # the OASIS SARIF 2.1.0 schema
    return doc["runs"][0]


def test_sarif_by_problem_one_result_with_examples_fix_and_a_stable_fingerprint():
    run_ = sarif(fmt="sarif")
    (result,) = run_["results"]  # two findings of one cause: one problem
    assert result["ruleId"] == "TC100" and result["level"] == "error"
    assert result["message"]["text"].splitlines()[1] == "2 occurrences; problem 1 of the reports."
    assert result["properties"]["occurrences"] == 2 and result["properties"]["pages"] == 1
    loc = result["locations"][0]
    assert loc["physicalLocation"]["artifactLocation"]["uri"] == "casting/index.html"
    assert [r["message"]["text"].startswith("also: ") for r in result["relatedLocations"]] == \
        [True]  # the other occurrence (the worst is the result's own location)
    assert "suppressions" not in result and "baselineState" not in result
    # the same problem in a run with its lines moved and one more text: the same fingerprint
    again = sarif(fmt="sarif", first=40, texts=("Skim the dross.", "Let the mould cool.",
                                                "Polish the crown."))["results"][0]
    assert again["properties"]["occurrences"] == 3
    assert again["partialFingerprints"] == result["partialFingerprints"]
    assert "one per problem" in run_["properties"]["results"]


def test_sarif_by_problem_with_a_baseline_marks_its_problems_new():
    # a baseline holds the unchanged findings back: what is grouped is new
    (result,) = sarif(fmt="sarif", marks=[("", "unchanged"), ("", "new")])["results"]
    assert result["baselineState"] == "new" and result["properties"]["occurrences"] == 1
    assert "baselineState" not in sarif(fmt="sarif")["results"][0]  # no baseline: none


def test_sarif_is_valid_and_carries_rules_fingerprints_and_locations():
    run_ = sarif()
    rule = run_["tool"]["driver"]["rules"][0]
    assert rule["id"] == "TC100" and rule["name"] == "text-ratio" and rule["help"]["text"]
    results = run_["results"]
    assert len(results) == 2
    first = results[0]
    assert first["ruleId"] == "TC100" and first["level"] == "error"
    assert first["partialFingerprints"]["tinctura/v1"]
    loc = first["locations"][0]
    assert loc["physicalLocation"]["artifactLocation"]["uri"] == "casting/index.html"
    assert loc["physicalLocation"]["region"]["startLine"] == 11
    assert loc["logicalLocations"][0]["fullyQualifiedName"] == "/html/body/main/p[1]"
    assert first["suppressions"] == [] and "baselineState" not in first
    assert "qualified people" in run_["properties"]["disclaimer"]


def test_sarif_suppressions_and_baseline_states():
    gone = [{"fingerprint": "abc", "rule": "TC100", "page": "casting/index.html",
             "scheme": "light", "state": "rest", "text": "Old note"}]
    results = sarif(marks=[("reviewed: stamped tag", "unchanged"), ("", "new")],
                    gone=gone)["results"]
    assert results[0]["suppressions"] == [{"kind": "inSource", "status": "accepted",
                                           "justification": "reviewed: stamped tag"}]
    assert [r["baselineState"] for r in results] == ["unchanged", "new", "absent"]


def test_sarif_points_at_the_markdown_source_when_known():
    header, pages, findings = run()
    header.source = lambda page, line: ("docs/casting.md", 4)
    doc = json.loads(render("sarif-findings", header, pages, findings))
    jsonschema.validate(doc, SARIF_SCHEMA)
    result = doc["runs"][0]["results"][0]
    assert result["locations"][0]["physicalLocation"] == {
        "artifactLocation": {"uri": "docs/casting.md"}, "region": {"startLine": 4}}
    assert result["relatedLocations"][0]["physicalLocation"]["artifactLocation"]["uri"] == \
        "casting/index.html"


def test_junit_one_case_per_page_and_rule_with_unique_names():
    header, pages, findings = run(marks=[("reviewed", ""), ("", "")])
    root = ET.fromstring(render("junit", header, pages, findings))
    cases = root.iter("testcase")
    got = {(c.get("classname"), c.get("name")): c for c in cases}
    assert set(got) == {("casting/index.html", "casting/index.html: TC100 text-ratio"),
                        ("alloys/index.html", "alloys/index.html: TC100 text-ratio")}
    failing = got[("casting/index.html", "casting/index.html: TC100 text-ratio")]
    failure = failing.find("failure")
    assert failure.get("message").startswith("1 finding: ") and "Polish the crown." in failure.text
    assert "reviewed" in failing.find("system-out").text  # the suppressed one, named
    assert root.get("failures") == "1" and root.get("tests") == "2"


def test_annotations_workflow_commands_and_summary():
    header, pages, findings = run(marks=[("reviewed", ""), ("", "")])
    lines = render("annotations", header, pages, findings).splitlines()
    assert len(lines) == 2  # one annotation (the suppressed finding is not annotated), summary
    assert lines[0].startswith("::error file=casting/index.html,line=12,title=TC100 text-ratio::")
    assert lines[1].startswith("tinctura: 1 finding (1 error) on 1 page of 2 checked")


def test_one_annotation_per_problem_with_its_counts_and_fix():
    header, pages, findings = run()
    (line, summary) = render("annotations", header, pages, findings).splitlines()
    assert line.startswith("::error file=casting/index.html,line=11,title=TC100 text-ratio::")
    assert "%0A2 occurrences (problem 1 of the reports); here: \u201cLet the mould cool.\u201d" \
        in line and "%0AFix: " in line
    assert "one per problem (1)" in summary


def test_junit_lists_the_first_findings_of_a_case_and_counts_the_rest():
    from tinctura.report.junit import LISTED

    texts = tuple(f"Note {n}." for n in range(LISTED + 5))
    root = ET.fromstring(render("junit", *run(texts=texts)))
    failure = next(root.iter("failure"))
    lines = failure.text.splitlines()
    assert failure.get("message").startswith(f"{LISTED + 5} findings: ")
    assert len(lines) == LISTED + 1 and lines[-1].startswith("and 5 more findings of this rule")


def test_the_audit_report_counts_only_the_findings_that_count():
    # read from the run's store as records (situations and places), the held ones among them
    import lxml.html

    from tinctura.report.store import FindingStore

    header, pages, findings = run(marks=[("reviewed: stamped tag", ""), ("", "")])
    doc = lxml.html.document_fromstring(render("html", header, pages, FindingStore.of(findings)))
    rows = {row.get("data-page"): row.xpath("string(td[1])") for row in
            doc.xpath("//tr[@data-page]")}
    assert rows == {"casting/index.html": "1"}


def test_annotation_escaping_as_documented():
    # workflow-command escaping, as CI runners document it: data % CR LF; properties also : ,
    assert escape_data("100%\r\nnext") == "100%25%0D%0Anext"
    assert escape_property("a:b,c%") == "a%3Ab%2Cc%25"


@pytest.mark.parametrize("fmt", sorted(FORMATS))
def test_every_format_escapes_page_text(fmt, tmp_path):
    header, pages, findings = run(texts=(NASTY,))
    diagnostics = [Diagnostic("casting/index.html", "odd <comment> \"here\"\n& there", line=3)]
    text = render(fmt, header, pages, findings, diagnostics)
    assert "\x1b" not in text and "\x00" not in text
    if fmt == "json":
        doc = json.loads(text)
        jsonschema.Draft202012Validator(report_schema()).validate(doc)
        assert expand(doc)[0]["text"].startswith('Bell <b>"metal"</b> & \'tin\' line two')
    elif fmt == "sarif-findings":
        doc = json.loads(text)
        jsonschema.validate(doc, SARIF_SCHEMA)
        assert "Bell <b>\"metal\"</b>" in doc["runs"][0]["results"][0]["message"]["text"]
    elif fmt == "sarif":
        doc = json.loads(text)
        jsonschema.validate(doc, SARIF_SCHEMA)
        region = doc["runs"][0]["results"][0]["locations"][0]["physicalLocation"]["region"]
        assert region["snippet"]["text"].startswith("Bell <b>\"metal\"</b>")
    elif fmt == "junit":
        root = ET.fromstring(text)
        assert "Bell <b>\"metal\"</b> & 'tin'" in root.find(".//failure").text
    elif fmt == "annotations":
        commands = [line for line in text.splitlines() if line.startswith("::")]
        assert len(commands) == 1  # the page's newline did not start a second command
        head, _, message = commands[0].partition("::error ")[2].partition("::")
        assert head == "file=casting/index.html,line=11,title=TC100 text-ratio"
        assert "::error file=x::boom 100%25," in message and "\r" not in message
    elif fmt == "baseline":
        assert json.loads(text)["findings"][0]["text"].startswith("Bell <b>")
    elif fmt == "html":
        assert "Bell <b>" not in text and "Bell &lt;b&gt;" in text
    elif fmt == "csv":
        import csv

        cells = [c for row in csv.reader(io.StringIO(text)) for c in row]
        assert any(c.startswith('Bell <b>"metal"</b>') for c in cells)
    else:  # text, and formats added later: at least the text is there, controls shown
        assert "Bell <b>" in text or fmt != "text"


def test_several_reports_at_once_written_atomically(tmp_path, monkeypatch):
    header, pages, findings = run()
    specs = [("sarif", str(tmp_path / "r.sarif")), ("junit", str(tmp_path / "r.xml")),
             ("json", str(tmp_path / "r.json"))]
    outputs.write_reports(specs, io.StringIO(), header, pages, findings, [], [])
    assert sorted(os.listdir(tmp_path)) == ["r.json", "r.sarif", "r.xml"]  # no temporary left
    jsonschema.validate(json.loads((tmp_path / "r.sarif").read_text()), SARIF_SCHEMA)

    def broken(self, summary):
        raise RuntimeError("disk full")
    monkeypatch.setattr(FORMATS["sarif"], "stop", broken)
    with pytest.raises(RuntimeError):
        outputs.write_reports(specs[:1], io.StringIO(), header, pages, findings, [], [])
    assert json.loads((tmp_path / "r.sarif").read_text())  # the old report is intact
    assert sorted(os.listdir(tmp_path)) == ["r.json", "r.sarif", "r.xml"]


def test_records_are_read_back_by_every_output_but_the_text_report_by_problem():
    """``engine.Options.keep_records``: a run whose outputs are the text report grouped by
    problem and the compact JSON report (which reads what each page wrote for it as it was
    judged), with no baseline written and no gate marks, leaves the records unkept."""
    from tinctura.report.outputs import records_read_back

    assert not records_read_back(["text"], "cause", False, False, False)
    assert not records_read_back(["text", "json"], "cause", False, False, False)
    assert records_read_back(["json", "junit"], "cause", False, False, False)
    assert records_read_back(["json"], "cause", True, False, False)  # the flat JSON
    assert records_read_back(["sarif-findings"], "cause", False, False, False)
    assert not records_read_back(["sarif"], "cause", False, False, False)  # by problem
    assert records_read_back(["text"], "page", False, False, False)
    assert records_read_back(["text"], "cause", True, False, False)  # flat findings
    assert records_read_back(["text"], "cause", False, True, False)  # fingerprints
    assert records_read_back(["text"], "cause", False, False, True)  # a baseline written
