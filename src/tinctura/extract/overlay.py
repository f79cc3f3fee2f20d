"""A page's own trailing ``<style>`` blocks laid over the rule set of its stylesheets.

Computed styles are shared by rule set (``samples.StyleCache``): every page with the same
stylesheets reuses what earlier pages computed, and replays their repeated subtrees. A page
with a ``<style>`` block of its own (a table generated from data, coloured by classes of that
page) has a rule set of its own, and would compute every style cold: ten times the time of a
page without one, on the benchmark's ``own-styles`` site. When the page's blocks come after
its last stylesheet, their rules come after every other in the cascade's order of
appearance, so an element none of them matches has the style it has without them: such a
page is keyed and cached with the rule set of its stylesheets (the base), and only the
elements its own rules match get keys of their own (``Overlay.marks``). Styles are still
computed with the page's whole rule set, made of the stylesheets' rule set and index, shared,
and the page's own rules (``LaidOver``).

A rule of a state (``a:hover``) marks every element it matches in some state: its selector
with each dynamic pseudo-class made ``:is(*)``, which matches more, never less (keyed apart
needlessly at worst). Blocks that cannot be laid over keep a rule set of their own: rules
reading descendants (``:has()``), a state inside ``:not()`` (made ``:is(*)`` it would match
less), cascade layers, which reorder the cascade.

A block every page verified carries last (the fixes' overrides, ``overrides.inject``) is
expanded, numbered and indexed once for all those pages (``SharedBlock``), and what the rules
reading no attribute a colour scheme sets match is worked out once for all of a page's schemes.
"""
from __future__ import annotations

import dataclasses
from functools import cached_property

import tinycss2
from lxml.etree import Element

from .media import Environment
from .ruleset import Index, indexed
from .sheet import _DYNAMIC_RE, _rightmost_attrs, compile_one


def can_lay_over(rules) -> bool:
    """Whether ``rules`` (a page's trailing ``<style>`` blocks) can be laid over the rule set
    before them, as far as their layers and ``:has()`` tell (``marking`` asks it, and
    tells the rest)."""
    return all(not r.layer and ":has(" not in r.selector_text for r in rules)


def marking(rules) -> list | None:
    """``rules`` as ``Overlay`` marks with them, a rule of a state relaxed (``_relaxed``);
    None where they cannot be laid over (``can_lay_over``) or one cannot be relaxed: the
    blocks are not laid over."""
    if not can_lay_over(rules):
        return None
    out = []
    for rule in rules:
        if rule.dynamic:
            rule = _relaxed(rule)
            if rule is None:
                return None
        out.append(rule)
    return out


def _relaxed(rule):
    """``rule`` matching wherever it matches in some state: its dynamic pseudo-classes made
    ``:is(*)``; None where that would not match more (one inside ``:not()``), or cannot be
    compiled."""
    text = rule.selector_text
    if ":not(" in text.lower():
        return None
    relaxed = _DYNAMIC_RE.sub(":is(*)", text)
    compiled, dynamic = compile_one(relaxed)
    if compiled is None or dynamic:
        return None
    return dataclasses.replace(
        rule, selector_text=relaxed, compiled=compiled, dynamic=False,
        attr_names=_rightmost_attrs(tinycss2.parse_component_value_list(relaxed)))


