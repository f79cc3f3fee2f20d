"""Repeated subtrees are replayed, not walked: the results must be exactly what a walk gives.

The reference here is the engine itself with replay turned off (``Options(replay=False)``):
the walk without fragments, whose colours the Chromium cross-checks cover. Every field of every
sample (XPaths, lines, texts, causes with the XPath a colour is inherited from, background
layers) and every finding, count and declaration use must agree.
"""
import pytest

from tinctura.engine import Options, Site, check_paths, judge_page
from tinctura.extract import fragments
from tinctura.problems import declaration_uses
from site_pages import write_pages

CSS = """
:root { --link: #1a56a8; --muted: #6d6d6d; }
@media (prefers-color-scheme: dark) {
  :root { --link: #8ab4f8; --muted: #8a8a8a; }
  body { background: #121212; color: #e8e8e8; }
}
nav.primary { color: var(--muted); }
.section > label { color: #555; }
.toggle:checked ~ nav { background: #f4f4f4; }
.item:nth-child(2) a { color: #7a7a7a; }
.item:last-child a { color: #0b5; }
.item a:hover { color: #c0c0c0; }
.item a:focus-visible { color: #d0d0d0; }
.item--active > a { font-weight: 700; color: var(--link); }
.hidden { display: none; }
.sr { position: absolute; width: 1px; height: 1px; overflow: hidden; clip: rect(0 0 0 0); }
article p { color: #333; }
"""


def section(n, active_page, pages_per_section=3):
    items = []
    for k in range(pages_per_section):
        page = n * pages_per_section + k
        cls = "item item--active" if page == active_page else "item"
        items.append(f'<li class="{cls}"><a href="../p{page}/">Page {page}</a>'
                     f'<span class="hidden">draft</span></li>')
    checked = " checked" if active_page // pages_per_section == n else ""
    return (f'<li class="section"><input class="toggle" type="checkbox" id="s{n}"{checked}>'
            f'<label for="s{n}">Section {n}</label><nav><ul>\n'
            + "\n".join(items) + f'\n</ul><span class="sr">end of section {n}</span>'
            f'<small>{pages_per_section} pages</small></nav></li>')  # colour from nav.primary


def page_html(active, sections=4):
    # a banner on some pages moves the navigation (div.shell becomes div[2]); blank lines on
    # others move its source lines: replays must re-stamp both
    banner = '<div class="banner">Notice</div>' if active % 3 == 0 else ""
    blank = "\n\n\n" if active % 2 == 0 else ""
    nav = "\n".join(section(n, active) for n in range(sections))
    return (f'<!doctype html><html><head><link rel="stylesheet" href="../site.css"></head><body>'
            f'{banner}{blank}<div class="shell"><nav class="primary"><ul>\n{nav}\n</ul></nav>'
            f'</div><article><p>Page {active} body text with <a href="#x">a link</a>.</p>'
            f'</article></body></html>')


@pytest.fixture
def repeated_site(tmp_path):
    return write_pages(tmp_path, CSS, page_html, 12)


def _order(s):
    return (s.page, s.scheme, s.state, s.xpath, s.kind)


def _assert_replays_equal_walks(site_dir):
    walked = Site(str(site_dir), Options(replay=False))
    replayed = Site(str(site_dir), Options(replay=True))
    for rel in walked.pages():
        a = walked.check_page(rel).samples
        b = replayed.check_page(rel).samples
        assert sorted(a, key=_order) == sorted(b, key=_order), rel
    # the test is only worth something if fragments were replayed across moved places
    memos = [cache.memo for caches in replayed._caches.values() for cache in caches.values()]
    assert sum(len(m.fragments) for m in memos) > 0


def test_replayed_samples_equal_walked_ones(repeated_site):
    _assert_replays_equal_walks(repeated_site)
    lazy = Site(str(repeated_site), Options(keep_samples=False))
    bases = {stamp.new_base.split("/nav")[0] for rel in lazy.pages()
             for _, stamp in lazy.check_page(rel).replays}
    assert bases == {"/html/body/div", "/html/body/div[2]"}


