"""A page's replayed fragments written as format 3 occurrences a block at a time.

``json_report.encoded_occurrences`` writes a page's records one by one. On a site whose
navigation link fails in a state, most of them are the same replayed fragments' findings on
every page: each would be placed (``situations.place_block``), sorted among the page's records,
grouped and written again. Here the fragments placed at one XPath (one per colour scheme,
usually) have their findings ordered and grouped into occurrences once (a ``_Layout``, kept on
the first one's ``fragments.Placement``), and each page writes them from the layout with its
lines, XPath base and numbers filled in.

The text is the same, character for character. It holds only where each place's findings stand
apart in report order (line, then XPath): no other record between their first and their last.
A page where they do not (a minified page whose navigation is one line, say) is written record
by record, as before.
"""
from __future__ import annotations

import operator
from bisect import bisect_left, bisect_right
from itertools import chain

from .json_report import (
    _COMPACT,
    _excerpt,
    _shared,
    encoded_list,
    encoded_occurrences,
    levels_up,
    occurrences_after,
)
from ..situations import _rebased

# a record's place in report order, ``(line, XPath)``: records are sorted by it (then rank)
_KEY = operator.itemgetter(2, 1)
_LAYOUTS_LIMIT = 8  # per fragment: one per set of fragments placed with it, usually one


def encoded_page(findings) -> str | None:
    """``encoded_occurrences`` of ``findings`` (``situations.PageFindings``), by blocks where
    its replayed fragments stand apart."""
    lazy = findings.blocks()
    runs = _runs(lazy) if lazy is not None else None
    if runs is None:
        return encoded_occurrences(findings.records)
    return _written(lazy[0], runs)


class _Layout:
    """The findings of fragments placed at one XPath, in report order and grouped into
    occurrences, for their slots' lines ``lines`` (one list per fragment). At a place whose
    lines are these shifted by one constant, the order and the groups are the same."""

    __slots__ = ("lines", "occurrences", "first", "last", "depth", "kinds", "kind_of", "tail")

    def __init__(self, lines, occurrences, depth, kinds, kind_of):
        self.lines = lines
        # the distinct lists of situations of its occurrences, as (fragment, group) pairs,
        # and each occurrence's: a page writes each list once
        self.kinds, self.kind_of = kinds, kind_of
        # (entries as (fragment, group), fragment, slot, shared with the previous relative
        # XPath, the rest written, text written, ",up" written or None, the inherited-from
        # rule (fragments._rebaser's) when "up" depends on the place, relative XPath)
        self.occurrences = occurrences
        self.first, self.last = occurrences[0], occurrences[-1]
        self.depth = depth  # levels the base must have for the "up"s above it to hold
        # the occurrences after the first as one %-format and what fills it (``_tail``)
        self.tail = _tail(occurrences)


def _runs(lazy) -> list | None:
    """``(first key, last key, layout, numbers, base, lines)`` per XPath where fragments were
    placed (``numbers``: the page's number of each situation of a fragment, in its
    ``Placement.groups`` order; ``numbers`` and ``lines`` one per fragment), in report order;
    None when the blocks cannot be written as such."""
    _, blocks, places, ranks, groups = lazy
    if ranks is None:
        return None
    at_base = {}  # base -> its places (block, base, lines), in page order
    for place in places:
        if blocks[place[0]][1]:
            members = at_base.get(place[1])
            if members is None:
                at_base[place[1]] = [place]
            else:
                members.append(place)
    runs = []
    for base, members in at_base.items():
        if not base.isascii() or "\0" in base:
            return None
        placements = [groups[b][2] for b, _, _ in members]
        lines = [place[2] for place in members]
        layout = _layout_for(placements, lines, members, blocks, ranks)
        if layout is None or base.count("/") <= layout.depth:
            return None
        numbers = [blocks[b][1] for b, _, _ in members]
        first, last = layout.first, layout.last
        runs.append(((lines[first[1]][first[2]], base + first[8]),
                     (lines[last[1]][last[2]], base + last[8]), layout, numbers, base, lines))
    runs.sort(key=operator.itemgetter(0))
    return runs if _apart(lazy[0], runs) else None


def _apart(records: list, runs: list) -> bool:
    """Whether no record of walked samples (``records``, in report order) stands between a
    run's first and last ``(line, XPath)``, nor another run (``runs`` sorted)."""
    previous_last = None
    for first, last, *_ in runs:
        if previous_last is not None and not previous_last < first:
            return False
        if bisect_left(records, first, key=_KEY) != bisect_right(records, last, key=_KEY):
            return False
        previous_last = last
    return True


