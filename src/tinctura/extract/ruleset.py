"""The rules of one page's stylesheets in cascade order, indexed for matching.

A ``RuleSet`` is built once per distinct list of stylesheets (a site usually has one) and filtered
once per environment (viewport and colour scheme) into an ``Index``. The index buckets selectors by
the rightmost compound's id, class, tag name and, for the rest, required attribute names, so that
few selectors are tested on each element.
"""
from __future__ import annotations

import re

from .media import Environment

ATTR_IN_SELECTOR = re.compile(r"\[\s*([\w:-]+)")


class RuleSet:
    def __init__(self, rules: list, layer_order: list):
        """``rules``: StyleRules in order of appearance (user-agent first)."""
        ranks = {}
        for path in layer_order:
            for k in range(1, len(path) + 1):  # a nested layer also declares its parents
                ranks.setdefault(path[:k], len(ranks))
        self.unlayered_rank = len(ranks)
        self.layer_ranks = ranks
        self.rules = rules
        for order, rule in enumerate(rules):
            rule.order = order
        self.uses_has = any(":has(" in r.selector_text for r in rules)
        # attribute names whose values selectors test: the style-sharing key keeps their values
        names = set()
        for r in rules:
            names.update(n.lower() for n in ATTR_IN_SELECTOR.findall(r.selector_text))
        self.attr_value_names = frozenset(names | {"class", "id", "style", "lang", "dir", "type",
                                                   "xml:lang"})
        self._indexes = {}

    def layer_rank(self, layer: tuple) -> int:
        if not layer:
            return self.unlayered_rank
        return self.layer_ranks.get(layer, self.unlayered_rank - 0.5)

    def index(self, env: Environment) -> "Index":
        idx = self._indexes.get(env.key)
        if idx is None:
            idx = self._indexes[env.key] = Index(
                [r for r in self.rules if all(env.matches(m) for m in r.media)], self)
        return idx


class Index:
    def __init__(self, rules, ruleset: RuleSet):
        self.by_id, self.by_class, self.by_tag, self.by_attr, self.other = {}, {}, {}, {}, []
        self.ruleset = ruleset
        for rule in rules:
            c = rule.compiled
            if c.never_matches:
                continue
            entry = (c.test, rule)
            if c.id is not None:
                self.by_id.setdefault(c.id, []).append(entry)
            elif c.class_name is not None:
                self.by_class.setdefault(c.class_name, []).append(entry)
            elif c.local_name is not None:
                self.by_tag.setdefault(c.lower_local_name, []).append(entry)
            elif rule.attr_names:
                self.by_attr.setdefault(rule.attr_names[0], []).append(entry)
            else:
                self.other.append(entry)

    def match(self, wrapper) -> list:
        """StyleRules whose selector matches, in no particular order."""
        el = wrapper.etree_element
        out = []
        attrib = el.attrib
        ident = attrib.get("id")
        if ident is not None:
            for test, rule in self.by_id.get(ident, ()):
                if test(wrapper):
                    out.append(rule)
        cls = attrib.get("class")
        if cls:
            seen = set()
            for name in cls.split():
                if name in seen:
                    continue
                seen.add(name)
                for test, rule in self.by_class.get(name, ()):
                    if test(wrapper):
                        out.append(rule)
        tag = el.tag
        if isinstance(tag, str):
            for test, rule in self.by_tag.get(tag.lower(), ()):
                if test(wrapper):
                    out.append(rule)
        if self.by_attr:
            for name in attrib:
                for test, rule in self.by_attr.get(name.lower(), ()):
                    if test(wrapper):
                        out.append(rule)
        for test, rule in self.other:
            if test(wrapper):
                out.append(rule)
        return out