class LaidOver:
    """The rule set of a page whose own trailing ``<style>`` blocks (``rules``, expanded: the
    last in the cascade's order of appearance) are laid over ``base``, the rule set of its
    stylesheets: made of that one's rules and indexes, which every such page shares, and the
    page's own. (A whole rule set of its own, built and indexed for each page, cost about a
    sixth of a page's time on the benchmark's ``own-styles`` site.)"""

    def __init__(self, base, rules, marking_rules, shared_sheets=frozenset(), shared=None):
        for order, rule in enumerate(rules, base.size):  # as in the whole rule set
            rule.order = order
        self.base = base
        # a block every page verified carries last (``SharedBlock``: the fixes' overrides),
        # expanded and indexed once for them all
        self.shared = shared
        more = shared.rules if shared is not None else ()
        self.size = base.size + len(rules) + len(more)
        self.colour_rules = [r for r in rules if r.decls]
        self.own_cue_rules = [r for r in rules if r.cue_decls]
        self.cue_rules = base.cue_rules + self.own_cue_rules
        if shared is not None:
            self.cue_rules = self.cue_rules + shared.cue_rules
        # (``marking``: a rule of a state relaxed once for every scheme marking with it)
        self.own_rules = marking_rules
        # blocks every page verified carries (the fixes' overrides): see ``Kept``
        self.shared_sheets = shared_sheets
        # no layers of its own (``can_lay_over``), nor :has()
        self.layer_ranks, self.unlayered_rank = base.layer_ranks, base.unlayered_rank
        self.layer_rank, self.uses_has = base.layer_rank, base.uses_has
        self._indexes = {}

    @property
    def rules(self) -> list:
        more = self.shared.colour_rules if self.shared is not None else []
        return self.base.rules + self.colour_rules + more

    @property
    def structure(self):
        return self.base.structure  # (the pages are keyed by the base's)

    @cached_property
    def scheme_facts(self):
        from .schemes import SchemeFacts

        return self.base.scheme_facts.joined(SchemeFacts(self.colour_rules))

    def index(self, env: Environment) -> "LaidOverIndex":
        idx = self._indexes.get(env.key)
        if idx is None:
            own = indexed(self.colour_rules, self.own_cue_rules, env, self)
            shared = self.shared.index(env) if self.shared is not None else None
            idx = self._indexes[env.key] = LaidOverIndex(self.base.index(env), own, shared)
        return idx


class LaidOverIndex:
    """The Index of a ``LaidOver`` rule set: its base's (shared, warm), then the page's own, then
    a block every page verified carries (``SharedBlock``, likewise shared)."""

    def __init__(self, base, own, shared=None):
        self.base, self.own, self.shared = base, own, shared
        self.dynamic_rules = base.dynamic_rules + own.dynamic_rules
        self.cue_rules = base.cue_rules + own.cue_rules
        if shared is not None:
            self.dynamic_rules = self.dynamic_rules + shared.dynamic_rules
            self.cue_rules = self.cue_rules + shared.cue_rules

    def match(self, wrapper) -> list:
        return self.match_over(wrapper, self.base.match(wrapper))

    def match_over(self, wrapper, found) -> list:
        """``match``, the base's matches given (``found``: not changed)."""
        more = self.own.match(wrapper)
        if more:
            found = found + more
        if self.shared is not None:
            more = self.shared.match(wrapper)
            if more:
                found = found + more
        return found

    def cue_match(self, wrapper) -> list:
        found = self.base.cue_match(wrapper)
        for idx in (self.own, self.shared):
            if idx is not None and idx.cue_rules:
                more = idx.cue_match(wrapper)
                if more:
                    found = found + more
        return found

    def state_can_matter(self, element) -> bool:
        return self.base.state_can_matter(element) or any(
            idx is not None and bool(idx.dynamic_rules) and idx.state_can_matter(element)
            for idx in (self.own, self.shared))


