"""Short readable locators for built pages: ``div.admonition.warning > p`` instead of an XPath.

A locator names the nearest element with an id or a class (itself or an ancestor) and the tags
below it. ``Pages`` reads a built page only when a report asks about it and keeps the last few
parsed, so a report costs one parse per page it shows, not one per finding.
"""
from __future__ import annotations

import os
import re
from collections import OrderedDict

MAX_CLASSES = 3  # classes shown per element: enough to recognise it
MAX_BELOW = 3  # tags shown below the named element
_IDENT = re.compile(r"^-?[_a-zA-Z][_a-zA-Z0-9-]*$")  # CSS identifiers that need no escaping
_NOISE = re.compile(r"^(md-typeset|highlight|headerlink)$")  # classes on nearly everything


def element_xpath(xpath: str) -> str:
    """The element part of a sample's XPath (``::before``, ``::marker`` stripped)."""
    return (xpath or "").split("::")[0]


def pseudo(xpath: str) -> str:
    return "::" + xpath.split("::", 1)[1] if "::" in (xpath or "") else ""


def compound(el, keep_noise: bool = False) -> str:
    """``tag#id`` or ``tag.class1.class2``: one element as CSS, identifiers that need escaping
    left out."""
    tag = el.tag if isinstance(el.tag, str) else "*"
    ident = el.get("id")
    if ident and _IDENT.match(ident):
        return f"{tag}#{ident}"
    classes = [c for c in (el.get("class") or "").split() if _IDENT.match(c)
               and (keep_noise or not _NOISE.match(c))]
    return tag + "".join(f".{c}" for c in classes[:MAX_CLASSES])


def named(el) -> bool:
    return bool(el.get("id") and _IDENT.match(el.get("id"))) or any(
        _IDENT.match(c) and not _NOISE.match(c) for c in (el.get("class") or "").split())


def readable(el, below: int = MAX_BELOW) -> str:
    """The nearest named element (itself or an ancestor) and the tags down to ``el``."""
    path = []
    node = el
    while node is not None and isinstance(node.tag, str):
        if named(node) or node.tag == "body":
            path.append(compound(node))
            break
        path.append(node.tag)
        node = node.getparent()
    path.reverse()
    if len(path) > below + 1:
        path = [path[0], "\u2026"] + path[-below:]
    return " > ".join(path)


def selector(el) -> str:
    """A CSS selector for ``el`` that a stylesheet can use: the nearest element with an id or
    classes and the child path below it, each step numbered among its siblings of the same
    tag where it has any (``div.tw-panel > p:nth-of-type(2) > span``)."""
    path = []
    node = el
    while node is not None and isinstance(node.tag, str):
        if named(node) or node.tag in ("body", "html"):
            path.append(compound(node))
            break
        path.append(node.tag + _nth_of_type(node))
        node = node.getparent()
    path.reverse()
    return " > ".join(path)


_TAG = re.compile(r"^[a-z][a-z0-9-]*$")
_QUOTABLE = re.compile(r'^[^"\\\n]+$')  # no quote, backslash or newline to escape


def by_style(el) -> str | None:
    """A CSS selector for every element with ``el``'s tag and its whole style attribute, as
    written (``span[style="color: #b4c8d8" i]``): a snippet pasted on many pages, at other
    places each time, where ``selector`` names one page's element. None when the attribute
    cannot be quoted as it is."""
    tag, style = el.tag, el.get("style")
    if not isinstance(tag, str) or not _TAG.match(tag) or not style or \
            not _QUOTABLE.match(style):
        return None
    return f'{tag}[style="{style}" i]'


def _nth_of_type(el) -> str:
    parent = el.getparent()
    if parent is None:
        return ""
    same = [c for c in parent if c.tag == el.tag]
    return f":nth-of-type({same.index(el) + 1})" if len(same) > 1 else ""


def landmarks(el) -> list:
    """Tags and classes of ``el`` and its ancestors, innermost first (for plain sentences and
    for telling theme text from page text)."""
    out = []
    node = el
    while node is not None and isinstance(node.tag, str):
        out.append((node.tag, tuple((node.get("class") or "").split()), node.get("id") or ""))
        node = node.getparent()
    return out


