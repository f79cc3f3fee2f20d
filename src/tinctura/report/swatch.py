"""Swatches: the words of a finding drawn in their real colours on their real background.

A swatch is a small SVG image embedded as a ``data:`` URI, so the report stays one file and
fetches nothing, and so the failing colours it must show are a picture of the problem rather
than text of the report (the report itself passes its own check). Its ``alt`` text gives the
words, the colours and the ratio. Images never run scripts; the words are XML-escaped inside
the image and the whole URI is percent-encoded and attribute-escaped.
"""
from __future__ import annotations

from html import escape
from urllib.parse import quote
from xml.sax.saxutils import escape as xml_escape

from tinctura.colour import wcag

from . import messages as m

WIDTH = 400

try:  # colour-vision deficiency simulation (Machado 2009), when this version has it
    from tinctura.colour import cvd as _cvd
except ImportError:  # optional hook: the report says it is not available
    _cvd = None


def deficiencies() -> tuple:
    """Names of the simulated colour-vision deficiencies (empty without the simulation)."""
    return tuple(getattr(_cvd, "DEFICIENCIES", ())) if _cvd is not None else ()


def simulate(rgb, deficiency: str) -> tuple:
    return tuple(float(c) for c in _cvd.simulate_one(tuple(rgb[:3]), deficiency))


def image(text: str, fg, bg, size_px: float = 16.0, weight: int = 400, label: str = "") -> str:
    """An ``<img>`` of ``text`` in ``fg`` on ``bg``; ``label`` opens its alternative text."""
    size = min(max(float(size_px or 16.0), 12.0), 30.0)
    height = int(size * 2.2)
    words = m.excerpt(text, max(8, int((WIDTH - 24) / (size * 0.54)))) or "Aa"
    fg_hex, bg_hex = m.colour(fg), m.colour(bg)
    svg = (f'<svg xmlns="http://www.w3.org/2000/svg" width="{WIDTH}" height="{height}">'
           f'<rect width="100%" height="100%" fill="{bg_hex}"/>'
           f'<text x="12" y="{height / 2 + size * 0.35:.1f}" fill="{fg_hex}" '
           f'font-family="system-ui, sans-serif" font-size="{size:g}" '
           f'font-weight="{int(weight or 400)}">{xml_escape(words)}</text></svg>')
    uri = "data:image/svg+xml," + quote(svg, safe="")
    ratio = m.ratio(wcag.contrast_ratio(fg, bg))
    alt = f"{label}: \u201c{words}\u201d in {fg_hex} on {bg_hex}, {ratio}:1".lstrip(": ")
    return (f'<img class="swatch" src="{escape(uri)}" width="{WIDTH}" height="{height}" '
            f'alt="{escape(alt)}">')
