"""What findings share and what each occurrence adds.

A site with one faint accent colour produces the same finding on every navigation link of every
page: same rule, scheme, state, colours, font, causes. Everything a rule reads of a sample except
where it stands is its *situation*; a rule judges a situation once (rules judge one sample at a
time) and each further occurrence costs only its place: page, XPath, line, text excerpt and the
ancestor an inherited colour comes from.

``sample_key(sample)`` is the situation of a sample (hashable); ``finding_key(finding)`` that of
a finding (its rule and its sample's situation). ``place(finding)`` is what an occurrence adds,
and ``rebuild(template, place, page)`` turns a situation's template finding and a place back
into a full ``Finding`` (outputs that want every finding get them this way).
"""
from __future__ import annotations

import dataclasses
import itertools
import os
import pickle
import operator
from collections import Counter

from .model import Cause, Finding, Layer, Sample

# Sample fields that say where a text stands, not what it looks like. A rule must not read them
# (rules judge colour situations; see DEVELOPERS.md "Rules").
POSITIONAL = ("page", "xpath", "line", "text")
_SPECIAL = ("fg_cause", "bg_layers")  # hold XPaths inside; keyed without them
_SHARED = tuple(f.name for f in dataclasses.fields(Sample)
                if f.name not in POSITIONAL and f.name not in _SPECIAL)
_shared = operator.attrgetter(*_SHARED)
_fields = operator.attrgetter(*(f.name for f in dataclasses.fields(Sample)))
# fields of a record ``(template number, xpath, line, ...)`` (``PageFindings``)
_NUMBER, _XPATH, _LINE = (operator.itemgetter(i) for i in range(3))


def sample_key(s: Sample) -> tuple:
    """Everything rules can read of ``s``: equal keys get equal verdicts."""
    c = s.fg_cause
    cause = None if c is None else (c.declaration, c.chain, c.inherited_from is not None)
    layers = s.bg_layers
    if layers:
        layers = tuple((layer.kind, layer.colour, layer.cause) for layer in layers)
    return (_shared(s), cause, layers)


# What ``looks`` reads of a sample: these by value (strings and numbers, hashed fast) ...
_BY_VALUE = ("scheme", "state", "kind", "status", "reason", "exempt", "font_size_px",
             "font_weight")
_by_value = operator.attrgetter(*_BY_VALUE)
# ... and these by identity (colour tuples, causes: hashing them calls Python code)
_BY_ID = ("fg", "bg", "fg_raw", "bg_alternatives", "surround", "fg_cause", "bg_cause",
          "bg_layers", "link")
assert set(_BY_VALUE + _BY_ID) == set(_SHARED + _SPECIAL)  # every field sample_key reads


def looks(s: Sample) -> tuple:
    """A stand-in for ``sample_key(s)`` among samples that are all alive (so that ids are
    unique): equal ones have equal keys. Samples of one style hold the very same colour tuples
    and causes, and this is hashed and compared much faster than the key (whose causes and
    declarations hash in Python): a page's samples look up their key once per distinct one."""
    return (_by_value(s), id(s.fg), id(s.bg), id(s.fg_raw), id(s.bg_alternatives),
            id(s.surround), id(s.fg_cause), id(s.bg_cause), id(s.bg_layers), id(s.link))


class Alike:
    """Samples grouped by ``looks``: ``firsts``, the first of each group in the order met;
    ``counts``, each group's size; ``of``, each sample's group. What a sample adds to a page's
    counts, declaration uses and palette uses depends only on what ``looks`` reads, so those are
    worked out once per group (a page repeats a few hundred styles over thousands of texts)."""

    __slots__ = ("firsts", "counts", "of")

    def __init__(self, samples):
        index, firsts, of = {}, [], []
        for s in samples:
            same = looks(s)
            g = index.get(same)
            if g is None:
                g = index[same] = len(firsts)
                firsts.append(s)
            of.append(g)
        counted = Counter(of)
        self.firsts, self.of = firsts, of
        self.counts = [counted[g] for g in range(len(firsts))]


def finding_key(f: Finding) -> tuple:
    return (f.rule, sample_key(f.sample))


