"""The compact JSON layout (format 3): one occurrence per place, naming its situations; XPaths
written as what they share with the previous one plus the rest. Put back together
(``json_report.expand``), it must give format 1's findings exactly, in report order."""
import io
import json

import jsonschema
from hypothesis import given, settings
from hypothesis import strategies as st

from tinctura.engine import Options
from tinctura.model import Cause, Declaration, PageResult
from tinctura.problems import group
from tinctura.report import Header, render
from tinctura.report import messages as m
from tinctura.report.base import findings_by_page
from tinctura.report.json_report import (expand, inherited_xpath, page_occurrences, places,
                                         read_page, schema)
from tinctura.rules import run
from tinctura.rules.examples import make_sample

VALIDATOR = jsonschema.Draft202012Validator


def decl(prop, value, line):
    return Declaration(prop, value, "assets/site.css", line, ".x", "author")


NAV = "/html/body/div[3]/main/div/div[1]/div/div/nav/ul/li[{}]/a"


def samples():
    """Navigation links failing at rest and on hover in two schemes (one place, several
    situations), a colour inherited from an ancestor and one from a non-ancestor, and XPaths
    sharing a non-ASCII step."""
    text_colour = Cause(decl("color", "var(--muted)", 4), chain=(decl("--muted", "#777", 1),))
    inherited = Cause(text_colour.declaration, "/html/body/div[3]/main", text_colour.chain)
    elsewhere = Cause(text_colour.declaration, "/html/body/aside", text_colour.chain)
    white = Cause(decl("background-color", "white", 2))
    out = []
    for n in (1, 2, 3, 10, 11):
        for scheme in ("dark", "light"):
            for state, fg in (("hover", "#999"), ("rest", "#777")):
                out.append(make_sample(fg, "white", page="a.html", scheme=scheme, state=state,
                                       xpath=NAV.format(n), line=200 + n, text=f"Link  {n}",
                                       fg_cause=inherited if n < 10 else elsewhere,
                                       bg_cause=white))
    for n, step in enumerate(("p[@lang='\u00e9t\u00e9']", "p[@lang='\u00e9t\u00e9s']")):
        out.append(make_sample("#777", "white", page="b.html", xpath=f"/html/body/{step}",
                               line=5 + n, text="\u00c9t\u00e9", fg_cause=text_colour,
                               bg_cause=white))
    out.append(make_sample("#777", "white", page="b.html", xpath="/html/body/p[9]::before",
                           line=9, text="Note", fg_cause=inherited, bg_cause=white))
    return out


def findings_of(samples_, marks=False):
    """The rules' findings in report order; with ``marks``, the gate's marks set on each (some
    suppressed, some already in the baseline: held findings)."""
    findings = [f for items in findings_by_page(run(samples_, Options())).values()
                for f in items]
    if marks:
        for n, f in enumerate(findings):
            f.fingerprint = f"{n:024x}"
            f.suppressed = "the printed panel" if n % 7 == 3 else ""
            f.baseline = "unchanged" if n % 5 == 1 else "new"
    return findings


def report(findings, layout):
    active = [f for f in findings if not getattr(f, "suppressed", "")
              and getattr(f, "baseline", "") != "unchanged"]
    pages = [PageResult(n) for n in sorted({f.sample.page for f in findings})]
    out = io.StringIO()
    render(out, "json", Header(version="1.2.3", level="AA", schemes=["light", "dark"],
                               findings_layout=layout), pages, findings, group(active), [])
    return json.loads(out.getvalue())


def test_places_sharing_a_text_are_one_occurrence():
    findings = findings_of(samples())
    doc = report(findings, "compact")
    VALIDATOR(schema()).validate(doc)
    first = doc["pages"][0]["occurrences"][0]
    # one link, failing on hover and at rest in both schemes, for several rules: one place
    assert len(first[0]) == len([f for f in findings if f.sample.xpath == NAV.format(1)]) >= 4
    second = doc["pages"][0]["occurrences"][1]
    assert (second[1], second[2]) == (len(NAV.format(1)) - 4, "2]/a")  # "li[" shared
    # div, div[1], div, div, nav, ul, li[n], a: eight levels below main
    assert [occ[5] for occ in doc["pages"][0]["occurrences"]] == [8, 8, 8, "/html/body/aside",
                                                                 "/html/body/aside"]
    # the non-ASCII step is not shared, though both XPaths start with it
    assert doc["pages"][1]["occurrences"][1][1] == len("/html/body/p[@lang='")
    assert all(len(occ) == 5 for occ in doc["pages"][1]["occurrences"][:2])  # nothing inherited


def test_expand_gives_format_1_in_report_order():
    findings = findings_of(samples())
    assert expand(report(findings, "compact")) == report(findings, "flat")["findings"]


def test_expand_gives_format_1_with_the_gate_marks():
    findings = findings_of(samples(), marks=True)
    compact, flat = report(findings, "compact"), report(findings, "flat")
    VALIDATOR(schema()).validate(compact)
    VALIDATOR(schema()).validate(flat)
    assert expand(compact) == flat["findings"]
    assert {f["suppressed"] for f in flat["findings"]} == {None, "the printed panel"}
    for occ in compact["pages"][0]["occurrences"]:
        assert len(occ) == 7 and len(occ[6]) == len(occ[0])
        assert all(len(marks) == 3 for marks in occ[6])


