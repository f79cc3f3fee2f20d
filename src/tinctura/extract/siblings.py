"""Which elements can a sibling-sensitive or ``:has()`` selector reach, and what does it read?

The style-sharing key of an element includes facts about its siblings only when some rule could
need them, and only the facts that rule reads:

- ``FIRST``: ``:first-child`` reads whether there is a previous element sibling, ``LAST``
  (``:last-child``) whether there is a next one, ``:only-child`` both;
- a position test (``:nth-child(2n)``, ``:nth-last-child(-n+3)``, ``:first-of-type``,
  ``:nth-of-type(2)``...) reads whether the position, counted from its end among all siblings
  or same-tag ones, fits its An+B formula: each distinct formula has a bit of its own
  (``SiblingIndex.formulas``), and the key holds only the answer;
- ``INDEX`` / ``TYPE``: a position test whose argument is not read as An+B keeps the position
  itself, among all siblings or same-tag ones, from both ends;
- the right side of ``+`` / ``~`` reads whether the previous sibling, or some previous one,
  matches the compound on the left: where that compound tests the sibling alone (names and
  attributes), each such relation has a bit of its own, as formulas do, and the key holds the
  answer (``h2 ~ p``: after an ``h2`` or not);
- ``FULL``: other right sides of ``+`` / ``~`` (``a:first-child + b``, ``a + b + c``) and
  ``:nth-child(An+B of S)`` read the previous siblings themselves; the key then holds their
  identity and the following siblings' tags.

Each such compound is reduced to what it requires of the element itself (tag, classes, id), of
its parent (the compound left of a ``>``) and of its ancestors (the compounds further left,
across descendant and child combinators): an element that satisfies none of them is styled the
same wherever it stands among its siblings. A selector list inside ``:is()``/``:not()``/
``:where()`` whose selectors have sibling combinators (``:not(li + li)``) is read the same way,
selector by selector: its rightmost compound is the element itself, so the outer compound's
parent and ancestors hold for it too.

``:has()`` looks at an element's descendants, or at its following siblings (``:has(+ x)``,
``:has(~ x)``): an element a ``:has()`` compound could match keeps in its key whether each such
compound matches it (``HasIndex``: the answers are all the cascade reads of its subtree and
siblings); every other element shares as usual. A compound that names no tag, class or id
(``:has(> img)``, ``[open]:has(x)``) could match any element: every element keeps its answers
then, which costs a test per element but still lets elements with the same answers share. Only
a ``:has()`` that cssselect2 cannot compile turns sharing off (``RuleSet.uses_has``).
"""
from __future__ import annotations

import re

import cssselect2
import tinycss2
import tinycss2.nth
from lxml import etree
from lxml.etree import Element

from ..tokens import significant, split_commas

MEMO_LIMIT = 50000
STRUCTURAL = re.compile(r":(nth-|first-child|last-child|only-child|first-of-type|last-of-type|"
                        r"only-of-type)", re.I)
FIRST, LAST, INDEX, TYPE, FULL = 1, 2, 4, 8, 16
_NEEDS = ((re.compile(r":(first|only)-child", re.I), FIRST),
          (re.compile(r":(last|only)-child", re.I), LAST),
          (re.compile(r":nth-(last-)?child", re.I), INDEX),
          (re.compile(r":(first|last|only|nth|nth-last)-of-type", re.I), TYPE))
_OF_SELECTOR = re.compile(r":nth-(last-)?child\([^)]*\bof\b", re.I)
# position tests read as (of-type, from the end, An+B argument); ``first``/``last``-of-type
# are nth(-last)-of-type(1), ``only-of-type`` both
_POSITION = re.compile(r":(nth-(last-)?(child|of-type)\(([^)]*)\)|(first|last|only)-of-type)",
                       re.I)
FORMULA_BITS = 5  # formula bits come after FULL


class Compound:
    __slots__ = ("tag", "classes", "ident", "parent", "ancestors", "needs")

    def __init__(self, tag, classes, ident, parent=None):
        self.tag, self.classes, self.ident = tag, frozenset(classes), ident
        self.parent = parent  # for `P > :nth-child(2)`: what the parent must be
        self.ancestors = ()  # compounds some ancestor must satisfy (`A B > x`: A and B)
        self.needs = 0  # what of the siblings it reads (FIRST | LAST | INDEX | TYPE | FULL)

    @property
    def universal(self) -> bool:
        return self.tag in (None, "*") and not self.classes and self.ident is None

    def could_match(self, tag, classes, ident) -> bool:
        return (self.tag in (None, "*", tag)) and self.classes <= classes \
            and (self.ident is None or self.ident == ident)


def split_compounds(tokens) -> list:
    """``[(combinator before it or None, [tokens])]`` of one complex selector, left to right."""
    compounds, current, combinator_before, pending = [], [], None, None
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
    return compounds


