"""Engine behaviour across pages: parallel runs, broken input, redirects, trace."""
import pytest

from tinctura.colour.convert import to_hex
from tinctura.engine import Options, check_paths
from tinctura.trace import trace

PAGE = ('<!doctype html><html><head><link rel="stylesheet" href="{up}site.css"></head><body>'
        '<nav><a href="{up}index.html">Home</a></nav><p class="faint">page {n}</p></body></html>')


@pytest.fixture
def site(tmp_path):
    (tmp_path / "site.css").write_text(
        ":root{--faint:#999} .faint{color:var(--faint)} a:hover{color:#bbb}")
    for n in range(12):
        folder = tmp_path / f"p{n}"
        folder.mkdir()
        (folder / "index.html").write_text(PAGE.format(up="../", n=n))
    (tmp_path / "index.html").write_text(PAGE.format(up="", n="home"))
    return tmp_path


def _flat(report):
    return [(p.page, s.scheme, s.state, s.xpath, to_hex(s.fg), to_hex(s.bg))
            for p in report.pages for s in p.samples]


def test_jobs_give_identical_results_in_the_same_order(site):
    one = check_paths([str(site)], Options(jobs=1))
    two = check_paths([str(site)], Options(jobs=2))
    assert _flat(one) == _flat(two)
    assert [(f.sample.page, f.ratio) for f in one.findings] == \
        [(f.sample.page, f.ratio) for f in two.findings]


def test_a_themes_note_is_on_every_page_and_reported_once_on_the_first(site):
    """What a theme's script changes that is not modelled is noted on each of its pages
    (which process checks which page first does not matter), and a site's check keeps it
    once, on the first page in order, with one process or two."""
    from tinctura.engine import Site

    bundle = '<script src="assets/javascripts/bundle.0.min.js"></script></head>'
    for page in sorted(site.rglob("*.html")):
        page.write_text(page.read_text().replace("</head>", bundle))
    lone = Site(str(site), Options(jobs=1))
    assert all(["mkdocs-material theme:" in d.message for d in lone.check_page(rel).diagnostics]
               == [True] for rel in ("p3/index.html", "index.html", "p3/index.html"))
    for jobs in (1, 2):
        report = check_paths([str(site)], Options(jobs=jobs))
        noted = [(p.page, d.message.split(":")[0]) for p in report.pages for d in p.diagnostics]
        assert noted == [("index.html", "mkdocs-material theme")]


def test_a_custom_property_past_its_bound_is_reported_once_with_one_process_or_two(site):
    """A value dropped for growing past the bound on var() expansion is said once per site:
    each process that computes the style says it, and the report keeps the first (two
    workers said it twice before)."""
    import json

    from tinctura import cli

    chain = "".join(f"--{chr(98 + i)}:" + " ".join([f"var(--{chr(97 + i)})"] * 4) + ";"
                    for i in range(9))
    (site / "site.css").write_text(":root{--a:1px;" + chain + "} p{margin:var(--j)}"
                                   " .faint{color:#999}")
    said = []
    for jobs in ("1", "2"):
        out = site.parent / f"bound{jobs}.json"
        cli.main(["check", str(site), "--no-config", "--fail-on", "never", "--jobs", jobs,
                  "--format", f"json:{out}"])
        said.append([(d["path"], d["line"], d["message"])
                     for d in json.loads(out.read_text())["diagnostics"]])
    assert said[0] == said[1] and len(said[0]) == 1
    assert said[0][0][0] == "site.css" and "expansion longer than" in said[0][0][2]


def test_a_prepared_site_has_the_rule_set_and_checks_the_page_as_a_fresh_one(site):
    # with --jobs N the main process only builds the first page's rule set before forking:
    # the workers' result for that page is a fresh Site's; an unreadable page is left to the
    # check that reports it
    from tinctura.engine import Site

    prepared, fresh = Site(str(site)), Site(str(site))
    prepared.prepare("index.html")
    assert len(prepared.loader._rulesets) == 1
    assert [(s.xpath, s.fg, s.bg) for s in prepared.check_page("index.html").samples] == \
        [(s.xpath, s.fg, s.bg) for s in fresh.check_page("index.html").samples]
    (site / "p3" / "index.html").write_bytes(b"\xff\xfe\x00")
    prepared.prepare("p3/index.html")
    prepared.prepare("missing.html")
    assert prepared.check_page("missing.html").diagnostics


def test_workers_leave_the_collector_as_they_found_it(site):
    # the main process freezes its heap before forking workers and thaws it after, but only
    # when nothing was frozen: a caller's frozen objects stay frozen (and the collector, off
    # while the workers' pages come in, is on again with its thresholds)
    import gc

    from tinctura import engine

    thresholds = gc.get_threshold()
    gc.unfreeze()
    check_paths([str(site)], Options(jobs=2))
    assert gc.get_freeze_count() == 0 and gc.get_threshold() == thresholds and gc.isenabled()
    gc.freeze()
    try:
        mine = gc.get_freeze_count()
        assert mine > 0
        check_paths([str(site)], Options(jobs=2))
        # (frozen objects freed meanwhile leave the count; a thaw would empty it)
        assert 0 < gc.get_freeze_count() <= mine and gc.get_threshold() == thresholds
        pool = engine.PagePool(str(site), Options(jobs=2), 1)
        pool.close()
        assert 0 < gc.get_freeze_count() <= mine
    finally:
        gc.unfreeze()