def test_places_name_each_findings_situation():
    findings = findings_of(samples())
    doc = report(findings, "compact")
    assert [(page, doc["situations"][sid]["rule"], doc["situations"][sid]["state"])
            for page, sid, _, _ in places(doc)] == \
        [(f.sample.page, f.rule, f.sample.state) for f in findings]


def test_format_2_reports_are_still_read():
    """A compact report of the earlier layout: one record per finding, whole XPaths."""
    entry = {"page": "a.html", "occurrences": [
        [0, "/html/body/p[1]", 3, "Sow", 1, {"fingerprint": "f", "suppressed": None,
                                             "baseline": "new"}],
        [1, "/html/body/p[2]", 4, "Reap"]]}
    assert read_page(entry, 2) == [
        [[0], "/html/body/p[1]", 3, "Sow", 1,
         [{"fingerprint": "f", "suppressed": None, "baseline": "new"}]],
        [[1], "/html/body/p[2]", 4, "Reap", None, None]]


# Records as the run's store gives them: (situation, xpath, line, text, inherited_from,
# layer xpaths, marks); repeated places, steps with non-ASCII characters, pseudo-elements.
STEPS = st.sampled_from(["div[1]", "div[2]", "nav", "ul", "li[3]", "li[13]", "a", "\u00e9",
                         "p[@x='\u00e9\u00e8']"])
XPATHS = st.builds(lambda steps, suffix: "/html/body/" + "/".join(steps) + suffix,
                   st.lists(STEPS, min_size=1, max_size=6),
                   st.sampled_from(["", "", "::before", "::placeholder"]))
MARKS = st.one_of(st.none(), st.tuples(st.text("0123456789abcdef", min_size=1, max_size=8),
                                       st.sampled_from(["", "a reason"]),
                                       st.sampled_from(["", "new", "unchanged"])))


@st.composite
def records(draw):
    out = []
    for _ in range(draw(st.integers(0, 12))):
        xpath = draw(XPATHS)
        steps = xpath.split("::")[0].split("/")
        inherited = draw(st.one_of(st.just(None), st.just("/html/elsewhere"),
                                   st.integers(2, len(steps) - 1).map(
                                       lambda k: "/".join(steps[:k]))))
        place = (xpath, draw(st.integers(0, 9)), draw(st.sampled_from(["Home", " a\n b ", ""])),
                 inherited)
        for sid in draw(st.lists(st.integers(0, 5), min_size=1, max_size=4)):
            out.append((sid,) + place + (None, draw(MARKS)))
    return out


@settings(max_examples=200, deadline=None)
@given(records())
def test_occurrences_give_back_every_record(recs):
    entry = json.loads(json.dumps({"page": "p.html", "occurrences": page_occurrences(recs)},
                                  ensure_ascii=False))
    back = [(sid, occ[1], occ[2], occ[3], inherited_xpath(occ), mark)
            for occ in read_page(entry) for sid, mark in zip(occ[0], occ[5] or [None] * len(occ[0]))]
    assert back == [(sid, xpath, line, m.excerpt(text, 200), inherited or None,
                     marks and {"fingerprint": marks[0], "suppressed": marks[1] or None,
                                "baseline": marks[2] or None})
                    for sid, xpath, line, text, inherited, _, marks in recs]
    for occ, full in zip(entry["occurrences"], read_page(entry)):
        assert full[1][:occ[1]].isascii()  # every reader counts the shared part alike


def test_encoded_occurrences_match_the_records_written_directly():
    """A page's occurrences written where the page is judged (with its own template numbers)
    and renumbered by the main process read as json.dumps writes the renumbered records."""
    import json as json_mod

    from tinctura.report.json_report import encoded_occurrences, renumbered

    base = "/html/body/nav/ul/li[1]/a"
    records = [(0, base, 12, "Home", "/html/body/nav", None, None),
               (1, base, 12, "Home", "/html/body/nav", None, None),
               (0, "/html/body/nav/ul/li[2]/a", 13, "Tide \u00e9t\u00e9 \"tables\"", None,
                None, None),
               (2, "/html/body/main/p[1]", 20, "x]," + "[[1]", "/html/body/main/p[1]", None,
                None)]
    mapping = (7, 3, 11)
    renumbered_records = [(mapping[r[0]],) + r[1:] for r in records]
    expected = json_mod.dumps({"page": "p.html",
                               "occurrences": page_occurrences(renumbered_records)},
                              ensure_ascii=False, separators=(",", ":"))
    text = renumbered(encoded_occurrences(records), mapping)
    assert '{"page":"p.html","occurrences":' + text + "}" == expected
    same = json_mod.dumps(page_occurrences(records), ensure_ascii=False, separators=(",", ":"))
    assert renumbered(encoded_occurrences(records), None) == same


def test_encoded_occurrences_give_way_to_a_text_holding_a_nul():
    from tinctura.report.json_report import encoded_occurrences

    assert encoded_occurrences([(0, "/html/body/p", 3, "a", "/html/body", None, None)])
    assert encoded_occurrences([(0, "/html/body/p\0", 3, "a", None, None, None)]) is None