def slot(f: Finding) -> tuple:
    """Which occurrence ``f`` is, whatever its colours: rule, page, element, state, scheme."""
    s = f.sample
    return (f.rule, s.page, s.xpath, s.state, s.scheme)


def place(f: Finding) -> tuple:
    """``(xpath, line, text, inherited_from, layer xpaths or None, gate marks or None)`` of one
    occurrence; the gate's marks (``tinctura.gate``) are ``(fingerprint, suppressed,
    baseline, suppressed_by)``, ``suppressed_by`` the suppression's origin ("comment",
    "attribute", "configuration"; empty when not suppressed), which the SARIF report needs."""
    s = f.sample
    inherited = s.fg_cause.inherited_from if s.fg_cause is not None else None
    layers = tuple(layer.xpath for layer in s.bg_layers) if s.bg_layers else None
    marks = None
    if getattr(f, "fingerprint", ""):
        origin = f.args.get("suppressed_by", "") if f.suppressed else ""
        marks = (f.fingerprint, f.suppressed, f.baseline, origin)
    return (s.xpath, s.line, s.text, inherited, layers, marks)


def rebuild(template: Finding, where: tuple, page: str) -> Finding:
    """The finding of ``template``'s situation at ``where`` on ``page``."""
    s = Sample(*_fields(template.sample))
    s.page = page
    s.xpath, s.line, s.text, inherited = where[:4]
    c = s.fg_cause
    if c is not None and c.inherited_from != inherited:
        s.fg_cause = Cause(c.declaration, inherited, c.chain)
    if where[4]:
        s.bg_layers = tuple(Layer(x, layer.kind, layer.colour, layer.cause)
                            for x, layer in zip(where[4], s.bg_layers))
    found = occurrence(template, s)
    if where[5]:
        found.fingerprint, found.suppressed, found.baseline, origin = where[5]
        if origin:  # a new dict: the template's arguments are shared by its occurrences
            found.args = {**found.args, "suppressed_by": origin}
    return found


def occurrence(template: Finding, sample: Sample) -> Finding:
    """``template``'s verdict on another sample of the same situation (shares its fixes and
    arguments, which are never changed once made; the gate's marks are the occurrence's own)."""
    t = template
    return Finding(t.rule, t.slug, t.severity, sample, t.ratio, t.required, t.level, t.fixes,
                   t.args)


def place_block(entries, numbers, new_base: str, lines, out: list) -> None:
    """Append to ``out`` the records of a replayed fragment's findings (``fragments.Placement``
    entries ``(relative XPath, line slot, text, inherited, layers, group)``, ``numbers`` the
    number of each group's situation) at the place whose XPath is ``new_base`` and slots' lines
    ``lines``."""
    for rel, slot, text, inherited, layers, group in entries:
        n = numbers[group]
        if layers is not None:
            layers = tuple(_rebased(spec, new_base) for spec in layers)
        kind = inherited[0]
        out.append((n, new_base + rel, lines[slot], text,
                    inherited[1] if kind == 0 else new_base + inherited[1] if kind == 1
                    else _rebased(inherited, new_base), layers, None))


def _rebased(spec: tuple, new_base: str):
    """An XPath of a replayed fragment at ``new_base``: ``spec`` is ``fragments._rebaser``'s."""
    if spec[0] == 0:
        return spec[1]
    if spec[0] == 1:
        return new_base + spec[1]
    return (new_base + spec[1]).rsplit("/", spec[2])[0] or "/"


# What a worker process sends the main one once, and names on later pages: a replayed
# fragment's entries (``fragments.Placement``, by uid) and a situation's template finding and
# key (by process and ``situation_id``). Pages keep their packed blocks by the entries' uid,
# which their own process knows, but for entries placed on one page so far, kept with it: a
# page's own navigation section makes fragments of its own, which would otherwise be kept
# here for the whole run (memory would grow with the pages).
_ENTRIES: dict = {}  # uid -> a Placement's entries, pickled (kept for the run; ``keep_entries``)
_UID_OF: dict = {}  # pickled entries -> their uid here: equal entries are kept once
_LIVE: dict = {}  # uid -> a Placement's entries, for the last ones used (bounded)
_LIVE_LIMIT = 4096
_TEMPLATES: dict = {}  # (pid, situation_id) -> (template, key): received from other processes
_SHIPPED_ENTRIES: set = set()  # uids whose entries this process has pickled for another
_SHIPPED_TEMPLATES: set = set()  # template names this process has pickled for another
_uids = itertools.count(1)
_TOKEN: list = [None]


