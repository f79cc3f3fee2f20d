"""What the contrast criteria do not cover, decided once per page, each exemption as data.

SC 1.4.3 and 1.4.6 require a contrast ratio of "text and images of text" with named
exceptions (inactive components, incidental text, logotypes), and WCAG defines text as a
sequence of characters "expressing something in human language". Each decision below rests on
one sentence of WCAG 2.2 (or of a standard it defers to) and can be switched off
(``Options.exemptions``).

How a decision reaches a sample without breaking the shared caches: ``mark`` runs on the parsed
page before any walk and sets an attribute ``data-tinctura-exempt-<id>`` on every element it
exempts. Attribute presence is part of an element's structural id (``extract/structure.py``) and
of a subtree's fingerprint (``extract/fragments.py``), so a disabled control and an enabled one
never share a computed style, a state result or a replayed fragment. The walk reads the
decision per element (``Decisions.of``) after the caches; the one exemption that needs colours,
text not visible to anyone, is settled in ``settle`` from the sample's own pixels.
"""
from __future__ import annotations

import re
import unicodedata
from dataclasses import dataclass

from lxml import etree

MARK = "data-tinctura-exempt-"
WCAG = "https://www.w3.org/TR/WCAG22/"
UNDERSTANDING_1_4_3 = "https://www.w3.org/WAI/WCAG22/Understanding/contrast-minimum.html"
UNDERSTANDING_1_4_11 = "https://www.w3.org/WAI/WCAG22/Understanding/non-text-contrast.html"

_PAGE = ('<!doctype html><html lang="en"><head><meta charset="utf-8"><title>{title}</title>'
         '</head><body style="margin:0;background-color:#ffffff;color:#1a1a1a">{body}</body>'
         '</html>')


@dataclass(frozen=True)
class Exemption:
    """One kind of text the contrast criteria do not require a ratio of."""

    id: str
    title: str
    applies_to: str  # what tinctura treats as such, in a reader's words
    source: str  # the document and the place the sentence comes from
    quote: str  # the sentence, quoted from ``source``
    url: str
    exempt_example: str  # a page whose text "Subject..." is exempt
    judged_example: str  # the nearest page whose text "Subject..." is judged (and fails TC100)
    judged_by: str = ""  # the rule that judges it instead, if any


INCIDENTAL = ("Text or images of text that are part of an inactive user interface component, "
              "that are pure decoration, that are not visible to anyone, or that are part of a "
              "picture that contains significant other visual content, have no contrast "
              "requirement.")
SC_1_4_3_INCIDENTAL = "WCAG 2.2, SC 1.4.3 Contrast (Minimum), exception \"Incidental\""
TEXT_DEFINITION = ("text: sequence of characters that can be programmatically determined, where "
                   "the sequence is expressing something in human language")
_FAINT = "color:#b0b0b0"  # 2.17:1 on white: fails TC100 wherever it is judged

