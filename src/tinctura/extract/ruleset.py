"""The rules of one page's stylesheets in cascade order, indexed for matching.

A ``RuleSet`` is built once per distinct list of stylesheets (a site usually has one) and filtered
once per environment (viewport and colour scheme) into an ``Index``. The index buckets selectors by
the rightmost compound's id, class, tag name and, for the rest, required attribute names, so that
few selectors are tested on each element.
"""
from __future__ import annotations

import dataclasses
import re
import weakref
from functools import cached_property

from .media import Environment
from .siblings import HasIndex, SiblingIndex

EVALUATED_STATES = re.compile(r":(hover|focus)", re.I)
ATTR_IN_SELECTOR = re.compile(r"\[\s*([\w:-]+)")
ATTR_TEST = re.compile(r"""\[\s*([\w:-]+)\s*(?:([~|^$*]?=)\s*("[^"\\]*"|'[^'\\]*'|[\w-]+)\s*([is])?\s*)?\]""",
                       re.I)
# Attributes whose full value stays in the style-sharing key: read by the cascade itself (style,
# SVG fill, aria-disabled) or by pseudo-classes that look at ancestors (:lang, :dir).
KEEP_VALUES = frozenset({"style", "lang", "dir", "xml:lang", "fill", "aria-disabled"})
# Class and id names in selectors. Over-inclusive is harmless (a name from inside an attribute
# value only keeps more in the key); a backslash escape could hide a name, so then the whole
# class and id values are kept.
# a name's first character (a letter, `_` or past ASCII) and the rest (a word character, `-`
# or past ASCII), written as what they are not: `[\w\u0080-\U0010ffff-]` took 4-5 ms to
# compile at every start
_IDENT_START = r"[^\x00-\x40\[-\^`{-\x7f]"
_IDENT_REST = r"[^\x00-\x2c./:-@\[-\^`{-\x7f]"
_IDENT = rf"(-?{_IDENT_START}{_IDENT_REST}*)"
CLASS_IN_SELECTOR = re.compile(r"\." + _IDENT)
ID_IN_SELECTOR = re.compile("#" + _IDENT)


class RuleSet:
    # a page's own trailing <style> blocks laid over the rule set of its stylesheets: that
    # rule set, and those blocks' rules (``overlay``); None where they are not
    base = None
    own_rules = ()

    def __init__(self, rules: list, layer_order: list):
        """``rules``: StyleRules in order of appearance (user-agent first)."""
        ranks = {}
        for path in layer_order:
            for k in range(1, len(path) + 1):  # a nested layer also declares its parents
                ranks.setdefault(path[:k], len(ranks))
        self.unlayered_rank = len(ranks)
        self.layer_ranks = ranks
        for order, rule in enumerate(rules):
            rule.order = order
        self.size = len(rules)  # (rules laid over it come after: ``overlay.LaidOver``)
        # rules drawing non-colour cues, matched apart for links (extract/links.py); rules with
        # nothing else stay out of the colour cascade and its keys
        self.cue_rules = [r for r in rules if r.cue_decls]
        # what selectors can read stays in the style keys for every rule (cue rules included:
        # cues are cached per style key); only colour rules are indexed and cascaded
        # (a cue rule with :has() is left out: one cached answer per style key)
        keyed = [r for r in rules if r.decls or ":has(" not in r.selector_text]
        rules = [r for r in rules if r.decls]
        self.rules = rules
        self.has_index = HasIndex(rules)
        # :has() that cannot be analysed: nothing is shared (see ``siblings``)
        self.uses_has = any(":has(" in r.selector_text for r in rules) and \
            not self.has_index.usable
        # Attribute tests in selectors. The style-sharing key keeps, for each attribute, only the
        # answers to those tests (so `href` values that differ per page do not split the cache),
        # or the whole value when a test could not be read.
        tests = {}
        for r in keyed:
            text = r.selector_text
            found = ATTR_TEST.findall(text)
            if len(found) != text.count("["):
                for name in ATTR_IN_SELECTOR.findall(text):
                    tests[name.lower()] = None
            for name, op, value, flag in found:
                name = name.lower()
                if op and name in tests and tests[name] is None:
                    continue
                entry = tests.setdefault(name, [])
                if op and entry is not None and (op, value.strip("\"'"), flag.lower() == "i") \
                        not in entry:
                    entry.append((op, value.strip("\"'"), flag.lower() == "i"))
        for name in KEEP_VALUES:
            tests[name] = None
        texts = [r.selector_text for r in keyed]
        if any("\\" in text for text in texts):
            tests["class"] = tests["id"] = None
            self.selector_classes = self.selector_ids = frozenset()
        else:
            self.selector_classes = frozenset(n for t in texts for n in CLASS_IN_SELECTOR.findall(t))
            self.selector_ids = frozenset(n for t in texts for n in ID_IN_SELECTOR.findall(t))
        self.attr_tests = {k: (tuple(v) if v is not None else None) for k, v in tests.items()}
        self._indexes = {}

    @cached_property
    def scheme_facts(self):
        from .schemes import SchemeFacts

        return SchemeFacts(self.rules)

    @cached_property
    def siblings(self) -> SiblingIndex:
        """What selectors read of siblings, for ``structure``: built on first use (a rule set
        laid over another, ``overlay``, keys its pages with that one's)."""
        # siblings only for colour rules: a sibling-sensitive cue rule (`li + li a`) would split
        # the keys of every navigation item; its answer is the first sibling's (documented)
        return SiblingIndex(self.rules)

    @cached_property
    def structure(self):
        """Structural ids of elements for this rule set's style keys (all schemes share them)."""
        from .structure import Structure

        return Structure(self)

    def attr_signature(self, name, value):
        """What the key keeps of an attribute: its value, test answers, or just presence.

        Of ``class`` and ``id`` it keeps the names some selector mentions (and the answers to
        attribute tests on them): a heading's unique id or a highlighter's language class does
        not split the cache, nor the repeated navigation of one page from another's.
        """
        tests = self.attr_tests.get(name, ())
        if tests is None:
            return value
        answers = tuple(_attr_test(op, wanted, value, ci) for op, wanted, ci in tests)
        if name == "class":
            return (tuple(sorted({c for c in value.split() if c in self.selector_classes})),
                    answers)
        if name == "id":
            return (value if value in self.selector_ids else None, answers)
        return answers or None

    def layer_rank(self, layer: tuple) -> int:
        if not layer:
            return self.unlayered_rank
        return self.layer_ranks.get(layer, self.unlayered_rank - 0.5)

    def index(self, env: Environment) -> "Index":
        idx = self._indexes.get(env.key)
        if idx is None:
            idx = self._indexes[env.key] = indexed(self.rules, self.cue_rules, env, self)
        return idx


