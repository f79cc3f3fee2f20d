"""What themes' scripts change in the page before a reader sees it, as a declarative table.

tinctura reads the built HTML; documentation themes run scripts at load time that add classes and
wrap elements, and theme stylesheets style the result (striped table rows, responsive table
wrappers). Each :class:`Behaviour` restates one such change, found in the theme's own script
(named in ``source``), so the cascade sees the tree the reader's browser sees. Each entry is
checked against Chromium running the theme's real script (tests/browser/test_theme_scripts.py).

A behaviour applies to a page when the page loads the theme's script (a ``<script src>``
contains ``script``) and has the theme's marker (``marker``: a CSS selector). Users declare their own
behaviours for their own scripts in the configuration (``behaviours``: the same fields, with
``script`` optional). A scroll spy, which marks the table-of-contents entry of the section in
view as the reader scrolls, is the action ``current``: the tree is left as it is, and each
matching element is walked again with the classes added, one at a time, in the state
``current`` (``samples.PageWalker.disclose``). What else a script changes later, on scroll or
on click, is not modelled: :data:`NOT_MODELLED` says so once per site for the themes in the
table.
"""
from __future__ import annotations

import re
from dataclasses import dataclass
from functools import lru_cache

from lxml import etree

from .disclosure import CURRENT  # an action, and the state of what it marks

ACTIONS = ("add-class", "remove-class", "wrap", "wrap-children", "current")


@dataclass(frozen=True)
class Behaviour:
    theme: str  # a readable name for reports
    action: str  # "add-class" / "remove-class": the classes in ``value``; "wrap": wrap the
    # element in ``value``; "wrap-children": wrap its content (text and children) in ``value``;
    # "current": the classes in ``value`` on one matching element at a time (a scroll spy)
    selector: str  # the elements changed (CSS selector)
    # classes ("a b"), or the wrappers, outermost first ("div.outer > div.inner"), each
    # tag.class[attribute=value], where {name} in a value stands for the element's attribute
    value: str
    marker: str = ""  # the page has the theme when this selector matches ("" always)
    script: str = ""  # ... and loads a script whose src contains this ("" any page)
    source: str = ""  # where the theme's script does it
    # the elements matching ``selector`` at or below each element matching this, searched
    # from each of those ("" the whole page): far faster than "container item" where the
    # item is common and the container rare (``_targets``)
    within: str = ""


_MATERIAL = ("body", "assets/javascripts/bundle.")  # any page of the theme; its script bundle