def test_broken_stylesheet_and_page_do_not_stop_the_site(site):
    (site / "p3" / "index.html").write_bytes(b"")
    (site / "site.css").write_text(":root{--faint:#999} .faint{color:var(--faint)} @media {{{ p{")
    report = check_paths([str(site)], Options(jobs=1))
    broken = [d for p in report.pages for d in p.diagnostics if "p3" in d.path]
    assert broken and "empty" in broken[0].message
    assert sum(1 for p in report.pages if p.samples) == 12


def test_redirect_pages_are_skipped(tmp_path):
    (tmp_path / "index.html").write_text(
        '<!doctype html><html><head><meta http-equiv="refresh" content="0; url=new/">'
        '</head><body><p style="color:#eee">moved</p></body></html>')
    report = check_paths([str(tmp_path)], Options())
    assert report.pages[0].samples == [] and report.pages[0].skipped == {"redirect page": 1}


def test_a_theme_template_copied_into_the_site_is_not_a_page(tmp_path):
    # a theme's Jinja macros, shipped among its static files (pydata-sphinx-theme's
    # _static/webpack-macros.html); a page about Jinja shows the same syntax in its text
    (tmp_path / "macros.html").write_text(
        "{% macro head() %}\n<link href=\"{{ pathto('_static/theme.css', 1) }}\" "
        "rel=\"stylesheet\">\n{% endmacro %}\n")
    (tmp_path / "jinja.html").write_text(
        "<!doctype html><html><head><title>Macros</title></head><body>"
        "<pre><code>{% macro head() %}&lt;link href=\"{{ url }}\"&gt;</code></pre></body></html>")
    report = check_paths([str(tmp_path)], Options(jobs=1))
    pages = {p.page: p for p in report.pages}
    assert pages["macros.html"].samples == [] and pages["macros.html"].diagnostics == []
    assert pages["macros.html"].skipped == {"unrendered template": 1}
    assert pages["jinja.html"].samples and "unrendered template" not in pages["jinja.html"].skipped


def test_trace_names_the_custom_property_chain(site):
    t = trace(str(site), "p1/index.html", "page 1")
    sample = t.schemes[0].samples[0]
    assert sample.fg_cause.declaration.value == "var(--faint)"
    assert [d.property for d in sample.fg_cause.chain] == ["--faint"]
    # ":root{" is six characters, so the declaration starts in column 7 (columns count from 1)
    assert sample.fg_cause.chain[0].where() == "site.css:1:7"


def test_schemes_setting_overrides_discovery(tmp_path):
    from tinctura.extract.schemes import from_setting

    (tmp_path / "index.html").write_text(
        '<!doctype html><html><head><style>body[data-mode=night]{background:#000;color:#333}'
        '</style></head><body><p>t</p></body></html>')
    schemes = from_setting([{"name": "day"}, {"name": "night", "media": {
        "prefers-color-scheme": "dark"}, "attributes": [
        {"selector": "body", "attribute": "data-mode", "value": "night"}]}])
    report = check_paths([str(tmp_path)], Options(schemes=schemes))
    got = {s.scheme: (to_hex(s.fg), to_hex(s.bg)) for s in report.pages[0].samples}
    # the literals in the stylesheet above, applied only where the attribute is set
    assert got == {"day": ("#000000", "#ffffff"), "night": ("#333333", "#000000")}


@pytest.mark.parametrize("bad, message", [
    ([], "non-empty"), ([{"media": {}}], "name is required"),
    ([{"name": "a"}, {"name": "a"}], "used twice"),
    ([{"name": "a", "attributes": [{"selector": "body"}]}], "selector, attribute and value"),
])
def test_schemes_setting_errors_name_the_problem(bad, message):
    from tinctura.extract.schemes import from_setting

    with pytest.raises(ValueError, match=message):
        from_setting(bad)


def test_deep_nesting_keeps_the_content_and_says_so(tmp_path):
    (tmp_path / "deep.html").write_text(
        "<html><body>" + "<div>" * 3000 + "<p>deep</p>" + "</div>" * 3000 + "</body></html>")
    report = check_paths([str(tmp_path / "deep.html")], Options())
    (page,) = report.pages
    assert any("nested more than 256 levels" in d.message for d in page.diagnostics)
    assert "deep" in {s.text for s in page.samples}


def test_page_pool_hands_answers_over_as_they_come_in_order(site):
    """The plugin takes workers' answers while it submits more (so it never holds the whole
    site's findings): each page once, in submission order, the rest at the end."""
    import time

    from tinctura.engine import PagePool, can_fork

    if not can_fork():
        pytest.skip("worker processes need fork")
    pool = PagePool(str(site), Options(keep_samples=False), 2)
    names = [f"p{n}/index.html" for n in range(4)]
    for rel in names:
        assert pool.submit(rel, (site / rel).read_text())
    got, deadline = [], time.monotonic() + 60
    while len(got) < 2 and time.monotonic() < deadline:
        got.extend(rel for rel, _ in pool.ready())
        time.sleep(0.05)
    got.extend(rel for rel, _ in pool.results())
    assert got == names