def _requirements(parts) -> Compound:
    """What a compound requires of the element: tag, classes, id (the rest is ignored;
    ``:root`` is the ``html`` element of a page)."""
    tag, classes, ident = None, [], None
    for i, t in enumerate(parts):
        if t.type == "ident" and i == 0:
            tag = t.lower_value
        elif t.type == "ident" and t.lower_value == "root" and i and \
                parts[i - 1].type == "literal" and parts[i - 1].value == ":" and \
                tag in (None, "*"):
            tag = "html"
        elif t.type == "literal" and t.value == "*" and i == 0:
            tag = "*"
        elif t.type == "literal" and t.value == "." and i + 1 < len(parts) \
                and parts[i + 1].type == "ident":
            classes.append(parts[i + 1].value)
        elif t.type == "hash":
            ident = t.value
    return Compound(tag, classes, ident)


def _alternatives(parts) -> list:
    """The requirements of a compound, one per alternative where it names no tag, class or id
    but through one ``:is()`` / ``:where()`` of compounds of names (``:is(h1, h2, h3)``: an
    ``h1``, an ``h2`` or an ``h3``); else its requirements alone."""
    req = _requirements(parts)
    if not req.universal:
        return [req]
    lists = [t for t in parts if t.type == "function"
             and t.lower_name in ("is", "where", "matches", "-webkit-any")]
    if len(lists) != 1:
        return [req]
    out = []
    for selector in _split_list(lists[0].arguments):
        tokens = [t for t in selector if t.type not in ("whitespace", "comment")]
        alternative = _requirements(tokens)
        if not tokens or not _names_only(tokens) or alternative.universal:
            return [req]
        out.append(alternative)
    return out


def _context(compounds, reqs, k) -> tuple:
    """(parent requirement, ancestor requirements) of compound ``k``: the compound left of a
    ``>`` is the parent; those reached across `` `` and ``>`` are ancestors (a compound left of
    ``+``/``~`` is a sibling of one, so skipped; what is left of it is still an ancestor)."""
    parent = None
    ancestors = []
    comb = compounds[k][0]
    if comb == ">" and not reqs[k - 1].universal:
        parent = reqs[k - 1]
    j = k
    while j > 0:
        comb = compounds[j][0]
        j -= 1
        if comb in (" ", ">") and not reqs[j].universal:
            ancestors.append(reqs[j])
    return parent, tuple(ancestors)


def sensitive_compounds(tokens, formulas=None, outer_context=None):
    """Compounds of one selector that need sibling information, each with its ``needs``,
    parent and ancestors; None means "any element, FULL". ``formulas``: a dict that gives
    each position formula a bit (``_formula_needs``); without it positions are read whole.
    ``outer_context``: (parent, ancestors) the rightmost compound must also have (a selector
    inside ``:is()``, whose element is the outer compound's)."""
    compounds = split_compounds(tokens)
    reqs = [_requirements(parts) for _, parts in compounds]
    out = []
    for k, (comb, parts) in enumerate(compounds):
        needs = _relation_need(comb, compounds[k - 1], formulas) if comb in ("+", "~") else 0
        for t in parts:
            if t.type == "function":
                inner = tinycss2.serialize(t.arguments)
                # (a :has() reading siblings is answered in the key: ``HasIndex``)
                bare = _without_has(inner)
                if ("+" in bare or "~" in bare) and \
                        t.lower_name in ("is", "not", "where", "matches", "-webkit-any"):
                    found = _inner_compounds(t.arguments, formulas,
                                             _context(compounds, reqs, k) if k else (None, ()))
                    if found is None:
                        return None
                    out += found
                needs |= _needs_of(":" + t.lower_name + "(" + inner + ")", formulas)
        text = tinycss2.serialize(parts)
        needs |= _needs_of(text, formulas)
        if not needs:
            continue
        for req in _alternatives(parts):
            c = Compound(req.tag, req.classes, req.ident)
            c.needs = needs
            c.parent, c.ancestors = _context(compounds, reqs, k)
            if outer_context is not None and k == len(compounds) - 1:
                c.parent = c.parent or outer_context[0]
                c.ancestors = c.ancestors + outer_context[1]
            out.append(c)
    # the left side of + / ~ is read from the right side's view, which already carries it
    return out


# :is(h1, h2), :where(.a), :not(.x, p): lists of compounds of names and attributes, which test
# the element alone (a sibling's cssselect2 test of its own wrapper is then enough)
_NAMES = r"[\w.#*\-\[\]=\"']+"
_LISTS_OF_NAMES = re.compile(r":(is|where|not|matches)\(\s*%s(?:\s*,\s*%s)*\s*\)"
                             % (_NAMES, _NAMES), re.I)