def _layout_for(placements, lines, members, blocks, ranks):
    """The layout of ``placements`` placed at one XPath with their slots' ``lines`` (their
    ``members`` of ``blocks`` on a page ranked ``ranks``), or None.

    The order of the situations at one element is their rank's, which follows from what they
    are (``situations.PageFindings.build``'s ``template_order``: scheme, state, rule), so a
    layout is kept per fragments placed together, whatever the page."""
    key = tuple(p.serial for p in placements[1:])
    kept = placements[0].layouts.get(key)
    if kept is not None and _shifted(kept.lines, lines):
        return kept
    if any(p.lineless for p in placements):
        return None
    group_ranks = [ranks[n] for b, _, _ in members for n in blocks[b][1]]
    dense = sorted(set(group_ranks))  # (pages rank apart: made dense)
    kept = _layout(placements, tuple(map(dense.index, group_ranks)), lines)
    if kept is not None:
        layouts = placements[0].layouts
        if len(layouts) >= _LAYOUTS_LIMIT:  # partners recorded again (a long `serve`)
            layouts.clear()
        layouts[key] = kept
    return kept


def _shifted(reference: list, lines: list) -> bool:
    """Whether each fragment's slot ``lines`` (each ending with slot -1's 0) are
    ``reference``'s (without it) shifted by one constant."""
    add = (lines[0][0] - reference[0][0]).__add__
    for now, then in zip(lines, reference):
        if len(now) != len(then) + 1 or list(map(add, then)) != now[:-1]:
            return False
    return True


def _layout(placements, pattern: tuple, lines: list) -> _Layout | None:
    items, rank, at = [], [], 0
    for f, placement in enumerate(placements):
        items.extend((f, i) for i in range(len(placement.entries)))
        rank.extend(pattern[at + g] for g in placement.group_of)
        at += len(placement.groups)
    entry = [placements[f].entries[i] for f, i in items]
    order = sorted(range(len(items)), key=lambda k: (lines[items[k][0]][entry[k][1]],
                                                     entry[k][0], rank[k]))
    grouped = []  # [items, fragment, slot, relative XPath, text, inherited (canonical, rule)]
    for k in order:
        f = items[k][0]
        rel, slot, text, rule = entry[k][:4]
        inherited = _canonical(rule), rule
        head = grouped[-1] if grouped else None
        if head is not None and rel == head[3] and text == head[4] \
                and lines[f][slot] == lines[head[1]][head[2]]:
            if inherited[0] == head[5][0]:
                head[0].append(items[k])
                continue
            if "abs" in (inherited[0][0], head[5][0][0]):
                return None  # (rebased, they might be equal at some places only)
        grouped.append([[items[k]], f, slot, rel, text, inherited])
    for head in grouped:  # an entry stands for its situation: its group in the fragment
        head[0] = tuple((f, placements[f].group_of[i]) for f, i in head[0])
    return _occurrences(grouped, [list(line[:-1]) for line in lines])


def _occurrences(grouped: list, lines: list) -> _Layout | None:
    occurrences, previous, depth = [], None, 0
    for members, f, slot, rel, text, inherited in grouped:
        shared = _shared(previous, rel) if previous is not None else 0
        written = _COMPACT(_excerpt(text)), _COMPACT(rel[shared:])
        if any("\\u0000" in w for w in written):
            return None
        up, per_place = _up(rel, *inherited)
        if inherited[0][0] == "above":
            depth = max(depth, inherited[0][1])
        occurrences.append((members, f, slot, shared, written[1], written[0], up,
                            per_place, rel))
        previous = rel
    kinds = list(dict.fromkeys(occurrence[0] for occurrence in occurrences))
    kind_of = [kinds.index(occurrence[0]) for occurrence in occurrences]
    return _Layout(lines, occurrences, depth, kinds, kind_of)


def _canonical(inherited: tuple) -> tuple:
    """``fragments._rebaser``'s rule for an inherited-from XPath in a form whose equality is
    the XPaths' at every place deep enough (``_Layout.depth``): ("none", None or ""), ("in",
    suffix) for the base plus a suffix, ("above", levels) for an ancestor of the base, ("abs",
    XPath)."""
    kind = inherited[0]
    if kind == 0:
        return ("abs", inherited[1]) if inherited[1] else ("none", inherited[1])
    if kind == 1:
        return ("in", inherited[1])
    rel, levels = inherited[1], inherited[2]
    steps = rel.count("/")
    if steps >= levels:
        return ("in", rel.rsplit("/", levels)[0] if levels else rel)
    return ("above", levels - steps)


