"""Repeated subtrees: walk once, replay everywhere.

A site's navigation repeats on every page, with one section changed (the page's own entry), and
it holds most of a large site's text. The walker fingerprints an element's subtree (its
serialization, made in C by lxml) beside the element's style key, which stands for everything
outside the subtree that a selector can read: ancestors, their attributes and, where a selector
is sibling-sensitive, the siblings. Whatever the walk produces inside the subtree is a function
of those two, so:

- the first time a (key, fingerprint) is seen, only the fingerprint is remembered;
- the second time, the walk records a ``Fragment``: the samples it produced, in order, with
  nested fragments by reference, and the skipped counts;
- from then on the walker replays the fragment: its samples re-stamped with the page, XPaths and
  lines of the new place (``materialize``), or, when only findings are wanted, the fragment
  itself, judged once (the engine keeps a verdict per fragment and re-stamps only failing
  samples).

Keys whose subtrees do not repeat (a page's body, its article) stop being fingerprinted after a
few pages, so the fingerprint cost stays on what repeats.

The fingerprint is ``(length, hash)`` of the serialization, next to the style key: two different
subtrees under the same key and of the same length collide with probability 2**-64 per pair
(Python's 64-bit string hash), about 1.3e-10 for the 70,000 fingerprints a cache remembers.
"""
from __future__ import annotations

import dataclasses
import itertools
import operator
from itertools import islice

from lxml import etree

from ..model import Cause, Sample
from ..situations import place_block, register_entries, registered, situation_id

_SAMPLE_FIELDS = operator.attrgetter(*(f.name for f in dataclasses.fields(Sample)))
# Per style cache, least recently used first out: a site's pages come in navigation order, so
# what repeats now is what repeated on the last pages. Idle ones go well before the limits:
# fragments recorded around a page's own navigation entry recur on its neighbours only, and
# kept to the limit they made the peak memory grow with the pages (by 30 % from 40 to 200).
FRAGMENT_LIMIT = 20000  # recorded fragments (a navigation of thousands of entries fits)
SEEN_LIMIT = 50000  # fingerprints seen once
IDLE_PAGES = 30  # walks a fragment may go unmet, or as many as it was in use if more
SEEN_IDLE = 100  # walks a fingerprint seen once is remembered
SWEEP = 10  # walks between two sweeps of the idle
# A key stops being fingerprinted once it has shown new subtrees on this many pages and repeats
# on fewer than a tenth as many occasions: a fingerprint costs about 1/20 of a walk of the same
# subtree, so even rare repeats would pay, but a page's root and article never repeat. (Several
# pages, not one: a site's home and 404 pages link to the others with different prefixes.)
VOLATILE_PAGES = 6


class Fragment:
    """What walking one subtree produced: samples and nested fragments, in walk order."""

    __slots__ = ("base", "items", "skipped", "verdicts", "first", "used")

    def __init__(self, base: str, items: list, skipped: dict):
        self.first = self.used = 0  # serials of the walks that recorded it and last met it
        self.base = base  # XPath of the subtree's root where it was recorded
        self.items = items  # Sample, or (relative XPath, Fragment) for a nested fragment
        self.skipped = skipped  # skipped counts of the whole subtree, nested ones included
        self.verdicts = {}  # filled by the engine: judged once per rule selection

    def samples(self) -> list:
        return [item for item in self.items if isinstance(item, Sample)]

    def nested(self) -> list:
        return [item for item in self.items if not isinstance(item, Sample)]


