"""The CSV report: documented columns, one row per finding, formula-injection safe."""
import csv
import io

from tinctura.engine import Options
from tinctura.model import Cause, Declaration, PageResult
from tinctura.problems import group
from tinctura.report import Header, render
from tinctura.report.csv_report import COLUMNS, safe
from tinctura.rules import run
from tinctura.rules.examples import make_sample


def rows(samples):
    findings = run(samples, Options())
    pages = [PageResult(n, [s for s in samples if s.page == n]) for n in sorted({s.page for s in samples})]
    out = io.StringIO()
    render(out, "csv", Header(version="1.2.3"), pages, findings, group(findings, samples))
    return list(csv.reader(io.StringIO(out.getvalue()))), findings


def test_columns_and_one_row_per_finding():
    fg = Cause(Declaration("color", "#777", "site.css", 9, ".note", "author"))
    got, findings = rows([
        make_sample("#777", "white", page="a.html", line=3, text="Moor the buoy", fg_cause=fg),
        make_sample("#999", "white", page="b.html", scheme="dark"),
        make_sample("#111", "white", page="b.html"),
    ])
    assert tuple(got[0]) == COLUMNS
    assert len(got) - 1 == len(findings) == 2
    first = dict(zip(COLUMNS, got[1]))
    assert (first["page"], first["line"], first["text"], first["fg"], first["bg"]) == (
        "a.html", "3", "Moor the buoy", "#777777", "#ffffff")
    # WCAG 2.2 contrast ratio of #777777 on white: 4.478 (tests/wcag_reference.py)
    assert 4.478 <= float(first["ratio"]) < 4.479
    assert (first["required"], first["criterion"], first["rule"]) == ("4.5", "1.4.3", "TC100")
    assert (first["fg_declaration"], first["fg_where"]) == ("color: #777", "site.css:9")
    assert first["fix_fg"].startswith("#")


def test_cells_a_spreadsheet_would_run_are_quoted():
    for text in ("=HYPERLINK(\"http://example.invalid\")", "+1", "-2+3", "@SUM(A1)", "\tx", "\rx"):
        assert safe(text) == "'" + text
    assert safe("Tide at 3 m") == "Tide at 3 m"
    got, _ = rows([make_sample("#999", "white", page="=cmd|' /C calc'!A0.html",
                               text="=1+1 high water")])
    row = dict(zip(COLUMNS, got[1]))
    assert row["page"] == "'=cmd|' /C calc'!A0.html"
    assert row["text"] == "'=1+1 high water"
