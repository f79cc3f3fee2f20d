"""Findings held as situations and places give back the findings they were made from.

A finding's situation is everything a rule reads of its sample but where the text stands
(``situations.POSITIONAL``); the store and a page's ``PageFindings`` keep a situation once and an
occurrence as its place. Rebuilt findings must equal the originals field for field.
"""
import pickle

from tinctura import situations
from tinctura.engine import Options, judge
from tinctura.model import Cause, Declaration
from tinctura.report.store import FindingStore
from tinctura.rules.examples import make_sample


def samples():
    d = Declaration("color", "#777", "site.css", 3, ".nav a", "author")
    inherited = Cause(d, inherited_from="/html/body/nav/ul/li[2]")
    out = []
    for page in ("a.html", "b.html"):
        for n in range(1, 4):
            out.append(make_sample("#777", "white", page=page, xpath=f"/html/body/nav/ul/li[{n}]/a",
                                   line=10 + n, text=f"Link {n}", fg_cause=Cause(d)))
        out.append(make_sample("#777", "white", page=page, state="hover", fg_cause=inherited,
                               xpath="/html/body/nav/ul/li[2]/a/span", text="Inner"))
        out.append(make_sample("#000", "white", page=page))  # passes
    return out


def fields(f):
    s = f.sample
    return (f.rule, f.ratio, f.required, f.level, f.fixes, f.args, s.page, s.scheme, s.state,
            s.xpath, s.line, s.text, s.fg, s.bg, s.fg_cause, s.bg_cause, s.font_size_px)


def test_equal_situations_are_judged_once_and_found_everywhere():
    found = judge(samples(), Options())
    assert len(found) == 8
    assert len({situations.finding_key(f) for f in found}) == 2  # rest and :hover
    same = [f for f in found if f.sample.state == "rest"]
    assert all(f.fixes is same[0].fixes for f in same)  # one verdict, shared


def test_page_findings_rebuild_and_pickle_without_the_findings():
    found = [f for f in judge(samples(), Options()) if f.sample.page == "a.html"]
    page = situations.PageFindings.build("a.html", found)
    assert len(page.templates) == 2 and len(page) == 4
    assert [fields(f) for f in page] == [fields(f) for f in found]
    again = pickle.loads(pickle.dumps(page))
    assert [fields(f) for f in again] == [fields(f) for f in found]
    assert again.records == page.records


def test_store_counts_follow_replaced_and_discarded_pages():
    found = judge(samples(), Options())
    store = FindingStore()
    for page in ("a.html", "b.html"):
        store.add(page, [f for f in found if f.sample.page == page])
    assert len(store) == 8 and len(store.situations) == 2
    assert [fields(f) for f in store] == [fields(f) for f in found]
    assert store.occurrence_counts == [6, 2]
    store.replace("a.html", [f for f in found if f.sample.page == "a.html"][:1])
    assert len(store) == 5 and store.counts["page"] == {"a.html": 1, "b.html": 4}
    store.discard("b.html")
    assert len(store) == 1 and dict(store.counts["page"]) == {"a.html": 1}
    assert [fields(f) for f in store.by_page("a.html")] == [fields(found[0])]


def test_a_store_checked_again_all_day_keeps_its_file_to_what_pages_use(monkeypatch):
    """``mkdocs serve`` replaces a page's findings each time the page is checked again: the
    bytes the replaced findings used are given back (the file is compacted once they
    outweigh those in use), and what pages use reads back the same."""
    from tinctura.report import store as store_mod

    monkeypatch.setattr(store_mod, "COMPACT_AFTER_BYTES", 0)
    found = judge(samples(), Options())
    on = {page: [f for f in found if f.sample.page == page] for page in ("a.html", "b.html")}
    store = FindingStore()
    for page, items in on.items():
        store.add(page, items)
    store._file.seek(0, 2)
    start = store._file.tell()

    def packed(page):  # as a worker hands a page over, with its records written for a report
        return situations.PageFindings.build(page, on[page]).pack(lambda f: f"<{f.page}>")

    for n in range(200):
        page = ("a.html", "b.html")[n % 2]
        store.replace(page, packed(page) if n % 3 else on[page])
    store._file.seek(0, 2)
    assert store._file.tell() <= 2 * start + 64  # not 100 times what the pages use
    assert len(store) == 8 and dict(store.counts["page"]) == {"a.html": 4, "b.html": 4}
    for page, items in on.items():
        assert [fields(f) for f in store.by_page(page)] == [fields(f) for f in items]
    assert store.encoded("a.html") is None  # (last kept as a list, at step 198)
    assert store.encoded("b.html") == ("<b.html>", None)  # (last kept packed, at step 199)