EXEMPTIONS = (
    Exemption(
        "inactive-control", "Disabled control",
        "text of a control with the `disabled` attribute, and of everything a disabled "
        "`fieldset` disables: all but the contents of its first `legend` (HTML Living "
        "Standard, the fieldset element)",
        SC_1_4_3_INCIDENTAL,
        INCIDENTAL, WCAG + "#contrast-minimum",
        _PAGE.format(title="Exempt", body=f'<button disabled style="{_FAINT}">Subject: '
                                          'erase the log</button>'),
        _PAGE.format(title="Judged", body=f'<button style="{_FAINT}">Subject: erase the log'
                                          '</button>')),
    Exemption(
        "inactive-label", "Label of a disabled control",
        "a `label` wrapping a disabled control or naming it with `for`, and an element a "
        "disabled control names with `aria-labelledby`: part of the inactive component",
        SC_1_4_3_INCIDENTAL, INCIDENTAL, UNDERSTANDING_1_4_3,
        _PAGE.format(title="Exempt", body=f'<label for="d" style="{_FAINT}">Subject: depth'
                                          '</label><input id="d" disabled>'),
        _PAGE.format(title="Judged", body=f'<label for="d" style="{_FAINT}">Subject: depth'
                                          '</label><input id="d">')),
    Exemption(
        "inactive-widget", "Inside an aria-disabled widget or group",
        "anything inside an element with `aria-disabled=\"true\"` whose role (explicit or "
        "implicit) is a widget, composite or group role, the roles WAI-ARIA 1.2 applies "
        "aria-disabled to",
        SC_1_4_3_INCIDENTAL, INCIDENTAL, UNDERSTANDING_1_4_3,
        _PAGE.format(title="Exempt", body=f'<div role="group" aria-disabled="true" '
                                          f'style="{_FAINT}"><span>Subject: tide table</span>'
                                          '</div>'),
        _PAGE.format(title="Judged", body=f'<div role="group" aria-disabled="false" '
                                          f'style="{_FAINT}"><span>Subject: tide table</span>'
                                          '</div>')),
    Exemption(
        "inactive-link", "Link placeholder shown as inactive",
        "an `a` element without `href` whose `class` includes `disabled`: a link placeholder "
        "(HTML Living Standard: without `href` it \"represents a placeholder for where a link "
        "might otherwise have been placed, if it had been relevant\") that the author styles "
        "as an inactive control, as MkDocs' own theme marks the first page's Previous and "
        "the last page's Next. WCAG's user interface component is what users perceive as a "
        "control; reading the class as that perception is our judgement",
        SC_1_4_3_INCIDENTAL, INCIDENTAL, UNDERSTANDING_1_4_3,
        _PAGE.format(title="Exempt", body=f'<a class="nav-link disabled" style="{_FAINT}">'
                                          'Subject: previous page</a>'),
        _PAGE.format(title="Judged", body=f'<a class="nav-link disabled" href="#p" '
                                          f'style="{_FAINT}">Subject: previous page</a>')),
    Exemption(
        "invisible", "Not visible to anyone",
        "text whose colour equals its background (within one 8-bit step) and that is removed "
        "from the accessibility tree (`aria-hidden=\"true\"` on it or an ancestor)",
        SC_1_4_3_INCIDENTAL, INCIDENTAL, UNDERSTANDING_1_4_3,
        _PAGE.format(title="Exempt", body='<p aria-hidden="true" style="color:#ffffff">'
                                          'Subject: spare keywords</p>'),
        _PAGE.format(title="Judged", body='<p style="color:#ffffff">Subject: spare keywords'
                                          '</p>')),
    Exemption(
        "decoration", "Pure decoration",
        "text hidden from assistive technology (`aria-hidden=\"true\"`) that holds no letter "
        "and no digit: separators, ornaments, decorative icon glyphs",
        SC_1_4_3_INCIDENTAL, INCIDENTAL, UNDERSTANDING_1_4_3,
        _PAGE.format(title="Exempt", body=f'<p style="{_FAINT}" aria-hidden="true">~ ~ ~</p>'),
        _PAGE.format(title="Judged", body=f'<p style="{_FAINT}">~ ~ ~</p>')),
    Exemption(
        "logotype", "Logotype",
        "text inside an element matched by a selector of the `logotypes` option (a logo or "
        "brand name set as text); nothing is a logotype unless configured",
        "WCAG 2.2, SC 1.4.3 Contrast (Minimum), exception \"Logotypes\"",
        "Text that is part of a logo or brand name has no contrast requirement.",
        WCAG + "#contrast-minimum",
        _PAGE.format(title="Exempt", body=f'<p class="brand" style="{_FAINT}">Subject: '
                                          'Tidewell</p>'),
        _PAGE.format(title="Judged", body=f'<p class="brand" style="{_FAINT}">Subject: '
                                          'Tidewell</p>')),
    Exemption(
        "icon", "Icon glyph (not in a human language)",
        "a single letter or symbol (not a digit) that is all the visible text of a button or "
        "link with an accessible name (`aria-label`, `aria-labelledby`, `title`), and "
        "characters of the Unicode Private Use Areas (icon fonts) inside a link or control "
        "or with an accessible name: graphical objects, judged at 3:1 by TC110",
        "WCAG 2.2, definition of \"text\"", TEXT_DEFINITION,
        WCAG + "#dfn-text",
        _PAGE.format(title="Exempt", body=f'<button aria-label="Close" style="{_FAINT}">x'
                                          '</button>'),
        _PAGE.format(title="Judged", body=f'<button style="{_FAINT}">x</button>'),
        judged_by="TC110"),
    Exemption(
        "decorative-icon", "Decorative icon glyph",
        "characters of the Unicode Private Use Areas outside any link or control and without "
        "an accessible name, or hidden from assistive technology: no text, no meaning to judge",
        "WCAG 2.2, definition of \"text\"", TEXT_DEFINITION,
        WCAG + "#dfn-text",
        _PAGE.format(title="Exempt", body=f'<p><span style="{_FAINT}">\ue0a1</span> Tide '
                                          'table</p>'),
        _PAGE.format(title="Judged", body=f'<p><span style="{_FAINT}">Subject</span> Tide '
                                          'table</p>')),
)
BY_ID = {e.id: e for e in EXEMPTIONS}
IDS = tuple(BY_ID)
PRIORITY = {e.id: n for n, e in enumerate(EXEMPTIONS)}  # the first that applies is reported