def indexed(rules, cue_rules, env: Environment, ruleset) -> "Index":
    """The Index of ``rules`` (and of ``cue_rules`` for their cues) applying in ``env``."""
    idx = Index([r for r in rules if all(env.matches(m) for m in r.media)], ruleset)
    idx.cue_rules = [dataclasses.replace(r, decls=r.cue_decls) for r in cue_rules
                     if all(env.matches(m) for m in r.media)]
    return idx


def _proxy(ruleset):
    """A weak proxy of ``ruleset`` for what the rule set keeps: the run holds off the cyclic
    collector, so a back reference would keep a rule set let go (``loader.RULESETS_KEPT``)."""
    return ruleset if isinstance(ruleset, weakref.ProxyType) else weakref.proxy(ruleset)


class Index:
    cue_rules = ()  # set by RuleSet.index: rules of non-colour cues, with those as their decls

    def __init__(self, rules, ruleset: RuleSet):
        # buckets of (test, rule), filled from the raw buckets of rules on first lookup: a
        # selector is compiled to Python only when an element could match it (a large
        # stylesheet's selectors are mostly never tried)
        self.by_id, self.by_class, self.by_tag, self.by_attr, self.other = {}, {}, {}, {}, []
        self._raw = {}  # id(bucket dict) -> {key: [rule]}
        raw_id, raw_class, raw_tag, raw_attr = {}, {}, {}, {}
        self.ruleset = _proxy(ruleset)  # (kept by the rule set: no cycle, as Structure)
        for rule in rules:
            c = rule.compiled
            if c.never_matches:
                continue
            if c.id is not None:
                raw_id.setdefault(c.id, []).append(rule)
            elif c.class_name is not None:
                raw_class.setdefault(c.class_name, []).append(rule)
            elif c.local_name is not None:
                raw_tag.setdefault(c.lower_local_name, []).append(rule)
            elif rule.attr_names:
                raw_attr.setdefault(rule.attr_names[0], []).append(rule)
            else:
                self.other.append((c.test, rule))
        for bucket, raw in ((self.by_id, raw_id), (self.by_class, raw_class),
                            (self.by_tag, raw_tag), (self.by_attr, raw_attr)):
            self._raw[id(bucket)] = raw
        self.has_attr_rules = bool(raw_attr)
        # only the states tinctura evaluates: :visited, :target, :active never hold here
        self.dynamic_rules = [r for r in rules if r.dynamic and not r.compiled.never_matches
                              and EVALUATED_STATES.search(r.selector_text)]
        d = {"id": set(), "class": set(), "tag": set(), "attr": set(), "other": False}
        for r in self.dynamic_rules:
            c = r.compiled
            if c.id is not None:
                d["id"].add(c.id)
            elif c.class_name is not None:
                d["class"].add(c.class_name)
            elif c.local_name is not None:
                d["tag"].add(c.lower_local_name)
            elif r.attr_names and not r.attr_names[0].startswith("data-tinctura-state-"):
                d["attr"].add(r.attr_names[0])
            else:
                d["other"] = True
        self.dynamic_buckets = d

    @cached_property
    def _cue_index(self) -> "Index":
        return Index(self.cue_rules, self.ruleset)

    def cue_match(self, wrapper) -> list:
        """The cue rules (``cue_rules``) whose selector matches the element itself, not a
        pseudo-element of it. Indexed as the colour rules are, on first use: a scan of every
        cue rule compiled and ran each selector (on a 5 MB stylesheet, 36 MB of compiled
        tests and more than a second for one focusable control)."""
        return [r for r in self._cue_index.match(wrapper) if r.pseudo is None]

    def state_can_matter(self, element) -> bool:
        """Could a rule with a dynamic pseudo-class style an element in this subtree?

        Only the buckets are consulted (no selector is run): a cheap filter that keeps every
        element a state rule might reach."""
        d = self.dynamic_buckets
        if d["other"]:
            return True
        for el in element.iter():
            if not isinstance(el.tag, str):
                continue
            if el.tag.lower() in d["tag"] or el.get("id") in d["id"]:
                return True
            cls = el.get("class")
            if cls and not d["class"].isdisjoint(cls.split()):
                return True
            if not d["attr"].isdisjoint(el.attrib.keys()):
                return True
        return False

    def _fill(self, bucket: dict, key) -> list:
        """The (test, rule) list of a bucket key, compiling its selectors on first use."""
        rules = self._raw[id(bucket)].pop(key, None)
        if rules is None:  # no selector names it (ids are not kept: they are many)
            if bucket is not self.by_id:
                bucket[key] = ()
            return ()
        entries = bucket[key] = [(rule.compiled.test, rule) for rule in rules]
        return entries

    def match(self, wrapper) -> list:
        """StyleRules whose selector matches, in no particular order."""
        el = wrapper.etree_element
        out = []
        attrib = el.attrib
        ident = attrib.get("id")
        if ident is not None:
            bucket = self.by_id.get(ident)
            for test, rule in bucket if bucket is not None else self._fill(self.by_id, ident):
                if test(wrapper):
                    out.append(rule)
        cls = attrib.get("class")
        if cls:
            seen = set()
            by_class = self.by_class
            for name in cls.split():
                if name in seen:
                    continue
                seen.add(name)
                bucket = by_class.get(name)
                for test, rule in bucket if bucket is not None else self._fill(by_class, name):
                    if test(wrapper):
                        out.append(rule)
        tag = el.tag
        if isinstance(tag, str):
            tag = tag.lower()
            bucket = self.by_tag.get(tag)
            for test, rule in bucket if bucket is not None else self._fill(self.by_tag, tag):
                if test(wrapper):
                    out.append(rule)
        if self.has_attr_rules:
            for name in attrib:
                name = name.lower()
                bucket = self.by_attr.get(name)
                for test, rule in bucket if bucket is not None else self._fill(self.by_attr,
                                                                                name):
                    if test(wrapper):
                        out.append(rule)
        for test, rule in self.other:
            if test(wrapper):
                out.append(rule)
        return out


def _attr_test(op, wanted, value, ci):
    if ci:
        wanted, value = wanted.lower(), value.lower()
    if op == "=":
        return value == wanted
    if op == "~=":
        return wanted in value.split()
    if op == "|=":
        return value == wanted or value.startswith(wanted + "-")
    if op == "^=":
        return bool(wanted) and value.startswith(wanted)
    if op == "$=":
        return bool(wanted) and value.endswith(wanted)
    if op == "*=":
        return bool(wanted) and wanted in value
    return value
