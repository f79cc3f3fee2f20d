"""End to end: the example site yields exactly its planted findings, no others.

The expectations in example_site/expected_findings.json were computed from headless Chromium's
rendering (tests/browser/chromium_reference.py) with the WCAG 2.2 contrast formula, not by
tinctura. Text over a gradient that fails at every stop is a finding (the stops agree); the
harness lists it among the undetermined samples with that verdict. Chromium reports ::before text
on its element, tinctura on `element::before`.
"""
import json
import pathlib
import sys

import pytest

from tinctura.colour.convert import to_hex
from tinctura.engine import Options, check_paths
from tinctura.rules import SITE_LEVEL
from tinctura.extract.exempt import IDS

HERE = pathlib.Path(__file__).resolve().parent
sys.path.insert(0, str(HERE / "browser"))
from example_build import build_example_site  # noqa: E402

EXPECTED = json.loads((HERE.parent / "example_site" / "expected_findings.json").read_text())


def _key(page, scheme, state, xpath):
    return (page, scheme, state, xpath.split("::")[0])


@pytest.fixture(scope="module")
def report(tmp_path_factory):
    site = build_example_site(tmp_path_factory.mktemp("site"), tmp_path_factory.mktemp("cfg"))
    return check_paths([str(site)], Options(jobs=1))


@pytest.mark.slow
def test_exactly_the_planted_findings(report):
    expected = {_key(f["page"], f["scheme"], f["state"], f["xpath"]): f
                for f in EXPECTED["findings"]}
    for u in EXPECTED["undetermined"]:
        if u.get("verdict") == "fails at every stop":
            expected[_key(u["page"], u["scheme"], u["state"], u["xpath"])] = u
    # Chromium's harness does not collect list markers: a marker ("3.") takes its item's
    # colour, so a marker finding is expected exactly where its list item has one.
    text_findings = [f for f in report.findings if f.rule == "TC100"]
    markers = [f for f in text_findings if f.sample.xpath.endswith("::marker")]
    assert all(_key(f.sample.page, f.sample.scheme, f.sample.state, f.sample.xpath) in expected
               for f in markers)
    others = [f for f in text_findings if not f.sample.xpath.endswith("::marker")]
    keys = [_key(f.sample.page, f.sample.scheme, f.sample.state, f.sample.xpath) for f in others]
    assert len(keys) == len(set(keys))
    found = dict(zip(keys, others))
    assert sorted(found) == sorted(expected)
    for key, f in found.items():
        want = expected[key]
        fg = want.get("fg")
        if "stops" in want:  # worst stop
            worst = min(want["stops"], key=lambda s: s["ratio"])
            fg, bg = worst["fg"], worst["bg"]
        else:
            bg = want["bg"]
        got_fg, got_bg = to_hex(f.args.get("fg", f.sample.fg)), to_hex(f.args.get("bg", f.sample.bg))
        for mine, theirs in ((got_fg, fg), (got_bg, bg)):
            assert all(abs(int(mine[i:i + 2], 16) - int(theirs[i:i + 2], 16)) <= 1
                       for i in (1, 3, 5)), (key, mine, theirs)


@pytest.mark.slow
def test_exactly_the_planted_appearance_risks(report):
    """The status board's risks (example_site/README.md, "Palette colours in context"): the
    caution amber shifts between the light card and the dark panel, lighter on the panel
    (simultaneous contrast, common practice); the running green and stopped red collapse under
    deuteranopia only (Machado 2009). Nothing else on the site."""
    site = [f for f in report.findings if f.rule in SITE_LEVEL]
    assert sorted((f.rule, f.args["entry"], f.args.get("other")) for f in site) == [
        ("TC300", ".tw-chip.tw-state-caution", None),
        ("TC310", ".tw-chip.tw-state-running", ".tw-chip.tw-state-stopped"),
    ]
    shift = next(f for f in site if f.rule == "TC300")
    assert {to_hex(c["bg"]) for c in shift.args["contexts"]} == {"#ffffff", "#1e2530"}
    assert to_hex(shift.args["to_bg"]) == "#1e2530" and "lighter" in shift.args["terms"]
    assert all(f.sample.page == "faults/status-board/index.html" for f in site)
    assert all(f.severity == "warning" for f in site)
    collapse = next(f for f in site if f.rule == "TC310")
    assert "deuteranopia" in collapse.args["conditions"]
    assert "normal vision" not in collapse.args["conditions"]


@pytest.mark.slow
def test_undetermined_samples_say_why(report):
    undetermined = [s for p in report.pages for s in p.samples
                    if s.status == "undetermined" and s.state == "rest"]
    reasons = " ".join(s.reason for s in undetermined)
    assert "background image" in reasons and "backgrounds disagree" in reasons
    exempt = [s for p in report.pages for s in p.samples if s.exempt]
    assert exempt and {s.exempt for s in exempt} <= set(IDS)


@pytest.mark.slow
def test_exempt_where_chromium_says_so(report):
    """Every failing sample Chromium's harness finds exempt (its scope decided from the
    browser's DOM: :disabled, label.control, aria-labelledby, aria-disabled, aria-hidden) is
    exempt in tinctura for the same reason (WCAG 2.2 SC 1.4.3 "Incidental", definition of
    text); none of them is a TC100 finding."""
    mine = {_key(s.page, s.scheme, s.state, s.xpath): s.exempt
            for p in report.pages for s in p.samples if s.kind in ("text", "generated")}
    assert EXPECTED["exempt"]
    for entry in EXPECTED["exempt"]:
        key = _key(entry["page"], entry["scheme"], entry["state"], entry["xpath"])
        assert mine.get(key) == entry["exempt"], (key, mine.get(key), entry["exempt"])