def _up(rel: str, inherited: tuple, rule: tuple) -> tuple:
    """``(",up" written, None)`` when ``inherited`` (``_canonical`` of ``rule``) gives the same
    "up" at every place deep enough, ``(None, rule)`` when it must be worked out per place."""
    if inherited[0] == "none":
        return "", None
    if inherited[0] == "in":
        up = levels_up(rel, inherited[1])
        if type(up) is int:
            return "," + str(up), None
    elif inherited[0] == "above":
        return "," + str(inherited[1] + rel.split("::")[0].count("/")), None
    return None, rule


def _written(before: list, runs: list) -> str | None:
    pieces, previous, at = [], "", 0
    for first, _, layout, numbers, base, lines in runs:
        upto = bisect_left(before, first, key=_KEY)
        if upto > at:
            previous = _records(before[at:upto], previous, pieces)
            if previous is None:
                return None
            at = upto
        kinds = [",".join([str(numbers[f][g]) for f, g in kind]) for kind in layout.kinds]
        written = list(map(kinds.__getitem__, layout.kind_of))
        previous = _block(layout, written, base, lines, previous, pieces)
        if previous is None:
            return None
    if at < len(before):
        if _records(before[at:], previous, pieces) is None:
            return None
    return "[" + ",".join(pieces) + "]"


def _records(records: list, previous: str, pieces: list) -> str | None:
    """Write ``records`` after an occurrence at ``previous``; the XPath of their last."""
    occurrences, previous = occurrences_after(records, previous)
    text = encoded_list(occurrences)
    if text is None:
        return None
    pieces.append(text[1:-1])
    return previous


def _tail(occurrences: list):
    """The occurrences after the first, as ``_block`` writes them, as one %-format of their
    numbers, shared lengths (less the base's) and lines, with the shared lengths and the
    ``(fragment, slot)`` of each line; None when an "up" depends on the place. Filled by one
    C-level formatting per page: a 1,000-page manual's navigation has thousands a page."""
    rest = occurrences[1:]
    if any(o[6] is None for o in rest):
        return None
    fmt = ",".join("[[\0%s\0],%d," + o[4].replace("%", "%%") + ",%d,"
                   + (o[5] + o[6]).replace("%", "%%") + "]" for o in rest)
    return fmt, [o[3] for o in rest], [(o[1], o[2]) for o in rest]


def _block(layout: _Layout, numbers: list, base: str, lines: list, previous: str,
           pieces: list) -> str | None:
    """Write the fragments placed at ``base``; the XPath of their last occurrence (None: an
    inherited-from XPath held a NUL)."""
    tail = layout.tail
    if tail is not None and _first(layout.occurrences[0], numbers[0], base, lines, previous,
                                   pieces):
        if len(numbers) > 1:
            fmt, shared, slots = tail
            n = len(base)
            values = zip(numbers[1:], [k + n for k in shared], [lines[f][i] for f, i in slots])
            pieces.append(fmt % tuple(chain.from_iterable(values)))
        return base + layout.last[8]
    n, first = len(base), True
    for (_, f, slot, shared, rest, text, up, per_place, rel), listed in zip(
            layout.occurrences, numbers):
        if first:  # written against the occurrence before these
            xpath = base + rel
            shared = _shared(previous, xpath)
            rest = _COMPACT(xpath[shared:])
            first = False
        else:
            shared += n
        if up is None:
            up = "," + _COMPACT(levels_up(base + rel, _rebased(per_place, base)))
            if "\\u0000" in up:
                return None  # (as encoded_occurrences: then written from the records)
        pieces.append(f"[[\0{listed}\0],{shared},{rest},{lines[f][slot]},{text}{up}]")
    return base + layout.last[8]


def _first(occurrence, listed: str, base: str, lines: list, previous: str, pieces: list) -> bool:
    """Write a block's first occurrence (against the occurrence before it, ``previous``);
    False, writing nothing, when its "up" depends on the place."""
    _, f, slot, _, _, text, up, _, rel = occurrence
    if up is None:
        return False
    xpath = base + rel
    shared = _shared(previous, xpath)
    pieces.append(f"[[\0{listed}\0],{shared},{_COMPACT(xpath[shared:])},{lines[f][slot]},"
                  f"{text}{up}]")
    return True
