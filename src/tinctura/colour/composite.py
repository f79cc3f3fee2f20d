"""Alpha compositing: Porter-Duff source-over on sRGB-encoded values.

Browsers blend in the encoded sRGB space (CSS Compositing and Blending Level 1, "simple alpha
compositing"), so no linearisation happens here.
"""
from __future__ import annotations


def over(top, bottom) -> tuple:
    """Source-over of two non-premultiplied (r, g, b, a) colours; non-premultiplied result.

    A missing alpha counts as 1. A fully transparent result is (0, 0, 0, 0).
    """
    at = top[3] if len(top) > 3 else 1.0
    ab = bottom[3] if len(bottom) > 3 else 1.0
    if at >= 1.0:
        return (top[0], top[1], top[2], 1.0)
    if at <= 0.0:
        return (bottom[0], bottom[1], bottom[2], ab)
    wb = ab * (1.0 - at)
    a = at + wb
    if a <= 0.0:
        return (0.0, 0.0, 0.0, 0.0)
    return (
        (top[0] * at + bottom[0] * wb) / a,
        (top[1] * at + bottom[1] * wb) / a,
        (top[2] * at + bottom[2] * wb) / a,
        a,
    )


def flatten(layers, base) -> tuple:
    """Composite ``layers`` (top-most first, each (r, g, b[, a])) over an opaque ``base``.

    Returns the opaque (r, g, b) a reader sees. Layers below the first opaque one are skipped.
    """
    stack = []
    for layer in layers:
        stack.append(layer)
        if len(layer) < 4 or layer[3] >= 1.0:
            break
    else:
        stack.append(base)
    colour = stack[-1]
    colour = (colour[0], colour[1], colour[2], 1.0)
    for layer in reversed(stack[:-1]):
        colour = over(layer, colour)
    return colour[:3]


def with_alpha(rgba, factor: float) -> tuple:
    """Multiply a colour's alpha by ``factor`` (e.g. an ancestor's opacity)."""
    a = rgba[3] if len(rgba) > 3 else 1.0
    return (rgba[0], rgba[1], rgba[2], a * factor)
