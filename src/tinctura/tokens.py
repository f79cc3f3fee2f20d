"""Small helpers over tinycss2 component values, shared by the colour parser and extraction."""
from __future__ import annotations

_INSIGNIFICANT = ("whitespace", "comment")


def significant(tokens) -> list:
    """The tokens without whitespace and comments."""
    return [t for t in tokens if t.type not in _INSIGNIFICANT]


def split_commas(tokens, *, drop_whitespace: bool = False) -> list:
    """Top-level comma-separated groups of a token list (commas inside functions stay)."""
    groups, group = [], []
    for token in tokens:
        if drop_whitespace and token.type in _INSIGNIFICANT:
            continue
        if token.type == "literal" and token.value == ",":
            groups.append(group)
            group = []
        else:
            group.append(token)
    groups.append(group)
    return groups
