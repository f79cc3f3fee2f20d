"""What style keys need of the document structure, computed once per page for every scheme.

An element's style depends on its ancestors (its parent's key stands for them) and on its own
structural identity: tag, attributes as selectors see them (``RuleSet.attr_signature``),
whether it is empty, and, only where a sibling-sensitive selector can reach it, its previous
siblings and the tags of the following ones. That identity does not depend on the colour scheme,
so it is interned once per rule set (``Structure``) and each page's children lists, with their
structural ids, are kept in a ``PageStructure`` that every scheme's walk of the page reuses.
"""
from __future__ import annotations

import cssselect2
from lxml.etree import Element

from .html import own_text
from .ruleset import _proxy
from .sheet import IN_A_STATE
from .siblings import FIRST, FULL, INDEX, LAST, TYPE, fits

LIMIT = 60000
HAS_SUBTREE = -1  # in Structure.raw_ids: an element whose id depends on its subtree
# Attributes that cssselect2 caches on its element wrappers: a scheme that sets one of them
# needs wrappers of its own.
WRAPPER_CACHED = frozenset({"class", "id", "lang", "xml:lang"})


class Structure:
    """Structural ids for one rule set: equal ids mean selectors cannot tell elements apart
    (given equal parents)."""

    def __init__(self, ruleset):
        self.ruleset = _proxy(ruleset)  # (the rule set keeps its structure)
        self.siblings = ruleset.siblings
        has = getattr(ruleset, "has_index", None)
        self.has = has if has is not None and has.active else None
        self.ids = {}
        self.attr_sigs = {}
        self.raw_ids = {}  # (tag, attribute items, empty) -> id, for elements no sibling test reads
        # element -> its :has() answers, for the page being checked (a state walk asks again
        # for an element's id; an answer may read the whole subtree): emptied with each
        # PageStructure and whenever the tree changes
        self.answered = {}
        self._next = 0

    def intern(self, key) -> int:
        ident = self.ids.get(key)
        if ident is None:
            if len(self.ids) > LIMIT:  # bound memory; ids are never reused
                self.ids.clear()
            self._next += 1
            ident = self.ids[key] = self._next
        return ident

    def attrs(self, el) -> tuple:
        memo = self.attr_sigs
        out = []
        for item in el.attrib.items():
            sig = memo.get(item)
            if sig is None:
                if len(memo) > LIMIT:
                    memo.clear()
                sig = memo[item] = (item[0], self.ruleset.attr_signature(*item))
            out.append(sig)
        return tuple(out)  # document order: the same generator writes the same order

    def element_id(self, el, siblings=None, wrapper_of=None) -> int:
        """The structural id of ``el`` at its place among its siblings (``siblings``: what
        ``children`` found selectors read of them; None for an element outside a list).
        ``wrapper_of(el)``: its cssselect2 wrapper, needed where a ``:has()`` compound can
        match it."""
        return self._id(el, self.attrs(el), siblings, wrapper_of)

    def _id(self, el, attrs: tuple, siblings, wrapper_of=None) -> int:
        empty = not len(el) and not (el.text or "").strip()
        if self.has is not None:
            answers = self._answers(el, wrapper_of)
            if answers:
                # a :has() compound reads the subtree or the following siblings: whether it
                # matches is in the identity
                return self.intern((el.tag, attrs, siblings, empty, answers))
        if siblings:
            return self.intern((el.tag, attrs, siblings, empty))
        return self.intern((el.tag, attrs, empty))

    def _answers(self, el, wrapper_of=None) -> tuple:
        """Whether each ``:has()`` compound ``el`` could match does (``()``: none could)."""
        answers = self.answered.get(el)
        if answers is None:
            candidates = self.has.candidates(el)
            if not candidates:
                answers = self.answered[el] = ()
            elif not self.has.dynamic or not any(c[0] in self.has.dynamic for c in candidates):
                answers = self.answered[el] = self.has.answers_of(
                    el, candidates, wrapper_of or _standalone_wrapper)
            else:
                answers = self._stated_answers(el, candidates, wrapper_of or _standalone_wrapper)
        return answers

    def _stated_answers(self, el, candidates, wrapper_of) -> tuple:
        """``_answers`` where one of the compounds reads a state (``li:has(a:hover)``): asked
        again while a state walk marks elements, unless those elements cannot be in any of its
        compounds that read one (``HasIndex.unmoved``): then the answers are those with no
        element in a state, kept (a state walk asks at each target for the body's answers)."""
        has, marked = self.has, IN_A_STATE
        if marked and not has.unmoved(candidates, marked):
            return has.answers_of(el, candidates, wrapper_of)
        at_rest = ("at rest", el)  # (forgotten with the other answers when the tree changes)
        kept = self.answered.get(at_rest)
        if kept is None:
            kept = self.answered[at_rest] = has.at_rest(el, candidates, wrapper_of)
        return kept

    def children(self, el, wrapper_of=None, chains=None) -> list:
        """``(child, structural id, sibling facts)`` for the child elements of ``el``; the
        sibling facts are what sibling-reading selectors need of its place (0 where none
        can reach it). ``wrapper_of``: as for ``element_id``; ``chains``: the page's
        ancestry numbers (``SiblingIndex.needs_children``)."""
        children = list(el.iterchildren(Element))  # elements only, filtered by lxml
        if not children:
            return children
        # what a child's tag, attributes and emptiness decide, looked up once per child: its
        # id where no sibling test reads it, the sibling-reading compounds it could match and
        # its attributes as selectors see them
        raw_ids, known, candidates, plain = self.raw_ids, [], [], True
        for cel in children:
            raw = (cel.tag, tuple(cel.items()), not len(cel) and not (cel.text or "").strip())
            hit = raw_ids.get(raw)
            if hit is None:
                hit = self._first_seen(cel, raw)
            known.append(hit)
            candidates.append(hit[1])
            if hit[0] == HAS_SUBTREE:
                plain = False
        needs = self.siblings.needs_of(el, candidates, chains)
        if needs is None:  # the common case: tag, attributes and emptiness decide
            if plain:
                return [(cel, hit[0], 0) for cel, hit in zip(children, known)]
            return [(cel, hit[0] if hit[0] != HAS_SUBTREE else self._id(cel, hit[2], 0, wrapper_of),
                     0) for cel, hit in zip(children, known)]
        attrs = [hit[2] for hit in known]
        if not plain and any(need & FULL for need in needs):
            # a previous sibling is its :has() answers too (`x:has(y) + z`)
            attrs = [a if hit[0] != HAS_SUBTREE else (a, self._answers(cel, wrapper_of))
                     for cel, hit, a in zip(children, known, attrs)]
        facts = self._sibling_facts(children, needs, attrs)
        out = []
        for cel, (ident, _, attrs, tag, empty), siblings in zip(children, known, facts):
            if ident == HAS_SUBTREE:
                ident = self._id(cel, attrs, siblings, wrapper_of)
            elif siblings:  # as _id, where no :has() compound can match
                ident = self.intern((tag, attrs, siblings, empty))
            out.append((cel, ident, siblings))
        return out

    def _first_seen(self, el, raw: tuple) -> tuple:
        """``(id, sibling-reading compounds, attrs, tag, empty)`` of a tag, attributes and
        emptiness not met yet; the id is HAS_SUBTREE where a :has() compound may match (its
        answers are per subtree)."""
        raw_ids = self.raw_ids
        if len(raw_ids) > LIMIT:
            raw_ids.clear()
        has, attrs = self.has, self.attrs(el)
        ident = HAS_SUBTREE if has is not None and has.could_match(el) \
            else self.intern((raw[0], attrs, raw[2]))
        hit = raw_ids[raw] = (ident, self.siblings.candidates(el), attrs, raw[0], raw[2])
        return hit

    def _sibling_facts(self, children, needs, attrs) -> list:
        """Per child, only what its selectors read of its siblings (``siblings`` module);
        ``attrs``: each child's ``attrs``."""
        n = len(children)
        want = 0
        for need in needs:
            want |= need
        # (bit, of-type, from the end, a, b) of the position formulas some child reads
        formulas = self.siblings.formulas_of(want)
        relations = self._relations(children, want)
        types = ends = None
        if want & TYPE or any(form[1] for form in formulas):
            seen, types = {}, []
            for c in children:
                seen[c.tag] = seen.get(c.tag, 0) + 1
                types.append(seen[c.tag])
            ends = [seen[c.tag] - k for c, k in zip(children, types)]
        following = prevs = None
        if want & FULL:
            intern = self.intern
            following = [0] * n
            nxt = 0
            for i in range(n - 1, -1, -1):
                following[i] = nxt
                nxt = intern(("f", children[i].tag, nxt))
            prevs, chain = [], 0  # identity of the previous siblings (tags and attributes)
            for c, c_attrs in zip(children, attrs):
                prevs.append(chain)
                chain = intern(("s", c.tag, c_attrs, chain))
        out = []
        for i, need in enumerate(needs):
            if not need:
                out.append(0)
                continue
            facts = [need]
            if need & FIRST:
                facts.append(i > 0)
            if need & LAST:
                facts.append(i < n - 1)
            if need & INDEX:
                facts += (i, n - 1 - i)
            if need & TYPE:
                facts += (types[i], ends[i])
            for bit, of_type, from_end, a, b in formulas:
                if need & bit:  # 1-based positions; ends[i] is 0 for the last of its type
                    position = (ends[i] + 1 if from_end else types[i]) if of_type \
                        else (n - i if from_end else i + 1)
                    facts.append(fits(a, b, position))
            for bit, after in relations:
                if need & bit:
                    facts.append(after[i])
            if need & FULL:
                facts += (prevs[i], following[i])
            out.append(tuple(facts))
        return out

    def _relations(self, children, want: int) -> list:
        """``(bit, answers)`` of the sibling relations in ``want``: per child, whether the
        previous sibling (``+``) or some previous sibling (``~``) passes the relation's test."""
        out = []
        for bit, comb, test in self.siblings.relations_of(want):
            hits = [test(c) for c in children]
            if comb == "+":
                after = [False] + hits[:-1]
            else:
                after, seen = [], False
                for hit in hits:
                    after.append(seen)
                    seen = seen or hit
            out.append((bit, after))
        return out


