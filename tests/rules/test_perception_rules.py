"""TC200 text-lc, TC400 cvd-ratio, TC500 glare-ratio on hand-made samples.

Reference numbers: WCAG 2.2 ratio (tests/wcag_reference.py); APCA Lc reference values (shared
reference values: #888 on #fff = 63.06, #fff on #888 = -68.54); protanopia via colour-science's
Machado 2009 matrix (general-purpose reference library).
"""
import pytest
from wcag_reference import ratio

from tinctura import engine
from tinctura.colour.convert import to_hex
from tinctura.rules import perception as appearance, run
from tinctura.rules.examples import make_sample


def findings(samples, code, **options):
    return run(samples, engine.Options(rules=(code,), **options))


@pytest.mark.parametrize("size, weight, kind, tier", [
    (16, 400, "text", "body"), (23.9, 400, "text", "body"), (15.9, 700, "text", "body"),
    (24, 400, "text", "content"), (16, 700, "text", "content"), (35.9, 400, "text", "content"),
    (36, 400, "text", "headline"), (24, 700, "text", "headline"), (12, 400, "placeholder", "any"),
])
def test_tiers(size, weight, kind, tier):
    assert appearance.tier(size, weight, kind) == tier


def test_text_lc_reports_polarity_and_level():
    # #fff on #888 is 3.54:1 (fails TC100, so TC200 leaves it); on #555 it is 7.46:1 and
    # light on dark: Lc about -86 passes. #ccc on #333: WCAG 2.2 ratio 7.94, Lc about -60: fails 75.
    assert findings([make_sample("#fff", "#888")], "TC200") == []
    assert ratio("#cccccc", "#333333") > 4.5
    (f,) = findings([make_sample("#ccc", "#333")], "TC200")
    assert f.args["polarity"] == "light on dark" and f.args["lc_required"] == 75
    assert f.severity == "warning" and f.args["lc"] < 0 and abs(f.args["lc"]) < 75
    # a 36 px headline needs only Lc 45
    assert findings([make_sample("#ccc", "#333", size_px=36)], "TC200") == []


def test_lc_levels_setting():
    sample = make_sample("#888", "#fff", size_px=24)  # fails TC100 at 3.54:1 -> none
    assert findings([sample], "TC200") == []
    # #595959 on white: 7.00:1, Lc about 84: passes 75, fails a body level of 90
    assert findings([make_sample("#595959", "#fff")], "TC200") == []
    assert findings([make_sample("#595959", "#fff")], "TC200", lc_levels={"body": 90})


def test_cvd_reports_only_what_normal_vision_passes():
    # #ff3030 on black: 5.71:1 (WCAG 2.2), 3.80:1 under protanopia (Machado 2009 via
    # colour-science, severity 1)
    (f,) = findings([make_sample("#ff3030", "#000")], "TC400")
    assert f.args["deficiency"] == "protanopia" and f.ratio == pytest.approx(3.80, abs=0.01)
    assert f.args["normal_ratio"] == pytest.approx(ratio("#ff3030", "#000000"))
    # #e00000 on black fails for everyone (4.0:1 < 4.5): TC100's, not TC400's
    assert ratio("#e00000", "#000000") < 4.5
    assert findings([make_sample("#e00000", "#000")], "TC400") == []
    # severity 0 is normal vision
    assert findings([make_sample("#ff3030", "#000")], "TC400", cvd_severity=0.0) == []


def test_cvd_simulates_each_distinct_colour_once(monkeypatch):
    from collections import Counter

    from tinctura.colour import cvd

    calls = []
    real = cvd.simulate_with
    monkeypatch.setattr(cvd, "simulate_with", lambda m, rgb: calls.append(rgb) or real(m, rgb))
    appearance._SIMULATED.clear()
    samples = [make_sample(f"#ff{n:02x}30", "#000") for n in range(40, 48)] * 50
    findings(samples, "TC400")
    # judging 400 samples of 9 distinct colours (8 reds and black): 9 simulations per
    # deficiency; the fix searches that follow simulate their candidate colours as they walk
    judged = Counter(calls[:27])
    assert len(judged) == 9 and set(judged.values()) == {3}


def test_cvd_at_the_default_severity_imports_no_numpy():
    """numpy's import time (about 0.1 s) is more than TC400's whole simulation on a site of a
    few hundred distinct colours (colour.cvd's docstring)."""
    import subprocess
    import sys

    code = ("import sys\n"
            "from tinctura.rules import perception, deficiency\n"
            "perception.simulate_all([(1.0, 0.19, 0.19), (0.0, 0.0, 0.0)], deficiency.DEFICIENCIES, 1.0)\n"
            "perception.simulated((0.2, 0.9, 0.1), 'tritanopia', 1.0)\n"
            "print('numpy' in sys.modules)\n")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         timeout=120)
    assert out.stdout.strip() == "False", out.stderr