def test_page_pool_answers_as_this_process_and_leaves_no_files(site):
    """Pages and answers go between the plugin and its workers as files: a worker finds what
    checking the page here finds, and the pool's folder is gone once it is closed."""
    import os

    from tinctura import engine

    if not engine.can_fork():
        pytest.skip("worker processes need fork")
    options = Options(keep_samples=False)
    names = [f"p{n}/index.html" for n in range(3)]
    here = engine.Site(str(site), options)
    pool = engine.PagePool(str(site), options, 1)
    folder = pool._spool
    for rel in names:
        assert pool.submit(rel, (site / rel).read_text())
    there = dict(pool.results())
    assert not os.path.exists(folder)

    def seen(findings):
        return [(f.rule, f.sample.state, f.sample.xpath, f.ratio) for f in findings]
    for rel in names:
        assert seen(there[rel][1]) == seen(engine.judge_page(here, rel, options)[1])
        assert seen(there[rel][1])  # (the faint text fails: something was compared)


@pytest.mark.parametrize("copy", ["forked", "cannot fork", "fails"])
def test_deferred_pages_are_checked_by_the_worker_and_its_copy(site, monkeypatch, copy):
    """Pages kept for the end while the worker is behind (the plugin's MkDocs process then
    renders on instead of checking them cold): the worker checks half of them and a copy of
    itself it forks the other half; the answers are this process's, each page once, in order.
    A copy that cannot start, or fails, leaves its half to the worker."""
    import os

    from tinctura import engine

    if not engine.can_fork():
        pytest.skip("worker processes need fork")
    if copy == "cannot fork":  # (set before the pool forks its worker, which inherits it)
        monkeypatch.setattr(engine, "_fork_checker", lambda pages, spool: None)
    if copy == "fails":  # the copy dies before its first page

        def fail():
            raise RuntimeError("the copy fails")
        monkeypatch.setattr(engine, "_die_with_parent", fail)
    options = Options(keep_samples=False)
    names = [f"p{n}/index.html" for n in range(5)]
    here = engine.Site(str(site), options)
    pool = engine.PagePool(str(site), options, 1)
    folder = pool._spool
    assert pool.submit(names[0], (site / names[0]).read_text())
    for rel in names[1:]:
        assert pool.defer(rel, (site / rel).read_text())
    there = list(pool.results())
    assert [rel for rel, _ in there] == names and not os.path.exists(folder)

    def seen(findings):
        return [(f.rule, f.sample.state, f.sample.xpath, f.ratio) for f in findings]
    for rel, answer in there:
        assert seen(answer[1]) == seen(engine.judge_page(here, rel, options)[1])


def test_pages_kept_for_the_end_are_always_the_last_given(site):
    """The plugin gates answers in page order: a page kept for the end (the worker behind)
    goes to the worker as soon as it has room, before any later page, and while one is kept
    every later page is kept after it; the answers come in the order the pages were given."""
    from tinctura import engine

    if not engine.can_fork():
        pytest.skip("worker processes need fork")
    names = [f"p{n}/index.html" for n in range(4)]
    html = {rel: (site / rel).read_text() for rel in names}
    pool = engine.PagePool(str(site), Options(keep_samples=False), 1)
    room = [0]
    pool._behind = lambda: len(pool._pending) >= room[0]  # how far behind, set by the test
    for rel in names[:2]:  # behind: kept
        assert not pool.submit(rel, html[rel]) and pool.defer(rel, html[rel])
    room[0] = 1  # room for one: the first kept goes, the next page waits behind the second
    assert not pool.submit(names[2], html[names[2]]) and pool.defer(names[2], html[names[2]])
    assert [rel for rel, _ in pool._pending] == names[:1]
    assert [rel for rel, _ in pool._deferred] == names[1:3]
    room[0] = 10  # caught up: the kept ones first, then the new page
    assert pool.submit(names[3], html[names[3]])
    assert [rel for rel, _ in pool._pending] == names and not pool._deferred
    assert [rel for rel, answer in pool.results() if not isinstance(answer, Exception)] == names


def test_page_pool_rechecks_pages_with_css_as_this_process_does(site):
    """After the last page the plugin's worker checks some pages again with the fixes as CSS
    (overrides.verify): what it finds is what checking them here finds."""
    from tinctura import overrides
    from tinctura.engine import PagePool, can_fork

    if not can_fork():
        pytest.skip("worker processes need fork")
    options = Options(keep_samples=False)
    css = ".faint { color: #595959; }\n"  # 7:1 on white; a:hover #bbb still fails
    pages = ["p1/index.html", "p2/index.html", "p3/index.html"]
    here = overrides.recheck(str(site), options, css, pages)
    pool = PagePool(str(site), options, 1)
    try:
        assert pool.submit("p0/index.html", (site / "p0/index.html").read_text())
        list(pool.results(keep=True))
        there = pool.rechecker()(css, pages)()
    finally:
        pool.close()
    assert there == here and here[2] > 0
    without = overrides.recheck(str(site), options, "", pages)
    assert here[0] < without[0]  # the faint text's problem is gone with the CSS