BUILTIN = (
    # mkdocs-material's bundle: document.documentElement.classList.remove("no-js"), then
    # .add("js") (rules under .no-js hide the search box), and its focus-visible polyfill adds
    # "js-focus-visible"; content tables without a class are
    # wrapped: <div class="md-typeset__scrollwrap"><div class="md-typeset__table">table</div></div>
    Behaviour("mkdocs-material", "remove-class", "html", "no-js", *_MATERIAL,
              "mkdocs-material assets/javascripts/bundle.*.min.js"),
    Behaviour("mkdocs-material", "add-class", "html", "js js-focus-visible", *_MATERIAL,
              "mkdocs-material assets/javascripts/bundle.*.min.js"),
    Behaviour("mkdocs-material", "wrap", "[data-md-component=content] table:not([class])",
              "div.md-typeset__scrollwrap > div.md-typeset__table", *_MATERIAL,
              "mkdocs-material assets/javascripts/bundle.*.min.js"),
    # content tabs ([data-tabs]): the labels' container is marked linked and each label's
    # content is wrapped in <a href="#{for}" tabindex="-1">
    Behaviour("mkdocs-material", "add-class", "[data-tabs] > .tabbed-labels",
              "tabbed-labels--linked", *_MATERIAL,
              "mkdocs-material assets/javascripts/bundle.*.min.js"),
    Behaviour("mkdocs-material", "wrap-children", "[data-tabs] > .tabbed-labels > label[for]",
              "a[href=#{for}][tabindex=-1]", *_MATERIAL,
              "mkdocs-material assets/javascripts/bundle.*.min.js"),
    # its scroll spy marks the link of the section in view in each table of contents (the
    # sidebar's and the one inside the navigation) "md-nav__link--active" (seen in Chromium,
    # tests/browser/test_scroll_spies_chromium.py; those passed get "--passed", whose look is
    # the rest's in the theme's palettes)
    Behaviour("mkdocs-material", "current", "a.md-nav__link", "md-nav__link--active",
              *_MATERIAL, "mkdocs-material assets/javascripts/bundle.*.min.js",
              within="nav.md-nav--secondary"),
    # MkDocs' own theme, js/base.js: document.querySelectorAll('table').forEach(table =>
    # table.classList.add('table', 'table-striped', 'table-hover'))
    Behaviour("mkdocs", "add-class", "table", "table table-striped table-hover",
              "html[data-bs-theme]", "js/base.js", "mkdocs theme js/base.js"),
    # js/base.js: new bootstrap.ScrollSpy(document.body, {target: '.bs-sidebar'}): Bootstrap's
    # scroll spy marks the sidebar's link of the section in view "active"
    Behaviour("mkdocs", "current", "a.nav-link", "active", "html[data-bs-theme]",
              "js/base.js", "mkdocs theme js/base.js", within="div.bs-sidebar"),
    # MkDocs' readthedocs theme: js/theme_extra.js adds 'docutils' to content tables, then
    # js/theme.js wraps them: $("table.docutils:not(.field-list,.footnote,.citation)")
    # .wrap("<div class='wy-table-responsive'></div>"), footnotes and citations likewise.
    Behaviour("readthedocs", "add-class", "div.rst-content table", "docutils",
              "body.wy-body-for-nav", "js/theme_extra.js", "readthedocs theme js/theme_extra.js"),
    Behaviour("readthedocs", "wrap",
              "table.docutils:not(.field-list):not(.footnote):not(.citation)",
              "div.wy-table-responsive", "body.wy-body-for-nav", "js/theme.js",
              "readthedocs theme js/theme.js"),
    Behaviour("readthedocs", "wrap", "table.docutils.footnote", "div.wy-table-responsive.footnote",
              "body.wy-body-for-nav", "js/theme.js", "readthedocs theme js/theme.js"),
    Behaviour("readthedocs", "wrap", "table.docutils.citation", "div.wy-table-responsive.citation",
              "body.wy-body-for-nav", "js/theme.js", "readthedocs theme js/theme.js"),
    # Sphinx's Furo, _static/scripts/furo.js: its scroll spy marks the table-of-contents item
    # of the section in view "scroll-current" (its link takes the look)
    Behaviour("furo", "current", "li", "scroll-current", ".sidebar-drawer",
              "scripts/furo.js", "furo _static/scripts/furo.js", within="div.toc-tree"),
    # pydata-sphinx-theme, _static/scripts/pydata-sphinx-theme.js: Bootstrap's scroll spy marks
    # the page's table-of-contents entry in view "active", its link and its item (whose nested
    # list the theme's stylesheet then shows; not modelled: NOT_MODELLED)
    Behaviour("pydata-sphinx-theme", "current", ".toc-entry > a.nav-link", "active",
              ".bd-header", "scripts/pydata-sphinx-theme.js",
              "pydata-sphinx-theme _static/scripts/pydata-sphinx-theme.js", within=".page-toc"),
)

# Themes whose scripts change only what is not modelled (below): (theme, marker, script), as
# a Behaviour's; the page has the theme when both match, and the note is made
DETECTED = (
    # pydata-sphinx-theme's _static/scripts/pydata-sphinx-theme.js: in the dark,
    # `.dropdown-menu` elements get "dropdown-menu-dark"
    # (`"dark"===n?e.classList.add("dropdown-menu-dark")`)
    ("pydata-sphinx-theme", ".bd-header", "scripts/pydata-sphinx-theme.js"),
)

NOT_MODELLED = {
    "mkdocs-material": "the theme's script also adds buttons (copy, tabs) and marks the "
                       "table-of-contents entries passed on scroll; those are not checked",
    "mkdocs": "the theme's script also changes classes on click, besides opening its menus; "
              "those states are not checked",
    "readthedocs": "the theme's script also marks the current navigation entry from the URL "
                   "fragment and adds expand buttons; those are not checked",
    "pydata-sphinx-theme": "the theme's script also shows the nested entries of the "
                           "table-of-contents entry in view and darkens dropdown menus in the "
                           "dark scheme; those looks are not checked",
}


NOTES_BY_THEME = {theme: f"{theme} theme: {note}" for theme, note in NOT_MODELLED.items()}


