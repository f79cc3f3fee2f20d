"""TC100 text-ratio against WCAG 2.2 (W3C): SC 1.4.3, SC 1.4.6, the definitions of relative
luminance, contrast ratio and large-scale text, and Understanding SC 1.4.3 (no rounding)."""
import pytest

from tinctura.engine import Options
from tinctura.model import UNDETERMINED
from tinctura.rules import run
from tinctura.rules.examples import make_sample
from tinctura.rules.text import check_text_ratio


from wcag_reference import ratio  # noqa: E402  (WCAG 2.2 formulas)


def grey_with_ratio_on_white(target):
    """A (float) grey whose WCAG ratio against white is ``target``: inverts the definitions."""
    lum = 1.05 / target - 0.05
    c = lum * 12.92 if lum <= 0.0031308 else 1.055 * lum ** (1 / 2.4) - 0.055
    return (c, c, c)


def check(samples, level="AA"):
    return check_text_ratio(samples, Options(level=level))


# Values from /work/shared/reference-values.md, reproduced with the formula above:
# #777777 on white 4.48:1, #767676 4.54:1, #595959 7.00:1, #ff0000 4.00:1, #0000ff 8.59:1.
@pytest.mark.parametrize("fg, level, size, weight, fails", [
    ("#777777", "AA", 16, 400, True),
    ("#767676", "AA", 16, 400, False),
    ("#767676", "AAA", 16, 400, True),
    ("#595959", "AAA", 16, 400, False),
    ("#ff0000", "AA", 16, 400, True),
    ("#ff0000", "AA", 24, 400, False),  # large: 3:1
    ("#ff0000", "AAA", 24, 400, True),  # large at AAA: 4.5:1
    ("#0000ff", "AAA", 16, 400, False),
])
def test_reference_pairs(fg, level, size, weight, fails):
    required = {("AA", False): 4.5, ("AA", True): 3.0, ("AAA", False): 7.0, ("AAA", True): 4.5}
    assert (ratio(fg, "#ffffff") < required[(level, size >= 24)]) is fails  # the table is right
    findings = check([make_sample(fg, "#ffffff", size_px=size, weight=weight)], level)
    assert bool(findings) is fails
    if findings:
        assert findings[0].ratio == pytest.approx(ratio(fg, "#ffffff"), abs=1e-9)


def test_777_on_white_measures_4_478():
    # WCAG 2.2 formula: #777777 on #ffffff = 4.478:1 (reference-values.md, recomputed here).
    (finding,) = check([make_sample("#777", "white")])
    assert finding.ratio == pytest.approx(ratio("#777777", "#ffffff"), rel=1e-12)
    assert 4.478 <= finding.ratio < 4.479
    assert (finding.required, finding.level, finding.rule, finding.slug) == (4.5, "AA", "TC100", "text-ratio")
    assert finding.args["sc"] == "1.4.3"


@pytest.mark.parametrize("target, fails", [(4.499, True), (4.4999, True), (4.5001, False)])
def test_never_rounds_before_comparing(target, fails):
    # Understanding SC 1.4.3 (W3C): 4.499:1 does not meet 4.5:1.
    fg = grey_with_ratio_on_white(target)
    assert ratio(fg, (1.0, 1.0, 1.0)) == pytest.approx(target, abs=1e-9)
    assert bool(check([make_sample(fg, "#ffffff")])) is fails


# WCAG 2.2 large-scale text: >= 18 pt or >= 14 pt bold; 1 pt = 4/3 px (CSS Values 3).
@pytest.mark.parametrize("size, weight, large", [
    (24, 400, True), (23.9, 400, False), (18.6667, 700, True), (14 * 4 / 3, 700, True),
    (18.6, 700, False), (18.6667, 600, False), (30, 100, True), (20, 900, True),
])
def test_large_text_thresholds(size, weight, large):
    # #949494 on white is about 3.03:1 (formula above): passes only as large text at AA.
    assert 3.0 < ratio("#949494", "#ffffff") < 4.5
    findings = check([make_sample("#949494", "#ffffff", size_px=size, weight=weight)])
    assert bool(findings) is (not large)
    if findings:
        assert findings[0].required == 4.5 and findings[0].args["large"] is False


def test_aaa_thresholds_are_7_and_4_5():
    # SC 1.4.6: 7:1, large text 4.5:1. #6b6b6b on white is about 5.33:1.
    normal, = check([make_sample("#6b6b6b", "#ffffff")], "AAA")
    assert normal.required == 7.0 and normal.args["sc"] == "1.4.6"
    assert check([make_sample("#6b6b6b", "#ffffff", size_px=24)], "AAA") == []