# WAI-ARIA 1.2: roles aria-disabled applies to (widgets, composites, groups and their kin).
DISABLEABLE_ROLES = frozenset("""
    application button checkbox combobox grid gridcell group link listbox menu menubar menuitem
    menuitemcheckbox menuitemradio option radio radiogroup row scrollbar searchbox separator
    slider spinbutton switch tab tablist tabpanel textbox toolbar tree treegrid treeitem
    """.split())
FORM_CONTROLS = ("button", "input", "select", "textarea", "optgroup", "option", "fieldset")
CONTROLS = frozenset({"a", "button", "summary", "select", "input", "textarea"})
CONTROL_ROLES = frozenset({"button", "link", "menuitem", "menuitemcheckbox", "menuitemradio",
                           "tab", "switch", "checkbox", "radio", "option", "treeitem"})
NAME_ATTRS = ("aria-label", "aria-labelledby", "title")


def implicit_role(el) -> str:
    """The role HTML gives an element (HTML-ARIA), for the elements that matter here."""
    tag = el.tag if isinstance(el.tag, str) else ""
    if tag == "a":
        return "link" if el.get("href") is not None else ""
    if tag == "input":
        kind = (el.get("type") or "text").lower()
        return {"checkbox": "checkbox", "radio": "radio", "range": "slider",
                "button": "button", "submit": "button", "reset": "button",
                "number": "spinbutton"}.get(kind, "textbox")
    return {"button": "button", "select": "combobox", "textarea": "textbox",
            "fieldset": "group", "details": "group", "optgroup": "group", "option": "option",
            "summary": "button", "tr": "row"}.get(tag, "")


def role_of(el) -> str:
    explicit = (el.get("role") or "").split()
    return explicit[0].lower() if explicit else implicit_role(el)


def private_use(ch: str) -> bool:
    return unicodedata.category(ch) == "Co"


def only_private_use(text: str) -> bool:
    chars = [c for c in text if not c.isspace()]
    return bool(chars) and all(private_use(c) for c in chars)


def wordless(text: str) -> bool:
    """No letter and no digit: ornaments, separators, symbols."""
    return not any(unicodedata.category(c)[0] in "LN" and not private_use(c) for c in text)