def _relation_need(comb: str, left: tuple, formulas) -> int:
    """What a compound right of ``+`` / ``~`` reads of its siblings: whether the previous one
    (``+``) or some previous one (``~``) matches the compound on its left, a bit of its own,
    where that compound reads nothing but the sibling itself (names and attributes, and no
    ``+`` / ``~`` before it); else FULL, the previous siblings themselves."""
    from .sheet import with_state_attributes

    left_comb, parts = left
    # (`a:hover + b`: whether the previous sibling is a hovered `a`, as state walks mark it)
    text = with_state_attributes(tinycss2.serialize(parts).strip())
    if formulas is None or left_comb in ("+", "~") or "\\" in text or \
            any(c in _LISTS_OF_NAMES.sub("", text) for c in ":()"):
        return FULL
    if _sibling_test(text) is None:
        return FULL
    form = ("sibling", comb, text)
    bit = formulas.get(form)
    if bit is None:
        bit = formulas[form] = 1 << (FORMULA_BITS + len(formulas))
    return bit


def _sibling_test(text: str):
    """A test of an lxml element for a compound of names and attributes (None: not one)."""
    tokens = tinycss2.parse_component_value_list(text)
    req = _requirements(tokens)
    tag = req.tag if req.tag not in (None, "*") else None
    if _names_only(tokens):
        plain = _plain_test(req)
        return (lambda el: el.tag.lower() == tag and plain(el)) if tag else plain
    from .sheet import compile_one

    compiled, dynamic = compile_one(text)
    if compiled is None or dynamic:
        return None
    return lambda el, test=compiled.test: test(_lone(el))


def _inner_compounds(arguments, formulas, outer_context):
    """``sensitive_compounds`` of each selector of ``:is()``/``:not()``/``:where()``'s list
    whose combinators read siblings (``:not(li + li)``: an element that cannot be an ``li`` is
    matched or not whatever its siblings; an ``li`` reads them). The rightmost compound of each
    is the element itself, so the outer compound's parent and ancestors hold for it too."""
    out = []
    for selector in _split_list(arguments):
        found = sensitive_compounds(selector, formulas, outer_context)
        if found is None:
            return None
        out += found
    return out


def _split_list(tokens) -> list:
    """The token lists of a selector list's selectors (split at its top-level commas)."""
    return [part for part in split_commas(tokens) if significant(part)]


def _without_has(text: str) -> str:
    """``text`` without the arguments of its ``:has()`` (``:not(:has(+ p))`` reads no sibling of
    the element itself: its answers are in its key)."""
    out, at, lower = [], 0, text.lower()
    while True:
        start = lower.find(":has(", at)
        if start < 0:
            return "".join(out) + text[at:]
        out.append(text[at:start])
        end = _closing(text, start + 4)
        at = len(text) if end < 0 else end + 1


def _needs_of(text: str, formulas=None) -> int:
    needs = 0
    for pattern, need in _NEEDS:
        if pattern.search(text):
            needs |= need
    if _OF_SELECTOR.search(text):
        needs |= FULL
    if formulas is not None and needs & (INDEX | TYPE):
        needs = _formula_needs(text, needs, formulas)
    return needs


def _formula_needs(text: str, needs: int, formulas: dict) -> int:
    """``needs`` with INDEX and TYPE replaced by a bit per An+B formula of ``text``'s position
    tests (Selectors 4), where every such test of the kind reads as one."""
    found = {INDEX: [], TYPE: []}  # None: a test that does not read as An+B
    for m in _POSITION.finditer(text):
        of_type = m.group(3) is None or m.group(3).lower() == "of-type"
        kind = TYPE if of_type else INDEX
        if m.group(5):  # first-, last-, only-of-type
            word = m.group(5).lower()
            forms = [(True, end, 0, 1) for end in
                     ((False, True) if word == "only" else (word == "last",))]
        else:
            ab = tinycss2.nth.parse_nth(m.group(4))  # None for `2n of .x` (FULL already)
            forms = None if ab is None else [(of_type, m.group(2) is not None, *ab)]
        found[kind] = None if forms is None or found[kind] is None else found[kind] + forms
    for kind, forms in found.items():
        if not needs & kind or not forms:
            continue
        needs &= ~kind
        for form in forms:
            bit = formulas.get(form)
            if bit is None:
                bit = formulas[form] = 1 << (FORMULA_BITS + len(formulas))
            needs |= bit
    return needs


def fits(a: int, b: int, position: int) -> bool:
    """Whether a 1-based ``position`` is an+b for some integer n >= 0 (Selectors 4, An+B)."""
    if a == 0:
        return position == b
    n, rest = divmod(position - b, a)
    return rest == 0 and n >= 0


