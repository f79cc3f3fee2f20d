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

from .html import own_text

LIMIT = 60000
# Attributes that cssselect2 caches on its element wrappers: a scheme that sets one of them
# needs wrappers of its own.
WRAPPER_CACHED = frozenset({"class", "id", "lang", "xml:lang"})


class Structure:
    """Structural ids for one rule set: equal ids mean selectors cannot tell elements apart
    (given equal parents)."""

    def __init__(self, ruleset):
        self.ruleset = ruleset
        self.siblings = ruleset.siblings
        self.ids = {}
        self.attr_sigs = {}
        self.raw_ids = {}  # (tag, attribute items, empty) -> id, for elements no sibling test reads
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

    def element_id(self, el, prev_chain: int, following: int) -> int:
        """The structural id of ``el`` at its place among its siblings."""
        return self._id(el, self.attrs(el), self.siblings.sensitive(el, el.getparent()),
                        prev_chain, following)

    def _id(self, el, attrs: tuple, sensitive: bool, prev_chain: int, following: int) -> int:
        empty = not len(el) and not (el.text or "").strip()
        if sensitive:
            return self.intern((el.tag, attrs, prev_chain, following, empty))
        return self.intern((el.tag, attrs, empty))

    def children(self, el) -> list:
        """``(child, structural id, previous-siblings id, following-siblings id)`` for the
        child elements of ``el``; the sibling ids are 0 where no selector can read them."""
        children = [c for c in el if isinstance(c.tag, str)]
        if not children:
            return children
        sensitive = self.siblings.sensitive_children(el, children)
        if sensitive is None:  # the common case: tag, attributes and emptiness decide
            raw_ids, out = self.raw_ids, []
            for cel in children:
                raw = (cel.tag, tuple(cel.attrib.items()),
                       not len(cel) and not (cel.text or "").strip())
                ident = raw_ids.get(raw)
                if ident is None:
                    if len(raw_ids) > LIMIT:
                        raw_ids.clear()
                    ident = raw_ids[raw] = self.intern((raw[0], self.attrs(cel), raw[2]))
                out.append((cel, ident, 0, 0))
            return out
        intern = self.intern
        following = [0] * len(children)
        nxt = 0
        for i in range(len(children) - 1, -1, -1):
            following[i] = nxt
            nxt = intern(("f", children[i].tag, nxt))
        prev_chain = 0  # identity of the previous siblings (tags and attributes)
        out = []
        for i, cel in enumerate(children):
            attrs = self.attrs(cel)
            ident = self._id(cel, attrs, sensitive[i], prev_chain, following[i])
            out.append((cel, ident, prev_chain, following[i]))
            prev_chain = intern(("s", cel.tag, attrs, prev_chain))
        return out


def steps(children) -> list:
    """The last XPath step of each child, as lxml's ``getpath`` writes it: the tag, with the
    position among same-tag siblings when there are several."""
    count = {}
    for c in children:
        count[c.tag] = count.get(c.tag, 0) + 1
    seen, out = {}, []
    for c in children:
        tag = c.tag
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
        # element -> XPath, filled as children lists are made (lxml's getpath rescans every
        # level's siblings: a tenth of all the work on a large page)
        self.paths = {root: "/" + root.tag}
        self._getpath = root.getroottree().getpath
        self._reset_wrappers()

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
            kids = self.kids[el] = self.structure.children(el)
            if kids:
                paths = self.paths
                base = paths.get(el)
                if base is None:
                    base = paths[el] = self._getpath(el)
                for (child, *_), step in zip(kids, steps([k[0] for k in kids])):
                    paths[child] = f"{base}/{step}"
        return kids

    def path(self, el) -> str:
        path = self.paths.get(el)
        if path is None:
            path = self.paths[el] = self._getpath(el)
        return path

    def root_id(self) -> int:
        return self.structure.intern(("root", self.structure.element_id(self.root, 0, 0)))

    def changed(self, elements, attributes) -> None:
        """A scheme set ``attributes`` on ``elements``: forget what read them."""
        if not elements:
            return
        if WRAPPER_CACHED & {a.lower() for a in attributes}:
            self._reset_wrappers()
            self.kids.clear()
            return
        for el in elements:
            parent = el.getparent()
            if parent is not None:
                self.kids.pop(parent, None)  # its children's ids (and the siblings after)