class Memo:
    """Fingerprints and fragments for one style cache (one rule index and scheme)."""

    def __init__(self):
        self.fragments = {}  # (key id, fingerprint) -> Fragment, least recently used first
        self.seen = {}  # (key id, fingerprint) seen once -> that walk's serial, oldest first
        self.keys = {}  # key id -> [repeats, pages with a new fingerprint, last such page]
        self.page = 0  # serial of the walk in progress (a page in this cache's scheme)

    def begin_page(self) -> None:
        """A new walk. Every ``SWEEP`` walks, forget the fragments idle for longer than they
        were in use (and at least ``IDLE_PAGES``), and fingerprints seen once more than
        ``SEEN_IDLE`` walks ago: a navigation section's fragments recur on every page while
        it is closed, and those recorded around a page's own entry only on its neighbours."""
        self.page = page = self.page + 1
        if page % SWEEP:
            return
        self.fragments = {k: f for k, f in self.fragments.items()
                          if page - f.used <= max(IDLE_PAGES, f.used - f.first)}
        oldest, seen = page - SEEN_IDLE, self.seen
        while seen:
            first = next(iter(seen))
            if seen[first] >= oldest:
                break
            del seen[first]

    def keep(self, memo_key, fragment) -> None:
        if len(self.fragments) >= FRAGMENT_LIMIT:
            del self.fragments[next(iter(self.fragments))]
        fragment.used = fragment.first = self.page
        self.fragments[memo_key] = fragment

    def clear(self) -> None:
        self.fragments.clear()
        self.seen.clear()
        self.keys.clear()

    def worth_trying(self, key_id: int) -> bool:
        stats = self.keys.get(key_id)
        return stats is None or stats[1] < VOLATILE_PAGES or stats[0] * 10 >= stats[1]

    def lookup(self, key_id: int, fingerprint: tuple):
        """(fragment to replay or None, whether to record this walk of the subtree)."""
        memo_key = (key_id, fingerprint)
        stats = self.keys.get(key_id)
        if stats is None:
            stats = self.keys[key_id] = [0, 0, 0]
        fragments = self.fragments
        fragment = fragments.pop(memo_key, None)
        if fragment is not None:
            fragments[memo_key] = fragment  # most recently used last
            fragment.used = self.page
            stats[0] += 1
            return fragment, False
        seen = self.seen
        if seen.pop(memo_key, None) is not None:
            stats[0] += 1
            return None, True
        if len(seen) >= SEEN_LIMIT:
            del seen[next(iter(seen))]
        seen[memo_key] = self.page
        if stats[2] != self.page:
            stats[1] += 1
            stats[2] = self.page
        return None, False


def fingerprint(el) -> tuple:
    data = etree.tostring(el, with_tail=False, encoding="unicode")  # a fifth faster than bytes
    return (len(data), hash(data))


class Recording:
    """A subtree being walked for the first time after being seen once."""

    __slots__ = ("memo_key", "base", "start", "skipped", "nested")

    def __init__(self, memo_key, base: str, start: int, skipped: dict):
        self.memo_key = memo_key
        self.base = base
        self.start = start  # index in the walker's samples where the subtree begins
        self.skipped = dict(skipped)  # the page's counts before the subtree
        self.nested = []  # (first sample, end sample, relative XPath, Fragment)

    def finish(self, samples: list, skipped: dict) -> Fragment:
        items, at = [], self.start
        for first, end, rel, fragment in self.nested:
            items.extend(samples[at:first])
            items.append((rel, fragment))
            at = end
        items.extend(samples[at:])
        before = self.skipped
        delta = {k: v - before.get(k, 0) for k, v in skipped.items() if v != before.get(k, 0)}
        return Fragment(self.base, items, delta)


# -- re-stamping ------------------------------------------------------------------------------

def rebase(xpath, old_base: str, new_base: str):
    """An XPath recorded around ``old_base`` moved to the same place around ``new_base``.

    Inside the subtree: the same steps below the new root. An ancestor of the root: as many
    levels above the new root.
    """
    if not xpath:
        return xpath
    if xpath == old_base:
        return new_base
    rest = xpath[len(old_base):]
    if xpath.startswith(old_base) and rest[:1] in ("/", ":"):
        return new_base + rest
    if old_base.startswith(xpath) and old_base[len(xpath):len(xpath) + 1] == "/":
        up = old_base.count("/") - xpath.count("/")
        return new_base.rsplit("/", up)[0] or "/"
    return xpath


def resolve(anchor, rel: str):
    """The element at the relative XPath ``rel`` (as lxml's getpath writes it) below ``anchor``."""
    el = anchor
    for step in rel.split("/"):
        if not step:
            continue
        tag, _, index = step.partition("[")
        n = int(index[:-1]) if index else 1
        el = next(islice(el.iterchildren(tag), n - 1, None), None)
        if el is None:
            return anchor
    return el