def process_token() -> tuple:
    """This process's part of the names it gives (uids, template names): its pid and a random
    number drawn when it first names something. A pid alone is not enough: `mkdocs serve` forks
    a new worker for each build, the main process keeps what earlier workers sent, and a new
    worker may get an old one's pid while counting on from the same numbers (forked from the
    same state)."""
    token = _TOKEN[0]
    if token is None or token[0] != os.getpid():  # (a forked child inherits its parent's)
        token = _TOKEN[0] = (os.getpid(), int.from_bytes(os.urandom(8), "big"))
    return token


def register_entries(entries: list) -> tuple:
    """A uid for a Placement's ``entries``, by which packed pages name them. Equal entries get
    one uid: a fragment forgotten and recorded again (``fragments.Memo``), a navigation
    section judged alike in two schemes, every page again after ``mkdocs serve`` saw a
    stylesheet change."""
    data = pickle.dumps(entries, protocol=pickle.HIGHEST_PROTOCOL)
    uid = _UID_OF.get(data)
    if uid is None:  # (a forked worker may name its parent's: it sends what it names once)
        uid = _UID_OF[data] = (process_token(), next(_uids))
        _ENTRIES[uid] = data
    _live(uid, entries)
    return uid


def registered(uid) -> bool:
    """Whether this process still keeps the entries named ``uid`` (``keep_entries``)."""
    return uid in _ENTRIES


def keep_entries(uids) -> None:
    """Forget the entries that no page kept names (``mkdocs serve``: pages replaced by later
    builds would keep theirs for the whole session). A fragment whose entries went registers
    them again when next placed (``fragments.Placement.named``). Not while another process
    sends pages: it names what it sent once."""
    keep = set(uids)
    for data in [data for data, uid in _UID_OF.items() if uid not in keep]:
        del _UID_OF[data]
    for uid in [uid for uid in _ENTRIES if uid not in keep]:
        del _ENTRIES[uid]
    _LIVE.clear()
    _SHIPPED_ENTRIES.intersection_update(keep)


def _entries(named) -> list:
    """A block's entries: ``named`` is them, or their uid (``fragments.Placement.named``)."""
    if type(named) is list:
        return named
    entries = _LIVE.get(named)
    if entries is None:
        entries = _live(named, pickle.loads(_ENTRIES[named]))
    return entries


def _live(uid, entries: list) -> list:
    """Keep ``entries`` at hand (bounded: the fragments they came from may be gone)."""
    if len(_LIVE) >= _LIVE_LIMIT:
        _LIVE.clear()
    _LIVE[uid] = entries
    return entries


def _shipped(findings: "PageFindings") -> tuple:
    """``(template names, templates and entries not sent before)`` of a packed page pickled
    for another process (``PageFindings.__reduce__``): each is sent once per process."""
    pid = process_token()
    names = findings.names  # (made here by ``_Numbering.named``: named already)
    if not names or names[0][0] != pid:
        names = [(pid, situation_id(k)) for k in findings.keys]
    templates = {}
    for name, t, k in zip(names, findings.templates, findings.keys):
        if name not in _SHIPPED_TEMPLATES:
            templates[name] = (t, k)
    entries = {uid: _ENTRIES[uid] for uid in findings._named if uid not in _SHIPPED_ENTRIES}
    _SHIPPED_TEMPLATES.update(templates)
    _SHIPPED_ENTRIES.update(entries)
    return names, templates, entries


