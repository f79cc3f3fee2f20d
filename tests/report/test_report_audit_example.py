"""The audit report of the example site: its structure, its numbers against the JSON report of
the same site, its CSV, and the report checked by tinctura itself in both of its schemes."""
import csv
import io
import json
import pathlib
import sys

import lxml.html
import pytest

from tinctura import cli
from tinctura.engine import Options, check_paths
from tinctura.report.summary import summarise

HERE = pathlib.Path(__file__).resolve().parents[1]
sys.path.insert(0, str(HERE / "browser"))
from example_build import build_example_site  # noqa: E402

pytestmark = pytest.mark.slow


@pytest.fixture(scope="module")
def reports(tmp_path_factory):
    site = build_example_site(tmp_path_factory.mktemp("site"), tmp_path_factory.mktemp("cfg"))
    out = tmp_path_factory.mktemp("out")
    for fmt in ("json", "html", "csv"):
        status = cli.main(["check", str(site), "--jobs", "1", "--fail-on", "never",
                           "--format", fmt, "-o", str(out / f"report.{fmt}")],
                          io.StringIO(), io.StringIO())
        assert status == 0
    return {
        "site": site,
        "json": json.loads((out / "report.json").read_text(encoding="utf-8")),
        "html": (out / "report.html").read_text(encoding="utf-8"),
        "csv": (out / "report.csv").read_text(encoding="utf-8"),
    }


def json_findings(doc) -> list:
    """The JSON report's findings one by one (a compact report's occurrences expanded)."""
    from tinctura.report import json_report

    expand = getattr(json_report, "expand", None)
    return expand(doc) if expand is not None and "situations" in doc else doc["findings"]


def cells(row):
    return [c.text_content().strip() for c in row.xpath("./th|./td")]


def number(text):
    return int(text.replace(",", ""))


def test_sections_and_every_problem(reports):
    doc = lxml.html.document_fromstring(reports["html"])
    data = reports["json"]
    for section in ("scope", "criteria", "rules", "ratios", "pages", "problems", "not-judged",
                    "limits"):
        assert doc.get_element_by_id(section) is not None
    articles = doc.xpath("//article[@class='problem']")
    assert len(articles) == len(data["problems"]) == data["summary"]["problems"]
    for article, problem in zip(articles, data["problems"]):
        assert int(article.get("data-occurrences")) == problem["occurrences"]
        assert article.get("data-rule") == problem["rule"]
        text = article.text_content()  # one problem per cause, naming every scheme it fails in
        assert all(f" {s['name']}" in text for s in problem["schemes"]) and "scheme" in text
    assert len(doc.xpath("//svg[@class='chart']")) == len(data["summary"]["schemes"]) + 1
    assert "Tidewell TW-40 Operating Manual" in doc.findtext(".//h1")


def test_numbers_equal_the_json_report(reports):
    doc = lxml.html.document_fromstring(reports["html"])
    summary = reports["json"]["summary"]
    figures = {dd.get("data-figure"): number(dd.text_content())
               for dd in doc.xpath("//dd[@data-figure]")}
    assert figures["Pages checked"] == summary["pages"]
    assert figures["Findings"] == summary["findings"]
    assert figures["Problems (distinct causes)"] == summary["problems"]
    # pages: not the site-level rules' findings, listed under "(whole site)"
    assert "(whole site)" in summary["by_page"]  # the premise: the example has some
    assert figures["Pages with findings"] == len(summary["by_page"]) - 1
    assert figures["Texts not judged"] == summary["undetermined"]
    # texts judged: every sample but the undetermined and exempt ones
    assert figures["Texts judged"] == summary["samples"] - summary["undetermined"] - summary["exempt"]
    pages = {row.get("data-page"): number(cells(row)[1]) for row in doc.xpath("//tr[@data-page]")}
    assert pages == summary["by_page"]
    assert list(pages) == sorted(pages, key=lambda p: (-pages[p], p))  # ranked
    schemes = {row.get("data-scheme"): number(cells(row)[2])
               for row in doc.xpath("//tr[@data-scheme]")}
    assert schemes == summary["by_scheme"]
    rules = {row.get("data-rule"): number(cells(row)[3]) for row in doc.xpath("//tr[@data-rule]")}
    assert {k: v for k, v in rules.items() if v} == summary["by_rule"]
    row = doc.xpath("//tr[@data-criterion='1.4.3']")[0]
    # SC 1.4.3 counts the contrast-ratio findings (TC100): TC110 and TC120 report under 1.4.11
    # and 1.4.1, the appearance rules are warnings beside WCAG 2
    assert cells(row)[2] == "Fail" and number(cells(row)[4]) == summary["by_rule"]["TC100"]


def test_csv_has_one_row_per_finding(reports):
    rows = list(csv.DictReader(io.StringIO(reports["csv"])))
    findings = json_findings(reports["json"])
    assert len(rows) == len(findings)
    for row, f in zip(rows, findings):
        assert (row["page"], row["scheme"], row["state"], row["xpath"], row["fg"], row["bg"]) == (
            f["page"], f["scheme"], f["state"], f["xpath"], f["fg"], f["bg"])
        assert float(row["ratio"]) == pytest.approx(f["ratio"], abs=1e-4)


def test_the_report_passes_its_own_check_in_both_schemes(reports, tmp_path):
    (tmp_path / "index.html").write_text(reports["html"], encoding="utf-8")
    # the WCAG 2 ratio (TC100); the colour-appearance rules' advice on the report's own colours
    # is not asserted here
    result = check_paths([str(tmp_path)], Options(jobs=1, rules=("TC100",)))
    summary = summarise(result.pages, result.findings, (), result.diagnostics, result.schemes)
    assert sorted(summary.schemes) == ["dark", "light"]  # it honours prefers-color-scheme
    assert result.findings == []
    assert summary.undetermined == 0
    assert summary.diagnostics == 0


def test_distribution_equals_a_full_walk(reports):
    """Counted per fragment while checking (samples dropped) or from every sample: equal."""
    fast = check_paths([str(reports["site"])], Options(jobs=1, keep_samples=False))
    full = check_paths([str(reports["site"])], Options(jobs=1, keep_samples=True, replay=False))
    a = summarise(fast.pages, fast.findings).ratios
    b = summarise(full.pages, full.findings).ratios
    assert a == b and sum(sum(bins.values()) for bins in a.values()) > 1000


def test_links_told_apart_by_colour_alone_are_fixed_by_an_underline(reports):
    # TC120 is met by a cue besides colour, not by a colour change (W3C technique G183): its
    # problems give the underline the check verified, never "change both colours"
    doc = lxml.html.document_fromstring(reports["html"])
    links = doc.xpath("//article[@class='problem'][@data-rule='TC120']")
    assert links  # the premise: the example site's links in running text
    for article in links:
        fix = " ".join(article.xpath(".//dt[.='Fix at the cause']/following-sibling::dd[1]"
                                     "//text()"))
        assert "underline the links" in fix and "text-decoration-line: underline" in fix
        assert "change both colours" not in fix
