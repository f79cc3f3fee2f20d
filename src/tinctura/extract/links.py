"""Links inside running text: what SC 1.4.1 (Use of Color) needs to judge them, per link.

A link told apart from the text around it by colour alone must differ from that text by 3:1
and get a cue other than colour on hover and focus (W3C technique G183; failure F73 when it
does neither). The walk carries, on the link's sample, the colour of the surrounding text and
the link's non-colour cues at rest, with :hover and with :focus (``model.LinkCues``), so that
TC120 judges one sample at a time and a replayed fragment is judged once.

Which links are in running text is decided once per page, before the walk (``mark_running``):
a link whose nearest block holds words outside the link. A navigation item, a table cell or a
paragraph holding only the link (and punctuation) is not running text. The mark is an
attribute, so it is part of the style keys and fragment fingerprints, like the exemptions.
"""
from __future__ import annotations

import unicodedata

from ..model import LinkCues
from .sheet import mark_states, parse_declarations, split_declarations, unmark_states
from .style import cascade, latest_winner

RUNNING = "data-tinctura-running"
# Elements that flow inside a line of text; any other element starts or is a block.
INLINE = frozenset("""a abbr b bdi bdo cite code data dfn em i kbd mark q s samp small span
    strong sub sup time u var font tt big ins del label output""".split())
LINE_STYLES = frozenset({"solid", "dashed", "dotted", "double", "groove", "ridge", "inset",
                         "outset", "wavy"})
BORDERS = ("border", "border-bottom", "border-block-end", "border-style", "border-bottom-style",
           "border-block-end-style", "border-top", "border-block", "border-block-start")
# (state, pseudo-classes on the link, on its ancestors), as the walk's state samples use them
STATE_CLASSES = {"hover": (("hover",), ("hover",)),
                 "focus": (("focus", "focus-visible", "focus-within"), ("focus-within",))}
WEIGHT_STEP = 300  # a font-weight change this large reads as bold against regular (common
# practice, no published threshold)


def mark_running(root) -> int:
    """Mark the links that stand inside running text; returns how many (``consider`` does
    it link by link, inside the exemptions' pass over the page's controls)."""
    return sum(consider(link) for link in root.iter("a") if link.get("href") is not None)


def consider(link, seen: dict | None = None) -> bool:
    """Mark ``link`` when it stands in running text. Cheap on pages of navigation links: only
    a link with text next to it (or next to its inline wrapper) is looked at further.
    ``seen``: ``page_marker``'s, kept between the links of one page."""
    if _text_next_to(link, seen) and in_running_text(link):
        link.set(RUNNING, "")
        return True
    return False


def page_marker():
    """``consider`` for the links of one page, in document order: what the scan of a link's
    earlier siblings found is kept for the next link of the same parent (a code listing's
    line-number links, 500 siblings of one element, were each read back to the first:
    7.5 ms of a 54 ms page)."""
    seen: dict = {}
    return lambda link: consider(link, seen)


def _text_next_to(el, seen: dict | None = None, depth: int = 3) -> bool:
    for _ in range(depth):
        if el.tail and not el.tail.isspace():
            return True
        parent = el.getparent()
        if parent is None:
            return False
        if parent.text and not parent.text.isspace():
            return True
        if _text_before(el, parent, seen):
            return True
        if parent.tag not in INLINE:
            return False
        el = parent
    return False


def _text_before(el, parent, seen: dict | None) -> bool:
    """Whether a sibling before ``el`` has text after it. ``seen``: parent -> (a sibling, whether
    it or one before it has), the sibling a scan started from: a later scan stops there."""
    mark, known = seen.get(parent, (None, False)) if seen is not None else (None, False)
    found = False
    start = prev = el.getprevious()
    while prev is not None:
        if prev is mark:
            found = known
            break
        if prev.tail and not prev.tail.isspace():
            found = True
            break
        prev = prev.getprevious()
    if seen is not None and start is not None:
        seen[parent] = (start, found)
    return found


def in_running_text(link) -> bool:
    block = link.getparent()
    while block is not None and block.tag in INLINE:
        block = block.getparent()
    if block is None:
        return False
    return _words_around(block, link)


def _words_around(block, link) -> bool:
    """Whether the text of ``block``'s lines outside ``link`` (nested blocks left out) holds
    words, read until the first one (a paragraph of 200 links was read whole for each: 40,000
    steps). Iterative: a recursive closure would make a reference cycle that keeps the page's
    tree alive until a garbage collection."""
    if _has_words(block.text or ""):
        return True
    stack = list(block)
    while stack:
        child = stack.pop()
        if child is not link and isinstance(child.tag, str) and child.tag in INLINE:
            if _has_words(child.text or ""):
                return True
            stack.extend(child)
        if _has_words(child.tail or ""):
            return True
    return False


def _has_words(text: str) -> bool:
    return any(unicodedata.category(c)[0] in "LN" for c in text)


def _line(text: str) -> bool:
    words = text.lower().replace(",", " ").split()
    if not LINE_STYLES & set(words) and not ("auto" in words and len(words) <= 3):
        return False
    return not {"0", "0px", "transparent", "none", "hidden"} & set(words)