def _received(state: tuple, names: list, templates: dict, entries: dict) -> "PageFindings":
    """A packed page pickled by another process (``_shipped``)."""
    _ENTRIES.update(entries)
    _TEMPLATES.update(templates)
    known = [_TEMPLATES[name] for name in names]
    page = PageFindings(state[0], [t for t, _ in known], [k for _, k in known], *state[1:])
    page.names = names
    return page


_IDS: dict = {}  # finding_key -> a number standing for it in this process
_IDS_LIMIT = 200000
_next_id = [0]


def situation_id(key) -> int:
    """A small number for the situation ``key`` (never reused in a process), for callers
    that meet the same key on every page: an int is looked up faster than a key is hashed."""
    sid = _IDS.get(key)
    if sid is None:
        if len(_IDS) >= _IDS_LIMIT:  # bound memory; numbers stay unique
            _IDS.clear()
            _NAMED.clear()
        _next_id[0] += 1
        sid = _IDS[key] = _next_id[0]
    return sid


# id(template) -> (template, its situation key, situation_id): a walked sample's findings come
# from the templates judged for its situation (``engine._situations``), the same objects on
# every page; each is named once (the template is kept, so that its id is not reused).
_NAMED: dict = {}


def _named(template, sample_key) -> tuple:
    """``(finding key, situation_id)`` of ``template``, judged for situation ``sample_key``."""
    hit = _NAMED.get(id(template))
    if hit is None or hit[0] is not template:
        key = (template.rule, sample_key)
        sid = situation_id(key)  # (before the entry: a renewal of the ids clears _NAMED)
        if len(_NAMED) >= _IDS_LIMIT:  # templates judged again after engine._JUDGED's clear
            _NAMED.clear()
        hit = _NAMED[id(template)] = (template, key, sid)
    return hit[1], hit[2]


def packed_form(data: bytes, per_template, size: int) -> tuple:
    """``PageFindings.packed()``'s ``(pickled records, occurrences per template, templates in
    first-seen order)`` from ``per_template`` (template index -> occurrences, in first-seen
    order) for ``size`` templates."""
    counts = [0] * size
    for n, times in per_template.items():
        counts[n] = times
    return data, counts, list(per_template)


