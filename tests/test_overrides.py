"""Fixes as CSS overrides: which stylesheets are the writer's, how a rule is scoped to a colour
scheme, how the rules are written and merged; readable locators.

Selector and cascade facts used here (CSS Cascade 5, Selectors 4): an attribute selector adds
specificity (0,1,0), so a scoped override beats the rule it overrides at equal order; a custom
property declared on an element is inherited by its descendants.
"""
import pytest
from lxml import etree

from tinctura.locator import readable, selector
from tinctura.mkdocs_project import Project, owned
from tinctura.model import Cause, Declaration, Scheme
from tinctura.engine import Options
from tinctura.overrides import Planner, Rule, Scope, combined_css, inject, Override
from tinctura.problems import group
from tinctura.rules import run
from tinctura.rules.examples import make_sample

DAY = Scheme("default", (("prefers-color-scheme", "light"),),
             (("body", "data-md-color-scheme", "default"),), "palette")
NIGHT = Scheme("slate", (("prefers-color-scheme", "dark"),),
               (("body", "data-md-color-scheme", "slate"),), "palette")
LIGHT = Scheme("light", (("prefers-color-scheme", "light"),), (), "media")
DARK = Scheme("dark", (("prefers-color-scheme", "dark"),), (), "media")


@pytest.mark.parametrize("sheet, mine", [
    ("stylesheets/extra.css", True),
    ("assets/stylesheets/main.57a0d79d.min.css", False),  # hashed and minified: the theme's
    ("css/site.3f9a2c1b.css", False),
    ("vendor/grid.min.css", False),
    ("assets/stylesheets/custom.css", False),  # mkdocs-material's asset folder
    ("docs.html <style> #1", False),
    ("style attribute", False),
])
def test_which_stylesheets_the_writer_owns_without_a_project(sheet, mine):
    assert owned(sheet) is mine


def test_with_a_project_extra_css_and_docs_files_are_the_writers():
    project = Project(extra_css=["stylesheets/extra.css"], static={"css/local.css"})
    assert owned("stylesheets/extra.css", project) and owned("css/local.css", project)
    assert not owned("assets/stylesheets/palette.fb2fffe2.min.css", project)


@pytest.mark.parametrize("scheme, declared, expected", [
    # the scheme's attribute inside :where(): the override keeps the specificity of the rule
    # it replaces (Selectors Level 4: :where() adds none)
    (NIGHT, ".tw-note", ':where([data-md-color-scheme="slate"]) .tw-note'),
    (NIGHT, "[data-md-color-scheme=slate]", "[data-md-color-scheme=slate]"),  # the theme's own
    (NIGHT, ":root", '[data-md-color-scheme="slate"]'),  # above <body>: on <body> instead
    (NIGHT, "body", 'body:where([data-md-color-scheme="slate"])'),
    (NIGHT, "body > .x", 'body:where([data-md-color-scheme="slate"]) > .x'),
    (DARK, ".tw-note", ".tw-note"),  # media-only schemes are scoped by @media
    # a palette attribute may sit on the holder itself (material: all three on <body>)
    (NIGHT, "[data-md-color-accent=indigo]", ':where([data-md-color-scheme="slate"])'
     '[data-md-color-accent=indigo], :where([data-md-color-scheme="slate"]) '
     '[data-md-color-accent=indigo]'),
    (NIGHT, "[data-md-color-primary=teal] .md-tabs", ':where([data-md-color-scheme="slate"])'
     '[data-md-color-primary=teal] .md-tabs, :where([data-md-color-scheme="slate"]) '
     '[data-md-color-primary=teal] .md-tabs'),
])
def test_scoped_selectors(scheme, declared, expected):
    other = DAY if scheme is NIGHT else LIGHT
    planner = Planner([other, scheme])
    assert planner.scoped(planner.scope(scheme.name), declared) == expected