def from_setting(entries) -> tuple:
    """User behaviours from a setting; ValueError naming the entry and what is wrong."""
    if not isinstance(entries, list):
        raise ValueError("behaviours must be a list")
    out = []
    for n, entry in enumerate(entries, 1):
        where = f"behaviour #{n}"
        if not isinstance(entry, dict):
            raise ValueError(f"{where}: expected a mapping with action, selector, value")
        unknown = set(entry) - {"action", "selector", "value", "marker", "script", "theme",
                                "within"}
        if unknown:
            raise ValueError(f"{where}: unknown keys {', '.join(sorted(unknown))}")
        if entry.get("action") not in ACTIONS:
            raise ValueError(f"{where}: action must be one of {', '.join(ACTIONS)}")
        for key in ("selector", "value"):
            if not isinstance(entry.get(key), str) or not entry[key].strip():
                raise ValueError(f"{where}: {key} must be a non-empty string")
        behaviour = Behaviour(entry.get("theme", "configuration"), entry["action"],
                              entry["selector"], entry["value"], entry.get("marker", ""),
                              entry.get("script", ""), "configuration",
                              entry.get("within", ""))
        if behaviour.action.startswith("wrap") and not all(
                _PART.fullmatch(p.strip()) for p in behaviour.value.split(">")):
            raise ValueError(f"{where}: value must be tag.class[attribute=value] > ...")
        try:
            _compiled(behaviour.selector)
            for other in (behaviour.marker, behaviour.within):
                if other:
                    _compiled(other)
        except Exception as exc:
            raise ValueError(f"{where}: invalid selector: {exc}") from None
        out.append(behaviour)
    return tuple(out)


def apply(root, behaviours=BUILTIN, source=None, detected=DETECTED, spied=None) -> list:
    """Apply the behaviours whose theme the page has, in order; returns the themes applied,
    then those of ``detected`` (theme, marker, script) the page has. A ``current`` behaviour
    leaves the tree as it is: its ``(element, classes)`` go to ``spied`` (a list), when given.

    ``source``: the page's HTML (decoded text) the tree was parsed from, when at hand: a
    selector that names a tag or an attribute the page never mentions cannot match, and is
    not searched for (a search of the tree costs about a millisecond on a page with a large
    navigation)."""
    scripts = [el.get("src") or "" for el in root.iter("script") if el.get("src")]
    mentions = _Mentions(source)
    applied = []
    for b in behaviours:
        if b.script and not any(b.script in src.split("?")[0] for src in scripts):
            continue
        if b.marker and not (mentions.may_match(b.marker) and select(root, b.marker)):
            continue
        targets = _targets(root, b, mentions)
        if b.action == CURRENT:
            if spied is not None:
                spied.extend((el, b.value) for el in targets)
        else:
            for el in targets:
                _ACT[b.action](el, b.value)
            if targets:
                mentions.made(b)
        if b.theme not in applied:
            applied.append(b.theme)
    for theme, marker, script in detected:
        if any(script in src.split("?")[0] for src in scripts) and \
                mentions.may_match(marker) and select(root, marker):
            applied.append(theme)
    return applied


def _targets(root, b: Behaviour, mentions) -> list:
    """The elements ``b`` changes. With ``within``, each container is searched from itself
    down: a scroll spy's links (``a.md-nav__link``, one of a thousand in a large navigation)
    inside a rare container cost 6 ms a page written as one selector, whose search looks up
    from every such link (``_translator``), measured on 1,000 pages."""
    if not mentions.may_match(b.selector) or (b.within and not mentions.may_match(b.within)):
        return []
    if not b.within:
        return select(root, b.selector)
    found = {}
    for container in select(root, b.within):
        found.update(dict.fromkeys(select(container, b.selector)))
    return list(found)


# Tags an HTML parser (or parse_html) may create without a tag in the source.
_IMPLIED_TAGS = frozenset({"html", "head", "body", "tbody", "p"})


class _Mentions:
    """The tag and attribute names a page's HTML mentions, as a necessary condition for a
    selector to match: names cannot be written with character references, so an element of
    the parsed tree has its tag (unless the parser implies it) and attribute names in the
    source. Behaviours that made elements or attributes add theirs."""

    def __init__(self, source):
        self.text = source.lower() if isinstance(source, str) else None  # None: no filter
        self.extra = set()

    def may_match(self, selector: str) -> bool:
        if self.text is None:
            return True
        return any(all(name in self.extra or name in self.text for name in names)
                   for names in _named(selector))

    def made(self, behaviour) -> None:
        if behaviour.action.startswith("wrap"):
            for part in behaviour.value.split(">"):
                tag, _, attrs = _PART.fullmatch(part.strip()).groups()
                self.extra.add(tag.lower() or "div")
                self.extra.update(a.partition("=")[0].strip().lower()
                                  for a in re.findall(r"\[([^\]]*)\]", attrs))
        self.extra.add("class")  # the wrappers' classes, or classes added to an element


