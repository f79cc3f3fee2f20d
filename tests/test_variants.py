"""Sharing gives what computing everything afresh gives, on the benchmark's site shapes.

The generator in ``benchmarks/generate_site.py`` writes mkdocs-material sites of several shapes
(page kinds, expanded navigation sections, structural and ``:has()`` selectors in the site's
CSS, an accent that fails on :hover and :focus, faint colours all over the article), one on
MkDocs' own theme (Bootstrap, light and dark by ``data-bs-theme``) and one on its readthedocs
theme (the current section's pages in a dark side navigation), and one with more Markdown
extensions, ``:has()`` selectors that read the following siblings or name no tag, class or id,
and sibling relations (``:is(h1, h2) + :is(p, ul)``, ``:not(li + li)``). Each is
built with MkDocs and checked twice: as ``tinctura check`` runs (styles shared by structural
key, repeated subtrees replayed, each colour situation judged once) and with all of that off
(``Options(share=False, replay=False)``: every element's cascade computed, every sample judged).
Findings, problems, counts and declaration uses must be the same.
"""
import io
import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

from tinctura import cli
from tinctura.engine import Options, check_paths
from tinctura.problems import cause_key, group
from tinctura.report.json_report import expand

sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "benchmarks"))
import generate_site  # noqa: E402

pytestmark = pytest.mark.slow
PAGES = 14


@pytest.fixture(scope="module", params=["varied", "states", "many", "mkdocs-theme",
                                        "readthedocs-theme", "extensions"])
def variant_site(request, tmp_path_factory):
    out = tmp_path_factory.mktemp(request.param)
    before = generate_site.SECTION_SIZE
    generate_site.SECTION_SIZE = 4  # several sections: the active one moves between pages
    try:
        generate_site.generate(PAGES, out, variant=request.param)
    finally:
        generate_site.SECTION_SIZE = before
    env = dict(os.environ, NO_MKDOCS_2_WARNING="1")
    subprocess.run([sys.executable, "-m", "mkdocs", "build", "-q", "-f", "mkdocs-plain.yml",
                    "-d", "site"], cwd=out, check=True, env=env, capture_output=True)
    return request.param, out / "site"


def findings_of(report):
    # (causes do not order: site-level findings of one palette pair tie on everything else)
    return sorted(((s.page, f.rule, s.scheme, s.state, s.xpath, s.line, s.text, s.fg, s.bg,
                    round(f.ratio, 9), s.fg_cause, s.bg_cause)
                   for f in report.findings for s in [f.sample]), key=repr)


def palette_of(report):
    return {key: (use.count, use.where) for key, use in report.palette.items()}


def problems_of(report):
    return [(p.rule, p.scheme, cause_key(p.fg_cause), cause_key(p.bg_cause), p.occurrences,
             p.pages, round(p.worst_ratio, 9),
             p.fix_at_cause and p.fix_at_cause.colour)  # (None: TC120 is fixed by a cue)
            for p in group(report.findings, uses=report.uses)]


def test_shared_check_equals_a_fresh_one(variant_site):
    name, site = variant_site
    shared = check_paths([str(site)], Options(keep_samples=False))
    fresh = check_paths([str(site)], Options(keep_samples=False, share=False, replay=False))
    assert findings_of(shared) == findings_of(fresh)
    assert problems_of(shared) == problems_of(fresh)
    assert [p.stats for p in shared.pages] == [p.stats for p in fresh.pages]
    assert shared.uses == fresh.uses
    # the site-level rules' uses: counted, and each with the site's first places (a page's
    # first in line and XPath order), whether a subtree was walked or replayed
    assert palette_of(shared) == palette_of(fresh)
    states = {f.sample.state for f in shared.findings}
    if name in ("states", "many", "extensions"):  # the accent fails on every navigation link
        assert {"hover", "focus"} <= states
        assert len(shared.findings) > 20 * PAGES


def test_compact_report_holds_the_same_findings(variant_site):
    _, site = variant_site
    docs = []
    for extra in ([], ["--flat-findings"]):
        out = io.StringIO()
        cli.main(["check", str(site), "--jobs", "1", "--format", "json", *extra], out,
                 io.StringIO())
        docs.append(json.loads(out.getvalue()))
    compact, flat = docs
    assert expand(compact) == flat["findings"]
    assert len(json.dumps(compact)) < len(json.dumps(flat))


def test_one_process_or_two_write_the_same_report(variant_site):
    """``--jobs 2`` checks the pages in two processes, each replaying what it has recorded
    itself: the JSON report is the same text as with one (the site-level rules' example
    places included)."""
    _, site = variant_site
    texts = []
    for jobs in ("1", "2"):
        out = io.StringIO()
        cli.main(["check", str(site), "--jobs", jobs, "--format", "json"], out, io.StringIO())
        texts.append(out.getvalue())
    assert texts[0] == texts[1]