def content_scope(tree, xpaths) -> str | None:
    """A selector of one container holding the elements at ``xpaths`` (the first of them on
    ``tree``'s page; the others at the same places of pages built from one template) and no
    navigation (``nav``, ``role=navigation``) besides what lies among them: the widest such
    ancestor of their nearest common one that a class, an id or ``role=main`` names alone on
    the page. None where the page has no navigation outside them, or nothing names it."""
    steps = [element_xpath(x).split("/") for x in xpaths]
    common = []
    for parts in zip(*steps):
        if len(set(parts)) > 1:
            break
        common.append(parts[0])
    found = tree.xpath("/".join(common)) if len(common) > 2 else []
    if not found:
        return None
    inner = found[0]
    around = [(n, set(n.iterancestors()))
              for n in tree.xpath("//nav | //*[@role='navigation']")]
    path = [inner]  # the container's candidates, innermost first
    for parent in inner.iterancestors():
        node = path[-1]
        if any(parent in ups and node not in ups and n is not node for n, ups in around):
            break
        path.append(parent)
    else:
        return None  # every navigation is among the elements: nothing to keep out
    for el in reversed(path):
        name = _alone(tree, el)
        if name:
            return name
    return None


def _alone(tree, el) -> str | None:
    """A selector naming ``el`` and no other element of ``tree``."""
    ident = el.get("id")
    candidates = [f"#{ident}"] if ident and _IDENT.match(ident) else []
    candidates += [f".{c}" for c in (el.get("class") or "").split()
                   if _IDENT.match(c) and not _NOISE.match(c)]
    if el.get("role") == "main":
        candidates.append('[role="main"]')
    if el.tag in ("main", "article"):
        candidates.append(el.tag)
    for name in candidates:
        if _count(tree, name) == 1:
            return name
    return None


def _count(tree, name: str) -> int:
    if name.startswith("#"):
        return len(tree.xpath("//*[@id=$v]", v=name[1:]))
    if name.startswith("."):
        return len(tree.xpath("//*[contains(concat(' ', normalize-space(@class), ' '), $v)]",
                              v=f" {name[1:]} "))
    if name.startswith("["):
        return len(tree.xpath("//*[@role='main']"))
    return len(tree.xpath(f"//{name}"))


class Pages:
    """Built pages parsed on demand, the most recently used kept up to a budget of HTML bytes.

    A report names each problem's examples in problem order, which jumps between pages: on
    200 pages of a generated manual its 125 places stood on 34 pages, and keeping the last 8
    trees parsed 74 of them (the JSON report took 0.16 s); 15 trees parse 52 (0.12 s; all 34
    kept: 0.11 s, but 15 MB more at the run's peak). A parsed tree takes about ten times its
    HTML (32 trees of 100 KB pages: 32 MB), so the budget is in bytes: many small pages or a
    few large ones."""

    KEEP = 64  # trees at most
    KEEP_BYTES = 1_500_000  # of HTML, the trees' sum (large pages: at least 2 are kept)

    def __init__(self, roots, behaviours=()):
        self.roots = [os.path.abspath(r) for r in roots]
        self.behaviours = tuple(behaviours)  # theme script behaviours the engine applied
        self._trees: OrderedDict = OrderedDict()  # page -> (tree, HTML bytes)
        self._bytes = 0

    def tree(self, page: str):
        if page in self._trees:
            self._trees.move_to_end(page)
            return self._trees[page][0]
        tree, size = None, 0
        for root in self.roots:
            path = os.path.join(root, page)
            if os.path.isfile(path):
                from tinctura.extract.html import parse_html

                try:
                    with open(path, "rb") as fh:
                        data = fh.read()
                    size = len(data)
                    tree = parse_html(data)
                    if self.behaviours:  # the XPaths are those of the tree the engine walked
                        from tinctura.extract import behaviours

                        behaviours.apply(tree, self.behaviours)
                except Exception:  # an unreadable page: no locator, the XPath remains
                    tree = None
                break
        self._trees[page] = (tree, size)
        self._bytes += size
        while len(self._trees) > 2 and (len(self._trees) > self.KEEP
                                        or self._bytes > self.KEEP_BYTES):
            self._bytes -= self._trees.popitem(last=False)[1][1]
        return tree

    def element(self, page: str, xpath: str):
        tree = self.tree(page)
        if tree is None:
            return None
        try:
            found = tree.xpath(element_xpath(xpath))
        except Exception:
            return None
        return found[0] if found else None
