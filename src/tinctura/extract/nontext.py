"""Samples of what is not text, for SC 1.4.11 Non-text Contrast (TC110).

Emitted by the resting walk beside the text samples, so that a rule still judges one sample at
a time and replayed fragments carry them:

- ``boundary``: a text field, text area or select whose border or fill the author set. ``fg``
  is the border as painted over the colour around the control (None without a border), ``bg``
  the control's fill, ``surround`` the colour around it. The control is identified by whichever
  of the two differs from the surround; where neither does, nothing is there to judge. Buttons
  are not sampled: their text identifies them (Understanding SC 1.4.11), and TC100 judges it.
  Controls the author left to the user agent are not sampled (SC 1.4.11 exempts an appearance
  "determined by the user agent and not modified by the author").
- ``focus-ring``: an outline the author draws on :focus / :focus-visible, against the colour
  around the element. An inset outline (negative offset) lies on the element's own fill:
  which colour it meets is geometry, so the sample is undetermined.
- ``svg-icon``: an inline ``<svg>`` that carries meaning (inside a link or control, or with an
  accessible name), painted with one fill: ``fg`` that fill, ``bg`` what is behind it. Icons
  drawn with strokes or with several fills of their own are undetermined (which shape meets
  which colour is geometry).

None of these is text: the text rules skip them (``rules.text.judged``).
"""
from __future__ import annotations

from ..colour.parse import parse_color
from ..model import DETERMINED, REST, UNDETERMINED, Cause, Sample
from . import exempt as exempt_mod
from .sheet import mark_states, split_declarations, unmark_states
from .style import cascade, latest_winner
from .values import significant

KINDS = frozenset({"boundary", "focus-ring", "svg-icon"})
CONTROL_TAGS = frozenset({"input", "select", "textarea", "button"})
FIELDS = frozenset({"input", "select", "textarea"})
NO_BOUNDARY = frozenset({"hidden", "checkbox", "radio", "range", "color", "file", "image",
                         "button", "submit", "reset"})  # buttons: their text identifies them
TAGS = CONTROL_TAGS | {"svg", "a", "summary"}
LINE_STYLES = frozenset({"solid", "dashed", "dotted", "double", "groove", "ridge", "inset",
                         "outset", "auto"})
BORDER = ("border", "border-bottom", "border-block-end")
BORDER_COLOUR = ("border-color", "border-bottom-color")
OUTLINE = ("outline",)
OUTLINE_COLOUR = ("outline-color",)
FOCUS = ("focus", "focus-visible", "focus-within")
TRANSPARENT = (0.0, 0.0, 0.0, 0.0)


def emit(walker, el, tag, style, chain) -> None:
    """Append the non-text samples of ``el`` (resting walk only)."""
    if walker.state != REST:
        return
    if tag == "svg":
        _svg_icon(walker, el, style, chain)
        return
    if tag in FIELDS and (tag != "input" or
                          (el.get("type") or "text").lower() not in NO_BOUNDARY):
        _boundary(walker, el, tag, style, chain)
    if tag in ("a", "summary") or tag in CONTROL_TAGS:
        if tag != "a" or el.get("href") is not None:
            _focus_ring(walker, el, style, chain)


def _append(walker, el, kind, text, fg, bg, surround, style, status=DETERMINED, reason="",
            exempt="", cause=None):
    walker.samples.append(Sample(
        walker.page, walker.scheme, REST, walker._getpath(el) + "::" + kind,
        el.sourceline or 0, text, kind, fg, bg, None, style.font_size, style.font_weight,
        status, reason, (), exempt, cause or Cause(), (), style.bg_cause, surround))


def _winners(walker, el, states=()):
    """Winning border and outline declarations of ``el`` (with ``states`` in force)."""
    marked = mark_states(el, states)
    try:
        wrapper = walker.structure.wrapper_of(el)
        rules = walker.index.cue_match(wrapper)
        inline = el.get("style")
        return cascade(rules, split_declarations(inline)[1] if inline else (), walker.ruleset)
    finally:
        unmark_states(marked)


def _line(winners, shorthand, colour_names, current, scheme, tokens_of=None):
    """(colour, whether drawn, the declaration's Cause) of a border or outline, or None.
    ``tokens_of(winner)``: its value's tokens with var() substituted (None: invalid)."""
    tokens_of = tokens_of or (lambda w: w.decl.tokens)
    w = latest_winner(winners, shorthand)
    c = latest_winner(winners, colour_names)
    if w is None and c is None:
        return None
    colour, drawn, cause = current, False, Cause()
    if w is not None:
        cause = Cause(w.provenance())
        tokens = significant(tokens_of(w) or ())
        words = {t.lower_value for t in tokens if t.type == "ident"}
        zero = any(t.type in ("number", "dimension") and t.value == 0 for t in tokens)
        drawn = bool(words & LINE_STYLES) and not zero and "none" not in words
        for t in tokens:
            if t.type in ("hash", "function") or (t.type == "ident" and t.lower_value not in
                                                   LINE_STYLES | {"none", "hidden", "thin",
                                                                  "medium", "thick"}):
                parsed = parse_color([t], current=current, scheme=scheme)
                if isinstance(parsed, tuple):
                    colour = parsed
    if c is not None and (w is None or c.key > w.key):
        parsed = parse_color(significant(tokens_of(c) or ()), current=current, scheme=scheme)
        if isinstance(parsed, tuple):
            colour = parsed
        cause = Cause(c.provenance())
    return colour, drawn, cause