def single_glyph(text: str) -> bool:
    """One visible character (combining marks and variation selectors aside), not a digit."""
    base = [c for c in text if not c.isspace() and unicodedata.category(c) not in ("Mn", "Me")
            and not 0xFE00 <= ord(c) <= 0xFE0F]
    return len(base) == 1 and unicodedata.category(base[0])[0] != "N"


class Decisions:
    """The exemptions of one page: element -> id, plus candidates settled per sample."""

    __slots__ = ("by_element", "enabled")

    def __init__(self, enabled: frozenset):
        self.by_element = {}
        self.enabled = enabled

    def put(self, el, ident: str) -> None:
        if ident not in self.enabled and ident != "hidden":
            return
        old = self.by_element.get(el)
        if old is None or _rank(ident) < _rank(old):
            self.by_element[el] = ident

    def of(self, el) -> str:
        return self.by_element.get(el, "")


def _rank(ident: str) -> int:
    return PRIORITY.get(ident, len(PRIORITY))


def enabled_set(names) -> frozenset:
    """The exemptions switched on: all when ``names`` is None; unknown names are an error."""
    if names is None:
        return frozenset(IDS)
    chosen = frozenset(n.strip() for n in names)
    unknown = sorted(chosen - set(IDS))
    if unknown:
        raise ValueError(f"unknown exemption {', '.join(unknown)}; known: {', '.join(IDS)}")
    return chosen


_SELECTORS: dict = {}


def compile_logotypes(selectors) -> list:
    """cssselect2 selectors for the ``logotypes`` option; a bad one is a clear error."""
    import cssselect2

    key = tuple(selectors)
    compiled = _SELECTORS.get(key)
    if compiled is None:
        compiled = []
        for text in key:
            try:
                compiled.extend(cssselect2.compile_selector_list(text))
            except Exception as exc:  # cssselect2 raises its own parse errors
                raise ValueError(f"logotypes: cannot read selector {text!r}: {exc}") from None
        _SELECTORS[key] = compiled
    return compiled


def mark(root, enabled: frozenset = frozenset(IDS), logotypes=(), text_of=None,
         source=None, per_link=None) -> Decisions:
    """Decide the page's exemptions and mark the decided elements (see the module docstring).

    ``text_of(el)``: the element's own text (``PageStructure.text`` shares it with the walk).
    ``source``: the page's HTML, when at hand: a search of it skips the scans a page cannot
    need (most pages have no disabled control and nothing hidden from assistive technology).
    ``per_link(a)``: called for every ``a href`` on the way (one pass over the controls serves
    both; ``extract/links.py`` marks the links in running text).
    """
    if text_of is None:
        text_of = _own
    found = Decisions(enabled)

    if source is not None and isinstance(source, bytes):
        words = (b"disabled", b"aria-disabled", b"aria-hidden", b"aria-label", b"title")
        present = {w.decode(): w in source for w in words}
        pua = any(lead in source for lead in _PUA_LEADS) and bool(_PUA_BYTES.search(source))
    else:
        text = source if isinstance(source, str) else None
        present = {w: text is None or w in text
                   for w in ("disabled", "aria-disabled", "aria-hidden", "aria-label", "title")}
        pua = text is None or bool(_PUA_TEXT.search(text))
    if present["disabled"]:  # (MkDocs' theme marks a stylesheet link disabled on every page)
        _inactive(root, found, present["aria-disabled"])
    if "logotype" in enabled and logotypes:
        _logotypes(root, logotypes, found)
    if present["aria-hidden"]:
        _hidden(root, found, text_of)
    if pua and ("icon" in enabled or "decorative-icon" in enabled):
        _private_use(root, found, text_of)
    glyphs = "icon" in enabled and (present["aria-label"] or present["title"])
    if glyphs or per_link is not None:
        _controls(root, found, text_of, glyphs, per_link)
    for el, ident in found.by_element.items():
        el.set(MARK + ident, "")
    return found