def has_compounds(tokens) -> list:
    """``(requirements, compound text)`` of the compounds of one selector that contain
    ``:has()`` (a compound that names no tag, class or id is a candidate for every element)."""
    out = []
    for _comb, parts in split_compounds(tokens):
        text = tinycss2.serialize(parts)
        if ":has(" in text.lower():
            out += [(req, text.strip()) for req in _alternatives(parts)]
    return out


class SiblingIndex:
    """Answers "what of its siblings could a selector read of this element?"."""

    def __init__(self, rules):
        self.any = False  # every element FULL
        self.own = _Buckets()  # by what the element itself must be
        self.by_parent = _Buckets()  # universal compounds (`P > :first-child`), by the parent
        self.free = []  # universal compounds without a parent requirement
        self._memo = {}
        self._universal = {}  # parent's (tag, class, id) -> universal compounds it may meet
        self._satisfied = {}  # (ancestry number, id(compound)) -> _Ancestry.satisfies
        self._needs_memo = {}  # (ancestry number, *candidates of each child) -> needs_of
        self._child_needs = {}  # (ancestry number, candidates of a child) -> its need
        self._chain_ids = {}  # (parent's ancestry number, tag, class, id) -> ancestry number
        self._next_chain = 0
        self.formulas = {}  # (of-type, from the end, a, b) -> its bit in a need
        self._formulas_of = {}  # a children list's needs together -> formulas_of(them)
        self._relations_of = {}  # the same -> relations_of(them)
        for rule in rules:
            text = rule.selector_text
            if not (STRUCTURAL.search(text) or "+" in text or "~" in text):
                continue
            found = sensitive_compounds(tinycss2.parse_component_value_list(text),
                                        self.formulas)
            if found is None:
                self.any = True
                return
            for c in found:
                if not c.universal:
                    self.own.add(c, c)
                elif c.parent is not None:
                    self.by_parent.add(c.parent, c)
                else:
                    self.free.append(c)

    def relations_of(self, want: int) -> tuple:
        """``(bit, combinator, test)`` of the sibling relations in ``want`` (``+``: the
        previous sibling passes ``test``; ``~``: some previous sibling does)."""
        hit = self._relations_of.get(want)
        if hit is None:
            if len(self._relations_of) > MEMO_LIMIT:
                self._relations_of.clear()
            hit = self._relations_of[want] = tuple(
                (bit, form[1], _sibling_test(form[2])) for form, bit in self.formulas.items()
                if want & bit and form[0] == "sibling")
        return hit

    def formulas_of(self, want: int) -> tuple:
        """``(bit, of-type, from the end, a, b)`` of the position formulas in ``want``."""
        hit = self._formulas_of.get(want)
        if hit is None:
            if len(self._formulas_of) > MEMO_LIMIT:
                self._formulas_of.clear()
            hit = self._formulas_of[want] = tuple(
                (bit, *form) for form, bit in self.formulas.items()
                if want & bit and form[0] != "sibling")
        return hit

    def needs_children(self, parent, children, chains=None) -> list | None:
        """For each child of ``parent``, what of its siblings selectors read (0: nothing);
        None when no child needs anything. ``chains``: a page's element -> ancestry number
        (``_chain_id``), so that whether a compound's parent and ancestors can match is
        worked out once per distinct ancestry, not once per parent element."""
        return self.needs_of(parent, [self.candidates(el) for el in children], chains)

    def needs_of(self, parent, candidates: list, chains=None) -> list | None:
        """``needs_children`` given ``candidates(child)`` of each child."""
        if self.any:
            return [FULL] * len(candidates)
        pkey = (parent.tag, parent.get("class"), parent.get("id"))
        universal = self._universal.get(pkey)
        if universal is None:
            if len(self._universal) > MEMO_LIMIT:
                self._universal.clear()
            tag, classes, ident = _facts(parent)
            universal = self._universal[pkey] = (
                *self.by_parent.matches(tag, classes, ident), *self.free)
        if not universal and not any(candidates):
            return None
        context = _Ancestry(parent)
        if chains is None:
            return self._needs(universal, candidates, context.satisfies)
        # the ancestry number stands for the parent and its ancestors (``universal`` too)
        chain_id = self._chain_id(parent, chains)
        key = (chain_id, *candidates)
        hit = self._needs_memo.get(key)
        if hit is None:
            if len(self._needs_memo) > MEMO_LIMIT:
                self._needs_memo.clear()
            hit = self._needs_memo[key] = self._needs_by_child(chain_id, universal,
                                                                candidates, context)
        return hit

    def _needs_by_child(self, chain_id: int, universal, candidates, context) -> list | None:
        """``_needs``, each child's answer kept by the ancestry and the child's candidates:
        lists under one ancestry differ (a paragraph's inline elements, a table's rows), the
        answers for their children repeat (the children lists of 40 pages of the benchmark's
        readthedocs-theme: 300 lists a page not met before, 380 distinct children in them)."""
        memo, out, every, satisfies = self._child_needs, [], None, None
        for found in candidates:
            key = (chain_id, found)
            need = memo.get(key)
            if need is None:
                if satisfies is None:
                    satisfies = self._satisfies_memo(chain_id, context)
                    every = _need(0, universal, satisfies)
                need = _need(every, found, satisfies)
                if len(memo) > MEMO_LIMIT:
                    memo.clear()
                memo[key] = need
            out.append(need)
        return out if any(out) else None

    @staticmethod
    def _needs(universal, candidates, satisfies) -> list | None:
        every = _need(0, universal, satisfies)
        out = [_need(every, found, satisfies) for found in candidates]
        return out if any(out) else None

    def _satisfies_memo(self, chain_id: int, context):
        memo = self._satisfied

        def satisfies(c) -> bool:
            key = (chain_id, id(c))
            hit = memo.get(key)
            if hit is None:
                if len(memo) > MEMO_LIMIT:
                    memo.clear()
                hit = memo[key] = context.satisfies(c)
            return hit
        return satisfies

    def _chain_id(self, el, chains: dict) -> int:
        """A number for the tags, classes and ids of ``el`` and its ancestors (all that
        ``_Ancestry.satisfies`` reads), equal for equal ancestries across pages."""
        found = chains.get(el)
        if found is not None:
            return found
        path, base = [el], 0
        for up in el.iterancestors():
            known = chains.get(up)
            if known is not None:
                base = known
                break
            path.append(up)
        ids = self._chain_ids
        for node in reversed(path):
            key = (base, node.tag, node.get("class"), node.get("id"))
            ident = ids.get(key)
            if ident is None:
                if len(ids) > MEMO_LIMIT:  # numbers are never reused
                    ids.clear()
                self._next_chain += 1
                ident = ids[key] = self._next_chain
            chains[node] = base = ident
        return base

    def candidates(self, el) -> tuple:
        """The sibling-reading compounds ``el`` itself could match (tag, classes, id)."""
        key = (el.tag, el.get("class"), el.get("id"))
        hit = self._memo.get(key)
        if hit is None:
            tag = el.tag.lower() if isinstance(el.tag, str) else ""
            classes = frozenset(key[1].split()) if key[1] else frozenset()
            hit = tuple(self.own.matches(tag, classes, key[2]))
            if len(self._memo) > MEMO_LIMIT:  # unique ids would grow it page after page
                self._memo.clear()
            self._memo[key] = hit
        return hit