def _substituted(walker, style):
    """``tokens_of`` for ``_line``: a value's var()s substituted with the element's custom
    properties (an outline of ``var(--accent) solid 3px``, as pydata-sphinx-theme draws)."""
    return lambda winner: walker.resolver.value(winner, style)[0]


def _boundary(walker, el, tag, style, chain) -> None:
    cache = walker.cache.cores
    key = ("boundary", style)
    line = cache.get(key)
    if line is None:
        line = cache[key] = (_line(_winners(walker, el), BORDER, BORDER_COLOUR, style.color,
                                   style.scheme, _substituted(walker, style)),)
    line = line[0]
    author_fill = style.bg_cause is not None and style.bg_cause.declaration is not None and \
        style.bg_cause.declaration.origin != "user-agent"
    if line is None and not author_fill:
        return  # the user agent's appearance: exempt from SC 1.4.11
    outer = walker._paint(chain[:-1], TRANSPARENT)[0][1]
    fill = walker._paint(chain, TRANSPARENT)[0][1]
    border = None
    if line is not None and line[1]:
        border = walker._paint(chain[:-1], line[0])[0][0]
    exempt = "inactive-control" if style.disabled else ""  # SC 1.4.11: "except for inactive
    # components"
    _append(walker, el, "boundary", f"{tag} boundary", border, fill, outer, style,
            exempt=exempt, cause=line[2] if line is not None else None)


def _focus_ring(walker, el, style, chain) -> None:
    cache = walker.cache.cores
    key = ("focus-ring", style)
    got = cache.get(key)
    if got is None:
        winners = _winners(walker, el, FOCUS)
        line = _line(winners, OUTLINE, OUTLINE_COLOUR, style.color, style.scheme,
                     _substituted(walker, style))
        offset = winners.get("outline-offset")
        inset = offset is not None and offset.decl.text.strip().startswith("-")
        got = cache[key] = (line, inset)
    line, inset = got
    if line is None or not line[1] or style.disabled:
        return  # no author outline: the user agent's ring, or no ring (SC 2.4.7's concern)
    outer = walker._paint(chain[:-1], TRANSPARENT)[0][1]
    ring = walker._paint(chain[:-1], line[0])[0][0]
    status, reason = (UNDETERMINED, "inset focus outline: lies on the element's own fill") \
        if inset else (DETERMINED, "")
    _append(walker, el, "focus-ring", f"{el.tag} focus outline", ring, outer, outer, style,
            status, reason, cause=line[2])


def _svg_icon(walker, el, style, chain) -> None:
    if (el.get("aria-hidden") or "").strip().lower() == "true":
        control = exempt_mod._control_of(el.getparent()) if el.getparent() is not None else None
        if control is None or exempt_mod._visible_words(control, walker.structure.text):
            return  # decorative: hidden, beside words that carry the meaning
    elif exempt_mod._control_of(el) is None and not _named_svg(el):
        return  # neither in a control nor named: nothing says it carries meaning
    inner = [d for d in el.iter() if isinstance(d.tag, str) and d is not el]
    used = _used(inner, walker.structure.by_id)
    if any(d.tag in ("text", "foreignObject") for d in inner + (used or [])):
        return  # a chart or diagram with text, not an icon: not judged (documented)
    fill = style.svg_fill[0] if style.svg_fill is not None else (0.0, 0.0, 0.0, 1.0)
    status, reason = DETERMINED, ""
    if used is None:  # drawn from another file's symbol: what it fills or strokes is not here
        status, reason = UNDETERMINED, "icon drawn from a symbol in another file"
        used = []
    inner += used
    own = {(d.get("fill") or "").strip().lower() for d in inner}
    own -= {"", "currentcolor", "inherit"}
    styled = any(d.get("class") or d.get("style") for d in inner)  # fills from CSS per shape
    strokes = any(d.get("stroke") not in (None, "none") for d in inner)
    if own - {"none"} or styled or strokes or fill[3] <= 0:
        status, reason = UNDETERMINED, "icon drawn with strokes or several fills: geometry decides"
    fg, bg = walker._paint(chain, fill)[0] if fill[3] > 0 else (None, None)
    if bg is None:
        bg = walker._paint(chain, TRANSPARENT)[0][1]
    _append(walker, el, "svg-icon", "svg icon", fg, bg, bg, style, status, reason)


def _used(inner, by_id) -> list | None:
    """The shapes of the symbols the ``<use>`` elements among ``inner`` draw (SVG 2, "The
    use element": the referenced element's content is rendered in its place, and inherits
    from it), found by id in the page (``by_id``: ``PageStructure.by_id``); None when one
    refers to another file (a sprite sheet).
    A theme's icons are often a ``<use href="#svg-eye">`` of a symbol drawn with
    ``stroke="currentColor"`` (Sphinx's Furo theme)."""
    found = []
    for d in inner:
        if d.tag != "use":
            continue
        href = (d.get("href") or d.get("xlink:href")
                or d.get("{http://www.w3.org/1999/xlink}href") or "").strip()
        if not href.startswith("#"):
            return None
        target = by_id(href[1:])
        if target is not None:
            found.extend(t for t in target.iter() if isinstance(t.tag, str))
    return found


def _named_svg(el) -> bool:
    if (el.get("aria-label") or el.get("aria-labelledby") or "").strip():
        return True
    return any(isinstance(c.tag, str) and c.tag == "title" and (c.text or "").strip()
               for c in el)


__all__ = ["KINDS", "TAGS", "emit"]