def test_packed_findings_are_kept_unread_and_read_back_the_same():
    """A worker packs a page's records (pickled once); the main process keeps them as they
    are, counts them per situation and reads the same records back, renumbered."""
    from tinctura import gate as gated
    from tinctura import problems

    found = judge(samples(), Options())
    pages = {p: situations.PageFindings.build(p, [f for f in found if f.sample.page == p])
             for p in ("a.html", "b.html")}
    # the second page numbers its templates the other way round: the store must renumber
    b = pages["b.html"]
    b.templates.reverse(), b.keys.reverse()
    b._records = [(1 - r[0],) + r[1:] for r in b.records]
    for more in ("c.html", "d.html", "e.html"):  # later pages: problems with their examples
        pages[more] = situations.PageFindings(more, b.templates, b.keys, list(b.records))
    plain, packed = FindingStore(), FindingStore()
    kept = {}
    for name, store in (("plain", plain), ("packed", packed)):
        gate, collector = gated.Gate(fingerprints=False), problems.Collector(keep_indexes=False)
        for page, findings in pages.items():
            if name == "packed":
                findings = pickle.loads(pickle.dumps(
                    situations.PageFindings(page, findings.templates, findings.keys,
                                            list(findings.records)).pack()))
                assert findings.packed() is not None and len(findings) == 4
            gated.intake(gate, store, collector, page, findings)
        kept[name] = (gate.counts, [(p.rule, p.count, p.pages) for p in collector.problems({})])
    assert kept["plain"] == kept["packed"]
    assert plain.occurrence_counts == packed.occurrence_counts == [15, 5]
    for page in pages:
        assert packed.occurrences(page) == plain.occurrences(page)
    assert [fields(f) for f in packed] == [fields(f) for f in plain]


def test_looks_stands_for_every_field_the_key_reads():
    """Samples holding the same objects look alike; a change in any field the situation key
    reads (here: a new colour tuple, a new cause) makes them look different."""
    import dataclasses

    from tinctura.model import Cause, Declaration, Sample

    decl = Declaration("color", "#767676", "site.css", 4, "a", "author")
    fg, bg = (0.46, 0.46, 0.46), (1.0, 1.0, 1.0)
    a = Sample("p.html", "light", "rest", "/html/body/a[1]", 3, "Tides", "text", fg, bg,
               fg + (1.0,), 16.0, 400, fg_cause=Cause(decl))
    b = dataclasses.replace(a, xpath="/html/body/a[2]", line=4, text="Moorings")
    assert situations.looks(a) == situations.looks(b)
    assert situations.looks(a) != situations.looks(dataclasses.replace(a, fg=tuple(fg)[:2] + (0.5,)))
    assert situations.looks(a) != situations.looks(dataclasses.replace(a, fg_cause=Cause(decl)))
    assert situations.looks(a) != situations.looks(dataclasses.replace(a, state="hover"))


def test_a_situation_numbered_twice_on_a_page_is_counted_once_with_both_counts():
    # after situations.situation_id renews its numbers (a bound), a page may hold one
    # situation under two template numbers; the store counts both under one situation
    from tinctura import gate as gated
    from tinctura import problems

    found = judge(samples(), Options())
    page = [f for f in found if f.sample.page == "a.html"]
    built = situations.PageFindings.build("a.html", page)
    templates, keys = built.templates[:1] * 2, built.keys[:1] * 2
    records = [(n % 2,) + r[1:] for n, r in enumerate(built.records) if r[0] == 0]
    assert len(records) >= 2
    findings = pickle.loads(pickle.dumps(
        situations.PageFindings("a.html", templates, keys, records).pack()))
    store = FindingStore()
    gated.intake(gated.Gate(fingerprints=False), store, problems.Collector(keep_indexes=False),
                 "a.html", findings)
    assert store.occurrence_counts == [len(records)]


def test_findings_counted_only_give_the_same_counts_and_problems_as_kept_ones():
    """When no output reads a page's records back (the text report grouped by problem), the
    page checked in the main process is counted without pickling its records
    (``pack(keep=False)``): the store keeps its counts and page, not its records, and the
    gate and problems come out as when the records are kept."""
    from tinctura import gate as gated
    from tinctura import problems

    found = judge(samples(), Options())
    kept = {}
    for keep in (True, False):
        store = FindingStore()
        gate, collector = gated.Gate(fingerprints=False), problems.Collector(keep_indexes=False)
        for page in ("a.html", "b.html"):
            findings = situations.PageFindings.build(
                page, [f for f in found if f.sample.page == page]).pack(keep=keep)
            assert (findings.packed()[0] is None) == (not keep)
            assert len(findings) == 4
            gated.intake(gate, store, collector, page, findings)
        kept[keep] = (gate.counts, store.occurrence_counts, store.pages(), len(store),
                      [(p.rule, p.count, p.pages, [fields(f) for f in p.example_pool()])
                       for p in collector.problems({})])
        if not keep:
            assert store.occurrences("a.html") == []  # (nothing to read back)
    assert kept[True] == kept[False]


def test_names_given_by_two_workers_with_one_pid_differ(monkeypatch):
    """`mkdocs serve` forks a worker per build from one state; a later one may get an earlier
    one's pid. The names they give (template names, entry uids) must not collide."""
    import os

    from tinctura import situations as sit

    token = sit.process_token()
    assert sit.process_token() == token  # stable within a process
    inherited = (token[0] + 1, token[1])  # what a forked worker starts with: its parent's
    monkeypatch.setattr(sit, "_TOKEN", [inherited])
    first = sit.process_token()
    monkeypatch.setattr(sit, "_TOKEN", [inherited])  # the next build's worker, the same pid
    second = sit.process_token()
    assert first[0] == second[0] == os.getpid() and first != second
