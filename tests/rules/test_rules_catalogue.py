"""Completeness of the rule set: every rule documented, with examples, a check and a schema entry."""
import re

import pytest

from tinctura import rules
from tinctura.report.json_report import schema
from tinctura.rules import CHECKS, RULES


def test_codes_and_slugs_are_unique_and_well_formed():
    codes = [r.code for r in RULES]
    slugs = [r.slug for r in RULES]
    assert len(set(codes)) == len(codes)
    assert len(set(slugs)) == len(slugs)
    for rule in RULES:
        assert re.fullmatch(r"TC\d{3}", rule.code)
        assert re.fullmatch(r"[a-z]+(-[a-z]+)*", rule.slug)


@pytest.mark.parametrize("rule", RULES, ids=lambda r: r.code)
def test_every_rule_is_documented(rule):
    docs = rule.docs
    for text in (rule.title, docs.checks, docs.why, docs.fix, rule.message):
        assert text.strip()
    assert docs.references, "cite the standard the rule follows"
    for title, url in docs.references:
        assert title and url.startswith("https://")
    assert rule.severity in ("error", "warning", "info")
    assert rule.criteria and all(re.fullmatch(r"\d\.\d+\.\d+", c.number) for c in rule.criteria)


@pytest.mark.parametrize("rule", RULES, ids=lambda r: r.code)
def test_every_rule_has_a_check_and_both_examples(rule):
    assert callable(CHECKS[rule.code])
    assert rule.docs.bad.html.strip() and rule.docs.good.html.strip()
    assert rule.docs.bad.html != rule.docs.good.html


def test_no_check_without_metadata():
    assert set(CHECKS) == {r.code for r in RULES}


def test_schema_enums_list_exactly_the_rules():
    defs = schema()["$defs"]
    assert defs["rule"]["enum"] == [r.code for r in RULES]
    assert defs["slug"]["enum"] == [r.slug for r in RULES]


def test_lookup_by_code_or_slug():
    assert rules.get("TC100") is rules.get("tc100") is rules.get("text-ratio")
    with pytest.raises(KeyError):
        rules.get("nope")


def test_criteria_follow_the_level():
    # WCAG 2.2: SC 1.4.3 Contrast (Minimum) is level AA, SC 1.4.6 Contrast (Enhanced) is AAA.
    rule = rules.get("TC100")
    assert (rule.criterion("AA").number, rule.criterion("AA").name) == ("1.4.3", "Contrast (Minimum)")
    assert (rule.criterion("AAA").number, rule.criterion("AAA").name) == ("1.4.6", "Contrast (Enhanced)")