class HasIndex:
    """Answers "which ``:has()`` compounds could match this element?" by tag, classes and id,
    and whether they do (``answers``)."""

    def __init__(self, rules):
        from .sheet import compile_one

        self.own = _Buckets()
        self.usable = True
        self.active = False
        self._memo = {}
        self._answers = {}  # (compound, serialization length, hash) -> its answer
        self._simple = {}  # compound text -> _simple_has(compound text)
        self._skeletons = {}  # compound reading a state -> ``_state_skeletons``
        self._never_at_rest = set()  # those holding of no element while none is in a state
        # compounds reading a state (`li:has(a:hover)`): their answers change while a state
        # walk marks an element, so they are not kept (``Structure.answered``)
        self.dynamic = set()
        seen = {}
        for rule in rules:
            text = rule.selector_text
            if ":has(" not in text.lower():
                continue
            fresh = set()  # compounds first met in this rule: each of their alternatives
            for req, compound in has_compounds(tinycss2.parse_component_value_list(text)):
                if compound in seen and compound not in fresh:
                    continue
                if compound not in seen:
                    compiled, dynamic = compile_one(compound)
                    if compiled is None:
                        self.usable = False
                        return
                    if dynamic:
                        self.dynamic.add(compound)
                        found = self._skeletons[compound] = _state_skeletons(compound)
                        if found is not None and found[1]:
                            self._never_at_rest.add(compound)
                    seen[compound] = compiled.test
                    fresh.add(compound)
                    self._simple[compound] = _simple_has(compound)
                # (`:is(p, li):has(a)`: one requirement a tag; the li was not a candidate, its
                # answer left out of its key, and a cached li's style served another)
                self.own.add(req, (compound, seen[compound]))
                self.active = True

    def candidates(self, el) -> tuple:
        """``(compound text, test)`` of the ``:has()`` compounds ``el`` could match."""
        key = (el.tag, el.get("class"), el.get("id"))
        hit = self._memo.get(key)
        if hit is None:
            tag = el.tag.lower() if isinstance(el.tag, str) else ""
            classes = frozenset(key[1].split()) if key[1] else frozenset()
            hit = tuple(sorted(set(self.own.matches(tag, classes, key[2])),
                               key=lambda c: c[0]))
            if len(self._memo) > MEMO_LIMIT:
                self._memo.clear()
            self._memo[key] = hit
        return hit

    def could_match(self, el) -> bool:
        return bool(self.candidates(el))

    def unmoved(self, candidates, marked) -> bool:
        """Whether the answers of ``candidates`` are those with no element in a state, where
        the elements ``marked`` are in one: none of them is what a compound reading a state
        names but the state (``_state_skeletons``), so each such compound holds of no element
        now, as with none in a state."""
        for text, _ in candidates:
            if text not in self.dynamic:
                continue
            found = self._skeletons.get(text)
            if found is None or any(test(el) for test in found[0] for el in marked):
                return False
        return True

    def at_rest(self, el, candidates, wrapper_of) -> tuple:
        """``answers_of`` with no element in a state (or none that matters, ``unmoved``): a
        compound that holds of nothing then (``_state_skeletons``) is not asked."""
        never = self._never_at_rest
        asked = [c for c in candidates if c[0] not in never]
        if len(asked) == len(candidates):
            return self.answers_of(el, candidates, wrapper_of)
        found = iter(self.answers_of(el, asked, wrapper_of) if asked else ())
        return tuple(False if c[0] in never else next(found) for c in candidates)

    def answers_of(self, el, candidates, wrapper_of) -> tuple:
        """``answers`` for ``el``, each compound on its own. ``A:has(B)``, ``A:has(> B)``,
        ``A:has(+ B)`` or ``A:has(~ B)`` whose parts test only the element they apply to
        (tag, classes, id, attributes) is answered with lxml (``_has_simple``): cssselect2's
        own test builds a wrapper for every element it reads. Others are remembered by the
        element's serialization where they read only the element and its subtree (no
        pseudo-class but ``:has()`` itself), else asked of cssselect2."""
        simple, out, wrapper, data = self._simple, [], None, None
        for text, test in candidates:
            spec = simple.get(text)
            if spec is not None:
                out.append(_has_simple(el, spec))
                continue
            if wrapper is None:
                wrapper = wrapper_of(el)
            if not _reads_subtree_only(text):
                out.append(test(wrapper))
                continue
            if data is None:
                data = etree.tostring(el, with_tail=False, encoding="utf-8")
            key = (text, len(data), hash(data))
            hit = self._answers.get(key)
            if hit is None:
                if len(self._answers) > MEMO_LIMIT:
                    self._answers.clear()
                hit = self._answers[key] = test(wrapper)
            out.append(hit)
        return tuple(out)