def test_page_pool_ends_its_workers_in_the_background_and_close_waits(site):
    """The plugin starts ending its worker once the fixes are verified (``end_soon``), while
    it writes the reports; ``close`` then waits for that and removes the pages' folder."""
    import multiprocessing
    import os

    from tinctura.engine import PagePool, can_fork

    if not can_fork():
        pytest.skip("worker processes need fork")
    pool = PagePool(str(site), Options(keep_samples=False), 1)
    try:
        assert pool.submit("p0/index.html", (site / "p0/index.html").read_text())
        assert [rel for rel, _ in pool.results(keep=True)] == ["p0/index.html"]
        pool.end_soon()
        pool.end_soon()  # (once)
        ending = pool._ending
        assert ending is not None
    finally:
        pool.close()
    assert not ending.is_alive() and multiprocessing.active_children() == []
    assert not os.path.exists(pool._spool)


@pytest.mark.parametrize("copy", ["works", "cannot start", "fails"])
def test_a_lone_worker_rechecks_every_page_beside_a_copy_of_itself(site, tmp_path_factory,
                                                                    logged, monkeypatch, copy):
    """The plugin's lone worker takes every verification page and forks a copy of itself that
    rechecks every other one (``_worker_recheck_split``): MkDocs' process rechecks none, the
    answer is the union of the two, the same as rechecking them all here. A copy that cannot
    start or fails leaves its pages to the worker, with the same answer."""
    import os

    from tinctura import engine, overrides

    if not engine.can_fork():
        pytest.skip("worker processes need fork")
    options = Options(keep_samples=False)
    css = ".faint { color: #595959; }\n"
    pages = ["p1/index.html", "p2/index.html", "p3/index.html"]
    logs = tmp_path_factory.mktemp("logs")
    logged[0] = logs / "here"
    here = overrides.recheck(str(site), options, css, pages)
    logged[0] = logs / "there"  # (the worker is forked after this: it inherits the log's name
    fork_copy = engine._fork_copy  # and what its copy does)
    if copy == "cannot start":
        monkeypatch.setattr(engine, "_fork_copy", lambda spool, work: None)
    elif copy == "fails":
        monkeypatch.setattr(engine, "_fork_copy",
                            lambda spool, work: fork_copy(spool, _failing_copy))
    pool = engine.PagePool(str(site), options, 1)
    try:
        assert pool.submit("p0/index.html", (site / "p0/index.html").read_text())
        list(pool.results(keep=True))
        helper = pool.rechecker()
        assert helper.all_shares and helper.splits
        there = helper(css, pages)()
    finally:
        pool.close()
    assert there == here and here[2] > 0
    rechecks = _rechecks(logs / "there")
    assert os.getpid() not in rechecks
    assert sorted(sum(rechecks.values(), [])) == sorted(pages)  # each page once
    if copy == "works":
        assert sorted(rechecks.values()) == [pages[0::2], pages[1::2]]
    else:  # the worker alone: all the pages, or its share then the copy's
        assert len(rechecks) == 1


def _failing_copy():
    raise RuntimeError("the copy failed")


def test_verify_split_with_a_helper_marks_as_alone(site, monkeypatch):
    """Half the pages checked by a helper (the plugin's worker): the same verdicts and counts."""
    from tinctura import overrides

    options = Options(keep_samples=False)
    asked = []

    def helper(css, pages):
        asked.append(pages)
        return lambda: overrides.recheck(str(site), options, css, pages)

    def failing(css, pages):
        return lambda: None  # a worker that died: its pages are checked here

    def absent(css, pages):
        return None  # no worker could start: its pages are checked here too

    pages = [f"p{n}/index.html" for n in range(5)]
    results = []
    checked = []
    recheck = overrides.recheck

    def counting(root, options, css, pages, loader=None):
        checked.extend(pages)
        return recheck(root, options, css, pages, loader)

    for use in (None, helper, failing, absent):
        del checked[:]
        monkeypatch.setattr(overrides, "recheck", counting)
        override = overrides.Override("site.css", [overrides.Rule(".faint", (("color", "#595959",
                                                                            False),))])
        problem = _faint_problem(site, options)
        counts = overrides.verify(str(site), options, [problem], [override], pages, helper=use)
        monkeypatch.setattr(overrides, "recheck", recheck)
        results.append((override.verified, counts))
        if use is not helper:  # every page checked, here when the helper gave nothing
            assert sorted(checked) == sorted(pages)
    assert asked == [pages[1::2]]
    assert results[0] == results[1] == results[2] == results[3] and results[0][0] is True


