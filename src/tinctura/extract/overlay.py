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
    before them, as far as their layers and ``:has()`` tell (``marking`` tells the rest)."""
    return all(not r.layer and ":has(" not in r.selector_text for r in rules)


def marking(rules) -> list | None:
    """``rules`` as ``Overlay`` marks with them, a rule of a state relaxed (``_relaxed``);
    None where one cannot be: the blocks are not laid over."""
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

    def __init__(self, base, rules, marking_rules, shared_sheets=frozenset()):
        for order, rule in enumerate(rules, base.size):  # as in the whole rule set
            rule.order = order
        self.base = base
        self.size = base.size + len(rules)
        self.colour_rules = [r for r in rules if r.decls]
        self.own_cue_rules = [r for r in rules if r.cue_decls]
        self.cue_rules = base.cue_rules + self.own_cue_rules
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
        return self.base.rules + self.colour_rules

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
            idx = self._indexes[env.key] = LaidOverIndex(self.base.index(env), own)
        return idx


class LaidOverIndex:
    """The Index of a ``LaidOver`` rule set: its base's (shared, warm), then the page's own."""

    def __init__(self, base, own):
        self.base, self.own = base, own
        self.dynamic_rules = base.dynamic_rules + own.dynamic_rules
        self.cue_rules = base.cue_rules + own.cue_rules

    def match(self, wrapper) -> list:
        found = self.base.match(wrapper)
        more = self.own.match(wrapper)
        return found + more if more else found

    def cue_match(self, wrapper) -> list:
        found = self.base.cue_match(wrapper)
        more = self.own.cue_match(wrapper) if self.own.cue_rules else ()
        return found + more if more else found

    def state_can_matter(self, element) -> bool:
        return self.base.state_can_matter(element) or (
            bool(self.own.dynamic_rules) and self.own.state_can_matter(element))


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
        self._ruleset = ruleset
        # the marks of the page's tree, shared by its colour schemes' walks where the rules
        # read none of the ``attributes`` a scheme sets (``page_marks``: a dict per page)
        texts = [r.selector_text.lower() for r in rules]
        reads = any("\\" in t or any(a.lower() in t for a in attributes) for t in texts)
        self._page_marks = None if reads else page_marks
        self._rules_key = tuple(map(id, rules))
        self._parts = {}  # id(rule) -> what the rule is, by value
        self._keep = rules  # (the ids above stay theirs)
        shared = getattr(ruleset, "shared_sheets", ())
        self._shared = {id(r) for r in rules if r.sheet in shared} if shared else set()

    def marks(self, root, wrapper_of, opened: bool = False) -> tuple:
        """``(element -> key part, elements whose subtree holds one)`` of the tree as it is
        (``opened``: what a reader opens opened, ``disclosure``): the part names the page's
        rules the element matches, by value (a style cached under it on one page serves
        another only where the same rules, from the same sheet and line, match)."""
        known = self._page_marks
        if known is not None:
            key = (opened, self._rules_key)
            found = known.get(key)
            if found is None:
                found = known[key] = self._marks(root, wrapper_of)
            return found
        return self._marks(root, wrapper_of)

    @cached_property
    def index(self) -> Index:  # (not needed where another scheme's walk marked the page)
        return Index(self._keep, self._ruleset)

    def _marks(self, root, wrapper_of) -> tuple:
        marked, holding = {}, set()
        for el in self._candidates(root):
            matched = self.index.match(wrapper_of(el))
            if not matched:
                continue
            matched.sort(key=_order)
            part = tuple(self._part(r) for r in matched)
            shared = self._shared
            marked[el] = Kept(part) if shared and all(id(r) in shared for r in matched) \
                else part
            for up in el.iterancestors():
                if up in holding:
                    break
                holding.add(up)
            holding.add(el)
        return marked, holding

    @cached_property
    def _buckets(self) -> tuple:
        """``(every, ids, classes, tags, attributes)``: what the rules' rightmost compounds
        name (``every``: one names none of them)."""
        ids, classes, tags, attrs, every = set(), set(), set(), set(), False
        for rule in self._keep:
            c = rule.compiled
            if c.id is not None:
                ids.add(c.id)
            elif c.class_name is not None:
                classes.add(c.class_name)
            elif c.local_name is not None:
                tags.add(c.lower_local_name)
            elif rule.attr_names:
                attrs.add(rule.attr_names[0])
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

    def _part(self, rule) -> tuple:
        part = self._parts.get(id(rule))
        if part is None:
            part = self._parts[id(rule)] = (
                rule.sheet, rule.selector_text, rule.pseudo, rule.media,
                tuple((d.name, d.text, d.important, d.line, d.column)
                      for d in list(rule.decls) + list(rule.cue_decls)))
        return part


def _order(rule) -> int:
    return rule.order