def test_undetermined_and_exempt_samples_give_no_finding():
    samples = [
        make_sample("#eeeeee", "#ffffff", status=UNDETERMINED, reason="background image"),
        make_sample("#eeeeee", "#ffffff", exempt="disabled control"),
    ]
    assert check(samples) == []


def test_missing_colours_are_not_judged():
    s = make_sample("#eeeeee", "#ffffff")
    s.bg = None
    assert check([s]) == []


def test_gradient_must_pass_on_every_stop_and_reports_the_worst():
    # Dark text: fine on white, poor on the darker stop.
    s = make_sample("#333333", "#ffffff", bg_alternatives=("#ffffff", "#777777", "#999999"))
    (finding,) = check([s])
    assert finding.ratio == pytest.approx(ratio("#333333", "#777777"))
    assert finding.args["bg"] == pytest.approx((0x77 / 255,) * 3)
    assert finding.args["stop"] == 2 and finding.args["stops"] == 4
    fg_fix = next(f for f in finding.fixes if f.target == "foreground")
    for bg in ("#ffffff", "#777777", "#999999"):
        assert ratio(fg_fix.colour, bg) >= 4.5  # the fix passes on every stop


def test_translucent_text_is_composited_on_each_stop():
    # 50 % black: over white gives #808080 (3.95:1); over #bbbbbb it gives #5e5e5e
    # (source-over in sRGB, CSS Compositing 1), whose ratio to #bbbbbb is lower.
    s = make_sample("rgb(0 0 0 / 50%)", "#ffffff", bg_alternatives=("#bbbbbb",))
    (finding,) = check([s])
    expected_fg = tuple(0.5 * 0xbb / 255 for _ in range(3))
    assert finding.args["fg"] == pytest.approx(expected_fg)
    assert finding.ratio == pytest.approx(ratio(expected_fg, "#bbbbbb"))


def test_fixes_reach_the_required_ratio():
    (finding,) = check([make_sample("#cc6666", "#eeeeee")])
    targets = {f.target: f for f in finding.fixes}
    assert set(targets) == {"foreground"}  # no lighter background than #eeeeee reaches 4.5:1
    assert ratio(targets["foreground"].colour, "#eeeeee") >= 4.5
    assert targets["foreground"].ratio == pytest.approx(ratio(targets["foreground"].colour, "#eeeeee"))
    (finding,) = check([make_sample("#ffffff", "#8a8a8a")])
    (background,) = [f for f in finding.fixes if f.target == "background"]
    assert ratio("#ffffff", background.colour) >= 4.5


def test_suggestions_keep_the_polarity_of_the_pair():
    # grey text on white: a darker text colour, never a black background (WCAG 2.2 formula for
    # the ratios); white text on a mid grey: a darker background, never a darker text colour
    (finding,) = check([make_sample("#777777", "#ffffff")])
    assert [f.target for f in finding.fixes] == ["foreground"]
    fg = finding.fixes[0].colour
    assert ratio(fg, "#000000") < ratio("#777777", "#000000")  # darker than #777777
    (finding,) = check([make_sample("#ffffff", "#8a8a8a")])
    assert [f.target for f in finding.fixes] == ["background"]
    assert ratio(finding.fixes[0].colour, "#000000") < ratio("#8a8a8a", "#000000")


def test_foreground_fix_keeps_the_hue():
    # colour-science (general-purpose reference library) for the Oklab hue of both colours.
    import math
    import warnings

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        import colour
    (finding,) = check([make_sample("#cc6666", "#ffffff")])
    fix = next(f for f in finding.fixes if f.target == "foreground")

    def hue(rgb):
        lab = colour.convert(rgb, "sRGB", "Oklab")
        return math.degrees(math.atan2(lab[2], lab[1])) % 360

    start = tuple(int("cc6666"[i:i + 2], 16) / 255 for i in (0, 2, 4))
    assert abs(hue(fix.colour) - hue(start)) < 3  # degrees; 8-bit rounding moves it a little


def test_run_selects_rules_by_code_or_slug():
    s = [make_sample("#777777", "#ffffff")]
    assert [f.rule for f in run(s, Options())] == ["TC100"]
    assert [f.rule for f in run(s, Options(rules=("text-ratio",)))] == ["TC100"]