def test_skipped_counts_are_the_pages_at_rest_however_they_are_walked(tmp_path):
    # A label hidden only while its button is hovered or focused is shown at rest: the
    # skipped counts are the two paragraphs hidden at rest (counted by hand from the CSS
    # below), on the first page walked cold as on the later ones, whose states are re-stamped
    # from the first's, and with nothing shared or replayed.
    (tmp_path / "site.css").write_text(
        ".hidden { display: none; } .ghost { opacity: 0; } "
        "button:hover .label, button:focus .label { display: none; }")
    for n in range(3):
        (tmp_path / f"p{n}.html").write_text(
            '<!doctype html><html><head><link rel="stylesheet" href="site.css"></head><body>'
            '<nav><button>Theme <span class="label">light</span></button></nav>'
            f'<p class="hidden">draft {n}</p><p class="ghost">faint</p><p>shown {n}</p>'
            '</body></html>')
    for options in (Options(), Options(keep_samples=False), Options(share=False, replay=False)):
        site = Site(str(tmp_path), options)
        for rel in site.pages():
            assert site.check_page(rel).skipped == {"display:none": 1, "opacity:0": 1}, rel


def test_judged_replays_give_the_same_findings_counts_and_uses(repeated_site):
    def run(replay):
        options = Options(replay=replay, keep_samples=False)
        site = Site(str(repeated_site), options)
        out = []
        for rel in site.pages():
            page, findings, uses = judge_page(site, rel, options)
            out.append((page.stats, uses,
                        [(f.rule, f.sample.page, f.sample.scheme, f.sample.state, f.sample.xpath,
                          f.sample.line, f.sample.text, f.sample.fg_cause, round(f.ratio, 6),
                          [(x.target, x.colour) for x in f.fixes]) for f in findings]))
        return out

    walked, replayed = run(False), run(True)
    assert walked == replayed
    assert any(findings for _, _, findings in walked)  # the site has findings to compare


def test_replay_with_samples_kept_matches_uses_of_a_walk(repeated_site):
    walked = check_paths([str(repeated_site)], Options(replay=False))
    replayed = check_paths([str(repeated_site)], Options(replay=True))
    assert walked.uses == replayed.uses
    assert declaration_uses([s for p in walked.pages for s in p.samples]) == \
        declaration_uses([s for p in replayed.pages for s in p.samples])


@pytest.mark.parametrize("xpath, expected", [
    ("/html/body/nav/ul/li[2]/a", "/html/body/div[2]/nav/ul/li[2]/a"),  # inside
    ("/html/body/nav", "/html/body/div[2]/nav"),  # the root itself
    ("/html/body/nav::before", "/html/body/div[2]/nav::before"),  # a pseudo-element of it
    ("/html/body", "/html/body/div[2]"),  # an ancestor, one level up
    ("/html", "/html/body"),  # two levels up
    ("/html/body/navx/p", "/html/body/navx/p"),  # a sibling whose tag only starts alike
])
def test_rebase_moves_paths_inside_and_above_the_subtree(xpath, expected):
    assert fragments.rebase(xpath, "/html/body/nav", "/html/body/div[2]/nav") == expected


def test_rebase_does_not_mistake_a_numbered_sibling_for_the_root():
    # "div[1]" is a string prefix of "div[10]" but not its ancestor
    assert fragments.rebase("/html/body/div[10]/p", "/html/body/div[1]", "/x") == \
        "/html/body/div[10]/p"


