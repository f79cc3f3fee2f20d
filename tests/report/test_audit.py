"""Results per WCAG success criterion: which rules count, and the four verdicts."""
from dataclasses import replace

from tinctura.report import audit
from tinctura.rules.catalogue import TEXT_RATIO

ADVICE = replace(TEXT_RATIO, code="TC200", slug="advice")  # names 1.4.3 as TC100 does


def status(rows, number):
    return next(r for r in rows if r.criterion.number == number)


def test_advice_rules_never_decide_a_wcag_criterion():
    rows = audit.criteria_rows("AA", (TEXT_RATIO, ADVICE), {"TC200": 5}, {"TC200": 1}, 0)
    row = status(rows, "1.4.3")
    assert (row.status, row.rules, row.findings) == (audit.PASS, ["TC100"], 0)
    assert audit.other_rules("AA", (TEXT_RATIO, ADVICE)) == [ADVICE]


def test_verdicts():
    rows = audit.criteria_rows("AA", (TEXT_RATIO,), {"TC100": 3}, {"TC100": 2}, 0)
    assert status(rows, "1.4.3").status == audit.FAIL
    assert status(rows, "1.4.6").status == audit.NOT_CHECKED  # AAA, at level AA
    assert "Level AAA" in status(rows, "1.4.6").note
    assert status(rows, "1.4.11").status == audit.NOT_CHECKED
    rows = audit.criteria_rows("AAA", (TEXT_RATIO,), {}, {}, 4)
    assert status(rows, "1.4.6").status == audit.REVIEW
    assert status(rows, "1.4.3").status == audit.NOT_CHECKED  # the AAA run applies 1.4.6
    for row in rows:  # every verdict says what a person must still judge
        assert "A person must" in row.note