@lru_cache(maxsize=256)
def _named(selector: str) -> tuple:
    """For each selector of the list, the tag and attribute names (lower case) an element
    must have for it to match, or some ancestor or sibling must (``:not()``, ``:is()`` and
    other arguments left out)."""
    from cssselect import parse

    out = []
    for parsed in parse(selector):
        names, todo = set(), [parsed.parsed_tree]
        while todo:
            node = todo.pop()
            kind = type(node).__name__
            if kind == "Element":
                tag = node.element or "*"
                if node.namespace is None and tag.isascii() and tag != "*" \
                        and tag.lower() not in _IMPLIED_TAGS:
                    names.add(tag.lower())
                continue
            if kind == "Attrib" and node.namespace is None and node.attrib.isascii():
                names.add(node.attrib.lower())
            if kind == "CombinedSelector":
                todo.append(node.subselector)
            inner = getattr(node, "selector", None)  # the compound's other parts
            if inner is not None:
                todo.append(inner)
        out.append(tuple(sorted(names)))
    return tuple(out)


def add_classes(el, value: str) -> None:
    """The classes of ``value`` added to ``el``'s, those it has kept once."""
    have = (el.get("class") or "").split()
    el.set("class", " ".join(have + [c for c in value.split() if c not in have]))


def _remove_classes(el, value: str) -> None:
    gone = set(value.split())
    kept = [c for c in (el.get("class") or "").split() if c not in gone]
    if kept:
        el.set("class", " ".join(kept))
    else:
        el.attrib.pop("class", None)


def _wrap(el, value: str) -> None:
    parent = el.getparent()
    if parent is None:
        return
    outer, inner = _wrappers(el, value)
    outer.tail, el.tail = el.tail, None
    parent.replace(el, outer)
    inner.append(el)


def _wrap_children(el, value: str) -> None:
    outer, inner = _wrappers(el, value)
    inner.text, el.text = el.text, None
    for child in list(el):
        inner.append(child)  # moves it, with its tail
    el.append(outer)


_PART = re.compile(r"([\w-]*)((?:\.[\w-]+)*)((?:\[[^\]]*\])*)")


def _wrappers(el, value: str) -> tuple:
    """(outermost, innermost) of the elements ``value`` describes, nested."""
    outer = inner = None
    for part in value.split(">"):
        tag, classes, attrs = _PART.fullmatch(part.strip()).groups()
        made = etree.Element(tag or "div")
        if classes:
            made.set("class", " ".join(classes.strip(".").split(".")))
        for attr in re.findall(r"\[([^\]]*)\]", attrs):
            name, _, text = attr.partition("=")
            made.set(name.strip(), re.sub(r"\{([\w-]+)\}", lambda m: el.get(m.group(1), ""),
                                          text.strip().strip("\"'")))
        made.sourceline = el.sourceline  # a script's element has no line; give it the element's
        if inner is None:
            outer = made
        else:
            inner.append(made)
        inner = made
    return outer, inner


_ACT = {"add-class": add_classes, "remove-class": _remove_classes, "wrap": _wrap,
        "wrap-children": _wrap_children}


def select(root, selector: str) -> list:
    """Elements matching ``selector`` (theme behaviours, scheme attributes). Runs on every
    page: the selector is translated to XPath once (cssselect) and evaluated by libxml2; a walk
    of cssselect2 wrappers cost several milliseconds on a page with a large navigation."""
    selector = selector.strip()
    if selector in ("html", ":root"):
        return [root]
    if selector == "body":
        body = root.find("body")
        return [body] if body is not None else []
    # below a subtree's root an ancestor may lie outside it: the left-to-right translation
    return _compiled(selector, root.getparent() is None)(root)


def selector_check(selector: str) -> None:
    """Raise when :func:`select` cannot read ``selector`` (settings are checked up front)."""
    if selector.strip() not in ("html", ":root", "body"):
        _compiled(selector.strip())


@lru_cache(maxsize=256)
def _compiled(selector: str, whole_page: bool = True):
    # relative to the document: descendant-or-self of the root element
    from cssselect import HTMLTranslator

    translator = _translator() if whole_page else HTMLTranslator()
    return etree.XPath(translator.css_to_xpath(selector, prefix="descendant-or-self::"))


@lru_cache(maxsize=1)
def _translator():
    from cssselect import HTMLTranslator

    class RightToLeft(HTMLTranslator):
        """``E F`` as "F with an ancestor E" where both are one compound: libxml2 then
        collects the few F of the page and looks up from each, instead of collecting every
        descendant of every E (a node set of the whole page for ``[data-x] table``)."""

        def xpath_descendant_combinator(self, left, right):
            if left.path or right.path or (right.element == "*" and not right.condition):
                return super().xpath_descendant_combinator(left, right)
            return right.add_condition(f"ancestor::{left}")

    return RightToLeft()