def test_placements_give_the_records_of_placing_each_finding(repeated_site):
    # a judged fragment's findings placed as a block (fragments.Placement) against placing
    # them one by one (Stamp.within(rel).place), on every replay of the site
    from tinctura.engine import _verdict, verdict_key

    options = Options(keep_samples=False)
    site = Site(str(repeated_site), options)
    compared, placements, moved = 0, {}, set()
    for rel in site.pages():
        for fragment, stamp in site.check_page(rel).replays:
            verdict = fragment.verdicts.get(verdict_key(options)) or _verdict(fragment, options)
            if not verdict.findings:
                continue
            # worked out on the first replay, used on the others (other pages, moved places)
            placement = placements.setdefault(
                id(verdict), fragments.Placement(verdict.findings, stamp.anchor))
            moved.add((id(verdict), stamp.new_base, stamp.anchor.sourceline))
            records = []
            # numbered by group: each finding gets its group's number (here: its index)
            placement.place(stamp, list(range(len(placement.groups))), records)
            one_by_one = [(placement.group_of[n],) + stamp.within(r).place(f.sample, base)
                          for n, (r, base, f, _) in enumerate(verdict.findings)]
            assert records == one_by_one
            compared += len(records)
    assert compared
    assert len(moved) > len(placements)  # placements were used at more than one place


def test_blocks_are_counted_and_packed_as_their_records(repeated_site):
    # a page's replayed findings kept as blocks (situations.PageFindings) are counted per
    # situation, in order of first occurrence, and packed, without placing them: the same as
    # counting the placed records one by one (collections.Counter keeps first-seen order)
    from collections import Counter

    from tinctura import situations
    from tinctura.engine import _finding_order

    options = Options(keep_samples=False)
    site = Site(str(repeated_site), options)
    lazy_pages = 0
    for rel in site.pages():
        found = judge_page(site, rel, options)[1]
        lazy_pages += found.packed() is None and found._records is None
        records = list(found.records)
        order = [_finding_order(found.templates[r[0]], r) for r in records]
        assert order == sorted(order)  # report order: line, XPath, scheme, state, rule
        data, counts, first = judge_page(site, rel, options)[1].pack().packed()
        seen = Counter(r[0] for r in records)
        assert first == list(seen)
        assert counts == [seen[n] for n in range(len(counts))]
        assert situations.unpack(data) == records
        wanted = [n % 2 == 0 for n in range(len(counts))]  # every other situation
        assert situations.unpack(data, wanted) == [r for r in records if wanted[r[0]]]
    assert lazy_pages  # pages with replayed findings kept as blocks were compared


def test_packed_pages_reach_another_process_with_entries_and_templates_once(repeated_site):
    # a worker's packed page names its blocks' entries and its situations' templates:
    # pickled for the main process, the first page naming one carries it, later ones do
    # not, and every page reads back whole
    import pickle

    from tinctura import situations

    options = Options(keep_samples=False)
    site = Site(str(repeated_site), options)
    pages = [judge_page(site, rel, options)[1] for rel in site.pages()]
    packed = [p for p in pages if p._lazy is not None]
    assert len(packed) >= 2
    expected = [list(p.records) for p in packed]
    sent = [pickle.dumps(p.pack()) for p in packed]
    named = {uid for p in packed for uid in p._named}
    assert named  # (entries met on a second page are named, not sent with it)
    assert all(not any(p.__reduce__()[1][2:]) for p in packed)  # each sent once: none again
    kept = {uid: situations._ENTRIES.pop(uid) for uid in named}  # as in another process
    live = dict(situations._LIVE)
    templates = dict(situations._TEMPLATES)
    situations._LIVE.clear()
    situations._TEMPLATES.clear()
    try:
        received = [pickle.loads(data) for data in sent]
        assert [list(p.records) for p in received] == expected
        assert [p.keys for p in received] == [p.keys for p in packed]
        assert [list(p) for p in received] == [list(p) for p in packed]  # the same findings
    finally:
        situations._ENTRIES.update(kept)
        situations._LIVE.update(live)
        situations._TEMPLATES.update(templates)