class SharedBlock:
    """A ``<style>`` block every page verified carries after its own (the fixes' overrides,
    ``overrides.inject``), laid over the rule set ``base``: expanded, numbered, indexed and
    grouped for marking once for every page of a round, not once a page (1,800 overrides
    copied, indexed and scanned again for each of 24 pages were a quarter of the
    verification). Its rules are numbered after any page's own (``SHARED_ORDER``), as the
    block comes after them."""

    def __init__(self, base, rules, marking_rules):
        for order, rule in enumerate(rules, base.size + SHARED_ORDER):
            rule.order = order
        self.base = base
        self.rules = rules
        self.colour_rules = [r for r in rules if r.decls]
        self.cue_rules = [r for r in rules if r.cue_decls]
        self.marking = marking_rules
        self.ids = frozenset(map(id, marking_rules))
        self.parts = {}  # id(rule) -> what the rule is, by value (``Overlay._part``)
        self._indexes, self._groups = {}, {}

    def index(self, env: Environment):
        idx = self._indexes.get(env.key)
        if idx is None:
            idx = self._indexes[env.key] = indexed(self.colour_rules, self.cue_rules, env,
                                                   self.base)
        return idx

    def groups(self, env: Environment, attributes) -> tuple:
        """``(rules reading none of a scheme's attributes, rules reading one)`` applying in
        ``env``, each a ``_Group`` or None (``Overlay``)."""
        key = (env.key, tuple(attributes))
        found = self._groups.get(key)
        if found is None:
            found = self._groups[key] = _split(
                [r for r in self.marking if all(env.matches(m) for m in r.media)],
                attributes, self.base)
        return found


SHARED_ORDER = 1 << 30  # (a page's own rules, however many, come before)


class Kept(tuple):
    """The key part of an element that only rules of blocks shared by pages match (the
    overrides injected into every page verified, ``overrides.verify``): the same on those
    pages, so what is computed under it is kept for them, not let go with the page
    (``samples.PageWalker.forget_own``). Equal to the plain part: either names the same rules."""

    __slots__ = ()


class Overlay:
    """The page's own rules (``LaidOver.own_rules``, states relaxed) in one environment: which
    elements they match, as a key part each."""

    def __init__(self, rules, env: Environment, ruleset, page_marks=None, attributes=()):
        rules = [r for r in rules if all(env.matches(m) for m in r.media)]
        # what the rules reading none of the ``attributes`` a scheme sets match is the same in
        # every colour scheme: worked out once for the page's tree (``page_marks``: a dict per
        # page); the others', per scheme (the fixes' overrides: 20 of 1,800 rules)
        plain, reading = _split(rules, attributes, ruleset)
        block = self._block = getattr(ruleset, "shared", None)
        more = block.groups(env, attributes) if block is not None else (None, None)
        self._plain = [g for g in (plain, more[0]) if g is not None]
        self._reading = [g for g in (reading, more[1]) if g is not None]
        self._parts = {}  # id(rule) -> what the rule is, by value
        shared_sheets = getattr(ruleset, "shared_sheets", ())
        self._shared = {id(r) for r in rules if r.sheet in shared_sheets} \
            if shared_sheets else set()
        self._page_marks = page_marks

    def marks(self, root, wrapper_of, opened: bool = False) -> tuple:
        """``(element -> key part, elements whose subtree holds one)`` of the tree as it is
        (``opened``: what a reader opens opened, ``disclosure``): the part names the page's
        rules the element matches, by value (a style cached under it on one page serves
        another only where the same rules, from the same sheet and line, match)."""
        matched, found = {}, None
        if self._plain:
            key = (opened, tuple(g.key for g in self._plain))
            known = self._page_marks
            found = known.get(key) if known is not None else None
            if found is None:
                found = [_joined(g.matched(root, wrapper_of) for g in self._plain), None]
                if known is not None:  # (matches, their marks)
                    known[key] = found
            matched = found[0]
        if not self._reading:
            if found is None:
                return {}, set()
            if found[1] is None:  # the other schemes take these marks as they are
                found[1] = self._marked(matched)
            return found[1]
        matched = _joined([matched] + [g.matched(root, wrapper_of) for g in self._reading])
        return self._marked(matched)

    def _marked(self, matched: dict) -> tuple:
        marked, holding = {}, set()
        for el, rules in matched.items():
            rules = sorted(rules, key=_order)
            part = tuple(self._part(r) for r in rules)
            marked[el] = Kept(part) if self._kept(rules) else part
            for up in el.iterancestors():
                if up in holding:
                    break
                holding.add(up)
            holding.add(el)
        return marked, holding

    def _kept(self, rules) -> bool:
        """Whether only rules of blocks shared by pages are among ``rules`` (``Kept``)."""
        shared, block = self._shared, self._block
        if block is not None:
            return all(id(r) in shared or id(r) in block.ids for r in rules)
        return bool(shared) and all(id(r) in shared for r in rules)

    def _part(self, rule) -> tuple:
        block = self._block
        parts = block.parts if block is not None and id(rule) in block.ids else self._parts
        part = parts.get(id(rule))
        if part is None:
            part = parts[id(rule)] = (
                rule.sheet, rule.selector_text, rule.pseudo, rule.media,
                tuple((d.name, d.text, d.important, d.line, d.column)
                      for d in list(rule.decls) + list(rule.cue_decls)))
        return part


