"""Suppressions next to the content and in the configuration."""
import json
import pathlib
import subprocess
import sys

import jsonschema
import pytest

from tinctura import suppress
from tinctura.extract.html import parse_html
from tinctura.report.json_report import schema as report_schema
from tinctura.report.json_report import expand, places


def situations(doc):
    """The situation of each finding, in report order."""
    return [sid for _, sid, _, _ in places(doc)]

from gate_helpers import CASTING, TUNING, call, page, site  # noqa: F401  (site: a fixture)

COMMENT = '<!-- tinctura: allow TC100 reason="the cooling note repeats the printed tag" -->\n'


def report(site, *extra):
    status, out, err = call("check", site, "--format", "json", "--jobs", 1, *extra)
    return status, json.loads(out), err


def test_comment_silences_exactly_the_next_element(site):
    site.write("index.html", CASTING.replace('<p class="faint">', COMMENT + '<p class="faint">')
               + '<p class="faint">Polish the crown last.</p>')
    status, doc, _ = report(site)
    assert status == 1
    marked = {f["text"]: f.get("suppressed") for f in expand(doc)}
    assert marked == {"Let the mould cool for three days.":
                      "the cooling note repeats the printed tag",
                      "Polish the crown last.": None,
                      "Strike note within two cents.": None}
    assert doc["summary"]["findings"] == 2  # the suppressed one does not count
    jsonschema.Draft202012Validator(report_schema()).validate(doc)
    grouped = [f for f, sid in zip(expand(doc), situations(doc)) if not f.get("suppressed")
               and any(sid in p["situations"] for p in doc["problems"])]
    assert sorted(f["text"] for f in grouped) == ["Polish the crown last.",
                                                  "Strike note within two cents."]


def test_suppressed_findings_do_not_fail(site):
    site.write("index.html", CASTING.replace('<p class="faint">', COMMENT + '<p class="faint">'))
    site.write("tuning/index.html", "<p>Clean.</p>")
    status, _, err = call("check", site, "--jobs", 1)
    assert status == 0 and "1 suppressed (with reasons)" in err


def test_attribute_covers_the_element_and_its_descendants(site):
    site.write("index.html", '<div data-tinctura-allow="text-ratio, TC100: legacy panel, '
                             'reviewed"><p class="faint">Old <b>casting</b> log.</p></div>')
    _, doc, _ = report(site)
    reasons = {f["page"]: f.get("suppressed") for f in expand(doc)}
    assert reasons == {"index.html": "legacy panel, reviewed", "tuning/index.html": None}


@pytest.mark.parametrize("directive, needle", [
    ("<!-- tinctura: allow TC100 -->", "a reason is required"),
    ('<!-- tinctura: allow TC999 reason="x" -->', "unknown rule 'TC999'"),
    ('<!-- tinctura: allow reason="x" -->', "cannot read"),
])
def test_malformed_directives_are_reported_and_ignored(site, directive, needle):
    site.write("index.html", directive + CASTING)
    status, doc, _ = report(site)
    assert status == 1 and all(f.get("suppressed") is None for f in expand(doc))
    assert any(needle in d["message"] and d["path"] == "index.html" for d in doc["diagnostics"])


def test_a_suppression_that_matches_nothing_is_reported(site):
    site.write("index.html", COMMENT + "<p>Lift the bell with the overhead crane.</p>")
    _, doc, err = report(site)
    notes = [d for d in doc["diagnostics"] if "matches no finding" in d["message"]]
    assert len(notes) == 1 and notes[0]["path"] == "index.html" and notes[0]["line"] == 1


def test_configuration_allow_by_page_rule_and_selector(site, tmp_path):
    (tmp_path / "tinctura.toml").write_text(
        'allow = [\n'
        '  {pages = "tuning/*", rules = ["text-ratio"], selector = "p.faint", '
        'reason = "tuning sheet is scanned from paper"},\n'
        '  {pages = "nowhere/*", reason = "stale entry"},\n'
        ']\n')
    _, doc, _ = report(site)
    reasons = {f["page"]: f.get("suppressed") for f in expand(doc)}
    assert reasons == {"index.html": None, "tuning/index.html": "tuning sheet is scanned from paper"}
    stale = [d for d in doc["diagnostics"] if "allow entry 2" in d["message"]]
    assert len(stale) == 1 and stale[0]["path"].endswith("tinctura.toml")


def test_selector_entry_covers_only_matching_elements(site, tmp_path):
    (tmp_path / "tinctura.toml").write_text(
        'allow = [{selector = "h1", reason = "headings are reviewed by hand"}]\n')
    _, doc, _ = report(site)
    assert all(f.get("suppressed") is None for f in expand(doc))


def test_scan_maps_a_comment_to_the_engines_xpath():
    root = parse_html(page("<h1>T</h1>\n" + COMMENT + "<p>a</p><!-- other --><p>b</p>"))
    marks = suppress.scan(root, "index.html")
    assert [(m.xpath, m.origin, sorted(m.rules)) for m in marks.marks] == [
        ("/html/body/main/p[1]", "comment", ["TC100"])]
    assert suppress.under("/html/body/main/p[1]::before", "/html/body/main/p[1]")
    assert not suppress.under("/html/body/main/p[10]", "/html/body/main/p[1]")