def _standalone_wrapper(el):
    """A cssselect2 wrapper of ``el`` in a tree of its own wrappers (callers without a page's)."""
    wrapper = cssselect2.ElementWrapper.from_html_root(el.getroottree().getroot())
    for node in reversed([el, *el.iterancestors()][:-1]):
        wrapper = next(c for c in wrapper.iter_children() if c.etree_element is node)
    return wrapper


def steps(children) -> list:
    """The last XPath step of each child, as lxml's ``getpath`` writes it: the tag, with the
    position among same-tag siblings when there are several."""
    tags = [c.tag for c in children]
    if len(set(tags)) == len(tags):  # no two alike: no positions
        return tags
    count = {}
    for tag in tags:
        count[tag] = count.get(tag, 0) + 1
    seen, out = {}, []
    for tag in tags:
        if count[tag] == 1:
            out.append(tag)
        else:
            n = seen[tag] = seen.get(tag, 0) + 1
            out.append(f"{tag}[{n}]")
    return out


class PageStructure:
    """One page's children lists, texts and XPaths, shared by the walks of its schemes, and the
    cssselect2 wrappers selector matching needs, built only for elements that get matched
    (a style-cache miss, a state walk): most elements of a page never are."""

    def __init__(self, root, structure: Structure):
        self.root = root
        self.structure = structure
        self.kids = {}  # element -> Structure.children(element)
        self.texts = {}  # element -> its own text
        self.chains = {}  # element -> ancestry number (siblings.SiblingIndex._chain_id)
        # element -> XPath, filled as children lists are made (lxml's getpath rescans every
        # level's siblings: a tenth of all the work on a large page)
        self.paths = {root: "/" + root.tag}
        self._getpath = root.getroottree().getpath
        self._ids = None  # id -> element, made on first use (``by_id``)
        structure.answered = {}
        self._reset_wrappers()

    def by_id(self, name: str):
        """The page's first element whose id is ``name``, or None: the page's ids are indexed
        once, on first use (an icon's ``<use href="#...">``, met in every scheme's walk)."""
        if self._ids is None:
            self._ids = {}
            for el in self.root.xpath("//*[@id]"):
                self._ids.setdefault(el.get("id"), el)
        return self._ids.get(name)

    def _reset_wrappers(self) -> None:
        self.wrapper = cssselect2.ElementWrapper.from_html_root(self.root)
        self.wrappers = {self.root: self.wrapper}

    def wrapper_of(self, el):
        wrappers = self.wrappers
        wrapper = wrappers.get(el)
        if wrapper is not None:
            return wrapper
        missing = [el]  # the element and its ancestors without wrappers, deepest first
        for up in el.iterancestors():
            if up in wrappers:
                break
            missing.append(up)
        for item in reversed(missing):
            parent = wrappers[item.getparent()]
            for child in parent.iter_children():  # siblings too: matching reads `previous`
                wrappers[child.etree_element] = child
        return wrappers[el]

    def text(self, el) -> str:
        text = self.texts.get(el)
        if text is None:
            text = self.texts[el] = own_text(el)
        return text

    def children(self, el) -> list:
        kids = self.kids.get(el)
        if kids is None:
            kids = self.kids[el] = self.structure.children(el, self.wrapper_of, self.chains)
            if kids:
                paths = self.paths
                base = paths.get(el)
                if base is None:
                    base = paths[el] = self._getpath(el)
                base += "/"
                for (child, _, _), step in zip(kids, steps([k[0] for k in kids])):
                    paths[child] = base + step
        return kids

    def path(self, el) -> str:
        path = self.paths.get(el)
        if path is None:
            path = self.paths[el] = self._getpath(el)
        return path

    def root_id(self) -> int:
        return self.structure.intern(("root", self.structure.element_id(
            self.root, wrapper_of=self.wrapper_of)))

    def reclassed(self, el) -> None:
        """A class set on ``el`` alone and taken off again (a scroll spy's mark, walked in
        turn on each entry): forget what read its classes, less than ``changed`` forgets for
        the whole page. Its wrapper's classes (cssselect2 caches them), its parent's list of
        children (its id), the lists below it and the ancestry numbers (which read classes)."""
        wrapper = self.wrappers.get(el)
        if wrapper is not None:
            wrapper.__dict__.pop("classes", None)  # (a cached_property of ElementWrapper)
        self.chains.clear()
        self.structure.answered.clear()
        for up in (el.getparent(), *el.iter()):
            self.kids.pop(up, None)
        if self.structure.has is not None:  # ancestors' subtree answers read it too
            for up in el.iterancestors():
                grand = up.getparent()
                if grand is not None:
                    self.kids.pop(grand, None)

    def changed(self, elements, attributes) -> None:
        """A scheme set ``attributes`` on ``elements``: forget what read them."""
        if not elements:
            return
        self.chains.clear()  # they read classes and ids
        self.structure.answered.clear()
        if WRAPPER_CACHED & {a.lower() for a in attributes}:
            self._reset_wrappers()
            self.kids.clear()
            return
        for el in elements:
            parent = el.getparent()
            if parent is not None:
                self.kids.pop(parent, None)  # its children's ids (and the siblings after)
            if self.structure.has is not None:  # ancestors' subtree fingerprints changed too
                for up in el.iterancestors():
                    grand = up.getparent()
                    if grand is not None:
                        self.kids.pop(grand, None)