def test_a_media_scheme_gives_a_media_block():
    planner = Planner([LIGHT, DARK])
    scope = planner.scope("dark")
    assert scope == Scope(media="(prefers-color-scheme: dark)")
    rule = Rule(".tw-note", (("color", "#828897", False),), scope.media)
    assert rule.css() == ("@media (prefers-color-scheme: dark) {\n  .tw-note {\n"
                          "    color: #828897;\n  }\n}\n")


def test_one_site_scheme_needs_no_scope():
    assert Planner([DAY]).scope("default") == Scope()


def decl(prop, value, line, selector, sheet="assets/stylesheets/main.1a2b3c4d.min.css"):
    return Declaration(prop, value, sheet, line, selector, "author")


def test_theme_variable_is_overridden_in_the_last_own_stylesheet_for_the_failing_scheme():
    # the theme's body text variable, used on a light page in one scheme and a dark page in
    # the other: the fix sets the variable for the failing scheme only, in the site's sheet
    ink = Cause(decl("color", "var(--ink)", 1, ".md-typeset"),
                chain=(decl("--ink", "#8a8a8a", 2, ":root"),))
    paper = Cause(decl("background-color", "#ffffff", 3, "body"))
    night = Cause(decl("background-color", "#111111", 4, "body"))
    samples = [make_sample("#8a8a8a", "#ffffff", fg_cause=ink, bg_cause=paper, scheme="default"),
               make_sample("#8a8a8a", "#111111", fg_cause=ink, bg_cause=night, scheme="slate")]
    (problem,) = group(run(samples, Options(rules=("TC100",))), samples)
    planner = Planner([DAY, NIGHT], None, ["assets/stylesheets/main.1a2b3c4d.min.css",
                                           "stylesheets/extra.css", "stylesheets/site.css"])
    override = planner.plan(problem)
    assert override.file == "stylesheets/site.css"  # the last of the site's own sheets
    assert override.schemes == ("default",)
    # #8a8a8a on #111111 passes (6.0:1) and stays; on white it becomes #767676 (4.54:1 by the
    # WCAG 2.2 formula)
    assert override.css() == '[data-md-color-scheme="default"] {\n  --ink: #767676;\n}\n'


def test_combined_css_sets_a_property_once_per_selector():
    a = Override("x.css", [Rule(".a", (("color", "#111111", False),))])
    b = Override("x.css", [Rule(".a", (("color", "#222222", False), ("--k", "#333333", False)))])
    css = combined_css([a, None, b])
    assert css.count("color:") == 1 and "#111111" in css and "--k: #333333" in css


def test_injected_style_is_the_last_stylesheet():
    html = "<html><head><link rel=stylesheet href=a.css></head><body><p>x</p></body></html>"
    out = inject(html, ".a { color: red; }")
    assert out.index("<style") > out.index("<p>") and out.endswith("</body></html>")


def test_readable_locator_and_selector():
    root = etree.fromstring(
        '<html><body><div class="admonition warning"><p>Keep <em>clear</em></p></div>'
        '<main><section><div><p>deep</p></div></section></main></body></html>')
    em = root.find(".//em")
    assert readable(em) == "div.admonition.warning > p > em"
    assert selector(em) == "div.admonition.warning > p > em"
    deep = root.find(".//main//p")
    assert readable(deep) == "body > \u2026 > section > div > p"
    assert selector(deep) == "body > main > section > div > p"
    two = etree.fromstring('<html><body><div class="tw-panel"><p>a</p><p>b <span>c</span></p>'
                           '</div></body></html>')
    assert selector(two.find(".//span")) == "div.tw-panel > p:nth-of-type(2) > span"


def test_an_element_by_its_style_attribute_as_written():
    from tinctura.locator import by_style

    root = etree.fromstring('<html><body><p><span style="color: #b4c8d8">a</span>'
                            '<b style=\'font-family: "Sluice Sans"\'>b</b><i>c</i></p></body></html>')
    assert by_style(root.find(".//span")) == 'span[style="color: #b4c8d8" i]'
    assert by_style(root.find(".//b")) is None  # a quote: not written as is (by place instead)
    assert by_style(root.find(".//i")) is None  # no style attribute


