"""The distribution of contrast ratios counted while checking."""
from tinctura import distribution
from tinctura.model import UNDETERMINED
from tinctura.rules.examples import make_sample


def test_bins_put_thresholds_on_edges():
    # WCAG 2.2 thresholds 3, 4.5 and 7 open a bin: a text at exactly 4.5:1 passes
    assert distribution.bin_range(distribution.bin_of(4.5)) == (4.5, 5.0)
    assert distribution.bin_range(distribution.bin_of(4.4999)) == (4.0, 4.5)
    assert distribution.bin_of(21.0) == distribution.LAST
    assert distribution.bin_range(distribution.LAST) == (20.5, 21.0)


def test_histogram_counts_judged_texts_per_scheme():
    samples = [
        # WCAG 2.2 contrast ratios (tests/wcag_reference.py): #777 on white 4.478, black on
        # white 21
        make_sample("#777", "white"), make_sample("#000", "white", scheme="dark"),
        make_sample("#777", "white", status=UNDETERMINED, reason="image"),
        make_sample("#777", "white", exempt="disabled control"),
    ]
    assert distribution.histogram(samples) == {"light": {8: 1}, "dark": {distribution.LAST: 1}}


def test_worst_background_counts():
    # #777 on white 4.478, on black 4.689 (WCAG 2.2 formula, tests/wcag_reference.py): the worst is kept
    s = make_sample("#777", "white", bg_alternatives=("#000",))
    assert distribution.histogram([s]) == {"light": {8: 1}}


def test_merge_and_key():
    into = {"light": {8: 1}}
    distribution.merge(into, {"light": {8: 2, 9: 1}, "dark": {3: 1}}, times=2)
    assert into == {"light": {8: 5, 9: 2}, "dark": {3: 2}}
    assert distribution.key(into) == distribution.key({"dark": {3: 2}, "light": {9: 2, 8: 5}})
