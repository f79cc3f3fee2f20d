"""The compact JSON report (format 3) of the example site: valid against its schema, and put
back together (``json_report.expand``) it gives the flat report's findings exactly, with and
without the gate's marks."""
import io
import json
import pathlib
import sys

import jsonschema
import pytest

from tinctura import cli
from tinctura.report.json_report import expand, schema

HERE = pathlib.Path(__file__).resolve().parents[1]
sys.path.insert(0, str(HERE / "browser"))
from example_build import build_example_site  # noqa: E402

pytestmark = pytest.mark.slow


@pytest.fixture(scope="module")
def site(tmp_path_factory):
    return build_example_site(tmp_path_factory.mktemp("site"), tmp_path_factory.mktemp("cfg"))


def check(site, *extra) -> dict:
    out = io.StringIO()
    cli.main(["check", str(site), "--jobs", "1", "--fail-on", "never", "--format", "json",
              *map(str, extra)], out, io.StringIO())
    return json.loads(out.getvalue())


@pytest.mark.parametrize("marked", [False, True], ids=["plain", "baseline"])
def test_compact_report_expands_to_the_flat_one(site, tmp_path, marked):
    extra = []
    if marked:  # every occurrence carries the gate's marks: fingerprint, baseline state
        baseline = tmp_path / "base.json"
        cli.main(["check", str(site), "--jobs", "1", "--fail-on", "never", "--format",
                  f"baseline:{baseline}"], io.StringIO(), io.StringIO())
        extra = ["--baseline", baseline]
    compact, flat = check(site, *extra), check(site, *extra, "--flat-findings")
    validator = jsonschema.Draft202012Validator(schema())
    validator.validate(compact)
    validator.validate(flat)
    assert (compact["format_version"], flat["format_version"]) == (3, 1)
    findings = expand(compact)
    assert findings == flat["findings"]
    assert len(findings) >= compact["summary"]["findings"] > 0 or marked  # held ones listed
    occurrences = [occ for entry in compact["pages"] for occ in entry["occurrences"]]
    assert len(occurrences) < len(findings)  # some texts fail several rules or states
    if marked:
        assert all(len(occ) == 7 and len(occ[6]) == len(occ[0]) for occ in occurrences)
        assert {f["baseline"] for f in findings} == {"unchanged"}


@pytest.mark.parametrize("jobs", ["1", "2"])
def test_compact_report_the_same_whether_or_not_records_are_kept(site, tmp_path, jobs):
    """Alone, the compact report reads what each page wrote for it as it was judged, and the
    pages' records are counted, not kept (``outputs.records_read_back``); beside a report
    that reads the records (JUnit), they are kept. The JSON text is the same."""
    texts = []
    for extra in ([], ["--format", f"junit:{tmp_path / 'cases.xml'}"]):
        path = tmp_path / f"report-{len(extra)}.json"
        cli.main(["check", str(site), "--jobs", jobs, "--fail-on", "never", "--format",
                  f"json:{path}", *extra], io.StringIO(), io.StringIO())
        texts.append(path.read_text())
    assert json.loads(texts[0])["summary"]["findings"] > 0
    assert texts[0] == texts[1]
