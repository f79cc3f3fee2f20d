"""Each rule's documented failing and passing examples, run by the test suite.

Without the engine: the colours each example declares, as samples. With the engine: the
example's HTML itself, so the documentation and the checked page cannot drift apart.
"""
import re

import pytest
from wcag_reference import ratio

from tinctura import engine
from tinctura.colour.convert import to_hex
from tinctura.rules import CHECKS, RULES, SITE_LEVEL, run
from tinctura.rules.examples import example_palette, example_sample, example_samples, rgba


def _run_example(rule, example):
    """Per-sample rules judge the example's one sample; site-level rules (TC300, TC310) take the
    palette contexts the example lists, with its entries declared as the palette."""
    if rule.code in SITE_LEVEL:
        options = engine.Options(rules=(rule.code,), palette=example_palette(example))
        return CHECKS[rule.code](example_samples(example), options)
    return run([example_sample(example)], engine.Options(rules=(rule.code,)))


@pytest.mark.parametrize("rule", RULES, ids=lambda r: r.code)
def test_bad_example_fails(rule):
    findings = _run_example(rule, rule.docs.bad)
    assert findings and {f.rule for f in findings} == {rule.code}


@pytest.mark.parametrize("rule", RULES, ids=lambda r: r.code)
def test_good_example_passes(rule):
    assert _run_example(rule, rule.docs.good) == []


def _engine_findings(tmp_path, html, code):
    page = tmp_path / "example.html"
    page.write_text(html, encoding="utf-8")
    report = engine.check_paths([str(page)], engine.Options(states=False, rules=(code,)))
    return report


needs_engine = pytest.mark.skipif(
    not hasattr(engine, "check_paths"), reason="tinctura.engine.check_paths not there yet"
)


@needs_engine
@pytest.mark.parametrize("which", ["bad", "good"])
@pytest.mark.parametrize("rule", RULES, ids=lambda r: r.code)
def test_example_html_renders_what_the_docs_say(tmp_path, rule, which):
    example = getattr(rule.docs, which)
    report = _engine_findings(tmp_path, example.html, rule.code)
    samples = [s for p in report.pages for s in p.samples
               if s.text.startswith(example.subject)]  # the judged text, where others surround it
    assert samples, "the example page has text"
    if rule.code in SITE_LEVEL:  # several contexts: each listed colour is on the page
        seen = {to_hex(c) for s in samples for c in (s.fg, s.bg, s.surround) if c}
        assert {to_hex(rgba(c[1])) for c in example.contexts} <= seen
        assert to_hex(rgba(example.fg)) in seen
    else:
        assert {s.exempt for s in samples} == {example.exempt}
        assert {to_hex(s.fg) for s in samples} == {to_hex(rgba(example.fg))}
        assert {to_hex(s.bg) for s in samples} == {to_hex(rgba(example.bg))}
    codes = {f.rule for f in report.findings}
    assert codes == ({rule.code} if which == "bad" else set())


def _ratio(a, b):
    """WCAG 2.2 contrast ratio (tests/wcag_reference.py), the reference for quoted ratios."""
    return ratio(a, b)


@pytest.mark.parametrize("which", ["bad", "good"])
@pytest.mark.parametrize("rule", RULES, ids=lambda r: r.code)
def test_ratios_quoted_in_example_notes_are_right(rule, which):
    example = getattr(rule.docs, which)
    quoted = re.findall(r"(\d+\.\d\d):1", example.note)
    fg, bg = to_hex(rgba(example.fg)), to_hex(rgba(example.bg))
    for value in quoted[:1]:  # the first ratio in a note is the example's own
        # shown truncated to 2 decimals, as the reports do
        assert int(_ratio(fg, bg) * 100) / 100 == float(value)
