"""Computed values of the properties tinctura reads: lengths, font size and weight, backgrounds.

Each function takes tinycss2 tokens after ``var()`` substitution and returns a plain value, or
None when the value is invalid (the caller then treats the declaration as ``unset``).
"""
from __future__ import annotations

import tinycss2

from ..colour.parse import parse_color
from ..tokens import significant, split_commas  # noqa: F401 (re-exported)

ABSOLUTE = {"px": 1.0, "pt": 96 / 72, "pc": 16.0, "in": 96.0, "cm": 96 / 2.54,
            "mm": 96 / 25.4, "q": 96 / 101.6}
# CSS Fonts 4, absolute-size keywords (medium = 16px; scale factors 3/5, 3/4, 8/9, 1, 6/5, 3/2, 2/1, 3/1)
SIZE_KEYWORDS = {"xx-small": 9.6, "x-small": 12.0, "small": 13.333333, "medium": 16.0,
                 "large": 19.2, "x-large": 24.0, "xx-large": 32.0, "xxx-large": 48.0}
# Chromium rounds the keyword table to whole pixels: 9, 10, 13, 16, 18, 24, 32, 48 (common browser practice)
SIZE_KEYWORDS_PX = {"xx-small": 9.0, "x-small": 10.0, "small": 13.0, "medium": 16.0,
                    "large": 18.0, "x-large": 24.0, "xx-large": 32.0, "xxx-large": 48.0}
WEIGHT_KEYWORDS = {"normal": 400, "bold": 700}


class LengthContext:
    __slots__ = ("em", "rem", "vw", "vh", "percent_base")

    def __init__(self, em, rem, vw=1280.0, vh=900.0, percent_base=None):
        self.em, self.rem, self.vw, self.vh = em, rem, vw, vh
        self.percent_base = em if percent_base is None else percent_base


def length(token, ctx: LengthContext):
    """A length token (or calc-like function) to px; None if not a length."""
    t = token.type
    if t == "dimension":
        unit = token.lower_unit
        if unit in ABSOLUTE:
            return token.value * ABSOLUTE[unit]
        if unit == "em":
            return token.value * ctx.em
        if unit == "rem":
            return token.value * ctx.rem
        if unit == "ex":
            return token.value * ctx.em * 0.5
        if unit == "ch":
            return token.value * ctx.em * 0.5
        if unit in ("vw", "svw", "lvw", "dvw", "vi"):
            return token.value * ctx.vw / 100
        if unit in ("vh", "svh", "lvh", "dvh", "vb"):
            return token.value * ctx.vh / 100
        if unit == "vmin":
            return token.value * min(ctx.vw, ctx.vh) / 100
        if unit == "vmax":
            return token.value * max(ctx.vw, ctx.vh) / 100
        return None
    if t == "percentage":
        return token.value * ctx.percent_base / 100
    if t == "number" and token.value == 0:
        return 0.0
    if t == "function":
        return _math(token, ctx)
    return None


def _math(fn, ctx):
    name = fn.lower_name
    args = split_commas(fn.arguments)
    if name == "calc":
        return _sum(significant(fn.arguments), ctx) if len(args) == 1 else None
    values = [_sum(significant(a), ctx) for a in args]
    if any(v is None for v in values) or not values:
        return None
    if name == "min":
        return min(values)
    if name == "max":
        return max(values)
    if name == "clamp" and len(values) == 3:
        return max(values[0], min(values[1], values[2]))
    return None


def _sum(tokens, ctx):
    """calc() sum of products; numbers only as factors (px values carry the unit)."""
    total, sign = 0.0, 1.0
    terms, current = [], []  # terms separated by + / -; each a product of factors
    for t in tokens:
        if t.type == "literal" and t.value in "+-":
            terms.append((sign, current))
            sign = 1.0 if t.value == "+" else -1.0
            current = []
        else:
            current.append(t)
    terms.append((sign, current))
    for sign, factors in terms:
        if not factors:
            continue
        value, is_len, op = None, False, "*"
        for f in factors:
            if f.type == "literal" and f.value in "*/":
                op = f.value
                continue
            if f.type == "number":
                v, v_len = f.value, False
            elif f.type == "() block":
                v, v_len = _sum(significant(f.content), ctx), True
            else:
                v, v_len = length(f, ctx), True
            if v is None:
                return None
            if value is None:
                value, is_len = v, v_len
            elif op == "*":
                value, is_len = value * v, is_len or v_len
            elif op == "/":
                if v == 0:
                    return None
                value = value / v
        if value is None:
            return None
        total += sign * value
    return total