def test_verify_does_its_own_work_meanwhile_while_the_helper_rechecks(site):
    """``meanwhile`` (the command line locates the reports' examples there) runs once the
    helper's workers are under way and before their answers are awaited, also with no
    helper; it is told whether every answer is in, where the helper can tell (else None);
    the verdicts are those without it."""
    from tinctura import overrides

    options = Options(keep_samples=False)
    pages = [f"p{n}/index.html" for n in range(3)]
    events, in_yet = [], []

    def helper(css, share, telling=False):
        events.append("started")

        def answer():
            events.append("awaited")
            return overrides.recheck(str(site), options, css, share)
        if telling:
            answer.ready = lambda: bool(in_yet)
        return answer

    def telling(css, share):
        return helper(css, share, telling=True)

    def meanwhile(ready):
        events.append("meanwhile")
        told.append(ready if ready is None else ready())
        in_yet.append(1)
        told.append(ready if ready is None else ready())

    helper.all_shares = telling.all_shares = True  # (warm workers take every share)
    verdicts = []
    for use in (helper, telling, None):
        del events[:], in_yet[:]
        told = []
        override = overrides.Override("site.css", [overrides.Rule(".faint", (("color", "#595959",
                                                                            False),))])
        counts = overrides.verify(str(site), options, [_faint_problem(site, options)],
                                  [override], pages, helper=use, meanwhile=meanwhile)
        verdicts.append((override.verified, counts))
        if use is None:
            assert events == ["meanwhile"] and told == [None, None]
        else:
            assert events == ["started", "started", "meanwhile", "awaited", "awaited"]
            assert told == ([None, None] if use is helper else [False, True])
    assert verdicts[0] == verdicts[1] == verdicts[2] and verdicts[0][0] is True


def test_verify_caches_every_round_of_a_build(site, monkeypatch):
    """``mkdocs serve`` keeps a cache between builds: the overrides of each round of planning
    (writer.NARROWING_ROUNDS) are looked up there, not only the last round's."""
    from tinctura import overrides

    options = Options(keep_samples=False)
    pages = ["p1/index.html"]
    calls = []
    recheck = overrides.recheck

    def counting(*args, **kwargs):
        calls.append(args[2])
        return recheck(*args, **kwargs)

    monkeypatch.setattr(overrides, "recheck", counting)
    cache: dict = {}
    rounds = ["#595959", "#505050"]  # two rounds' values for the faint text
    for _ in range(2):  # two builds, each with both rounds
        for value in rounds:
            override = overrides.Override("site.css", [overrides.Rule(
                ".faint", (("color", value, False),))])
            overrides.verify(str(site), options, [_faint_problem(site, options)], [override],
                             pages, cache=cache)
            assert override.verified is True
    assert len(calls) == 2  # the second build found both rounds in the cache


def _faint_problem(site, options):
    from tinctura import engine, problems

    _, findings, uses = engine.judge_page(engine.Site(str(site), options), "p0/index.html",
                                          options)
    found = problems.group([f for f in findings if f.rule == "TC100"], uses=uses)
    return next(p for p in found if "faint" in (p.fg_cause.declaration.selector or "")
                or "--faint" in p.fg_cause.declaration.property)


SHADES = {"a": "#999", "b": "#aaa", "c": "#a3a3a3", "d": "#9c9c9c"}  # each fails 4.5:1 on white


@pytest.fixture
def shaded(tmp_path):
    """Four pages, each with its own too-light text colour: four problems, whose fixes are
    verified on four different pages."""
    (tmp_path / "site.css").write_text(
        " ".join(f".{name}{{color:{value}}}" for name, value in SHADES.items()))
    for name in SHADES:
        (tmp_path / name).mkdir()
        (tmp_path / name / "index.html").write_text(
            f'<!doctype html><html><head><link rel="stylesheet" href="../site.css"></head>'
            f'<body><p class="{name}">Sort the seed packets by {name}</p></body></html>')
    (tmp_path / "index.html").write_text(
        '<!doctype html><html><head><link rel="stylesheet" href="site.css"></head>'
        '<body><p>Seed library opening hours</p></body></html>')
    return tmp_path


@pytest.fixture
def logged(monkeypatch, tmp_path_factory):
    """Every ``overrides.recheck``, in whichever process, appends ``pid pages`` to the file
    named ``logged[0]`` (set before each run)."""
    import os

    from tinctura import overrides

    log = [None]
    original = overrides.recheck

    def recording(site_root, options, css, pages, loader=None):
        with open(log[0], "a") as fh:
            fh.write(f"{os.getpid()} {','.join(pages)}\n")
        return original(site_root, options, css, pages, loader)

    monkeypatch.setattr(overrides, "recheck", recording)
    return log


def _verified_by_cli(site, jobs, logged, log):
    """``{problem sentence: fix verified}`` of ``tinctura check --jobs N``, its rechecks
    logged to ``log``."""
    import json

    from tinctura import cli

    logged[0] = log
    out = site.parent / f"r{jobs}.json"
    cli.main(["check", str(site), "--no-config", "--fail-on", "never", "--jobs", str(jobs),
              "--format", f"json:{out}"])
    return {p["sentence"]: p["fix"]["verified"] for p in json.loads(out.read_text())["problems"]
            if p["fix"] is not None}


def _rechecks(log):
    """``{pid: [pages]}`` of the rechecks logged."""
    found: dict = {}
    for line in log.read_text().splitlines():
        pid, pages = line.split(" ")
        found.setdefault(int(pid), []).extend(p for p in pages.split(",") if p)
    return found


def _alone_and_shared(shaded, jobs, logged, tmp_path_factory, monkeypatch) -> tuple:
    """``(rechecks with --jobs 1, with --jobs N, the folders made for pages by a PagePool)``
    (``_rechecks``) of two CLI runs, which verify the same fixes."""
    from tinctura import engine

    if not engine.can_fork():
        pytest.skip("worker processes need fork")
    logs = tmp_path_factory.mktemp("logs")
    alone = _verified_by_cli(shaded, 1, logged, logs / "one")
    folders = []
    spool = engine._spool_folder
    monkeypatch.setattr(engine, "_spool_folder", lambda: folders.append(spool()) or folders[-1])
    shared = _verified_by_cli(shaded, jobs, logged, logs / "many")
    assert shared == alone and len(alone) == len(SHADES) and any(alone.values())
    return _rechecks(logs / "one"), _rechecks(logs / "many"), folders