@pytest.mark.slow
def test_markdown_comment_and_attribute_list_in_an_mkdocs_build(tmp_path):
    docs = tmp_path / "docs"
    docs.mkdir()
    (docs / "extra.css").write_text(".faint { color: #949494; }\n")
    (docs / "index.md").write_text(
        "# Casting\n\n"
        '<!-- tinctura: allow TC100 reason="mirrors the stamped tag" -->\n'
        "Let the mould cool for three days.\n{: .faint }\n\n"
        "Polish the crown last.\n{: .faint }\n\n"
        "Check the clapper.\n"
        '{: .faint data-tinctura-allow="TC100: clapper note is decorative" }\n')
    (docs / "tuning.md").write_text("# Tuning\n\nStrike note within two cents.\n{: .faint }\n")
    (tmp_path / "mkdocs.yml").write_text(
        "site_name: Kestrow handbook\ntheme: {name: mkdocs}\nextra_css: [extra.css]\n"
        "markdown_extensions: [attr_list]\nplugins:\n  - tinctura:\n      states: false\n"
        "      fail_on: never\n      report: ['json:out.json', 'sarif-findings:out.sarif']\n"
        "      allow: [{pages: 'tuning/*', selector: 'p.faint', reason: 'scanned sheet'}]\n")
    subprocess.run([sys.executable, "-m", "mkdocs", "build", "-q"], cwd=tmp_path, check=True,
                   env={"NO_MKDOCS_2_WARNING": "1", "PATH": "/usr/bin:/bin"})
    doc = json.loads((tmp_path / "out.json").read_text())
    mine = {f["text"]: f.get("suppressed") for f in expand(doc) if f["page"] == "index.html"
            and f["text"] in ("Let the mould cool for three days.", "Polish the crown last.",
                              "Check the clapper.")}
    assert mine == {"Let the mould cool for three days.": "mirrors the stamped tag",
                    "Polish the crown last.": None,
                    "Check the clapper.": "clapper note is decorative"}
    sarif = json.loads((tmp_path / "out.sarif").read_text())
    located = {r["locations"][0]["physicalLocation"]["artifactLocation"]["uri"]
               for r in sarif["runs"][0]["results"]}
    assert "docs/index.md" in located  # the plugin knows the Markdown source
    # SARIF 2.1.0 (OASIS), §3.35.3 suppression.kind: "inSource" when written in the analysed
    # source (the Markdown's comment and attribute list), "external" when kept outside it
    # (here the plugin's settings in mkdocs.yml)
    kinds = {(r["message"]["text"].split("\u201c")[-1].rstrip("\u201d"), s["kind"])
             for r in sarif["runs"][0]["results"] for s in r["suppressions"]}
    assert kinds == {("Let the mould cool for three days.", "inSource"),
                     ("Check the clapper.", "inSource"),
                     ("Strike note within two cents.", "external")}


def test_a_directive_with_no_element_after_it_is_reported(site):
    site.write("index.html", CASTING + COMMENT)
    _, doc, _ = report(site)
    assert any("no element follows it" in d["message"] for d in doc["diagnostics"])
    assert all(f.get("suppressed") is None for f in expand(doc))


SARIF_SCHEMA = pathlib.Path(__file__).resolve().parents[1] / "data" / "sarif-schema-2.1.0.json"


@pytest.mark.parametrize("jobs", [1, 2])
def test_sarif_suppression_kind_names_where_the_suppression_was_written(site, tmp_path, jobs):
    # one suppression in each page's source (a comment, an attribute), one in the configuration
    site.write("index.html", CASTING.replace('<p class="faint">', COMMENT + '<p class="faint">'))
    site.write("tuning/index.html", TUNING)
    (site.root / "bells").mkdir()
    site.write("bells/index.html", '<p class="faint" data-tinctura-allow="TC100: worn bell '
                                   'plate, reviewed">Tenor bell, 1897.</p>')
    (tmp_path / "tinctura.toml").write_text(
        'allow = [{pages = "tuning/*", reason = "tuning sheet is scanned from paper"}]\n')
    status, _, err = call("check", site, "--jobs", jobs, "--fail-on", "never",
                          "--format", f"sarif-findings:{tmp_path / 'r.sarif'}")
    assert status == 0, err
    sarif = json.loads((tmp_path / "r.sarif").read_text())
    jsonschema.validate(sarif, json.loads(SARIF_SCHEMA.read_text()))  # OASIS SARIF 2.1.0 schema
    kinds: dict = {}
    for r in sarif["runs"][0]["results"]:
        uri = r["locations"][0]["physicalLocation"]["artifactLocation"]["uri"]
        kinds.setdefault(uri, set()).update(s["kind"] for s in r["suppressions"])
    # SARIF 2.1.0 (OASIS), §3.35.3 suppression.kind: "inSource" for a suppression written in
    # the analysed artefact (the page's comment or attribute), "external" for one kept outside
    # it (the configuration file)
    assert kinds == {"site/index.html": {"inSource"}, "site/bells/index.html": {"inSource"},
                     "site/tuning/index.html": {"external"}}


def test_the_text_report_by_page_lists_only_the_findings_that_count(site):
    # grouped by page the text report reads the store's records (``occurrences``): those the
    # gate holds are left out, as they were from the findings it was given before
    site.write("index.html", CASTING.replace('<p class="faint">', COMMENT + '<p class="faint">')
               + '<p class="faint">Polish the crown last.</p>')
    status, out, _ = call("check", site, "--group", "page", "--jobs", 1, "--color", "never")
    assert status == 1
    assert "index.html (1 finding)" in out
    assert "Polish the crown last." in out and "Let the mould cool" not in out