class Stamp:
    """Re-stamps samples recorded around one place for another place on a page."""

    __slots__ = ("page", "scheme", "anchor", "new_base", "_elements")

    def __init__(self, page: str, scheme: str, anchor, new_base: str):
        self.page = page
        self.scheme = scheme
        self.anchor = anchor  # the element at new_base
        self.new_base = new_base
        self._elements = {}

    def element(self, rel: str):
        """The element at ``rel`` (``resolve``) below the anchor."""
        el = self._elements.get(rel)
        if el is None:
            el = self._elements[rel] = resolve(self.anchor, rel)
        return el

    def line(self, rel: str) -> int:
        return self.element(rel).sourceline or 0

    def place(self, sample: Sample, old_base: str) -> tuple:
        """Where ``sample``, recorded around ``old_base``, stands here: the record
        ``situations.place`` makes of a finding (XPath, line, text, inherited-from XPath, the
        background layers' XPaths or None, no gate marks)."""
        new_base = self.new_base
        rel = sample.xpath[len(old_base):]
        fg_cause = sample.fg_cause
        inherited = fg_cause.inherited_from if fg_cause is not None else None
        if inherited:
            inherited = rebase(inherited, old_base, new_base)
        layers = tuple(rebase(layer.xpath, old_base, new_base)
                       for layer in sample.bg_layers) if sample.bg_layers else None
        return (new_base + rel, self.line(rel.split("::")[0]) if sample.line else 0,
                sample.text, inherited, layers, None)

    def sample(self, sample: Sample, old_base: str) -> Sample:
        new_base = self.new_base
        rel = sample.xpath[len(old_base):]
        fg_cause = sample.fg_cause
        if fg_cause is not None and fg_cause.inherited_from:
            fg_cause = Cause(fg_cause.declaration,
                             rebase(fg_cause.inherited_from, old_base, new_base), fg_cause.chain)
        layers = sample.bg_layers
        if layers:
            layers = tuple(dataclasses.replace(layer, xpath=rebase(layer.xpath, old_base, new_base))
                           for layer in layers)
        moved = Sample(*_SAMPLE_FIELDS(sample))  # a copy; dataclasses.replace is 4x slower
        moved.page = self.page
        moved.scheme = self.scheme
        moved.xpath = new_base + rel
        moved.line = self.line(rel.split("::")[0]) if sample.line else 0
        moved.fg_cause = fg_cause
        moved.bg_layers = layers
        return moved

    def within(self, rel: str) -> "Stamp":
        """The stamp for a nested fragment at ``rel`` below this one."""
        if not rel:
            return self
        return Stamp(self.page, self.scheme, resolve(self.anchor, rel.split("::")[0]),
                     self.new_base + rel)


_serials = itertools.count()


class Placement:
    """Where a judged fragment's findings stand in any replay of it, worked out once.

    Every replay of a fragment has the serialization it was recorded with, so the element of
    each finding is at the same child positions (comments included) below the replay's anchor:
    its line is read by indexing, not by matching XPath steps. The XPaths are the replay's base
    plus a fixed relative part; an inherited-from or layer XPath is rebased by a rule fixed per
    finding. ``Stamp.within(rel).place(sample, old_base)`` gives the same records one by one.
    """

    __slots__ = ("positions", "entries", "situations", "groups", "group_of", "placed", "uid",
                 "lineless", "layouts", "serial", "group_sids", "_steps")

    def __init__(self, findings, anchor):
        """``findings``: ``(relative XPath of the nested fragment, its base, finding, key)``;
        ``anchor``: the root element of one replay of the fragment."""
        find = PathFinder()
        nested, slots = {}, {}
        self.positions = []  # child positions below the anchor, one per distinct element
        # (relative XPath, line slot, text, inherited, layers, group): ``group`` indexes
        # ``groups``, the distinct situations, which a page numbers once each
        self.entries = []
        self.situations = []  # (finding, key, situations.situation_id(key))
        for rel, old_base, finding, key in findings:
            sample = finding.sample
            inner = nested.get(rel)
            if inner is None:
                inner = nested[rel] = find.at((anchor, ()), rel.split("::")[0])
            below = sample.xpath[len(old_base):]
            slot = -1
            if sample.line:
                where = find.at(inner, below.split("::")[0])[1]
                slot = slots.get(where)
                if slot is None:
                    slot = slots[where] = len(self.positions)
                    self.positions.append(where)
            fg_cause = sample.fg_cause
            inherited = fg_cause.inherited_from if fg_cause is not None else None
            inherited = _rebaser(inherited, old_base, rel) if inherited else (0, inherited)
            layers = tuple(_rebaser(layer.xpath, old_base, rel) for layer in sample.bg_layers) \
                if sample.bg_layers else None
            self.entries.append((rel + below, slot, sample.text, inherited, layers))
            self.situations.append((finding, key, situation_id(key)))
        self.groups = _groups(self.situations)
        self.group_sids = [self.situations[head][2] for head, _ in self.groups]
        self.group_of = [0] * len(self.entries)  # each entry's group
        for g, (_, members) in enumerate(self.groups):
            for i in members:
                self.group_of[i] = g
        self.entries = [entry + (g,) for entry, g in zip(self.entries, self.group_of)]
        self.placed = False  # on a page already (see ``named``)
        self.uid = None
        self.lineless = any(entry[1] < 0 for entry in self.entries) or not self.positions
        self.layouts = {}  # the JSON report's, by order of situations (block_occurrences)
        self.serial = next(_serials)  # names it in another's layouts (ids are reused)
        self._steps = None  # ``positions`` as ``lines`` walks them (``_steps``)

    def named(self):
        """The entries as a page's block names them: on the first page that places them, the
        entries themselves (packed with that page: most fragments of a page's own navigation
        section are never met again); from the second on, a uid by which this process keeps
        them once (``situations.register_entries``)."""
        if not self.placed:
            self.placed = True
            return self.entries
        if self.uid is None or not registered(self.uid):
            self.uid = register_entries(self.entries)
        return self.uid

    def lines(self, stamp: Stamp) -> list:
        """The line of each slot at ``stamp``'s place (and 0 last: slot -1, no line)."""
        steps = self._steps
        if steps is None:
            steps = self._steps = _steps(self.positions)
        lines = []
        path = [stamp.anchor]  # the elements down to the previous slot's
        for keep, more in steps:
            del path[keep + 1:]
            el = path[keep]
            for i in more:
                el = el[i]
                path.append(el)
            lines.append(el.sourceline or 0)
        lines.append(0)
        return lines

    def place(self, stamp: Stamp, numbers, out: list) -> None:
        """Append the record ``(number,) + place`` of every finding placed at ``stamp`` to
        ``out``; ``numbers``: the number of each group's situation (``groups`` order)."""
        place_block(self.entries, numbers, stamp.new_base, self.lines(stamp), out)


