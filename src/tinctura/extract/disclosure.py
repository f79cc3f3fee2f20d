"""Content a reader shows with a click: a closed ``<details>``, the panels of tabs made of
radio buttons (mkdocs-material's content tabs, pymdownx.tabbed, CSS-only tab sets), and the
dropdown menus a theme's script opens (MkDocs' own theme: its whole navigation). Last, the
table-of-contents entries a theme's scroll spy marks as the reader scrolls are walked marked,
one at a time, in the state ``current`` (``behaviours``' action of that name).

A browser hides them until the reader opens them, so a walk of the page as it loads never meets
their text, yet a reader does: their colours must pass like any other. Each page is therefore
also walked with every closed ``<details>`` open and every radio button of a group checked (a
group's panels then show together, each with its label in the selected look), over the
outermost such elements only; what that walk finds besides what the resting walk
found is reported in the state ``shown`` (``samples.PageWalker.disclose``). A menu, hidden
whole until opened and repeated on every page, is walked open as the resting walk goes, its
repeated parts replayed, its links hovered and focused too.

How browsers hide them, as the HTML Living Standard specifies (the ``details`` element's
rendering; radio button groups); tabs built on ``:checked`` (radios beside their panels) are
common practice in themes, while a group of radios beside only their labels (a light/dark
switch) is not taken for tabs.
"""
from __future__ import annotations

from lxml import etree

SHOWN = "shown"  # the state of what only a disclosed walk meets
CURRENT = "current"  # the state of an element a theme's scroll spy marks (behaviours.py)
# Menus a theme's script opens on click: (text the page must hold, the attributes of a toggle
# that marks the page, the menus' class, the class the script adds). Bootstrap 4 and 5
# (MkDocs' own theme) add "show" to a dropdown's menu (recalled from memory of Bootstrap's
# dropdown plugin; the marker is its toggle's attribute; tests/browser/test_disclosure_chromium.py
# checks it against the theme's script).
MENUS = (("dropdown-menu", (("data-bs-toggle", "dropdown"), ("data-toggle", "dropdown")),
          "dropdown-menu", "show"),)


class Disclosure:
    """The elements to change on one page and the subtrees to walk once they are changed."""

    def __init__(self, root, text: str | None = None, spied=()):
        """``text``: the page's HTML, when at hand (a page without a menu's class is not
        searched for menus); ``spied``: ``(element, classes)`` a theme's scroll spy adds as
        the reader scrolls (``behaviours``' action ``current``), each walked with them in turn
        in the state ``current``."""
        self.changes = []  # (element, attribute, value to set, value before or None)
        groups = {}  # parent of radio buttons -> its radios
        for el in root.iter("details", "input"):
            if el.tag == "details":
                if el.get("open") is None:
                    self.changes.append((el, "open", "open", None))
            elif (el.get("type") or "").lower() == "radio":
                parent = el.getparent()
                if parent is not None:
                    groups.setdefault(parent, []).append(el)
        # tabs: radio buttons beside the panels they show (a group of radios and their labels
        # alone, as a theme's light/dark switch, shows nothing but itself)
        tabs = [parent for parent, radios in groups.items()
                if any(r.get("checked") is None for r in radios) and any(
                    isinstance(c.tag, str) and c.tag not in ("input", "label") for c in parent)]
        for parent in tabs:
            self.changes.extend((r, "checked", "checked", None) for r in groups[parent]
                                if r.get("checked") is None)
        candidates = [el for el, attr, _, _ in self.changes if attr == "open"] + tabs
        self.menus = []  # the theme's menus, outermost: walked open as at rest (not deduped)
        for el, cls in _menus(root, text):
            self.changes.append((el, "class", f"{el.get('class', '')} {cls}".strip(),
                                 el.get("class")))
            self.menus.append(el)
        opened = set(self.menus)
        self.menus = [el for el in self.menus
                      if not any(up in opened for up in el.iterancestors())]
        inside = set(candidates)
        # the outermost ones: a walk of each covers those nested in it
        self.targets = [el for el in candidates
                        if not any(up in inside for up in el.iterancestors())]
        # the targets, what they hold and what holds them: never replayed from another
        # page's walk (the disclosed walk tells what is new by this page's resting samples)
        self.spied = [(el, classes) for el, classes in spied
                      if not set(classes.split()) <= set((el.get("class") or "").split())]
        self.holders = {up for el in self.targets + [el for el, _ in self.spied]
                        for up in (*el.iter(), *el.iterancestors())}
        self.attributes = sorted({attr for _, attr, _, _ in self.changes})

    def __bool__(self) -> bool:
        return bool(self.targets or self.menus or self.spied)

    def apply(self):
        """Open, check and show; returns the changed elements and a function that restores
        them."""
        for el, attr, value, _ in self.changes:
            el.set(attr, value)

        def restore():
            for el, attr, _, before in self.changes:
                if before is None:
                    el.attrib.pop(attr, None)
                else:
                    el.set(attr, before)

        return [el for el, _, _, _ in self.changes], restore


def _menus(root, text=None) -> list:
    """``(menu, class to add)`` for the menus a theme's script opens on click."""
    out = []
    for needle, toggles, menu, cls in MENUS:
        if text is None or needle in text:
            out.extend((el, cls) for el in _closed_menus(root, toggles, menu, cls))
    return out


def _closed_menus(root, toggles, menu: str, shown: str) -> list:
    """The elements of class ``menu`` without ``shown``, on a page with a toggle (one of
    ``toggles``' attribute values); one pass over the tree (two XPath searches took twice as
    long on MkDocs' theme, measured)."""
    found, toggled = [], False
    for el in root.iter(etree.Element):
        classes = el.get("class")
        if classes is not None and menu in classes:
            classes = classes.split()
            if menu in classes and shown not in classes:
                found.append(el)
        if not toggled:
            toggled = any(el.get(name) == value for name, value in toggles)
    return found if toggled else []
