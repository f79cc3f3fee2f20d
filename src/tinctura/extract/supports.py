"""``@supports`` conditions, answered for a current browser.

A static checker cannot know every property a browser supports; it answers "supported" for any
declaration test and any selector that compiles, and negates under ``not``. Sites use ``@supports``
mostly to feature-test modern CSS that current browsers have, so this errs on their side.
"""
from __future__ import annotations

import tinycss2

_UNSUPPORTED_PREFIXES = ("-ms-",)


def evaluate(tokens) -> bool:
    tokens = [t for t in tokens if t.type not in ("whitespace", "comment")]
    if not tokens:
        return False
    if tokens[0].type == "ident" and tokens[0].lower_value == "not":
        return not evaluate(tokens[1:])
    # split on top-level and/or
    groups, ops, current = [], [], []
    for t in tokens:
        if t.type == "ident" and t.lower_value in ("and", "or"):
            groups.append(current)
            ops.append(t.lower_value)
            current = []
        else:
            current.append(t)
    groups.append(current)
    values = [_in_parens(g) for g in groups]
    if "or" in ops:
        return any(values)
    return all(values)


def _in_parens(group) -> bool:
    if len(group) != 1:
        return False
    t = group[0]
    if t.type == "() block":
        inner = [x for x in t.content if x.type not in ("whitespace", "comment")]
        if any(x.type == "literal" and x.value == ":" for x in inner[:2]) and inner[0].type == "ident":
            name = inner[0].lower_value
            return not name.startswith(_UNSUPPORTED_PREFIXES)
        return evaluate(t.content)
    if t.type == "function" and t.lower_name == "selector":
        from .sheet import compile_one

        compiled, _ = compile_one(tinycss2.serialize(t.arguments))
        return compiled is not None
    return False