def test_cli_jobs_2_verifies_fixes_as_jobs_1_in_the_checks_own_workers(shaded, tmp_path_factory,
                                                                       monkeypatch, logged):
    """With --jobs 2 the workers that checked the pages stay, warm, and recheck every
    verification page (engine.pools_kept): the same fixes are verified as with --jobs 1, this
    process rechecks none, no other process starts and none is left."""
    import multiprocessing
    import os

    from tinctura import engine

    one, two, folders = _alone_and_shared(shaded, 2, logged, tmp_path_factory, monkeypatch)
    assert list(one) == [os.getpid()] and len(one[os.getpid()]) == len(SHADES)
    assert os.getpid() not in two and two  # the check's workers, not this process
    assert sorted(sum(two.values(), [])) == sorted(one[os.getpid()])  # each page once
    assert not folders  # (no worker forked for the rechecks: a PagePool makes a folder)
    assert multiprocessing.active_children() == [] and engine._KEPT is None
    assert engine._ENDING == []


def test_cli_jobs_3_verifies_in_three_shares_one_a_worker(shaded, tmp_path_factory,
                                                          monkeypatch, logged):
    """With --jobs 3 the three workers the check kept take a share each of the verification
    pages (two shares left one idle): every page once, none here, the same fixes verified as
    with --jobs 1."""
    import os

    for name in ("e", "f"):  # (seven pages: at least two a worker, so the workers are kept)
        (shaded / name).mkdir()
        (shaded / name / "index.html").write_text(
            '<!doctype html><html><head><link rel="stylesheet" href="../site.css"></head>'
            f'<body><p>Seed swap on shelf {name}</p></body></html>')
    one, three, _ = _alone_and_shared(shaded, 3, logged, tmp_path_factory, monkeypatch)
    shares = logged[0].read_text().splitlines()  # (the log of the last run: --jobs 3)
    assert len(shares) == 3 and os.getpid() not in three
    assert sorted(sum(three.values(), [])) == sorted(one[os.getpid()])  # each page once


def test_cli_jobs_2_workers_start_ending_before_the_reports(shaded, monkeypatch):
    """Once the kept workers have verified the fixes they have nothing more to do: they are
    ending (in a thread) while the reports are written, and gone when the command returns."""
    import multiprocessing

    from tinctura import cli, engine
    from tinctura.report import outputs

    if not engine.can_fork():
        pytest.skip("worker processes need fork")
    seen = []
    write = outputs.write_reports

    def spied(*args, **kwargs):
        seen.append((dict(engine._KEPT), list(engine._ENDING)))
        return write(*args, **kwargs)

    monkeypatch.setattr(outputs, "write_reports", spied)
    out = shaded.parent / "ending.json"
    cli.main(["check", str(shaded), "--no-config", "--fail-on", "never", "--jobs", "2",
              "--format", f"json:{out}"])
    assert len(seen) == 1
    kept, ending = seen[0]
    assert kept == {} and len(ending) == 1  # no pool kept: one ending
    assert not ending[0].is_alive() and engine._ENDING == []
    assert multiprocessing.active_children() == [] and engine._KEPT is None


def test_cli_verifies_beside_a_forked_worker_where_the_check_kept_none(shaded, tmp_path_factory,
                                                                      monkeypatch, logged):
    """Fewer pages than two per process: they are checked here, and a forked worker rechecks
    some of the verification pages beside this process (engine.recheck_helper); the same
    fixes are verified as with --jobs 1 and no process or folder is left."""
    import multiprocessing
    import os

    # (5 pages < 2 x 3)
    one, three, folders = _alone_and_shared(shaded, 3, logged, tmp_path_factory, monkeypatch)
    theirs = [pages for pid, pages in three.items() if pid != os.getpid()]
    assert len(theirs) == 1 and theirs[0] and three[os.getpid()]  # one worker, and this one
    assert sorted(sum(three.values(), [])) == sorted(one[os.getpid()])  # each page once
    assert folders and not any(os.path.exists(f) for f in folders)
    assert multiprocessing.active_children() == []


def test_cli_checks_the_pages_itself_when_no_worker_starts(shaded, tmp_path_factory, monkeypatch,
                                                           logged):
    import os

    from tinctura import engine

    def refused(*args, **kwargs):
        raise OSError("no more processes")

    logs = tmp_path_factory.mktemp("logs")
    alone = _verified_by_cli(shaded, 1, logged, logs / "one")
    monkeypatch.setattr(engine, "PagePool", refused)
    shared = _verified_by_cli(shaded, 3, logged, logs / "three")  # (no workers kept)
    assert shared == alone and any(alone.values())
    three = _rechecks(logs / "three")
    assert list(three) == [os.getpid()] and sorted(three[os.getpid()]) == sorted(
        _rechecks(logs / "one")[os.getpid()])