# U+E000..U+F8FF in UTF-8 (EE 80 80 .. EF A3 BF), planes 15-16 (F3 B0.. F4 8F), and character
# references in those ranges (decimal 57344-63743 or hex E000-F8FF)
_PUA_BYTES = re.compile(rb"\xee[\x80-\xbf]|\xef[\x80-\xa3]|\xf3[\xb0-\xbf]|\xf4[\x80-\x8f]|"
                        rb"&#[xX][eEfF][0-9a-fA-F]{3};|&#(?:5[7-9]|6[0-3])\d{3};")
_PUA_LEADS = (b"\xee", b"\xef", b"\xf3", b"\xf4", b"&#")  # memchr-fast prefilter
_PUA_TEXT = re.compile("[\ue000-\uf8ff\U000f0000-\U0010fffd]|&#[xX][eEfF][0-9a-fA-F]{3};|"
                       "&#(?:5[7-9]|6[0-3])\\d{3};")
_SHORT_TEXT = etree.XPath("//text()[string-length(normalize-space()) > 0 and "
                          "string-length(normalize-space()) <= 4]")


def _subtree(el, found, ident, skip=None) -> None:
    for d in el.iter():
        if isinstance(d.tag, str) and (skip is None or d not in skip):
            found.put(d, ident)


def _inactive(root, found, aria: bool = True) -> None:
    """``aria``: whether the page may hold ``aria-disabled`` (else not searched for)."""
    disabled = []  # controls that are disabled (natively or by their fieldset)
    for el in root.iter(*FORM_CONTROLS):  # (far faster than an XPath over every element)
        if el.get("disabled") is None:
            continue
        if el.tag == "fieldset":
            # HTML: the descendants of its first legend child are not disabled by it
            legend = next((c for c in el if c.tag == "legend"), None)
            keep = set(legend.iter()) if legend is not None else set()
            _subtree(el, found, "inactive-control", keep)
            disabled.extend(d for d in el.iter(*FORM_CONTROLS) if d not in keep)
        else:
            _subtree(el, found, "inactive-control")
            disabled.append(el)
    if disabled:
        ids = {el.get("id") for el in disabled if el.get("id")}
        inactive = set(disabled)
        for label in root.iter("label"):
            if label.get("for") in ids or any(d in inactive for d in label.iter(*FORM_CONTROLS)):
                _subtree(label, found, "inactive-label")
        refs = {ref for el in disabled for ref in (el.get("aria-labelledby") or "").split()}
        if refs:
            for el in root.xpath("//*[@id]"):
                if el.get("id") in refs:
                    _subtree(el, found, "inactive-label")
    for el in root.xpath("//*[@aria-disabled]") if aria else ():
        if el.get("aria-disabled", "").strip().lower() == "true" and \
                role_of(el) in DISABLEABLE_ROLES:
            _subtree(el, found, "inactive-widget")
    for el in _PLACEHOLDER_LINKS(root):  # (class tokens compared as written, as selectors do)
        _subtree(el, found, "inactive-link")


_PLACEHOLDER_LINKS = etree.XPath(
    "//a[not(@href)][contains(concat(' ', normalize-space(@class), ' '), ' disabled ')]")


def _logotypes(root, selectors, found) -> None:
    import cssselect2

    wrapper = cssselect2.ElementWrapper.from_html_root(root)
    for selector in compile_logotypes(selectors):
        for match in wrapper.query_all(selector):
            _subtree(match.etree_element, found, "logotype")


def _hidden(root, found, text_of) -> None:
    """aria-hidden text: wordless text is decoration; other text is exempt only when nobody
    can see it either (colour equals background: ``settle``)."""
    for top in root.xpath("//*[@aria-hidden]"):
        if top.get("aria-hidden", "").strip().lower() != "true":
            continue
        for el in top.iter():
            if not isinstance(el.tag, str):
                continue
            text = text_of(el)
            # icon-font glyphs are settled by _private_use (the only cue of a text-less control)
            found.put(el, "decoration" if text and wordless(text) and not only_private_use(text)
                      else "hidden")