def font_size(tokens, parent_px: float, root_px: float, vw: float = 1280.0):
    tokens = significant(tokens)
    if len(tokens) != 1:
        return None
    token = tokens[0]
    if token.type == "ident":
        kw = token.lower_value
        if kw in SIZE_KEYWORDS_PX:
            return SIZE_KEYWORDS_PX[kw]
        if kw == "larger":
            return parent_px * 1.2
        if kw == "smaller":
            return parent_px / 1.2
        if kw == "math":
            return parent_px
        return None
    value = length(token, LengthContext(parent_px, root_px, vw, percent_base=parent_px))
    if value is None or value < 0:
        return None
    return value


def font_weight(tokens, parent: int):
    tokens = significant(tokens)
    if len(tokens) != 1:
        return None
    t = tokens[0]
    if t.type == "number" and 1 <= t.value <= 1000:
        return int(t.value)
    if t.type == "ident":
        kw = t.lower_value
        if kw in WEIGHT_KEYWORDS:
            return WEIGHT_KEYWORDS[kw]
        # CSS Fonts 4, "bolder"/"lighter" relative weights table
        if kw == "bolder":
            return 400 if parent < 350 else 700 if parent < 550 else 900
        if kw == "lighter":
            return 100 if parent < 550 else 400 if parent < 750 else 700
    return None


_FONT_PREFIX = {"normal", "italic", "oblique", "small-caps", "ultra-condensed", "extra-condensed",
                "condensed", "semi-condensed", "semi-expanded", "expanded", "extra-expanded",
                "ultra-expanded", "bold", "bolder", "lighter"}


def font_shorthand(tokens):
    """(size tokens, weight tokens) from the ``font`` shorthand; None if it is a system font."""
    tokens = significant(tokens)
    weight = [tinycss2.ast.IdentToken(0, 0, "normal")]
    for i, t in enumerate(tokens):
        if t.type == "number" and not (i + 1 < len(tokens) and tokens[i + 1].type == "literal"):
            weight = [t]
            continue
        if t.type == "ident" and t.lower_value in _FONT_PREFIX:
            if t.lower_value in ("bold", "bolder", "lighter"):
                weight = [t]
            continue
        if t.type in ("dimension", "percentage", "function") or (
                t.type == "ident" and (t.lower_value in SIZE_KEYWORDS or
                                       t.lower_value in ("larger", "smaller"))):
            return [t], weight
        return None
    return None


def gradient_stops(fn, current, scheme) -> list | None:
    """Colours of a gradient's stops, or None if one cannot be parsed."""
    colours = []
    for part in split_commas(fn.arguments):
        sig = significant(part)
        if not sig:
            continue
        found = None
        for t in sig:
            if t.type in ("dimension", "percentage", "number"):
                continue
            c = parse_color([t], current=current, scheme=scheme)
            if isinstance(c, tuple):
                found = c
                break
        if found is not None:
            colours.append(found)
    return colours or None


def background_layers(tokens, current, scheme):
    """Split a ``background`` shorthand: (colour or None, [images]).

    An image is ("url", text) or ("gradient", stops colours). The colour may only be in the last
    layer; a shorthand without a colour sets it to transparent.
    """
    colour = None
    images = []
    layers = split_commas(tokens)
    for index, layer in enumerate(layers):
        for t in significant(layer):
            kind = _image_kind(t)
            if kind:
                images.append(_image(t, kind, current, scheme))
                continue
            if index == len(layers) - 1 and t.type in ("hash", "ident", "function"):
                c = parse_color([t], current=current, scheme=scheme)
                if c is not None and not isinstance(c, str):
                    colour = c
    return colour, images


def _image_kind(t):
    if t.type == "url":
        return "url"
    if t.type == "function":
        name = t.lower_name
        if name == "url" or name in ("image-set", "-webkit-image-set", "image", "element",
                                     "cross-fade", "paint"):
            return "url"
        if name.endswith("gradient"):
            return "gradient"
    return None