def test_cli_checks_the_pages_itself_when_a_kept_worker_fails(shaded, tmp_path_factory,
                                                               monkeypatch, logged):
    """A kept worker whose recheck fails gives no answer: its pages are checked here, and the
    fixes verified are the same."""
    import os

    from tinctura import engine

    if not engine.can_fork():
        pytest.skip("worker processes need fork")

    logs = tmp_path_factory.mktemp("logs")
    alone = _verified_by_cli(shaded, 1, logged, logs / "one")
    monkeypatch.setattr(engine, "_worker_recheck", _failing)  # (the workers are forked after)
    shared = _verified_by_cli(shaded, 2, logged, logs / "two")
    assert shared == alone and any(alone.values())
    two = _rechecks(logs / "two")
    assert list(two) == [os.getpid()] and sorted(two[os.getpid()]) == sorted(
        _rechecks(logs / "one")[os.getpid()])


def _failing(args):
    raise RuntimeError("the worker failed")


@pytest.mark.parametrize("count, jobs", [(1, 2), (7, 2), (199, 2), (999, 2), (400, 4)])
def test_pages_go_to_workers_in_runs_that_shrink_towards_the_end(count, jobs):
    from tinctura.engine import shrinking_chunks

    pages = [f"p{n}/index.html" for n in range(count)]
    chunks = shrinking_chunks(pages, jobs)
    assert [p for chunk in chunks for p in chunk] == pages  # every page once, in order
    sizes = [len(chunk) for chunk in chunks]
    assert sizes == sorted(sizes, reverse=True) and max(sizes) <= 25
    assert sizes[-1] == 1  # the last runs are single pages: the workers finish together


def test_counts_and_uses_per_group_of_alike_samples_are_those_per_sample(site):
    # engine._survey works them out once per situations.Alike group (with its size): the
    # same as over every sample, in the same order of first meeting
    from tinctura import engine, palette, problems, situations

    checker = engine.Site(str(site), Options(keep_samples=False))  # (layers not built)
    samples = [s for rel in checker.pages() for s in checker.check_page(rel).samples]
    engine.judge_gradients(samples, "AA")
    same = situations.Alike(samples)
    assert len(same.firsts) < len(samples) and sum(same.counts) == len(samples)
    assert [samples[i] for i in sorted({same.of.index(g) for g in set(same.of)})] == same.firsts
    assert engine.sample_stats(same.firsts, same.counts) == engine.sample_stats(samples)
    assert list(problems.declaration_uses(same.firsts).items()) == \
        list(problems.declaration_uses(samples).items())
    assert palette.collect(samples, (), same) == palette.collect(samples)


def test_no_collection_runs_while_a_page_is_checked(site, monkeypatch):
    # a collection in the middle of a page scans everything the page keeps alive and frees
    # nothing (the walk makes no cycles); between pages the collector runs as usual
    import gc

    from tinctura import engine

    during = []
    check_page = engine.Site.check_page

    def watched(self, rel, html=None):
        during.append(gc.isenabled())
        return check_page(self, rel, html)

    monkeypatch.setattr(engine.Site, "check_page", watched)
    assert gc.isenabled()
    report = check_paths([str(site)], Options(jobs=1))
    assert len(report.pages) == 13 and during == [False] * 13
    assert gc.isenabled()
    gc.disable()  # a caller's choice is kept
    try:
        check_paths([str(site)], Options(jobs=1))
        assert not gc.isenabled()
    finally:
        gc.enable()


def test_checking_a_page_makes_no_reference_cycles(site, monkeypatch):
    # forked workers check pages with the cyclic collector off (engine._worker_init): what a
    # page allocates must be freed by reference counting alone. (A Site's own rule sets and
    # caches do hold cycles: they live as long as the worker.)
    import gc

    from tinctura import engine

    found = []
    processed = engine._processed

    def then_collect(*args, **kwargs):
        result = processed(*args, **kwargs)
        found.append(gc.collect())
        return result

    monkeypatch.setattr(engine, "_processed", then_collect)
    check_paths([str(site)], Options(jobs=1))
    assert len(found) == 13 and found[3:] == [0] * 10, found


def test_an_elements_resting_state_is_reported_before_its_states(tmp_path):
    """Report order within one element: at rest first (what a reader sees first), then hover,
    then focus, each in every scheme; it was alphabetical, which listed a link's milder hover
    ratio before its resting one and made it the example of every page."""
    (tmp_path / "index.html").write_text(
        "<!doctype html><html><head><style>a { color: #999 } a:hover { color: #aaa }"
        "</style></head><body><p>Moorings: <a href='#x'>Tide tables</a> and "
        "<a href='#y'>Berths</a></p></body></html>", encoding="utf-8")
    report = check_paths([str(tmp_path)], Options())
    order = [(f.sample.xpath, f.sample.state) for f in report.findings if f.rule == "TC100"]
    assert order == [("/html/body/p/a[1]", "rest"), ("/html/body/p/a[1]", "hover"),
                     ("/html/body/p/a[2]", "rest"), ("/html/body/p/a[2]", "hover")]