def _private_use(root, found, text_of) -> None:
    """Icon-font characters as text: an icon when it carries meaning, else decoration."""
    for node in _SHORT_TEXT(root):
        el = node.getparent()
        if el is not None and node.is_tail:
            el = el.getparent()
        if el is None or not isinstance(el.tag, str):
            continue
        if found.by_element.get(el, "hidden") != "hidden":
            continue
        text = text_of(el)
        if not text or not only_private_use(text):
            continue
        hidden = found.by_element.get(el) == "hidden"
        control = _control_of(el)
        if hidden:  # an aria-hidden glyph is still the only visual cue of a text-less control
            meaningful = control is not None and not _visible_words(control, text_of)
        else:
            meaningful = control is not None or _named(el)
        found.put(el, "icon" if meaningful else "decorative-icon")


def _controls(root, found, text_of, glyphs, per_link) -> None:
    """One pass over links and buttons: a single letter or symbol that is all the visible
    text of a named one is an icon; each link is handed to ``per_link``."""
    for control in root.iter("a", "button", "summary"):
        attrib = control.attrib
        if per_link is not None and control.tag == "a" and "href" in attrib:
            per_link(control)
        if not glyphs or not ("title" in attrib or "aria-label" in attrib
                              or "aria-labelledby" in attrib) or not _named(control):
            continue
        text = " ".join("".join(control.itertext()).split())
        if not text or len(text) > 4 or not single_glyph(text):
            continue
        for el in control.iter():
            if isinstance(el.tag, str) and text_of(el):
                if found.by_element.get(el, "hidden") == "hidden":
                    found.put(el, "icon")


def _control_of(el, depth: int = 4):
    """The link or control the element is part of (itself or a near ancestor), if any."""
    at = el
    for _ in range(depth):
        if at is None or not isinstance(at.tag, str):
            return None
        if at.tag in CONTROLS and (at.tag != "a" or at.get("href") is not None):
            return at
        if role_of(at) in CONTROL_ROLES:
            return at
        at = at.getparent()
    return None


def _named(el) -> bool:
    if any((el.get(a) or "").strip() for a in NAME_ATTRS):
        return True
    return (el.get("role") or "").strip().lower() == "img" and bool(el.get("aria-label"))


def _visible_words(control, text_of) -> bool:
    """Whether the control shows text other than icon glyphs."""
    for d in control.iter():
        if isinstance(d.tag, str) and (d.get("aria-hidden") or "").lower() != "true":
            text = text_of(d)
            if text and not only_private_use(text):
                return True
    return False


def settle(el, candidate: str, kind: str, text: str, fg, bg, enabled: frozenset,
           text_of=None) -> str:
    """The exemption of one sample: the element's decision, with the colour-dependent case
    (hidden from assistive technology and drawn in its background's colour) settled, and
    icon-font characters in generated content (an icon font's ``::before``) recognised."""
    if kind == "generated" and candidate in ("", "hidden") and only_private_use(text):
        control = _control_of(el)
        if candidate == "hidden":
            meaningful = control is not None and not _visible_words(control, text_of or _own)
        else:
            meaningful = control is not None or _named(el)
        ident = "icon" if meaningful else "decorative-icon"
        return ident if ident in enabled else ""
    if candidate == "hidden":
        if "invisible" in enabled and fg is not None and bg is not None and \
                all(abs(a - b) <= 1 / 255 for a, b in zip(fg, bg)):
            return "invisible"
        return ""
    return candidate


def _own(el) -> str:
    from .html import own_text

    return own_text(el)


def reason(ident: str) -> str:
    """A one-line reason for reports: the exemption's title and its source."""
    e = BY_ID.get(ident)
    return f"{e.title} ({e.source})" if e else ident