def _state_skeletons(compound: str):
    """``(tests, never at rest)``: tests of an element for what each compound of ``compound``
    that reads a state (``a:hover`` in ``li:has(a:hover span)``) names besides its states
    (``a``), and whether ``compound`` holds of no element while none is in a state (a state
    outside the ``:has()``, or in each selector of its list); None where a state stands
    inside a function other than the ``:has()`` itself (``:not(:hover)`` holds of elements in
    no state) or such a compound does not test only the element it applies to."""
    from .sheet import _DYNAMIC_RE

    tokens = tinycss2.parse_component_value_list(compound)
    outer, inner = [], []
    for token in tokens:
        if token.type == "function" and token.lower_name == "has":
            inner += split_commas(token.arguments)
            if outer and outer[-1].type == "literal" and outer[-1].value == ":":
                outer.pop()  # (the colon of `:has(`)
        elif token.type in ("function", "() block") and \
                _DYNAMIC_RE.search(tinycss2.serialize([token])):
            return None
        else:
            outer.append(token)
    tests, stated = [], []  # (whether each part reads a state)
    for part in [outer] + inner:
        stated.append(False)
        for _, piece in split_compounds(part):
            text = tinycss2.serialize(piece).strip()
            if _DYNAMIC_RE.search(text) is None:
                continue
            if any(t.type in ("function", "() block") and
                   _DYNAMIC_RE.search(tinycss2.serialize([t])) for t in piece):
                return None
            test = _sibling_test(_DYNAMIC_RE.sub("", text).strip() or "*")
            if test is None:
                return None
            tests.append(test)
            stated[-1] = True
    return tests, stated[0] or (len(stated) > 1 and all(stated[1:]))


