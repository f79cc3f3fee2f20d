"""Samples from colours written as CSS: the rules' documented examples, and hand-made cases.

The engine builds samples from real pages; this module builds the same records from a few
colours, so a rule (and its documentation) can be exercised without a page.
"""
from __future__ import annotations

from tinctura.colour.composite import over
from tinctura.colour.parse import parse_color
from tinctura.model import DETERMINED, REST, LinkCues, Sample

from .catalogue import Example


def rgba(colour) -> tuple:
    """A CSS colour string or an (r, g, b[, a]) tuple -> (r, g, b, a) floats."""
    if isinstance(colour, str):
        parsed = parse_color(colour)
        if parsed is None or isinstance(parsed, str):
            raise ValueError(f"not a CSS colour: {colour!r}")
        return tuple(parsed)
    colour = tuple(float(c) for c in colour)
    return colour if len(colour) == 4 else colour + (1.0,)


def make_sample(fg, bg, *, size_px: float = 16.0, weight: int = 400, bg_alternatives=(),
                page: str = "index.html", scheme: str = "light", state: str = REST,
                xpath: str = "/html/body/p", line: int = 1, text: str = "Sample text",
                kind: str = "text", status: str = DETERMINED, reason: str = "",
                exempt: str = "", fg_cause=None, bg_cause=None, link=None) -> Sample:
    """A Sample of text ``fg`` on opaque ``bg`` (a translucent ``fg`` is composited over it)."""
    raw = rgba(fg)
    back = rgba(bg)[:3]
    return Sample(
        page=page, scheme=scheme, state=state, xpath=xpath, line=line, text=text, kind=kind,
        fg=tuple(over(raw, back)[:3]), bg=back, fg_raw=raw,
        font_size_px=size_px, font_weight=weight, status=status, reason=reason,
        bg_alternatives=tuple(rgba(b)[:3] for b in bg_alternatives), exempt=exempt,
        fg_cause=fg_cause, bg_cause=bg_cause, link=link,
    )


def example_sample(example: Example, **fields) -> Sample:
    """The sample a documented example renders."""
    link = None
    if example.surround:  # a link in running text (TC120)
        link = LinkCues(tuple(over(rgba(example.surround), rgba(example.bg)[:3])[:3]),
                        tuple(example.cues), tuple(example.hover), tuple(example.focus))
    fields.setdefault("exempt", example.exempt)
    return make_sample(example.fg, example.bg, size_px=example.size_px, weight=example.weight,
                       bg_alternatives=example.bg_alternatives, page="example.html", link=link,
                       **fields)


def example_samples(example: Example) -> list:
    """The samples a site-level rule's example shows: one per (entry, colour, background,
    scheme) context, the colour as the text colour."""
    return [make_sample(colour, bg, page="example.html", scheme=scheme, text=entry,
                        xpath=f"/html/body/p[{n + 1}]", line=n + 1)
            for n, (entry, colour, bg, scheme) in enumerate(example.contexts)]


def example_palette(example: Example) -> tuple:
    """The palette an example's contexts declare (entry name -> its colour)."""
    from tinctura.palette import palette_setting

    return palette_setting({entry: colour for entry, colour, _, _ in example.contexts})
