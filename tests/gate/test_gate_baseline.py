"""Fingerprints survive edits elsewhere; a baseline fails only on new findings."""
import json

from tinctura.report.json_report import expand

from gate_helpers import CASTING, TUNING, call, site  # noqa: F401  (site: a fixture)


def fingerprints(site, *extra):
    status, out, _ = call("check", site, "--format", "json", "--jobs", 1, "--fingerprints", *extra)
    return status, [(f["page"], f["fingerprint"], f["baseline"]) for f in expand(json.loads(out))]


def test_fingerprints_ignore_edits_elsewhere_and_sibling_indexes(site):
    _, before = fingerprints(site)
    # a paragraph and a table before the fault, and a page added to the site
    site.write("index.html", "<p>Foundry safety first.</p><table><tr><td>Tin</td></tr></table>"
               + CASTING)
    site.write("alloys.html", "<h1>Alloys</h1><p>Bell metal is copper and tin.</p>")
    _, after = fingerprints(site)
    assert after == before and len(before) == 2
    assert len({fp for _, fp, _ in before}) == 2


def test_fingerprint_changes_with_the_colours(site):
    _, before = fingerprints(site)
    site.write("index.html", CASTING.replace('class="faint"', 'style="color:#9a9a9a"'))
    _, after = fingerprints(site)
    assert after[1] == before[1] and after[0] != before[0]


def test_equal_findings_on_a_page_get_distinct_fingerprints(site):
    site.write("index.html", CASTING + CASTING)
    _, found = fingerprints(site)
    assert len(found) == 3 and len({fp for _, fp, _ in found}) == 3


def test_baseline_gates_only_new_findings(site, tmp_path):
    baseline = tmp_path / "baseline.json"
    status, _, err = call("check", site, "--write-baseline", baseline, "--jobs", 1)
    assert status == 0 and "wrote 2 findings to the baseline" in err
    doc = json.loads(baseline.read_text())
    assert [e["page"] for e in doc["findings"]] == ["index.html", "tuning/index.html"]

    status, _, err = call("check", site, "--baseline", baseline, "--jobs", 1)
    assert status == 0 and "0 new, 2 unchanged (not failing), 0 gone" in err

    site.write("index.html", "<p>Wear leather gloves near the furnace.</p>" + CASTING)
    assert call("check", site, "--baseline", baseline, "--jobs", 1)[0] == 0

    site.write("index.html", CASTING + '<p class="faint">Polish the crown last.</p>')
    status, found = fingerprints(site, "--baseline", baseline)
    assert status == 1
    assert sorted(state for _, _, state in found) == ["new", "unchanged", "unchanged"]

    site.write("tuning/index.html", TUNING.replace('class="faint"', ""))
    status, _, err = call("check", site, "--baseline", baseline, "--jobs", 1)
    assert status == 1 and "1 new, 1 unchanged (not failing), 1 gone" in err
    assert "gone from the baseline: tuning/index.html TC100 [light, rest] " \
           "\u201cStrike note within two cents.\u201d" in err


def test_baseline_from_the_configuration(site, tmp_path):
    call("check", site, "--write-baseline", tmp_path / "ci" / "accepted.json", "--jobs", 1)
    assert (tmp_path / "ci" / "accepted.json").exists() is False  # the folder must exist
    (tmp_path / "ci").mkdir()
    call("check", site, "--write-baseline", tmp_path / "ci" / "accepted.json", "--jobs", 1)
    (tmp_path / "tinctura.toml").write_text('baseline = "ci/accepted.json"\n')
    assert call("check", site, "--jobs", 1)[0] == 0


def test_bad_baseline_file_exits_2(site, tmp_path):
    bad = tmp_path / "b.json"
    bad.write_text("{ nope")
    status, out, err = call("check", site, "--baseline", bad)
    assert status == 2 and out == "" and f"{bad}: not a tinctura baseline" in err
    status, _, err = call("check", site, "--baseline", tmp_path / "missing.json")
    assert status == 2 and "cannot read the baseline" in err


def test_fingerprints_only_when_asked_or_needed(site):
    """Without --fingerprints, a baseline or a report that reads them, the JSON report's
    occurrences carry no marks (the gate never builds the findings); with a baseline they do."""
    _, out, _ = call("check", site, "--format", "json", "--jobs", 1)
    assert all(len(o) <= 6  # format 3: the marks would be a seventh field
               for p in json.loads(out)["pages"] for o in p["occurrences"])
    plain = [{k: v for k, v in f.items() if k not in ("fingerprint", "suppressed", "baseline")}
             for f in expand(json.loads(out))]
    _, found = fingerprints(site)
    assert len(plain) == len(found) and all(fp for _, fp, _ in found)