def test_received_pages_are_numbered_by_name_as_by_key(repeated_site):
    # the main process numbers a worker's situations by their names there (pid, id), not by
    # hashing their keys again: the store's numbers are those of the same pages kept unsent
    import pickle

    from tinctura import situations
    from tinctura.report.store import FindingStore

    options = Options(keep_samples=False)
    site = Site(str(repeated_site), options)
    rels = list(site.pages())
    direct, by_name = FindingStore(), FindingStore()
    for rel in rels:
        direct.add(rel, judge_page(site, rel, options)[1].pack())
    templates = dict(situations._TEMPLATES)
    try:
        for rel in rels:
            received = pickle.loads(pickle.dumps(judge_page(site, rel, options)[1].pack()))
            assert received.names is not None
            by_name.add(rel, received)
        assert by_name._by_name  # looked up by name
        assert by_name.keys == direct.keys
        assert list(by_name.occurrences(rels[-1])) == list(direct.occurrences(rels[-1]))
        # a name met again for another key (a new worker with an old one's pid): by key
        for name in by_name._by_name:
            by_name._by_name[name] = (0, ("another situation",))
        again = pickle.loads(pickle.dumps(judge_page(site, rels[-1], options)[1].pack()))
        assert by_name.numbers(again) == direct.numbers(again)
    finally:
        situations._TEMPLATES.clear()
        situations._TEMPLATES.update(templates)
    direct.close()
    by_name.close()


def _walks(memo, n, meet=()):
    """``n`` walks of ``memo``, meeting the fingerprints ``meet`` on each."""
    for _ in range(n):
        memo.begin_page()
        for fp in meet:
            memo.lookup(1, fp)


def test_fragments_idle_longer_than_their_use_are_forgotten():
    memo = fragments.Memo()
    _walks(memo, 2, meet=[(1, 1), (2, 2)])  # seen, then recorded at the second walk
    for fp in [(1, 1), (2, 2)]:
        memo.keep((1, fp), fragments.Fragment("/x", [], {}))
    # (1, 1) recurs for 60 more walks (a closed navigation section), (2, 2) never again (one
    # recorded around a page's own entry)
    _walks(memo, 60, meet=[(1, 1)])
    assert (1, (2, 2)) not in memo.fragments
    assert (1, (1, 1)) in memo.fragments
    # idle: kept as long as it was in use (60 walks), then forgotten
    _walks(memo, 55)
    assert (1, (1, 1)) in memo.fragments
    _walks(memo, 2 * fragments.SWEEP)
    assert (1, (1, 1)) not in memo.fragments


def test_a_fingerprint_seen_long_ago_counts_as_new():
    memo = fragments.Memo()
    _walks(memo, 1, meet=[(3, 3)])
    _walks(memo, fragments.SEEN_IDLE - fragments.SWEEP)
    assert memo.lookup(1, (3, 3)) == (None, True)  # the second sight: record it
    _walks(memo, 1, meet=[(4, 4)])
    _walks(memo, fragments.SEEN_IDLE + fragments.SWEEP)
    assert memo.lookup(1, (4, 4)) == (None, False)  # forgotten: a first sight again


def test_replays_with_fragments_forgotten_each_walk_equal_walked_ones(repeated_site, monkeypatch):
    monkeypatch.setattr(fragments, "IDLE_PAGES", 1)
    monkeypatch.setattr(fragments, "SEEN_IDLE", 2)
    monkeypatch.setattr(fragments, "SWEEP", 1)
    _assert_replays_equal_walks(repeated_site)


def test_equal_entries_are_kept_once():
    from tinctura import situations

    before = len(situations._ENTRIES)
    one = [("/li[1]/a", 0, "Berth 4", (0, None), None, 0)]
    other = [("/li[2]/a", 0, "Berth 5", (0, None), None, 0)]
    uid = situations.register_entries(list(one))
    assert situations.register_entries(list(one)) == uid
    assert situations.register_entries(other) != uid
    assert len(situations._ENTRIES) == before + 2


def test_checking_every_page_again_with_a_new_site_keeps_no_new_entries(repeated_site,
                                                                        monkeypatch):
    """As ``mkdocs serve`` does after a stylesheet changed: a new Site, every page again."""
    from tinctura import situations

    named = []
    monkeypatch.setattr(fragments, "register_entries",
                        lambda entries: named.append(situations.register_entries(entries))
                        or named[-1])
    options = Options(keep_samples=False)
    passes = []
    for _ in range(2):
        site = Site(str(repeated_site), options)
        for rel in site.pages():
            judge_page(site, rel, options, packed=True)
        passes.append((set(named), len(situations._ENTRIES)))
        named.clear()
    (first, size), (second, size_after) = passes
    assert first and second == first  # the new site's fragments named their entries again
    assert size_after == size