def test_one_places_findings_are_ordered_by_state_then_scheme(tmp_path):
    """At one element: every scheme at rest, then every scheme hovered. The JSON report writes
    a place's neighbouring situations of one inheritance as one occurrence; scheme before
    state put the resting ones (often inherited from elsewhere) between the schemes' hovered
    ones and wrote 20 % more on 200 pages of `varied`."""
    (tmp_path / "index.html").write_text(
        "<!doctype html><html><head><style>a { color: #999 } a:hover { color: #aaa }"
        " @media (prefers-color-scheme: dark) { body { background: #111 } a { color: #444 }"
        " a:hover { color: #333 } }</style></head><body><p>Moorings: <a href='#x'>Tide tables"
        "</a></p></body></html>", encoding="utf-8")
    report = check_paths([str(tmp_path)], Options())
    order = [(f.sample.state, f.sample.scheme) for f in report.findings
             if f.rule == "TC100" and f.sample.xpath == "/html/body/p/a"]
    assert order == [("rest", "dark"), ("rest", "light"), ("hover", "dark"), ("hover", "light")]


def test_texts_on_several_backgrounds_are_judged_as_against_each_one():
    """A text on several possible backgrounds is undetermined when they disagree about the
    required ratio: the lowest and highest ratio come from sorted luminances (the nearest
    and the farthest), which must give what the WCAG 2 contrast ratio against each
    background gives (the reference: ``wcag.contrast_ratio``, the formula of WCAG 2.2's
    definition of contrast ratio, applied to every background in turn)."""
    import random

    from tinctura import engine
    from tinctura.colour import wcag
    from tinctura.model import Sample
    from tinctura.rules.text import foreground_on

    rng = random.Random(5)
    for _ in range(300):
        colour = lambda: tuple(rng.random() for _ in range(3))  # noqa: E731
        fg, bg = colour(), colour()
        alternatives = tuple(colour() for _ in range(rng.randint(1, 12)))
        alpha = rng.choice([1.0, 1.0, 0.6])
        sample = Sample(page="a.html", scheme="light", state="rest", xpath="/html/body/p",
                        line=1, text="t", kind="text", fg=fg, bg=bg, fg_raw=fg + (alpha,),
                        bg_alternatives=alternatives, font_size_px=16.0, font_weight=400)
        engine.judge_gradients([sample], "AA")
        ratios = [wcag.contrast_ratio(foreground_on(sample, b), b) for b in (bg,) + alternatives]
        expected = min(ratios) < 4.5 <= max(ratios)
        assert (sample.status == "undetermined") == expected
        if expected:
            assert f"{min(ratios):.2f}:1 to {max(ratios):.2f}:1" in sample.reason



def test_kept_spread_runs_the_first_item_here_and_the_others_in_the_kept_workers():
    import multiprocessing
    import os

    from tinctura import engine

    assert engine.kept_spread("/nowhere") is None  # no workers kept
    with engine.pools_kept():
        engine._KEPT["/site"] = multiprocessing.get_context("fork").Pool(2)
        results = engine.kept_spread("/site")(_pid_and_square, [1, 2, 3, 4])
    assert [n for _, n in results] == [1, 4, 9, 16]  # in order
    assert results[0][0] == os.getpid()
    assert all(pid != os.getpid() for pid, _ in results[1:])


def _pid_and_square(n):
    import os

    return os.getpid(), n * n


def test_verification_pages_are_shared_by_what_they_cost(site):
    """Two processes recheck the verification pages: split every other page, a code
    listing's page (three of a prose page's cost) and a prose page went to one, a table's
    page to the other. With each page's cost (its text samples in the check), the costliest
    first, each to the lighter share; every page once, each share in the pages' order; the
    verdicts the same."""
    from tinctura import overrides

    assert overrides.cost_shares(["table", "code", "prose"], {"table": 73, "code": 190,
                                                               "prose": 44}.get) == \
        [["code"], ["table", "prose"]]
    assert overrides.cost_shares(list("abcde"), dict(a=5, b=5, c=5, d=100, e=1).get) == \
        [["d"], ["a", "b", "c", "e"]]
    assert overrides.cost_shares(list("abcd"), {}.get) == [["a", "c"], ["b", "d"]]  # (no cost)
    assert overrides.cost_shares(list("abcd")) == [["a", "c"], ["b", "d"]]
    # as many shares as processes, never an empty one
    assert overrides.cost_shares(list("abcde"), dict(a=5, b=50, c=5, d=100, e=1).get, 3) == \
        [["d"], ["b"], ["a", "c", "e"]]
    assert overrides.cost_shares(list("ab"), None, 8) == [["a"], ["b"]]

    options = Options(keep_samples=False)
    pages = [f"p{n}/index.html" for n in range(3)]
    asked, verdicts = [], []

    def helper(css, share):
        asked.append(share)
        return lambda: overrides.recheck(str(site), options, css, share)

    helper.all_shares = True
    for cost in (None, {pages[0]: 10, pages[1]: 300, pages[2]: 20}.get):
        override = overrides.Override("site.css", [overrides.Rule(".faint", (("color", "#595959",
                                                                            False),))])
        counts = overrides.verify(str(site), options, [_faint_problem(site, options)],
                                  [override], pages, helper=helper, cost=cost)
        verdicts.append((override.verified, counts))
    assert asked == [[pages[0], pages[2]], [pages[1]], [pages[1]], [pages[0], pages[2]]]
    assert verdicts[0] == verdicts[1] and verdicts[0][0] is True
