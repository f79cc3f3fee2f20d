"""What themes' scripts change in the page before a reader sees it, as a declarative table.

tinctura reads the built HTML; documentation themes run scripts at load time that add classes and
wrap elements, and theme stylesheets style the result (striped table rows, responsive table
wrappers). Each :class:`Behaviour` restates one such change, found in the theme's own script
(named in ``source``), so the cascade sees the tree the reader's browser sees. Each entry is
checked against Chromium running the theme's real script (tests/browser/test_theme_scripts.py).

A behaviour applies to a page when the page loads the theme's script (``script``: the end of a
``<script src>``) and has the theme's marker (``marker``: a CSS selector). Users declare their own
behaviours for their own scripts in the configuration (``behaviours``: the same fields, with
``script`` optional). What a script changes later, on scroll or on click (the current
table-of-contents entry, opened menus), is not modelled: :data:`NOT_MODELLED` says so once per
site for the themes in the table.
"""
from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

from lxml import etree

ACTIONS = ("add-class", "wrap")


@dataclass(frozen=True)
class Behaviour:
    theme: str  # a readable name for reports
    action: str  # "add-class": add the classes in ``value``; "wrap": wrap in ``value``
    selector: str  # the elements changed (CSS selector)
    value: str  # classes ("a b"), or the wrapper as tag.class.class ("div.wrapper")
    marker: str = ""  # the page has the theme when this selector matches ("" always)
    script: str = ""  # ... and loads a script whose src ends with this ("" any page)
    source: str = ""  # where the theme's script does it


BUILTIN = (
    # MkDocs' own theme, js/base.js: document.querySelectorAll('table').forEach(table =>
    # table.classList.add('table', 'table-striped', 'table-hover'))
    Behaviour("mkdocs", "add-class", "table", "table table-striped table-hover",
              "html[data-bs-theme]", "js/base.js", "mkdocs theme js/base.js"),
    # MkDocs' readthedocs theme: js/theme_extra.js adds 'docutils' to content tables, then
    # js/theme.js wraps them: $("table.docutils:not(.field-list,.footnote,.citation)")
    # .wrap("<div class='wy-table-responsive'></div>"), footnotes and citations likewise.
    Behaviour("readthedocs", "add-class", "div.rst-content table", "docutils",
              "body.wy-body-for-nav", "js/theme_extra.js", "readthedocs theme js/theme_extra.js"),
    Behaviour("readthedocs", "wrap", "table.docutils:not(.field-list, .footnote, .citation)",
              "div.wy-table-responsive", "body.wy-body-for-nav", "js/theme.js",
              "readthedocs theme js/theme.js"),
    Behaviour("readthedocs", "wrap", "table.docutils.footnote", "div.wy-table-responsive.footnote",
              "body.wy-body-for-nav", "js/theme.js", "readthedocs theme js/theme.js"),
    Behaviour("readthedocs", "wrap", "table.docutils.citation", "div.wy-table-responsive.citation",
              "body.wy-body-for-nav", "js/theme.js", "readthedocs theme js/theme.js"),
)

NOT_MODELLED = {
    "mkdocs": "the theme's script also changes classes on click (menus) and on scroll; "
              "those states are not checked",
    "readthedocs": "the theme's script also marks the current navigation entry from the URL "
                   "fragment and adds expand buttons; those are not checked",
}


def from_setting(entries) -> tuple:
    """User behaviours from a setting; ValueError naming the entry and what is wrong."""
    if not isinstance(entries, list):
        raise ValueError("behaviours must be a list")
    out = []
    for n, entry in enumerate(entries, 1):
        where = f"behaviour #{n}"
        if not isinstance(entry, dict):
            raise ValueError(f"{where}: expected a mapping with action, selector, value")
        unknown = set(entry) - {"action", "selector", "value", "marker", "script", "theme"}
        if unknown:
            raise ValueError(f"{where}: unknown keys {', '.join(sorted(unknown))}")
        if entry.get("action") not in ACTIONS:
            raise ValueError(f"{where}: action must be one of {', '.join(ACTIONS)}")
        for key in ("selector", "value"):
            if not isinstance(entry.get(key), str) or not entry[key].strip():
                raise ValueError(f"{where}: {key} must be a non-empty string")
        behaviour = Behaviour(entry.get("theme", "configuration"), entry["action"],
                              entry["selector"], entry["value"], entry.get("marker", ""),
                              entry.get("script", ""), "configuration")
        try:
            _compiled(behaviour.selector)
            if behaviour.marker:
                _compiled(behaviour.marker)
        except Exception as exc:
            raise ValueError(f"{where}: invalid selector: {exc}") from None
        out.append(behaviour)
    return tuple(out)


def apply(root, behaviours=BUILTIN) -> list:
    """Apply the behaviours whose theme the page has, in order; returns the themes applied."""
    scripts = [el.get("src") or "" for el in root.iter("script") if el.get("src")]
    applied = []
    for b in behaviours:
        if b.script and not any(src.split("?")[0].endswith(b.script) for src in scripts):
            continue
        if b.marker and not _select(root, b.marker):
            continue
        targets = _select(root, b.selector)
        for el in targets:
            _add_classes(el, b.value) if b.action == "add-class" else _wrap(el, b.value)
        if b.theme not in applied:
            applied.append(b.theme)
    return applied


def _add_classes(el, value: str) -> None:
    have = (el.get("class") or "").split()
    el.set("class", " ".join(have + [c for c in value.split() if c not in have]))


def _wrap(el, value: str) -> None:
    tag, *classes = value.split(".")
    wrapper = etree.Element(tag or "div")
    if classes:
        wrapper.set("class", " ".join(classes))
    parent = el.getparent()
    if parent is None:
        return
    wrapper.tail, el.tail = el.tail, None
    # a wrapper inserted by a script has no source line; give it the element's
    wrapper.sourceline = el.sourceline
    parent.replace(el, wrapper)
    wrapper.append(el)


def _select(root, selector: str) -> list:
    import cssselect2

    compiled = _compiled(selector)
    wrapper = cssselect2.ElementWrapper.from_html_root(root)
    return [w.etree_element for w in wrapper.iter_subtree()
            if any(c.test(w) for c in compiled)]


@lru_cache(maxsize=256)
def _compiled(selector: str) -> tuple:
    import cssselect2
    import tinycss2

    return tuple(cssselect2.compile_selector_list(
        tinycss2.parse_component_value_list(selector)))