def test_grey_pairs_are_not_simulated():
    from tinctura.rules import deficiency

    assert deficiency._neutral(make_sample("#777", "#fff"))
    assert not deficiency._neutral(make_sample("#777", "#fff7f7"))


def test_glare_profiles():
    # #6b6b6b on white: 5.33:1 in the office (WCAG 2.2), about 4.40:1 in daylight
    sample = make_sample("#6b6b6b", "#fff")
    (f,) = findings([sample], "TC500")
    assert f.args["profile"] == "daylight" and f.severity == "info"
    assert f.args["office_ratio"] == pytest.approx(ratio("#6b6b6b", "#ffffff"))
    assert findings([sample], "TC500", profiles=("office", "dim")) == []


@pytest.mark.parametrize("code, fg, bg, size", [
    ("TC200", "#ccc", "#333", 16), ("TC400", "#ff3030", "#000", 16), ("TC500", "#6b6b6b", "#fff", 16),
    ("TC400", "#eb7c60", "#000", 24),
])
def test_suggested_colours_pass_this_rule_and_tc100(code, fg, bg, size):
    (f,) = findings([make_sample(fg, bg, size_px=size, weight=700 if size >= 24 else 400)], code)
    assert f.fixes
    for fx in f.fixes:
        new_fg, new_bg = (to_hex(fx.colour), bg) if fx.target == "foreground" else (fg, to_hex(fx.colour))
        fixed = make_sample(new_fg, new_bg, size_px=size, weight=700 if size >= 24 else 400)
        assert findings([fixed], code) == [] and findings([fixed], "TC100") == [], fx


def test_fix_at_the_cause_uses_the_rule_test():
    from tinctura.problems import group

    (problem,) = group(findings([make_sample("#6b6b6b", "#fff")], "TC500"))
    fix = problem.fix_at_cause
    assert fix.possible and findings([make_sample(to_hex(fix.colour), "#fff")], "TC500") == []


def test_tc100_only_run_does_not_import_colour_science(tmp_path):
    """colour-science costs about half a second to import; a run without TC400 must not pay it
    (measured in a fresh interpreter: sys.modules after the run)."""
    import subprocess
    import sys

    page = tmp_path / "p.html"
    page.write_text('<!doctype html><html><body style="background:#fff">'
                    '<p style="color:#ff3030">Alarm</p><p style="color:#777">Grey</p></body></html>')
    code = (
        "import sys, io; from tinctura import engine, problems, report\n"
        "from tinctura.report.base import Header\n"
        "o = engine.Options(rules={rules}, keep_samples=False)\n"
        f"r = engine.check_paths([{str(page)!r}], o)\n"
        "report.render(io.StringIO(), 'text', Header(version='t'), r.pages, r.findings,\n"
        "              problems.group(r.findings, uses=r.uses), r.diagnostics)\n"
        "print(len(r.findings), 'colour' in sys.modules)\n"
    )
    def run_with(rules):
        done = subprocess.run([sys.executable, "-c", code.format(rules=rules)],
                              capture_output=True, text=True, timeout=120)
        assert done.returncode == 0, done.stderr
        return done.stdout.split()

    assert run_with(("TC100", "TC200", "TC500"))[1] == "False"
    assert run_with(("TC100",))[1] == "False"
    # all rules: TC400 simulates the red text with the dichromat matrices it keeps
    assert run_with(())[1] == "False"


def test_one_colour_simulation_equals_the_batched_one():
    import numpy as np

    from tinctura.colour import cvd

    colours = [(1.0, 0.19, 0.19), (0.1, 0.4, 0.9), (0.5, 0.5, 0.5), (0.0, 0.0, 0.0), (0.9, 0.8, 0.1)]
    for severity in (0.6, 1.0):
        for deficiency in ("protanopia", "deuteranopia", "tritanopia"):
            batch = cvd.simulate(np.array(colours), deficiency, severity)
            one = [appearance.simulated(c, deficiency, severity) for c in colours]
            assert np.allclose(batch, one, atol=1e-12)


def test_colour_science_is_imported_before_workers_only_for_the_rules_that_use_it():
    """With worker processes, the parent imports colour-science once before forking them
    (they share it) when TC400 will need it (a severity other than the dichromat matrices it
    keeps), and never otherwise."""
    import subprocess
    import sys

    code = ("import sys; from tinctura import engine\n"
            "engine._preload(engine.Options(rules={rules}, cvd_severity={severity}))\n"
            "print('colour' in sys.modules)\n")
    seen = [subprocess.run([sys.executable, "-c", code.format(rules=rules, severity=severity)],
                           capture_output=True, text=True, timeout=120).stdout.strip()
            for rules, severity in ((("TC100", "TC200", "TC500"), 0.5), (("TC400",), 1.0),
                                    (("TC400",), 0.5), ((), 0.5))]
    assert seen == ["False", "False", "True", "True"]