def _split(rules, attributes, ruleset) -> tuple:
    """``rules`` as ``(those reading none of a scheme's attributes, those reading one)``, each a
    ``_Group`` or None where there are none."""
    reads = [_reads(r.selector_text.lower(), attributes) for r in rules]
    reading = [r for r, read in zip(rules, reads) if read]
    plain = [r for r, read in zip(rules, reads) if not read] if reading else rules
    return (_Group(plain, ruleset) if plain else None,
            _Group(reading, ruleset) if reading else None)


def _joined(found) -> dict:
    """Element -> rules matching it, of several groups' ``_Group.matched`` (the first as it is
    when it is alone)."""
    out, copied = None, False
    for one in found:
        if out is None:
            out = one
        elif one:
            if not copied:
                out, copied = dict(out), True
            for el, rules in one.items():
                out[el] = out.get(el, []) + rules
    return {} if out is None else out


def _reads(text: str, attributes) -> bool:
    """Whether a selector (``text``, lower case) may read one of a scheme's ``attributes``:
    named, or, for ``class`` and ``id``, written as ``.name`` and ``#name``; an escape may
    hide a name."""
    if "\\" in text:
        return True
    for name in attributes:
        name = name.lower()
        if name in text or (name == "class" and "." in text) or (name == "id" and "#" in text):
            return True
    return False


class _Group:
    """Rules that mark together: their index and the buckets of their rightmost compounds,
    built on first use (not needed where another scheme's walk marked the page)."""

    def __init__(self, rules, ruleset):
        self.rules = rules  # (the ids in ``key`` stay theirs)
        self.key = tuple(map(id, rules))
        self._ruleset = ruleset

    @cached_property
    def index(self) -> Index:
        return Index(self.rules, self._ruleset)

    def matched(self, root, wrapper_of) -> dict:
        """Element -> the rules matching it (where some do)."""
        found = {}
        match = self.index.match
        for el in self._candidates(root):
            rules = match(wrapper_of(el))
            if rules:
                found[el] = rules
        return found

    @cached_property
    def _buckets(self) -> tuple:
        """``(every, ids, classes, tags, attributes)``: what the rules' rightmost compounds
        name (``every``: one names none of them)."""
        ids, classes, tags, attrs, every = set(), set(), set(), set(), False
        for rule in self.rules:
            c = rule.compiled
            if c.id is not None:
                ids.add(c.id)
            elif c.class_name is not None:
                classes.add(c.class_name)
            elif rule.attr_names:  # (before the tag: `span[style]`, not every span)
                attrs.add(rule.attr_names[0])
            elif c.local_name is not None:
                tags.add(c.lower_local_name)
            else:
                every = True
        return every, ids, classes, tags, attrs

    def _candidates(self, root):
        """The elements a rule could match by its rightmost compound's id, class, tag or
        attribute (every element when one names none of them)."""
        every, ids, classes, tags, attrs = self._buckets
        for el in root.iter(Element):  # (elements only: no comments)
            if every or (tags and el.tag.lower() in tags):
                yield el
                continue
            cls = el.get("class")
            if cls is not None and not classes.isdisjoint(cls.split()):
                yield el
            elif (ids and el.get("id") in ids) or (attrs and not attrs.isdisjoint(el.keys())):
                yield el


def _order(rule) -> int:
    return rule.order