def cues(winners) -> frozenset:
    """Non-colour cues an element's own declarations draw: underline (any text decoration
    line), border, box shadow, outline, italic."""
    found = set()
    w = latest_winner(winners, ("text-decoration", "text-decoration-line"))
    if w is not None and {"underline", "overline", "line-through"} & \
            set(w.decl.text.lower().split()):
        found.add("underline")
    w = latest_winner(winners, BORDERS)
    if w is not None and _line(w.decl.text):
        found.add("border")
    w = winners.get("box-shadow")
    if w is not None and w.decl.text.strip().lower() not in ("none", "initial", "unset"):
        found.add("shadow")
    w = latest_winner(winners, ("outline", "outline-style"))
    if w is not None and _line(w.decl.text):
        found.add("outline")
    w = winners.get("font-style")
    if w is not None and w.decl.text.strip().lower().split()[:1] in (["italic"], ["oblique"]):
        found.add("italic")
    return frozenset(found)


def _outline_removed(winners) -> bool:
    w = latest_winner(winners, ("outline", "outline-style", "outline-width"))
    if w is None:
        return False
    words = set(w.decl.text.lower().split())
    return bool({"none", "0", "0px", "hidden"} & words)


def context(walker, el, chain, fg, bg):
    """The ``LinkCues`` of a text sample inside a link in running text, or None."""
    at = len(chain) - 1
    while at >= 0:
        link = chain[at][0]
        if link is not None and link.tag == "a" and link.get("href") is not None:
            break
        at -= 1
    if at <= 0 or link.get(RUNNING) is None:
        return None
    cache = walker.cache.cores
    key = ("link", chain[at][1], chain[-1][1])
    got = cache.get(key)
    if got is None:
        got = cache[key] = _context(walker, link, chain, at)
    return got


def _context(walker, link, chain, at):
    parent = chain[at - 1][1]
    text, cause = parent.fill_color if parent.fill_color is not None else (
        parent.color, parent.color_cause)
    surround, parent_bg = walker._paint(chain[:at], text)[0]
    link_style = chain[at][1]
    rest = set(state_cues(walker, link, link_style, None))
    if abs(chain[-1][1].font_weight - parent.font_weight) >= WEIGHT_STEP:
        rest.add("weight")
    own_bg = walker._paint(chain[:at + 1], (0.0, 0.0, 0.0, 0.0))[0][1]
    if any(abs(a - b) > 1 / 255 for a, b in zip(own_bg, parent_bg)):
        rest.add("background")
    states = {}
    for state in ("hover", "focus"):
        states[state] = tuple(sorted(rest | state_cues(walker, link, link_style, state)))
    return LinkCues(surround=tuple(surround), rest=tuple(sorted(rest)), hover=states["hover"],
                    focus=states["focus"], surround_cause=cause,
                    undecorated=walker.cache.cores.get(("link-plain", link_style), ()))


def state_cues(walker, link, link_style, state) -> frozenset:
    """Cues the link's own declarations draw at rest (``state`` None), or with ``state`` in
    force (pointer over it and its ancestors, or keyboard focus). Only the link's own
    declarations count: what a state changes on its ancestors is not followed (documented in
    TC120). Keyboard focus shows the user agent's focus ring unless the author removes it."""
    cache = walker.cache.cores
    key = ("link-state", link_style, state)
    got = cache.get(key)
    if got is not None:
        return got
    marked = mark_states(link, *STATE_CLASSES[state]) if state is not None else []
    try:
        wrapper = walker.structure.wrapper_of(link)
        rules = walker.index.cue_match(wrapper)
        inline = link.get("style")
        decls = [d for d in split_declarations(inline)[1]] if inline else ()
        winners = cascade(rules, decls, walker.ruleset)
    finally:
        unmark_states(marked)
    found = set(cues(winners))
    if state is None:
        cache[("link-plain", link_style)] = _undecorated(winners)
    if state == "focus" and not _outline_removed(winners):
        found.add("outline")
    if state is not None:
        found |= _state_background(walker, link, link_style, state)
    got = cache[key] = frozenset(found)
    return got


def _undecorated(winners) -> tuple:
    """``(selector, specificity)`` of the site's rule whose declaration takes the underline
    away from the link, or () (none does, or it is !important: no fix outbids that)."""
    w = latest_winner(winners, ("text-decoration", "text-decoration-line"))
    if w is None or w.rule is None or w.origin != "author" or w.decl.important:
        return ()
    if "none" not in w.decl.text.lower().split():
        return ()
    return (w.rule.selector_text, w.rule.specificity)


def _state_background(walker, link, link_style, state) -> set:
    """A background of the link's own that appears or changes with the state."""
    colours = walker.cache.cores.get(("link-bg", link_style, state))
    if colours is None:
        marked = mark_states(link, STATE_CLASSES[state][0])
        try:
            rules = walker.index.match(walker.structure.wrapper_of(link))
            inline = link.get("style")
            winners = cascade(rules, parse_declarations(inline) if inline else (),
                              walker.ruleset)
            style = walker.resolver.compute(winners, link_style.parent, False)
        finally:
            unmark_states(marked)
        colours = walker.cache.cores[("link-bg", link_style, state)] = (style.bg,)
    bg = colours[0]
    return {"background"} if bg[3] > 0 and bg != link_style.bg else set()
