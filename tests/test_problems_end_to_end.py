"""Grouping on a generated site: one variable causes findings on many pages.

The site is written here: 30 pages whose notes use `color: var(--note-ink)` on white and on a
light grey callout. Expected: one problem per background cause, with the exact count, and the
value suggested at the cause passes everywhere once written back into the stylesheet (checked
by re-running the whole check, not by trusting the suggestion's own ratio).
"""
import re

from tinctura import problems
from tinctura.colour.convert import to_hex
from tinctura.engine import Options, check_paths

PAGES = 30
CSS = """:root { --note-ink: #9a9a9a; --callout-bg: #eeeeee; }
.note { color: var(--note-ink); }
.callout { background: var(--callout-bg); }
"""
PAGE = """<!doctype html><html><head><link rel="stylesheet" href="../site.css"></head><body>
<h1>Page {n}</h1><p>Body text is fine.</p>
<p class="note">Note one on page {n}.</p><p class="note">Note two on page {n}.</p>
<div class="callout"><p class="note">A note in a callout.</p></div>
</body></html>"""


def _site(tmp_path, css):
    (tmp_path / "site.css").write_text(css)
    for n in range(PAGES):
        folder = tmp_path / f"page{n:02d}"
        folder.mkdir(exist_ok=True)
        (folder / "index.html").write_text(PAGE.format(n=n))
    return tmp_path


def _problems(site):
    report = check_paths([str(site)], Options(jobs=1, keep_samples=False, rules=("TC100",)))
    return report, problems.group(report.findings, uses=report.uses)


def test_one_variable_many_pages_is_one_problem_per_background(tmp_path):
    site = _site(tmp_path, CSS)
    report, found = _problems(site)
    # #9a9a9a on #ffffff = 2.79:1 and on #eeeeee = 2.40:1 (WCAG 2.2 formula): both fail 4.5:1
    assert len(found) == 2
    by_bg = {to_hex(p.worst.sample.bg): p for p in found}
    assert by_bg["#ffffff"].occurrences == 2 * PAGES and by_bg["#ffffff"].pages == PAGES
    assert by_bg["#eeeeee"].occurrences == PAGES
    fix = by_bg["#ffffff"].fix_at_cause
    # ":root { " is eight characters: the declaration starts in column 9 (counting from 1)
    assert fix.declaration.property == "--note-ink" and fix.declaration.where() == "site.css:1:9"
    assert fix.possible
    # both problems point at the same declaration and suggest the same value
    assert by_bg["#eeeeee"].fix_at_cause.colour == fix.colour

    # apply the suggestion at the cause and check the whole site again
    fixed_css = re.sub(r"--note-ink: #9a9a9a", f"--note-ink: {to_hex(fix.colour)}", CSS)
    assert fixed_css != CSS
    report, found = _problems(_site(tmp_path, fixed_css))
    assert report.findings == [] and found == []