def _image(t, kind, current, scheme):
    if kind == "url":
        return ("url", tinycss2.serialize([t]))
    stops = gradient_stops(t, current, scheme)
    if stops is None:
        return ("url", tinycss2.serialize([t]))  # an unreadable gradient: as unknown as an image
    return ("gradient", stops)


# An inset shadow is painted above the element's backgrounds and below its content (CSS
# Backgrounds and Borders 3, "box-shadow"): inside the padding box, outside the box shrunk by the
# spread and moved by the offset. Without the box's geometry, tinctura classifies it:
# - it covers the whole box when the spread is at least half the viewport width: no text box is
#   wider than the viewport, so the unshadowed inner box is empty (the `inset 0 0 0 9999px`
#   idiom that CSS frameworks use to tint table rows);
# - it draws only an edge, like a border, when it reaches at most INSET_EDGE_PX into the box
#   (padding keeps text off such an edge: a judgement of ours, common practice for inner rings);
# - otherwise it covers part of the box: its colour is one more background the text may sit on.
INSET_EDGE_PX = 4.0


def inset_shadows(tokens, current, scheme, ctx: LengthContext) -> list:
    """[(colour, covers_whole_box)] of the inset shadows in a ``box-shadow`` value, bottom first.

    Outset shadows paint outside the border box, never behind the text: they are left out.
    """
    out = []
    for part in split_commas(tokens):
        sig = significant(part)
        if not any(t.type == "ident" and t.lower_value == "inset" for t in sig):
            continue
        lengths, colour = [], current
        for t in sig:
            if t.type == "ident" and t.lower_value == "inset":
                continue
            v = length(t, ctx) if t.type in ("dimension", "number", "function") else None
            if v is not None:
                lengths.append(v)
                continue
            c = parse_color([t], current=current, scheme=scheme)
            if isinstance(c, tuple):
                colour = c
        if len(lengths) < 2 or colour[3] <= 0:
            continue
        ox, oy = lengths[0], lengths[1]
        blur = max(0.0, lengths[2]) if len(lengths) > 2 else 0.0
        spread = lengths[3] if len(lengths) > 3 else 0.0
        if spread >= ctx.vw / 2:
            out.append((colour, True))
        elif max(abs(ox), abs(oy)) + max(spread, 0.0) + blur / 2 > INSET_EDGE_PX:
            out.append((colour, False))
    out.reverse()  # the first shadow in the list is painted on top
    return out


def background_images(tokens, current, scheme) -> list:
    images = []
    for layer in split_commas(tokens):
        for t in significant(layer):
            kind = _image_kind(t)
            if kind:
                images.append(_image(t, kind, current, scheme))
    return images


# Shorthands that carry a colour among other parts (CSS Backgrounds 3, CSS UI 4, CSS Text
# Decoration 3, CSS Multi-column 1): a fix changes the colour alone, for `outline: #c` would
# reset the outline's style to none and its width to medium, removing it.
_COLOUR_OF = {"outline": "outline-color", "text-decoration": "text-decoration-color",
              "column-rule": "column-rule-color", "border": "border-color"}
_BORDER_SIDES = ("top", "right", "bottom", "left", "block", "inline", "block-start",
                 "block-end", "inline-start", "inline-end")


def colour_longhand(prop: str) -> str:
    """The property that sets only the colour of ``prop`` (``prop`` itself when it is one)."""
    if prop in _COLOUR_OF:
        return _COLOUR_OF[prop]
    if prop.startswith("border-") and prop[7:] in _BORDER_SIDES:
        return prop + "-color"
    return prop


def with_colour(prop: str, value: str, colour: str) -> str:
    """``value`` of ``prop`` with ``colour`` in place of its colour: the colour alone for a
    colour property, a shorthand's other parts kept (`3px solid #cccccc` -> `3px solid
    #949494`; a shorthand with no colour gets it added)."""
    if colour_longhand(prop) == prop:
        return colour
    parts, done = [], False
    for t in tinycss2.parse_component_value_list(value):
        if not done and t.type != "whitespace" and \
                isinstance(parse_color([t], current=(0, 0, 0, 1)), tuple):
            parts.append(colour)
            done = True
        else:
            parts.append(t.serialize())
    text = "".join(parts).strip()
    return text if done else f"{text} {colour}"