def test_one_rule_fixing_several_problems_says_so():
    from tinctura.overrides import plan_all

    class Fixed:  # a planner returning prepared overrides
        def __init__(self, overrides):
            self.overrides = iter(overrides)

        def plan(self, problem, element_selector=None, opacity_of=None, narrow=False):
            return next(self.overrides)

    same = Rule('[data-md-color-primary="light-blue"]', (("--md-primary-fg-color", "#007db8", False),))
    other = Rule(".a", (("color", "#111111", False),))
    planned = plan_all([1, 2, 3], Fixed([Override("x.css", [same]), Override("x.css", [other]),
                                          Override("x.css", [same, other])]))
    assert [o.shared_with for o in planned] == [(3,), (3,), (1, 2)]


def test_text_faded_by_an_ancestors_opacity_gets_no_colour_override():
    from dataclasses import replace

    from tinctura.overrides import faded

    translucent = run([make_sample("rgba(0, 0, 0, 0.4)", "#ffffff")], Options())[0]
    assert not faded(translucent)  # its colour over white is exactly what is seen
    # #000000de text in a parent at opacity 0.45 over white: seen as #9b9b9b (CSS Color 4
    # compositing, by hand: 255 * (1 - 0.45 * 0.8706) = 155)
    sample = replace(make_sample("#9b9b9b", "#ffffff"), fg_raw=(0.0, 0.0, 0.0, 0.8706))
    (finding,) = run([sample], Options())
    assert faded(finding)
    (problem,) = group([finding], [sample])
    assert Planner([DAY]).plan(problem) is None


def test_equal_causes_from_another_run_give_the_same_override():
    # target_declaration is cached by value: a second run's equal (not identical) cause must
    # not make the variable look like an alias of itself
    def plan():
        ink = Cause(decl("color", "var(--ink)", 1, ".note", "stylesheets/site.css"),
                    chain=(decl("--ink", "#a0a0a0", 2, ":root", "stylesheets/site.css"),))
        samples = [make_sample("#a0a0a0", "#ffffff", fg_cause=ink, scheme="default")]
        (problem,) = group(run(samples, Options(rules=("TC100",))), samples)
        return Planner([DAY, NIGHT]).plan(problem).css()

    first = plan()
    assert plan() == first and first.count("--ink:") == 1


def test_how_to_add_the_written_file(tmp_path):
    from tinctura.writer import how_to_add

    docs = tmp_path / "docs"
    project = Project(config_file=str(tmp_path / "mkdocs.yml"), docs_dir=str(docs),
                      extra_css=["stylesheets/extra.css"])
    fresh = how_to_add(str(docs / "stylesheets" / "colour-fixes.css"), project)
    assert fresh.endswith("extra_css:\n    - stylesheets/colour-fixes.css")
    assert "docs/stylesheets/colour-fixes.css" in fresh
    project.extra_css.append("stylesheets/colour-fixes.css")
    again = how_to_add(str(docs / "stylesheets" / "colour-fixes.css"), project)
    assert again.startswith("docs/stylesheets/colour-fixes.css is listed in extra_css already")


def test_least_opacity_over_an_overrides_new_colours():
    from dataclasses import replace

    from tinctura.overrides import _least_opacity

    # white text in an element at opacity 0.7 over #009485 (seen #b3dfda). Even unfaded,
    # white on #009485 is 3.77:1 (WCAG 2 formula, by hand), so no opacity reaches 4.5:1.
    sample = replace(make_sample("#b3dfda", "#009485"), fg_raw=(1.0, 1.0, 1.0, 1.0))
    (finding,) = run([sample], Options(rules=("TC100",)))
    assert _least_opacity(finding, 0.7, 1.0, 4.5) is None
    # over a new black background the faded white (#b3b3b3) is 9.96:1 already (by hand:
    # L = 0.451): nothing to raise
    assert _least_opacity(finding, 0.7, 1.0, 4.5, bg=(0.0, 0.0, 0.0)) == 0.0
    # over a new #008578 (white on it 4.54:1, by hand) at 0.95 it is 4.25:1: only 1 passes
    bg = tuple(int("008578"[i:i + 2], 16) / 255 for i in (0, 2, 4))
    assert _least_opacity(finding, 0.7, 1.0, 4.5, bg=bg) == 1.0