def _steps(positions) -> list:
    """Each position (child indexes below the anchor) as ``(levels shared with the previous
    one, the indexes below them)``: the links of a navigation section share all but their last
    steps, so each slot's element is found from the previous one's ancestors (a section of a
    thousand-page site has hundreds of slots, placed on every page)."""
    out, previous = [], ()
    for where in positions:
        keep = 0
        for a, b in zip(where, previous):
            if a != b:
                break
            keep += 1
        out.append((keep, where[keep:]))
        previous = where
    return out


def _groups(situations) -> list:
    """``(first entry, entries)`` per distinct situation of a block, in first-entry order: a
    page counts a block's findings per situation, and finds each one's first, from these."""
    by_sid = {}
    for i, (_, _, sid) in enumerate(situations):
        by_sid.setdefault(sid, []).append(i)
    return [(entries[0], tuple(entries)) for entries in by_sid.values()]


class PathFinder:
    """``resolve`` for many relative XPaths below one anchor, with the child positions
    (comments included) that lead to each element. Each parent's children are indexed once
    and each path's parent resolved once, where ``resolve`` counts along the children for
    every step (a highlighted code block has hundreds of spans, each a finding's element)."""

    __slots__ = ("_children", "_paths")

    def __init__(self):
        self._children = {}  # parent -> {(tag, n): (child, position)}
        self._paths = {}  # (start element, relative XPath) -> (element, positions) or None

    def at(self, start: tuple, rel: str) -> tuple:
        """``(element, positions)`` at ``rel`` below ``start`` (the same pair), or ``start``
        itself where a step is missing, as ``resolve`` answers."""
        return self._at(start, rel.strip("/")) or start

    def _at(self, start: tuple, rel: str):
        if not rel:
            return start
        known = self._paths.get((start[0], rel))
        if known is not None or (start[0], rel) in self._paths:
            return known
        head, _, step = rel.rpartition("/")
        parent = self._at(start, head)
        found = None
        if parent is not None:
            tag, _, index = step.partition("[")
            child = self._of(parent[0]).get((tag, int(index[:-1]) if index else 1))
            if child is not None:
                found = (child[0], parent[1] + (child[1],))
        self._paths[(start[0], rel)] = found
        return found

    def _of(self, parent) -> dict:
        known = self._children.get(parent)
        if known is None:
            known, counts = {}, {}
            for position, child in enumerate(parent):
                tag = child.tag
                if isinstance(tag, str):
                    n = counts[tag] = counts.get(tag, 0) + 1
                    known[(tag, n)] = (child, position)
            self._children[parent] = known
        return known


def _rebaser(xpath, old_base: str, rel: str) -> tuple:
    """How ``rebase(xpath, old_base, new_base + rel)`` depends on ``new_base``: (0, result)
    when it does not, (1, suffix) for ``new_base + suffix``, (2, rel, levels) for an ancestor."""
    if not xpath:
        return (0, xpath)
    if xpath == old_base:
        return (1, rel)
    rest = xpath[len(old_base):]
    if xpath.startswith(old_base) and rest[:1] in ("/", ":"):
        return (1, rel + rest)
    if old_base.startswith(xpath) and old_base[len(xpath):len(xpath) + 1] == "/":
        return (2, rel, old_base.count("/") - xpath.count("/"))
    return (0, xpath)


def materialize(fragment: Fragment, stamp: Stamp, out: list) -> None:
    """Append the fragment's samples, re-stamped for ``stamp``'s place, to ``out`` in order."""
    for item in fragment.items:
        if isinstance(item, Sample):
            out.append(stamp.sample(item, fragment.base))
        else:
            rel, nested = item
            materialize(nested, stamp.within(rel), out)