@pytest.mark.slow
def test_icons_below_three_to_one_as_chromium_paints_them(report):
    """TC110 (WCAG 2.2 SC 1.4.11, 3:1): exactly the icon glyphs Chromium paints below 3:1."""
    found = sorted(_key(f.sample.page, f.sample.scheme, f.sample.state, f.sample.xpath)
                   for f in report.findings if f.rule == "TC110" and f.sample.kind == "text")
    expected = sorted(_key(e["page"], e["scheme"], e["state"], e["xpath"])
                      for e in EXPECTED["nontext"])
    assert found == expected


@pytest.mark.slow
def test_control_boundaries(report):
    """TC110 on control boundaries: the README's rows, nothing else (SC 1.4.11)."""
    import test_example_site as readme

    rows = readme.table("boundary")
    found = [f for f in report.findings if f.rule == "TC110" and f.sample.kind != "text"]
    assert sorted((f.sample.page, f.sample.scheme) for f in found) == \
        sorted((r["page"], r["scheme"]) for r in rows)
    for f in found:
        assert f.sample.kind == "boundary"
        assert (to_hex(f.args["fg"]), to_hex(f.args["bg"])) == ("#d0d0d0", "#ffffff")


@pytest.mark.slow
def test_links_told_apart_by_colour_alone(report):
    """TC120 (WCAG 2.2 SC 1.4.1, technique G183): the README's link rows, and nothing else:
    the same colours in a list of links are not running text, and the site underlines the
    theme's links."""
    import test_example_site as readme

    rows = readme.table("linkcue")
    found = [f for f in report.findings if f.rule == "TC120"]
    assert sorted((f.sample.page, f.sample.scheme, f.sample.text) for f in found) == \
        sorted((r["page"], r["scheme"], r["text starts with"]) for r in rows)
    for f in found:
        row = next(r for r in rows if r["scheme"] == f.sample.scheme)
        for mine, theirs in ((f.sample.fg, row["link"]), (f.args["surround"], row["surrounding text"])):
            mine = to_hex(mine)  # one level per channel: hsla() and alpha round either way
            assert all(abs(int(mine[i:i + 2], 16) - int(theirs[i:i + 2], 16)) <= 1
                       for i in (1, 3, 5)), (mine, theirs)
        assert f.ratio == pytest.approx(float(row["ratio"]), abs=0.006)
        assert f.args["missing"] == ("hover",)


@pytest.mark.slow
def test_shared_caches_change_nothing(tmp_path_factory):
    """Styles, states and whole subtrees are shared across pages; a page checked after all
    the others must give exactly what a fresh checker gives (fields and order)."""
    from tinctura.engine import Site

    site = build_example_site(tmp_path_factory.mktemp("site"), tmp_path_factory.mktemp("cfg"))
    warm = Site(str(site), Options())
    pages = warm.pages()
    for rel in pages:
        warm.check_page(rel)
    for rel in pages:
        assert warm.check_page(rel).samples == Site(str(site), Options()).check_page(rel).samples


@pytest.mark.slow
def test_check_mode_gives_what_a_full_walk_gives(tmp_path_factory):
    """`tinctura check` judges replayed fragments once and keeps no samples; the findings,
    counts, skipped counts and declaration uses must be those of a walk without replay that
    keeps every sample (the mode the Chromium cross-checks run in)."""
    from tinctura.engine import sample_stats

    site = build_example_site(tmp_path_factory.mktemp("site"), tmp_path_factory.mktemp("cfg"))
    full = check_paths([str(site)], Options(jobs=1, replay=False))
    lean = check_paths([str(site)], Options(jobs=1, keep_samples=False))

    def findings(report):
        return sorted((f.sample.page, f.sample.scheme, f.sample.state, f.sample.xpath,
                       f.sample.line, f.sample.text, round(f.ratio, 6), f.sample.fg_cause)
                      for f in report.findings)

    assert findings(full) == findings(lean)
    assert full.uses == lean.uses
    for a, b in zip(full.pages, lean.pages):
        assert a.page == b.page and a.skipped == b.skipped
        assert sample_stats(a.samples) == b.stats


@pytest.mark.slow
def test_reports_from_the_finding_store_equal_reports_from_memory(tmp_path_factory):
    """`tinctura check` keeps findings on disk and builds problems as they come
    (``FindingStore``, ``problems.Collector``); every report must be byte for byte the one
    built from findings held in memory and grouped at the end (``problems.group``)."""
    import io

    from tinctura import problems, report
    from tinctura.report.store import FindingStore

    site = build_example_site(tmp_path_factory.mktemp("site"), tmp_path_factory.mktemp("cfg"))
    options = Options(jobs=1, keep_samples=False)
    held = check_paths([str(site)], options)
    store, collector = FindingStore(), problems.Collector()

    def keep(page, findings):
        store.add(page.page, findings)
        for f in findings:
            collector.add(f)

    stored = check_paths([str(site)], options, findings_to=keep)
    assert len(store) == len(held.findings) > 0
    for fmt, group in (("json", "cause"), ("text", "cause"), ("text", "page")):
        out = []
        for findings, found, run in (
                (held.findings, problems.group(held.findings, uses=held.uses), held),
                (store, collector.problems(stored.uses), stored)):
            stream = io.StringIO()
            header = report.Header(version="test", group=group, schemes=["default", "slate"])
            report.render(stream, fmt, header, run.pages, findings, found, run.diagnostics,
                          colour_choice="never")
            out.append(stream.getvalue())
        assert out[0] == out[1], (fmt, group)
