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

MEMO_LIMIT = 50000
STRUCTURAL = re.compile(r":(nth-|first-child|last-child|only-child|first-of-type|last-of-type|"
                        r"only-of-type)", re.I)


class Compound:
    __slots__ = ("tag", "classes", "ident", "parent")

    def __init__(self, tag, classes, ident, parent=None):
        self.tag, self.classes, self.ident = tag, frozenset(classes), ident
        self.parent = parent  # for `P > :nth-child(2)`: what the parent must be

    @property
    def universal(self) -> bool:
        return self.tag in (None, "*") and not self.classes and self.ident is None

    def could_match(self, tag, classes, ident) -> bool:
        return (self.tag in (None, "*", tag)) and self.classes <= classes \
            and (self.ident is None or self.ident == ident)


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
    reqs = []
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
        reqs.append(Compound(tag, classes, ident))
        if comb in ("+", "~") or nested_structural:
            c = Compound(tag, classes, ident)
            k = len(reqs) - 1
            if c.universal and comb == ">" and k > 0 and not reqs[k - 1].universal:
                c.parent = reqs[k - 1]
            elif c.universal and comb in ("+", "~") and k > 0 and not reqs[k - 1].universal:
                # `X + *`: only siblings of an X; we cannot see those from the element, keep all
                pass
            out.append(c)
    # the left side of + / ~ is read from the right side's view, which already carries it
    return out


class SiblingIndex:
    """Answers "could a sibling-sensitive compound match this element?" by tag/class/id."""

    def __init__(self, rules):
        import tinycss2

        self.any = False
        self.own, self.by_parent = _Buckets(), _Buckets()
        self._memo = {}
        for rule in rules:
            text = rule.selector_text
            if not (STRUCTURAL.search(text) or "+" in text or "~" in text):
                continue
            found = sensitive_compounds(tinycss2.parse_component_value_list(text))
            if found is None:
                self.any = True
                return
            for c in found:
                if c.universal and c.parent is not None:
                    self.by_parent.add(c.parent, c)
                elif c.universal:
                    self.any = True
                    return
                else:
                    self.own.add(c, c)

    def sensitive_children(self, parent, children) -> list | None:
        """For each child of ``parent``, whether it is sensitive; None when none is."""
        if self.any or self._under(parent):
            return [True] * len(children)
        out = [self._own(el) for el in children]
        return out if any(out) else None

    def sensitive(self, el, parent) -> bool:
        """Whether a sibling-sensitive selector can reach ``el`` (``parent``: None at the root)."""
        return self.any or self._own(el) or (parent is not None and self._under(parent))

    def _own(self, el) -> bool:
        """A compound that needs siblings could match ``el`` itself."""
        key = (el.tag, el.get("class"), el.get("id"))
        hit = self._memo.get(key)
        if hit is None:
            tag = el.tag.lower() if isinstance(el.tag, str) else ""
            classes = frozenset(key[1].split()) if key[1] else frozenset()
            hit = self._remember(key, self.own.any_match(tag, classes, key[2], lambda c: True))
        return hit

    def _under(self, parent) -> bool:
        """``parent`` is one whose every child a sibling test reads (``P > :nth-child(2)``)."""
        key = ("parent", parent.tag, parent.get("class"), parent.get("id"))
        hit = self._memo.get(key)
        if hit is None:
            tag = parent.tag.lower() if isinstance(parent.tag, str) else ""
            classes = frozenset(key[2].split()) if key[2] else frozenset()
            hit = self._remember(key, self.by_parent.any_match(tag, classes, key[3],
                                                                 lambda c: True))
        return hit

    def _remember(self, key, hit: bool) -> bool:
        if len(self._memo) > MEMO_LIMIT:  # unique ids would grow it page after page
            self._memo.clear()
        self._memo[key] = hit
        return hit


class _Buckets:
    def __init__(self):
        self.by_id, self.by_class, self.by_tag = {}, {}, {}

    def add(self, req, payload):
        if req.ident:
            self.by_id.setdefault(req.ident, []).append((req, payload))
        elif req.classes:
            self.by_class.setdefault(next(iter(req.classes)), []).append((req, payload))
        else:
            self.by_tag.setdefault(req.tag, []).append((req, payload))

    def any_match(self, tag, classes, ident, accept) -> bool:
        candidates = list(self.by_tag.get(tag, ()))
        if ident:
            candidates += self.by_id.get(ident, ())
        for name in classes:
            candidates += self.by_class.get(name, ())
        return any(req.could_match(tag, classes, ident) and accept(p) for req, p in candidates)