def _simple_has(compound: str):
    """``(test of A or None, ((reach, test of B, B's tag or None, finder), ...))`` for
    ``A:has(B)``, ``A:has(> B)``, ``A:has(+ B)`` or ``A:has(~ B)`` (``reach``: " ", ">", "+",
    "~"), or a list of these (``A:has(B, > C)``: one alternative each), where A and each B
    test only the element they apply to (``_tests_element_only``; A may be empty:
    ``:has(> img)`` tests every element, and may go on after the ``:has()``:
    ``:has(> code):not(pre)``); None otherwise. Tests take lxml elements.

    ``finder``: an XPath listing, of the elements B could be at (``reach``), those with what B
    needs of their attributes, where it names an id, a class or states (``_finder``); else
    None. A ``:has()`` on the page's root or body reads every element, and one naming a
    state is asked again at every state walk's target."""
    lower = compound.lower()
    at = lower.find(":has(")
    if at < 0 or lower.count(":has(") != 1:
        return None
    end = _closing(compound, at + 4)
    if end < 0:
        return None
    outer = (compound[:at] + compound[end + 1:]).strip()
    root = bool(_ROOT.search(outer))  # `:root:has(...)`: the page's root element
    outer = _ROOT.sub("", outer) or ("*" if root else "")
    if not _tests_element_only(outer):
        return None
    outer_test = _sibling_test(outer) if outer and outer != "*" else None
    if outer and outer != "*" and outer_test is None:
        return None
    if root:
        outer_test = (lambda el, test=outer_test: el.getparent() is None and
                      (test is None or test(el)))
    listed = split_commas(tinycss2.parse_component_value_list(compound[at + 5:end]))
    alternatives = tuple(map(_has_argument, (tinycss2.serialize(t).strip() for t in listed)))
    return None if None in alternatives else (outer_test, alternatives)


def _has_argument(arg: str):
    """``(reach, test, tag or None, finder)`` of one relative selector of a ``:has()`` list
    (``> B``), or None where B does not test only the element it applies to."""
    reach = arg[0] if arg[:1] in (">", "+", "~") else " "
    arg = arg[1:].strip() if reach != " " else arg
    arg, states = _stated(arg)
    if not arg or not _tests_element_only(arg):
        return None
    test = _sibling_test(arg)
    if test is None:
        return None
    req = _requirements(tinycss2.parse_component_value_list(arg))
    tag = req.tag if req.tag not in (None, "*") else None
    return reach, test, tag, _finder(reach, req, states)


# where B of `A:has(B)` is looked for, by ``reach`` (``_has_simple``)
_AXES = {" ": "descendant::*", ">": "child::*", "~": "following-sibling::*",
         "+": "following-sibling::*[1]"}


def _finder(reach: str, req, states):
    """An XPath of the elements at ``reach`` that may match a compound requiring ``req`` and
    one of the attributes ``states`` (``_stated``, or None): a superset (a class or id is
    looked for as a part of the attribute's text), which the compound's test then sorts;
    None where it names none of these."""
    needs = []
    if states:
        needs.append(" or ".join("@" + name for name in states))
    name = req.ident if req.ident is not None else (min(req.classes) if req.classes else None)
    if name is not None and "'" not in name:
        needs.append(f"contains(@{'id' if req.ident is not None else 'class'}, '{name}')")
    if not needs:
        return None
    return etree.XPath(_AXES[reach] + "".join(f"[{need}]" for need in needs))


def _stated(arg: str) -> tuple:
    """``(arg, None)`` for an argument naming no state; for one that does (``input:focus``,
    ``a:is(:hover, :focus)``): ``(arg with its states written as the attributes a state walk
    sets, those of which it needs one or None)``. It needs one where a state stands in the
    compound itself or in each selector of an ``:is()`` / ``:where()`` list of it; one inside
    ``:not()`` needs none (``:not(:hover)`` holds of an element in no state)."""
    from .sheet import STATE_ATTR, _DYNAMIC_RE, with_state_attributes

    if _DYNAMIC_RE.search(arg) is None:
        return arg, None
    arg = with_state_attributes(arg)
    for token in tinycss2.parse_component_value_list(arg):
        needed = []
        if token.type == "[] block":
            needed = _state_attributes([token], STATE_ATTR)
        elif token.type == "function" and token.lower_name in ("is", "where", "matches"):
            each = [_state_attributes(s, STATE_ATTR)[:1] for s in split_commas(token.arguments)]
            if all(each):
                needed = [name for one in each for name in one]
        if needed:
            return arg, tuple(dict.fromkeys(needed))
    return arg, None


def _state_attributes(tokens, prefix: str) -> list:
    """The state attributes (``[data-tinctura-state-hover]``) among ``tokens``, at their top
    level."""
    out = []
    for token in tokens:
        if token.type == "[] block":
            inner = significant(token.content)
            if len(inner) == 1 and inner[0].type == "ident" and \
                    inner[0].lower_value.startswith(prefix):
                out.append(inner[0].lower_value)
    return out


_ROOT = re.compile(r":root(?![\w-])", re.I)


def _closing(text: str, at: int) -> int:
    """The index of the parenthesis that closes the one at ``at`` (-1: none)."""
    depth = 0
    for i in range(at, len(text)):
        depth += {"(": 1, ")": -1}.get(text[i], 0)
        if depth == 0:
            return i
    return -1