class PageFindings:
    """One page's findings as situations and places: ``templates`` (a finding per situation),
    their ``keys`` (``finding_key``) and ``records`` ``(template index,) + place`` in report
    order. A read-only sequence of ``Finding``
    (rebuilt on first use); pickled without them, so a worker sends each situation once.

    Replayed fragments' findings (most of a page's, when a navigation link fails) are kept as
    blocks until their records are read: a block is a placed fragment, ``(fragment's entries,
    their numbers)`` once per page and ``(block, XPath of the place, lines)`` per place.
    Counting them, and packing them for the main process, costs a block, not a finding: a
    report grouped by problem never reads them."""

    __slots__ = ("page", "templates", "keys", "_records", "_packed", "_items", "encoded",
                 "_lazy", "_named", "names")

    @property
    def entry_uids(self) -> tuple:
        """The uids of the entries its packed records name (``register_entries``)."""
        return tuple(self._named)

    def __init__(self, page: str, templates: list, keys: list, records: list, packed=None,
                 encoded=None, lazy=None):
        self.page = page
        self.templates = templates
        self.keys = keys
        self._records = records
        self._packed = packed  # (pickled records, occurrences per template, first-seen order)
        self._items = None
        # the records as a report writes them, made by ``pack`` (``encode``'s answer), or None
        self.encoded = encoded
        # (records of walked samples, sorted; blocks; places; ranks; groups), see ``build``
        self._lazy = lazy
        self._named = ()  # uids of the entries its packed records name (``pack``)
        # its templates' names in the process that made them (``_shipped``, and
        # ``_Numbering.named``), which the store looks up faster than their keys, tuples
        # hashed anew each time
        self.names = None

    @property
    def records(self) -> list:
        if self._records is None:
            if self._lazy is not None:
                self._records = expand(self._lazy[:4])
            else:
                self._records = unpack(self._packed[0])
        return self._records

    def records_of(self, wanted) -> list:
        """The records of the templates ``wanted`` (a truth value per template index), in
        order: blocks of none of them are not placed."""
        if self._records is not None:
            return [r for r in self._records if wanted[r[0]]]
        if self._lazy is not None:
            return expand(self._lazy[:4], wanted)
        return unpack(self._packed[0], wanted)

    def blocks(self):
        """``(records of walked samples, blocks, places, ranks, groups)`` while the replayed
        fragments' findings are kept as blocks (see ``build``), else None."""
        return self._lazy

    def pack(self, encode=None, keep: bool = True) -> "PageFindings":
        """Pickle the records once, where they were made (a worker process): the main process
        can then keep them as they are (``FindingStore.put_packed``) and count them from
        ``packed()`` without reading them. ``encode(self)``, when given, writes them for a
        report here too (``encoded``), so the main process only copies them. ``keep``
        False: no output will read them back (``engine.Options.keep_records``): counted,
        not pickled; a store keeps their counts only, and they are read from here."""
        if encode is not None:
            self.encoded = encode(self)
        data = None
        if self._lazy is not None:  # blocks pickled as blocks, counted per block
            per_template = _tally(self._lazy, len(self.templates))
            if keep:
                data = pickle.dumps(self._lazy[:4], protocol=pickle.HIGHEST_PROTOCOL)
                self._named = [named for named, _ in self._lazy[1] if type(named) is tuple]
        else:
            per_template = Counter(map(_NUMBER, self._records))  # in first-seen order
            if keep:
                data = pickle.dumps(self._records, protocol=pickle.HIGHEST_PROTOCOL)
        self._packed = packed_form(data, per_template, len(self.templates))
        if keep:
            self._records = self._lazy = None
        return self

    def packed(self):
        """``(pickled records or None, occurrences per template, templates in first-seen
        order)`` when the records were packed and not read since (None: counted only, see
        ``pack``), else None."""
        if self._packed is not None and self._packed[0] is None:
            return self._packed
        return self._packed if self._records is None and self._lazy is None else None

    @classmethod
    def build(cls, page: str, findings, keys=None, more=(), order=None, judged=(),
              replays=(), template_order=None) -> "PageFindings":
        """From findings (with their ``finding_key``s when known) and ``more``:
        ``(template, key, place)`` of findings that were never built. ``order``: sort key of
        ``(template, place)``. Findings never built either: ``judged`` (placed first),
        ``(sample, sample_key, template findings)`` of walked samples, the templates judged
        on a sample of the same situation; ``replays`` (placed last), ``(fragments.Placement,
        Stamp)`` of replayed fragments' findings, kept as blocks (see the class). ``template_order``:
        instead of ``order``, records sorted by line, XPath and ``template_order(template)``."""
        made = _Numbering()
        records = made.judged(judged)
        if keys is None:
            keys = [finding_key(f) for f in findings]
        for f, key in zip(findings, keys):
            records.append((made.number(key, lambda f=f: f),) + place(f))
        for template, key, where in more:
            n = made.by_object.get(id(template))
            if n is None:
                n = made.by_object[id(template)] = made.number(key, lambda t=template: t)
            records.append((n,) + where)
        blocks, groups, places = made.blocks(replays)
        templates, tkeys = made.templates, made.keys
        if order is not None:
            records = expand((records, blocks, places, None))
            records.sort(key=lambda r: order(templates[r[0]], r))
            return made.named(cls(page, templates, tkeys, records))
        ranks = None
        if template_order is not None:
            # each template's rank in template_order (equal orders, equal ranks): ints
            # compare faster than the orders' tuples of strings
            after = [template_order(t) for t in templates]
            rank = {a: r for r, a in enumerate(sorted(set(after)))}
            ranks = [rank[a] for a in after]
            records = _sorted(records, ranks)
        if not places:
            return made.named(cls(page, templates, tkeys, records))
        return made.named(cls(page, templates, tkeys, None,
                              lazy=(records, blocks, places, ranks, groups)))

    def built(self):
        """The findings, if they were built (and so may carry marks set since); else None."""
        return self._items

    def _list(self) -> list:
        if self._items is None:
            t, page = self.templates, self.page
            self._items = [rebuild(t[r[0]], r[1:], page) for r in self.records]
        return self._items

    def __len__(self) -> int:
        if self._records is not None:
            return len(self._records)
        if self._lazy is not None:
            before, places, groups = self._lazy[0], self._lazy[2], self._lazy[4]
            return len(before) + sum(len(groups[b][2].entries) for b, _, _ in places)
        return sum(self._packed[1])

    def __bool__(self) -> bool:
        return len(self) > 0

    def __iter__(self):
        return iter(self._list())

    def __getitem__(self, i):
        return self._list()[i]

    def __eq__(self, other) -> bool:
        return list(self) == list(other)

    def __reduce__(self):
        if self._packed is None or self._packed[0] is None:
            return (PageFindings, (self.page, self.templates, self.keys, self.records, None,
                                   self.encoded))
        # packed: a worker's answer, which names what it has sent the main process before
        return (_received, ((self.page, self._records, self._packed, self.encoded),)
                + _shipped(self))


