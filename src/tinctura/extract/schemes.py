"""Discover the colour schemes a page offers, from what its HTML and stylesheets say.

- mkdocs-material: the palette form lists one ``input.md-option`` per palette entry; the theme
  copies its ``data-md-color-*`` attributes onto ``<body>`` and the entry's media query says which
  reader preference selects it.
- MkDocs' own theme: ``data-bs-theme`` on ``<html>`` (light / dark).
- Other generators: a ``data-theme`` attribute on ``<html>`` or ``<body>`` with selectors for it.
- Plain CSS: ``@media (prefers-color-scheme: dark)`` rules, or ``light-dark()``.
Without any of these the page has one scheme, ``light``.
"""
from __future__ import annotations

import re

from ..model import LIGHT, Scheme
from .behaviours import select, selector_check

_PREFERS = re.compile(r"prefers-color-scheme\s*:\s*(light|dark)", re.I)
_ON_HTML = re.compile(r"(?:^|[\s,(])(?:html|:root)\[data-theme\b", re.I)
_ON_BODY = re.compile(r"(?:^|[\s,(>+~])body\[data-theme\b", re.I)


def discover(root, ruleset) -> list:
    palette = _material_palette(root)
    if palette:
        return palette
    facts = ruleset.scheme_facts  # worked out once per rule set, not per page
    html = root
    # an attribute the page carries decides; else the theme's own data-theme selectors come
    # before Bootstrap's data-bs-theme ones, which a theme built on Bootstrap may carry unused
    # (pydata-sphinx-theme's script sets data-theme on <html>, never data-bs-theme)
    if html.get("data-bs-theme") is not None or (facts.data_bs_theme and not facts.data_theme):
        return [Scheme(n, (("prefers-color-scheme", n),), (("html", "data-bs-theme", n),),
                       "data-bs-theme") for n in ("light", "dark")]
    if facts.data_theme:
        body = root.find("body")
        if body is not None and body.get("data-theme") is not None:
            holder = "body"
        elif html.get("data-theme") is not None:
            holder = "html"
        else:  # set by the theme's script: where its selectors look for it
            holder = facts.data_theme_holder
        return [Scheme(n, (("prefers-color-scheme", n),), ((holder, "data-theme", n),),
                       "data-theme") for n in ("light", "dark")]
    if facts.media or facts.light_dark:
        return [Scheme("light", (("prefers-color-scheme", "light"),), (), "media"),
                Scheme("dark", (("prefers-color-scheme", "dark"),), (), "media")]
    return [LIGHT]


class SchemeFacts:
    """What a rule set says about colour schemes (see ``RuleSet.scheme_facts``)."""

    def __init__(self, rules):
        author = [r for r in rules if r.origin == "author"]
        selectors = " ".join(r.selector_text for r in author)
        self.data_bs_theme = "data-bs-theme" in selectors
        self.data_theme = "data-theme" in selectors
        self._on_html = bool(_ON_HTML.search(selectors))
        self._on_body = bool(_ON_BODY.search(selectors))
        self.media = any(any("prefers-color-scheme" in m for m in r.media) for r in rules)
        self.light_dark = any("light-dark(" in d.text.lower() for r in author for d in r.decls)

    @property
    def data_theme_holder(self) -> str:
        """The element a theme's script gives data-theme to, as its selectors name it
        (pydata-sphinx-theme: html[data-theme=dark]; Furo: body[data-theme=dark])."""
        return "html" if self._on_html and not self._on_body else "body"

    def joined(self, more: "SchemeFacts") -> "SchemeFacts":
        """The facts of both rule sets' rules (a page's own blocks laid over its
        stylesheets': ``overlay.LaidOver``), without reading the first's rules again."""
        both = object.__new__(SchemeFacts)
        for name in ("data_bs_theme", "data_theme", "_on_html", "_on_body", "media",
                     "light_dark"):
            setattr(both, name, getattr(self, name) or getattr(more, name))
        return both


def _material_palette(root) -> list:
    """One scheme per palette entry a reader can get (see :func:`_palette_entries`)."""
    entries = _palette_entries(root)
    if not entries:
        return []
    names = _entry_names(entries)
    schemes = []
    for entry, name in zip(entries, names):
        scheme, primary, accent, pref = entry
        attrs = [("body", "data-md-color-scheme", scheme)]
        if primary:
            attrs.append(("body", "data-md-color-primary", primary))
        if accent:
            attrs.append(("body", "data-md-color-accent", accent))
        schemes.append(Scheme(name, (("prefers-color-scheme", pref),), tuple(attrs), "palette"))
    return schemes