# pseudo-classes a lone element answers: :checked reads its own attributes (HTML, "checked")
_ELEMENT_ONLY = re.compile(r":checked(?![\w-])", re.I)


def _tests_element_only(text: str) -> bool:
    """Whether a compound tests only the element itself: names, attributes, ``:checked`` and
    ``:is()`` / ``:where()`` / ``:not()`` lists of names and attributes."""
    rest = _ELEMENT_ONLY.sub("", _LISTS_OF_NAMES.sub("", text))
    return not any(c in rest for c in ":(),>+~ \t\n\r\f\\")


def _names_only(tokens) -> bool:
    """Whether a compound's tokens are a tag, ``*``, ``.class`` and ``#id`` alone."""
    for i, t in enumerate(tokens):
        if t.type == "ident" and (i == 0 or tokens[i - 1].type == "literal"
                                  and tokens[i - 1].value == "."):
            continue
        if t.type == "hash" or (t.type == "literal" and (t.value == "." or
                                                         (t.value == "*" and i == 0))):
            continue
        return False
    return True


def _plain_test(req):
    """A test of an lxml element for a compound of classes and id (its tag is looked for by
    the caller; Selectors 4: class names and ids match case-sensitively in a document in
    standards mode)."""
    classes, ident = req.classes, req.ident

    def test(el) -> bool:
        if ident is not None and el.get("id") != ident:
            return False
        if not classes:
            return True
        have = el.get("class")
        return have is not None and classes.issubset(have.split())
    return test


def _lone(el):
    """A cssselect2 wrapper of ``el`` alone: enough for a compound that tests only it."""
    return cssselect2.ElementWrapper(el, parent=None, index=0, previous=None,
                                     in_html_document=True)


def _has_simple(el, spec) -> bool:
    outer, alternatives = spec
    if outer is not None and not outer(el):
        return False
    return any(_has_one(el, *alternative) for alternative in alternatives)


def _has_one(el, reach: str, arg, tag, find) -> bool:
    if find is not None:  # (``arg`` tests the tag too)
        return any(arg(d) for d in find(el))
    if reach == "+":  # the next element sibling only
        after = next(el.itersiblings(Element), None)
        return after is not None and (tag is None or after.tag.lower() == tag) and arg(after)
    named = "{*}" + tag if tag else Element
    if reach == "~":
        items = el.itersiblings(named)
    elif reach == ">":
        items = el.iterchildren(named)
    else:
        items = el.iterdescendants(named)
    return any(arg(d) for d in items)


def _reads_subtree_only(compound: str) -> bool:
    """A ``:has()`` compound whose only pseudo-class is ``:has()`` and whose arguments use no
    sibling combinator reads nothing outside the element's subtree (``+`` or ``~`` anywhere,
    even inside a string, sends it to cssselect2's own test, which is always right)."""
    return ":" not in compound.lower().replace(":has(", "(") and \
        "+" not in compound and "~" not in compound


class _Ancestry:
    """A parent and its ancestors, read once for every child's candidate compounds."""

    __slots__ = ("parent", "_chain")

    def __init__(self, parent):
        self.parent = parent
        self._chain = None

    def chain(self) -> list:
        if self._chain is None:
            self._chain = [_facts(el) for el in [self.parent, *self.parent.iterancestors()]]
        return self._chain

    def satisfies(self, c: Compound) -> bool:
        if c.parent is not None and not c.parent.could_match(*self.chain()[0]):
            return False
        return all(any(a.could_match(*f) for f in self.chain()) for a in c.ancestors)


def _need(need: int, compounds, satisfies) -> int:
    """``need`` with what each of ``compounds`` reads whose parent and ancestors can match."""
    for c in compounds:
        if (need & c.needs) != c.needs and satisfies(c):
            need |= c.needs
    return need


def _facts(el) -> tuple:
    tag = el.tag.lower() if isinstance(el.tag, str) else ""
    cls = el.get("class")
    return tag, frozenset(cls.split()) if cls else frozenset(), el.get("id")


class _Buckets:
    def __init__(self):
        self.by_id, self.by_class, self.by_tag = {}, {}, {}
        self.universal = []

    def add(self, req, payload):
        if req.ident:
            self.by_id.setdefault(req.ident, []).append((req, payload))
        elif req.classes:
            self.by_class.setdefault(next(iter(req.classes)), []).append((req, payload))
        elif req.tag not in (None, "*"):
            self.by_tag.setdefault(req.tag, []).append((req, payload))
        else:
            self.universal.append((req, payload))

    def matches(self, tag, classes, ident):
        candidates = list(self.by_tag.get(tag, ())) + self.universal
        if ident:
            candidates += self.by_id.get(ident, ())
        for name in classes:
            candidates += self.by_class.get(name, ())
        for req, payload in candidates:
            if req.could_match(tag, classes, ident):
                yield payload