class _Numbering:
    """A page's situations numbered in order of first meeting (``PageFindings.build``), by
    their ``situation_id``: a key is hashed once per process, not once per page (the keys of
    a page's situations hold declarations and causes, whose hashes are computed in Python)."""

    def __init__(self):
        self.templates, self.keys, self.index = [], [], {}
        # a template object always comes with the same key: its number is found once a page
        self.by_object = {}

    def number(self, key, make, sid=None) -> int:
        """The page's number of situation ``key`` (``sid``: its ``situation_id``, when
        known); ``make()`` gives its template."""
        if sid is None:
            sid = situation_id(key)
        n = self.index.get(sid)
        if n is None:
            n = self.index[sid] = len(self.templates)
            self.templates.append(make())
            self.keys.append(key)
        return n

    def named(self, findings: "PageFindings") -> "PageFindings":
        """``findings`` with the names of its templates in this process (as ``_shipped``
        gives them): the store finds a known situation by name, not by hashing its key."""
        pid = process_token()
        findings.names = [(pid, sid) for sid in self.index]  # (in number order)
        return findings

    def judged(self, judged) -> list:
        """The records of walked samples' findings: ``(sample, sample_key, templates)``."""
        records, by_object = [], self.by_object
        for s, k, found in judged:
            where = None  # the sample's place, made once for all its findings
            for t in found:
                own = t.sample is s
                n = by_object.get(id(t))
                if n is None:
                    key, sid = _named(t, k)
                    n = by_object[id(t)] = self.number(
                        key, lambda t=t, s=s, own=own: t if own else occurrence(t, s), sid)
                if own and t.fingerprint:  # (marked by a gate: the marks are its own)
                    records.append((n,) + place(t))
                    continue
                if where is None:
                    c = s.fg_cause
                    where = (s.xpath, s.line, s.text,
                             c.inherited_from if c is not None else None,
                             tuple(layer.xpath for layer in s.bg_layers)
                             if s.bg_layers else None, None)
                records.append((n,) + where)
        return records

    def blocks(self, replays) -> tuple:
        """``(blocks, groups, places)`` of replayed fragments' findings: ``(entries or
        their uid, numbers)`` (``Placement.named``; ``numbers``: the page's number of each of
        its ``Placement.groups``) and ``(Placement.groups, lineless, Placement)`` once per
        placement, ``(block, XPath of the place, lines)`` per place."""
        blocks, groups, places = [], [], []
        block_of = {}  # id(placement) -> its block
        for placement, stamp in replays:
            b = block_of.get(id(placement))
            if b is None:  # (each group's situation numbered on the page, in group order)
                per_group = list(map(self.index.get, placement.group_sids))
                if None in per_group:
                    for g, n in enumerate(per_group):
                        if n is None:
                            template, key, sid = placement.situations[placement.groups[g][0]]
                            per_group[g] = self.number(key, lambda t=template: t, sid)
                b = block_of[id(placement)] = len(blocks)
                blocks.append((placement.named(), per_group))
                groups.append((placement.groups, placement.lineless, placement))
            places.append((b, stamp.new_base, placement.lines(stamp)))
        return blocks, groups, places


