"""Which elements can a sibling-sensitive selector reach?

The style-sharing key of an element includes its siblings only when some rule could need them:
a compound selector with a structural pseudo-class (``:nth-child``, ``:last-of-type``...) or on the
right of ``+`` / ``~``. Each such compound is reduced to what it requires of the element itself
(tag, classes, id); an element that satisfies none of them is styled the same wherever it stands
among its siblings. Selectors whose sibling tests hide inside ``:is()``/``:not()``/``:where()``
arguments with combinators are not analysed: they make every element sensitive.
"""
from __future__ import annotations

import re

STRUCTURAL = re.compile(r":(nth-|first-child|last-child|only-child|first-of-type|last-of-type|"
                        r"only-of-type)", re.I)


class Compound:
    __slots__ = ("tag", "classes", "ident")

    def __init__(self, tag, classes, ident):
        self.tag, self.classes, self.ident = tag, frozenset(classes), ident


def sensitive_compounds(tokens):
    """Compounds of one selector that need sibling information; None means "any element"."""
    compounds, current, combinator_before = [], [], None
    out = []

    def close(comb):
        if current:
            compounds.append((combinator_before, list(current)))

    pending = None
    for t in tokens:
        if t.type == "whitespace":
            if current and pending is None:
                pending = " "
            continue
        if t.type == "literal" and t.value in ">+~":
            pending = t.value
            continue
        if pending is not None and current:
            compounds.append((combinator_before, current))
            current, combinator_before = [], pending
        pending = None
        current.append(t)
    if current:
        compounds.append((combinator_before, current))
    for comb, parts in compounds:
        nested_structural = False
        tag, classes, ident = None, [], None
        i = 0
        while i < len(parts):
            t = parts[i]
            if t.type == "ident" and i == 0:
                tag = t.lower_value
            elif t.type == "literal" and t.value == "." and i + 1 < len(parts) \
                    and parts[i + 1].type == "ident":
                classes.append(parts[i + 1].value)
                i += 1
            elif t.type == "hash":
                ident = t.value
            elif t.type == "function":
                import tinycss2

                inner = tinycss2.serialize(t.arguments)
                if "+" in inner or "~" in inner:
                    if t.lower_name in ("is", "not", "where", "matches", "has", "-webkit-any"):
                        return None
                if STRUCTURAL.search(":" + t.lower_name) or STRUCTURAL.search(inner):
                    nested_structural = True
            elif t.type == "literal" and t.value == ":" and i + 1 < len(parts) \
                    and parts[i + 1].type == "ident" and STRUCTURAL.search(":" + parts[i + 1].value):
                nested_structural = True
            i += 1
        if comb in ("+", "~") or nested_structural:
            out.append(Compound(tag, classes, ident))
    # the left side of + / ~ is read from the right side's view, which already carries it
    return out


class SiblingIndex:
    """Answers "could a sibling-sensitive compound match this element?" by tag/class/id."""

    def __init__(self, rules):
        self.any = False
        self.by_class, self.by_tag, self.by_id, self.universal = {}, {}, {}, []
        import tinycss2

        for rule in rules:
            text = rule.selector_text
            if not (STRUCTURAL.search(text) or "+" in text or "~" in text):
                continue
            found = sensitive_compounds(tinycss2.parse_component_value_list(text))
            if found is None:
                self.any = True
                return
            for c in found:
                if c.ident:
                    self.by_id.setdefault(c.ident, []).append(c)
                elif c.classes:
                    self.by_class.setdefault(next(iter(c.classes)), []).append(c)
                elif c.tag and c.tag != "*":
                    self.by_tag.setdefault(c.tag, []).append(c)
                else:
                    self.universal.append(c)
        self._memo = {}

    def sensitive(self, tag, cls, ident) -> bool:
        if self.any or self.universal:
            return True
        key = (tag, cls, ident)
        hit = self._memo.get(key)
        if hit is not None:
            return hit
        classes = frozenset(cls.split()) if cls else frozenset()
        candidates = list(self.by_tag.get(tag, ()))
        if ident:
            candidates += self.by_id.get(ident, ())
        for name in classes:
            candidates += self.by_class.get(name, ())
        result = any((c.tag in (None, "*", tag)) and c.classes <= classes
                     and (c.ident is None or c.ident == ident) for c in candidates)
        self._memo[key] = result
        return result