def _palette_entries(root) -> list:
    """(scheme, primary, accent, preference) of each distinct entry a reader can select.

    - An automatic entry (media ``(prefers-color-scheme)`` with no value) follows the reader's
      system setting: the theme's palette script then applies the entry whose media is
      ``(prefers-color-scheme: light)`` or ``: dark``, whichever matches. It is folded into those
      entries and yields no scheme of its own, unless no entry names that preference (then its
      own colours are what the reader gets, for that preference).
    - Entries are deduplicated by what they set (scheme, primary, accent, preference), not by
      name: two toggles that set the same colours are one scheme.
    """
    inputs = [el for el in root.iter("input")
              if el.get("data-md-color-scheme") is not None
              and "md-option" in (el.get("class") or "").split()]
    explicit, automatic = [], []
    for el in inputs:
        media = el.get("data-md-color-media") or ""
        found = _PREFERS.search(media)
        scheme = el.get("data-md-color-scheme")
        attrs = (scheme, el.get("data-md-color-primary") or "", el.get("data-md-color-accent") or "")
        if found:
            explicit.append(attrs + (found.group(1).lower(),))
        elif "prefers-color-scheme" in media.lower():
            automatic.append(attrs)
        else:  # no media: the scheme's own polarity
            explicit.append(attrs + ("dark" if scheme == "slate" else "light",))
    covered = {entry[3] for entry in explicit}
    for attrs in automatic:
        explicit.extend(attrs + (pref,) for pref in ("light", "dark") if pref not in covered)
    return list(dict.fromkeys(explicit))


def _entry_names(entries) -> list:
    """Readable unique names: the scheme, then /primary, /accent, /preference as needed."""
    names = []
    for entry in entries:
        for width in (1, 2, 3, 4):
            name = "/".join(part for part in entry[:width] if part) if width > 1 else entry[0]
            if sum(e[:width] == entry[:width] for e in entries) == 1:
                break
        names.append(name)
    return names


def apply(root, scheme):
    """Set the scheme's attributes on the tree; returns a function that restores them."""
    saved = []
    for selector, attr, value in scheme.attributes:
        targets = select(root, selector)
        for el in targets:
            saved.append((el, attr, el.get(attr)))
            el.set(attr, value)

    def restore():
        for el, attr, old in reversed(saved):
            if old is None:
                el.attrib.pop(attr, None)
            else:
                el.set(attr, old)

    restore.elements = [el for el, _, _ in saved]  # changed: their subtrees' fingerprints too
    return restore


def from_setting(entries) -> list:
    """Schemes from a setting (plugin option or JSON file), overriding discovery.

    Each entry: ``{"name": "dark", "media": {"prefers-color-scheme": "dark"},
    "attributes": [{"selector": "body", "attribute": "data-theme", "value": "dark"}]}``.
    Raises ValueError naming the entry and what is wrong.
    """
    if not isinstance(entries, list) or not entries:
        raise ValueError("schemes must be a non-empty list")
    out, names = [], set()
    for n, entry in enumerate(entries, 1):
        where = f"scheme #{n}"
        if not isinstance(entry, dict):
            raise ValueError(f"{where}: expected a mapping with name, media, attributes")
        unknown = set(entry) - {"name", "media", "attributes"}
        if unknown:
            raise ValueError(f"{where}: unknown keys {', '.join(sorted(unknown))}")
        name = entry.get("name")
        if not isinstance(name, str) or not name.strip():
            raise ValueError(f"{where}: a name is required")
        if name in names:
            raise ValueError(f"{where}: the name {name!r} is used twice")
        names.add(name)
        media = entry.get("media") or {}
        if not isinstance(media, dict) or not all(isinstance(k, str) and isinstance(v, str)
                                                  for k, v in media.items()):
            raise ValueError(f"{where} ({name}): media must map feature names to values")
        attrs = []
        for a in entry.get("attributes") or []:
            if not isinstance(a, dict) or set(a) != {"selector", "attribute", "value"} or \
                    not all(isinstance(v, str) for v in a.values()):
                raise ValueError(f"{where} ({name}): each attribute needs selector, attribute "
                                 "and value (strings)")
            try:
                selector_check(a["selector"])
            except Exception as exc:
                raise ValueError(f"{where} ({name}): cannot read selector "
                                 f"{a['selector']!r}: {exc}") from None
            attrs.append((a["selector"], a["attribute"], a["value"]))
        out.append(Scheme(name, tuple(sorted(media.items())), tuple(attrs), "setting"))
    return out