def _sorted(records: list, ranks: list) -> list:
    """``records`` sorted by line, XPath and their template's rank (stable)."""
    if len(records) < 2:
        return records
    # (line, XPath, rank) per record, built by C-level iterators: pages have thousands
    sort_keys = list(zip(map(_LINE, records), map(_XPATH, records),
                         map(ranks.__getitem__, map(_NUMBER, records))))
    return list(map(records.__getitem__, sorted(range(len(records)),
                                                key=sort_keys.__getitem__)))


def expand(lazy: tuple, wanted=None, met=None) -> list:
    """The records of ``PageFindings``'s blocks ``(records, blocks, places, ranks)``, in
    report order: the walked samples' records then the blocks', sorted when ``ranks``;
    only those of the templates ``wanted`` (a truth value per template index) if given.
    ``met(named, base, numbers, entries)``: for a block at its place, True to leave it out
    (a report that counts it from an earlier page), else a list to add its records to too."""
    before, blocks, places, ranks = lazy
    named_as = [named for named, _ in blocks]
    blocks = [(_entries(named), numbers) for named, numbers in blocks]
    if wanted is None:
        records = list(before)
    else:
        records = [r for r in before if wanted[r[0]]]
        blocks = [_only(entries, numbers, wanted) for entries, numbers in blocks]
    for b, new_base, lines in places:
        entries, numbers = blocks[b]
        if not entries:
            continue
        kept = met(named_as[b], new_base, numbers, entries) if met is not None else None
        if kept is True:
            continue
        start = len(records)
        place_block(entries, numbers, new_base, lines, records)
        if kept is not None:
            kept.extend(records[start:])
    return records if ranks is None else _sorted(records, ranks)


def _only(entries, numbers, wanted) -> tuple:
    """A block's ``(entries, numbers)`` with the entries of the templates ``wanted`` only."""
    if all(wanted[n] for n in numbers):
        return entries, numbers
    return [entry for entry in entries if wanted[numbers[entry[5]]]], numbers


def unpack(data: bytes, wanted=None, met=None) -> list:
    """The records pickled by ``PageFindings.pack`` (or a list of records); only those of the
    templates ``wanted`` (a truth value per template index) if given; ``met``: ``expand``'s."""
    kept = pickle.loads(data)
    if type(kept) is not list:
        return expand(kept, wanted, met)
    return kept if wanted is None else [r for r in kept if wanted[r[0]]]


def _tally(lazy: tuple, size: int) -> dict:
    """Occurrences per template of ``PageFindings``'s blocks, in order of first occurrence in
    the report (as ``Counter`` of the expanded records), without placing a finding: the first
    of a template is the least ``(line, XPath, rank, run order)`` among its records."""
    before, blocks, places, ranks, groups = lazy
    counts = Counter(map(_NUMBER, before))
    # sorted already: a template's first record there is its least (the first index wins)
    at = dict(zip(map(_NUMBER, reversed(before)), range(len(before) - 1, -1, -1)))
    if ranks is None:
        first = {n: (i,) for n, i in at.items()}
    else:
        first = {n: (before[i][2], before[i][1], ranks[n], i) for n, i in at.items()}
    seq = len(before)
    for b, new_base, lines in places:
        named, numbers = blocks[b]
        entries = _entries(named)
        block_groups, lineless = groups[b][:2]
        lowest = 0 if lineless else min(lines[:-1])  # (lines ends with slot -1's 0)
        for (head, members), n in zip(block_groups, numbers):
            counts[n] += len(members)
            known = first.get(n)
            if ranks is None:
                if known is None:
                    first[n] = (seq + head,)
                continue
            if known is not None and known[0] < lowest:  # (places come in page order)
                continue
            i = min(members, key=lambda i: (lines[entries[i][1]], entries[i][0]))
            key = (lines[entries[i][1]], new_base + entries[i][0], ranks[n], seq + i)
            if known is None or key < known:
                first[n] = key
        seq += len(entries)
    return {n: counts[n] for n in sorted(first, key=first.__getitem__)}