def test_entries_no_kept_page_names_are_forgotten_and_registered_again(repeated_site):
    """``mkdocs serve`` keeps its findings store between builds; after each build only the
    entries its pages name are kept, and a fragment placed again names its entries anew."""
    from tinctura import situations
    from tinctura.report.store import FindingStore

    options = Options(keep_samples=False)
    site, store = Site(str(repeated_site), options), FindingStore()
    pages = site.pages()
    expected = {}
    for rel in pages:
        _, findings, _ = judge_page(site, rel, options, packed=True)
        store.add(rel, findings)
        expected[rel] = store.occurrences(rel)
    named = store.entry_uids()
    assert named  # the navigation's fragments were placed by uid
    for rel in pages[1:]:
        store.discard(rel)
    situations.keep_entries(store.entry_uids())
    kept = {uid for uid in named if situations.registered(uid)}
    assert kept == store.entry_uids() and kept != named  # the others' entries went
    assert store.occurrences(pages[0]) == expected[pages[0]]  # the kept page still reads them
    for rel in pages[1:]:  # placed again: the fragments name their entries anew
        _, findings, _ = judge_page(site, rel, options, packed=True)
        store.add(rel, findings)
        assert store.occurrences(rel) == expected[rel]


def test_finder_resolves_as_resolve_does_with_positions_counting_comments():
    # fragments.PathFinder indexes each parent's children once; ``resolve`` counts along them
    # for each step. Same element for every path (a missing step gives the start, as
    # ``resolve`` does), and the child positions lead to it with comments counted (lxml's
    # ``el[i]``, which Placement.lines indexes by)
    from lxml import etree

    root = etree.fromstring(
        "<div><!-- c --><p>a</p><pre><code><!-- x --><span>1</span><b/><span>2</span>"
        "<span>3</span></code></pre><p>b</p></div>")
    finder = fragments.PathFinder()
    paths = ["", "p", "p[2]", "pre/code/span[3]", "pre/code/span", "pre/code/b",
             "pre/code/span[4]", "pre/nope/span", "p[3]"]
    for rel in paths:
        el, where = finder.at((root, ()), rel)
        assert el is fragments.resolve(root, rel)
        reached = root
        for i in where:
            reached = reached[i]
        assert reached is el
    inner = finder.at((root, ()), "pre/code")
    assert finder.at(inner, "span[2]")[0] is fragments.resolve(root, "pre/code/span[2]")
    assert finder.at(inner, "em")[0] is inner[0]  # missing below a start: the start


def test_lines_are_those_of_each_slot_reached_from_the_root():
    # Placement.lines reaches each slot's element from the previous slot's ancestors
    # (``_steps``); the lines are those of the elements its positions name from the root,
    # whatever their order (the root itself, an ancestor of the slot before, a sibling)
    from lxml import etree

    root = etree.HTML("<div>\n<ul>\n<li><a>1</a></li>\n<li><a>2</a>\n<b>x</b></li>\n</ul>\n"
                      "<!-- c -->\n<p>\n<span>3</span></p></div>").find(".//div")
    positions = [(0, 0, 0), (0, 1, 0), (0, 1, 1), (), (0,), (2, 0), (0, 0), (2,), (0, 1, 1)]
    placement = fragments.Placement.__new__(fragments.Placement)
    placement.positions, placement._steps = positions, None
    stamp = fragments.Stamp.__new__(fragments.Stamp)
    stamp.anchor = root
    expected = []
    for where in positions:
        el = root
        for i in where:
            el = el[i]
        expected.append(el.sourceline)
    assert placement.lines(stamp) == expected + [0]
    assert len(set(expected)) > 4  # (elements on lines of their own)
