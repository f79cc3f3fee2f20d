"""Plain words: colour names and the one-sentence summary of a problem.

Hue anchors: the sRGB primaries and secondaries (CSS Color 4 named colours red, orange, yellow,
lime, cyan, blue, magenta); names of greys by lightness are common practice.
"""
import pytest

from tinctura.engine import Options
from tinctura.model import Fix
from tinctura.problems import group
from tinctura.report import plain
from tinctura.rules import run
from tinctura.rules.examples import make_sample
from tinctura.writer import Location


def rgb(hex_):
    return tuple(int(hex_[i:i + 2], 16) / 255 for i in (1, 3, 5))


@pytest.mark.parametrize("hex_, name", [
    ("#ff0000", "red"), ("#ffa500", "orange"), ("#00ff00", "light green"),
    ("#0000ff", "blue"), ("#2a4d7a", "dark blue"), ("#ffffff", "white"), ("#000000", "black"),
    ("#777777", "grey"), ("#d0d0d0", "light grey"), ("#333333", "dark grey"),
    ("#8b4513", "brown"),
])
def test_colour_names(hex_, name):
    assert plain.colour_name(rgb(hex_)) == name


def test_sentence_names_the_place_the_state_and_the_schemes():
    samples = [make_sample("#777777", "#ffffff", state="hover", scheme=scheme)
               for scheme in ("day", "night")]
    (problem,) = group(run(samples, Options()))
    where = Location("div.admonition.warning > p", None,
                     (("p", (), ""), ("div", ("admonition", "warning"), "")))
    assert plain.sentence(problem, where, True) == (
        "Grey text on white in warning boxes is too faint when hovered: 4.47:1, needs 4.5:1, "
        "in 2 schemes (day 4.47:1, night 4.47:1).")


@pytest.mark.parametrize("link, said", [
    # #9ecbf0 in #222222 text: 9.28:1 between them (WCAG 2 formula, by hand: L 0.5627 and
    # 0.0160): only the hover cue is missing, so nothing is "too faint"
    ("#9ecbf0", "Light blue link text in dark grey text is told apart by colour alone: no cue "
                "but colour on hover."),
    # #555555 in #222222 text: 2.13:1 (L 0.0908 and 0.0160), below G183's 3:1 as well
    ("#555555", "Dark grey link text in dark grey text is told apart by colour alone: 2.13:1 "
                "against that text, needs 3:1; no cue but colour on hover."),
])
def test_a_link_told_apart_by_colour_alone_is_not_called_too_faint(link, said):
    from tinctura.model import LinkCues

    cues = LinkCues(rgb("#222222"), (), (), ("outline",))
    sample = make_sample(link, "#ffffff", link=cues)
    findings = [f for f in run([sample], Options()) if f.rule == "TC120"]
    (problem,) = group(findings)
    assert plain.sentence(problem) == said


@pytest.mark.parametrize("what, named", [
    ("control boundary", "control boundary"), ("icon glyph", "icon"),
    ("focus outline", "focus outline"), ("svg icon", "SVG icon"),
])
def test_a_non_text_problem_names_the_object_not_text(what, named):
    # TC110 judges graphical objects (WCAG 2.2 SC 1.4.11, 3:1); #d0d0d0 on white is 1.54:1
    # (WCAG 2 formula, by hand: L 0.6308 and 1.0). A control's boundary is no "control text".
    from tinctura.model import Finding
    from tinctura.report import messages

    sample = make_sample("#d0d0d0", "#ffffff", kind="boundary", text="input boundary")
    finding = Finding("TC110", "ui-ratio", "error", sample, 1.5425, 3.0,
                      args={"what": what, "sc": "1.4.11"},
                      fixes=[Fix("foreground", rgb("#949494"), 3.03)])
    (problem,) = group([finding])
    assert plain.sentence(problem) == \
        f"Light grey {named} on white is too faint: 1.54:1, needs 3:1."
    assert messages.fixes(finding) == f"{named} #949494 (3.03:1)"  # not "text #949494"


def test_an_area_is_named_only_where_every_example_is():
    # a site-wide link colour whose worst occurrence (first in page order) is in the footer
    # read "Blue link text on white in the footer"; the writer looked only there
    samples = [make_sample("#777777", "#ffffff", page=p) for p in ("404.html", "index.html")]
    (problem,) = group(run(samples, Options()))
    footer = Location("footer > p", None, (("p", (), ""), ("footer", (), "")))
    article = Location("article > p", None, (("p", (), ""), ("article", (), "")))
    assert plain.sentence(problem, footer) == \
        "Grey text on white in the footer is too faint: 4.47:1, needs 4.5:1."
    assert plain.sentence(problem, footer, others=[article]) == \
        "Grey text on white is too faint: 4.47:1, needs 4.5:1."
    assert plain.sentence(problem, footer, others=[footer]).endswith("in the footer is too "
                                                                      "faint: 4.47:1, needs 4.5:1.")


def test_line_numbered_code_is_code_not_a_table():
    # Pygments writes line-numbered code as <table class="highlighttable"> (common practice:
    # its HtmlFormatter's linenos="table")
    marks = (("span", ("filename",), ""), ("th", ("filename",), ""), ("tr", (), ""),
             ("table", ("highlighttable",), ""), ("div", ("highlight",), ""))
    assert plain.area(marks) == " in code"
    assert plain.area((("td", (), ""), ("tr", (), ""), ("table", (), ""))) == " in tables"
