"""Media queries (Media Queries Level 4) evaluated for one screen and one colour scheme.

The environment is a desktop screen: ``width`` from the options (default 1280 px), 900 px high,
landscape, a fine pointer that can hover, colour, 1 dppx, no preference for motion or contrast.
``prefers-color-scheme`` comes from the scheme. Unknown features are false, as in a browser.
Lengths in media queries use the initial font size (1em = 16px).
"""
from __future__ import annotations

from functools import lru_cache

import tinycss2

from ..tokens import split_commas
from .values import ABSOLUTE, LengthContext, length

_INITIAL = LengthContext(16.0, 16.0)


class Environment:
    def __init__(self, width: int = 1280, height: int = 900, scheme_media: tuple = ()):
        self.values = {
            "width": float(width), "height": float(height),
            "device-width": float(width), "device-height": float(height),
            "aspect-ratio": width / height, "device-aspect-ratio": width / height,
            "orientation": "landscape" if width >= height else "portrait",
            "resolution": 1.0, "color": 8.0, "color-index": 0.0, "monochrome": 0.0,
            "grid": 0.0, "hover": "hover", "any-hover": "hover", "pointer": "fine",
            "any-pointer": "fine", "prefers-color-scheme": "light",
            "prefers-reduced-motion": "no-preference", "prefers-reduced-transparency":
            "no-preference", "prefers-contrast": "no-preference", "forced-colors": "none",
            "inverted-colors": "none", "display-mode": "browser", "scripting": "enabled",
            "update": "fast", "overflow-block": "scroll", "overflow-inline": "scroll",
            "color-gamut": "srgb", "dynamic-range": "standard", "video-dynamic-range": "standard",
            "-webkit-device-pixel-ratio": 1.0, "device-pixel-ratio": 1.0,
        }
        for key, value in scheme_media:
            self.values[key] = value
        self.key = tuple(sorted(self.values.items()))

    def matches(self, query_list: str) -> bool:
        return _matches(query_list, self.key)


@lru_cache(maxsize=4096)
def _matches(query_list: str, env_key: tuple) -> bool:
    env = dict(env_key)
    queries = split_commas(tinycss2.parse_component_value_list(query_list),
                           drop_whitespace=True)
    if not query_list.strip():
        return True
    return any(_query(q, env) for q in queries if q)


def _query(tokens, env) -> bool:
    negate = False
    if tokens and tokens[0].type == "ident" and tokens[0].lower_value in ("not", "only"):
        negate = tokens[0].lower_value == "not"
        if len(tokens) > 1 and tokens[1].type == "ident":
            tokens = tokens[1:]
        elif negate:  # `not (condition)`
            return not _condition(tokens[1:], env)
    if tokens and tokens[0].type == "ident":
        media_type = tokens[0].lower_value
        ok = media_type in ("all", "screen")
        rest = tokens[1:]
        if rest and rest[0].type == "ident" and rest[0].lower_value == "and":
            ok = ok and _condition(rest[1:], env)
        elif rest:
            ok = False
        return ok != negate
    return _condition(tokens, env) != negate


def _condition(tokens, env) -> bool:
    if not tokens:
        return False
    if tokens[0].type == "ident" and tokens[0].lower_value == "not":
        return not _condition(tokens[1:], env)
    results, ops = [], []
    for t in tokens:
        if t.type == "ident" and t.lower_value in ("and", "or"):
            ops.append(t.lower_value)
        elif t.type == "() block":
            results.append(_in_parens(t, env))
        else:
            return False
    if not results:
        return False
    return any(results) if "or" in ops else all(results)


def _in_parens(block, env) -> bool:
    inner = [t for t in block.content if t.type not in ("whitespace", "comment")]
    if not inner:
        return False
    if inner[0].type == "() block" or (inner[0].type == "ident" and inner[0].lower_value == "not"):
        return _condition(inner, env)
    # plain feature: (name) or (name: value)
    if inner[0].type == "ident" and (len(inner) == 1 or (inner[1].type == "literal"
                                                          and inner[1].value == ":")):
        name = inner[0].lower_value
        if len(inner) == 1:
            value = env.get(name)
            return value not in (None, 0.0, "none", "no-preference")
        return _feature(name, inner[2:], env)
    return _range(inner, env)


def _feature(name, value_tokens, env) -> bool:
    prefix = None
    if name.startswith("-webkit-"):
        name = name[len("-webkit-"):]
    if name.startswith(("min-", "max-")):
        prefix, name = name[:3], name[4:]
    actual = env.get(name)
    if actual is None:
        return False
    if isinstance(actual, str):
        return len(value_tokens) == 1 and value_tokens[0].type == "ident" and \
            value_tokens[0].lower_value == actual
    wanted = _number(value_tokens, name)
    if wanted is None:
        return False
    if prefix == "min":
        return actual >= wanted
    if prefix == "max":
        return actual <= wanted
    return abs(actual - wanted) < 1e-9


def _number(tokens, name):
    if len(tokens) == 3 and tokens[1].type == "literal" and tokens[1].value == "/":
        a, b = tokens[0], tokens[2]
        if a.type == "number" and b.type == "number" and b.value:
            return a.value / b.value
        return None
    if len(tokens) != 1:
        return None
    t = tokens[0]
    if t.type == "dimension":
        unit = t.lower_unit
        if unit in ABSOLUTE or unit in ("em", "rem"):
            return length(t, _INITIAL)  # em in a media query is the initial font size
        if unit in ("dppx", "x"):
            return t.value
        if unit == "dpi":
            return t.value / 96
        if unit == "dpcm":
            return t.value * 2.54 / 96
        return None
    if t.type == "number":
        return t.value
    return None


_OPS = {"<": lambda a, b: a < b, "<=": lambda a, b: a <= b, ">": lambda a, b: a > b,
        ">=": lambda a, b: a >= b, "=": lambda a, b: abs(a - b) < 1e-9}
_FLIP = {"<": ">", "<=": ">=", ">": "<", ">=": "<=", "=": "="}


def _range(tokens, env) -> bool:
    """Range syntax: (width >= 600px), (400px <= width < 700px)."""
    parts, ops, i = [], [], 0
    current = []
    while i < len(tokens):
        t = tokens[i]
        if t.type == "literal" and t.value in "<>=":
            op = t.value
            if op in "<>" and i + 1 < len(tokens) and tokens[i + 1].type == "literal" \
                    and tokens[i + 1].value == "=":
                op += "="
                i += 1
            parts.append(current)
            ops.append(op)
            current = []
        else:
            current.append(t)
        i += 1
    parts.append(current)
    if len(parts) not in (2, 3):
        return False
    name_index = next((k for k, p in enumerate(parts)
                       if len(p) == 1 and p[0].type == "ident"), None)
    if name_index is None:
        return False
    name = parts[name_index][0].lower_value
    actual = env.get(name)
    if not isinstance(actual, float):
        return False
    ok = True
    for k, op in enumerate(ops):
        left, right = parts[k], parts[k + 1]
        if k + 1 == name_index:  # value op name  ->  name flip(op) value
            value = _number(left, name)
            test = _FLIP[op]
        else:
            value = _number(right, name)
            test = op
        if value is None:
            return False
        ok = ok and _OPS[test](actual, value)
    return ok