class _Met:
    """A problem with an override, met on ``pages``, its examples on ``examples``."""

    def __init__(self, pages, examples=None, override=True):
        self.met_on = set(pages)
        self.override = object() if override else None
        self._examples = [type("F", (), {"sample": type("S", (), {"page": p})})()
                          for p in (examples or sorted(pages))]

    def example_pool(self):
        return self._examples


def test_verification_pages_cover_every_problem_with_few_pages():
    from tinctura.writer import verification_pages

    everywhere = [f"p{i}.html" for i in range(10)]
    problems = [_Met(everywhere),  # a navigation accent: on every page
                _Met(["p3.html", "p7.html"]),  # code tokens on two pages
                _Met(["p7.html", "p8.html"]),  # a table on two
                _Met(["p1.html"], override=False),  # no fix planned: no page needed
                _Met(["p5.html"])]
    # p7 meets three of the four problems; p5 alone meets the last one
    assert verification_pages(problems) == ["p7.html", "p5.html"]


def test_verification_pages_prefer_example_pages_on_a_tie():
    from tinctura.writer import verification_pages

    problems = [_Met(["a.html", "b.html", "c.html"], examples=["c.html"]),
                _Met(["a.html", "b.html", "c.html"])]
    assert verification_pages(problems) == ["c.html"]


def test_verification_pages_without_page_sets_use_the_example_pages():
    from tinctura.writer import VERIFY_LIMIT, verification_pages

    bare = _Met([], examples=["q.html", "r.html"])
    bare.met_on = None  # problems grouped without a Collector
    assert verification_pages([bare]) == ["q.html"]
    many = [_Met([f"only{i}.html"]) for i in range(VERIFY_LIMIT + 5)]
    assert len(verification_pages(many)) == VERIFY_LIMIT


def test_a_collectors_problems_know_every_page_they_were_met_on():
    from tinctura.problems import Collector

    found = run([make_sample("#999999", "#ffffff", page=f"p{i}.html") for i in range(7)],
                Options())
    collector = Collector()
    for f in found:
        collector.add(f)
    (problem,) = [p for p in collector.problems(uses={}) if p.rule == "TC100"]
    assert problem.met_on == {f"p{i}.html" for i in range(7)} and problem.pages == 7


def test_a_fix_with_the_same_value_in_every_scheme_is_one_rule(tmp_path):
    # white on #2fa4e7 in both schemes of a media-query site: no white text passes, so the
    # background changes, to the same value in both; written once, outside any @media block
    import io
    import json
    import re

    from tinctura.cli import main
    from wcag_reference import ratio

    (tmp_path / "site.css").write_text(
        "body { color: #222; background: #fff; }\n"
        "@media (prefers-color-scheme: dark) { body { color: #eee; background: #111; } }\n"
        ".badge { color: #ffffff; background-color: #2fa4e7; }\n", encoding="utf-8")
    (tmp_path / "index.html").write_text(
        '<!doctype html><html lang="en"><head><title>t</title><link rel="stylesheet" '
        'href="site.css"></head><body><p>Tide <span class="badge">Slack water</span> now.</p>'
        "</body></html>", encoding="utf-8")
    out = io.StringIO()
    main(["check", str(tmp_path), "--select", "TC100", "--no-states", "--jobs", "1",
          "--fail-on", "never", "--format", "json"], stdout=out, stderr=io.StringIO())
    (problem,) = json.loads(out.getvalue())["problems"]
    assert problem["schemes"] and len(problem["schemes"]) == 2  # the premise
    css, verified = problem["fix"]["css"], problem["fix"]["verified"]
    value = re.fullmatch(r"\.badge \{\n  background-color: (#[0-9a-f]{6});\n\}\n", css)
    assert value and verified, css
    assert ratio("#ffffff", value.group(1)) >= 4.5  # WCAG 2.2 formula (tests/wcag_reference.py)
