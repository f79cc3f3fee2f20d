"""Charts for the audit report, drawn as inline SVG from the data. Pure: numbers in, markup out.

Labels are drawn before the shapes, and never over them: a static check (tinctura's own) takes
shapes drawn earlier as possible backgrounds of later text. Colours come from the report's
stylesheet (classes ``bar``, ``bar-low``, ``rule``, ``axis``), so the charts follow its light
and dark schemes and print. Bars that fall below a threshold are hatched as well as coloured:
the difference never rests on colour alone (WCAG SC 1.4.1). Every chart has a title and a
description for assistive technology; the report gives the numbers in a table beside it.
"""
from __future__ import annotations

import hashlib
from html import escape

from tinctura import distribution

from . import messages as m

HATCH = (
    '<defs><pattern id="{id}" width="6" height="6" patternUnits="userSpaceOnUse" '
    'patternTransform="rotate(45)"><rect class="bar-low" width="6" height="6"/>'
    '<line class="hatch" x1="0" y1="0" x2="0" y2="6" stroke-width="3"/></pattern></defs>'
)


def _open(width: int, height: int, title: str, desc: str) -> tuple:
    # ids from the title (unique per chart in a report): the same data, the same document
    n = hashlib.blake2b(title.encode("utf-8", "surrogatepass"), digest_size=5).hexdigest()
    head = (f'<svg class="chart" viewBox="0 0 {width} {height}" width="{width}" '
            f'height="{height}" role="img" aria-labelledby="chart{n}-t chart{n}-d" '
            f'xmlns="http://www.w3.org/2000/svg">'
            f'<title id="chart{n}-t">{escape(title)}</title>'
            f'<desc id="chart{n}-d">{escape(desc)}</desc>')
    return n, head


def ratio_histogram(bins: dict, thresholds, scheme: str, peak: int | None = None) -> str:
    """Judged texts per contrast-ratio bin (``distribution.STEP`` wide) from 1:1 to 21:1,
    with the ``thresholds`` (ratios) as labelled dashed lines; bars below the highest
    threshold (the ratio normal-size text needs) are hatched. ``peak``: a shared y scale."""
    width, height, left, right, top, bottom = 680, 240, 48, 12, 26, 46
    plot_w, plot_h = width - left - right, height - top - bottom
    total = sum(bins.values())
    peak = max(peak or 0, max(bins.values(), default=0), 1)
    need = max(thresholds) if thresholds else 4.5
    below = sum(n for k, n in bins.items() if distribution.bin_range(k)[1] <= need)
    n, svg = _open(width, height, f"Contrast ratios of the texts judged, scheme {scheme}",
                   f"{total:,} texts in scheme {scheme}; {below:,} below {m.required(need)}:1. "
                   f"Bars give the number of texts per half unit of contrast ratio from 1:1 "
                   f"to 21:1, on a square-root scale; a table gives the same numbers.")
    pattern = f"hatch{n}"
    parts, shapes = [svg], [HATCH.format(id=pattern)]

    def x(ratio: float) -> float:
        return left + (ratio - 1.0) / 20.0 * plot_w

    base = top + plot_h
    shapes.append(f'<line class="axis" x1="{left}" y1="{base}" x2="{left + plot_w}" y2="{base}"/>')
    shapes.append(f'<line class="axis" x1="{left}" y1="{top}" x2="{left}" y2="{base}"/>')
    for k, value in sorted(bins.items()):
        lo, hi = distribution.bin_range(k)
        lo = max(lo, 1.0)
        # square-root scale: a handful of failing texts stays visible beside thousands
        h = max((value / peak) ** 0.5 * plot_h, 2.0)
        low = hi <= need
        if low:  # the count over each bar below the threshold
            parts.append(f'<text class="tick" x="{(x(lo) + x(hi)) / 2:.1f}" y="{base - h - 4:.1f}" '
                         f'text-anchor="middle">{value:,}</text>')
        fill = f' style="fill:url(#{pattern})"' if low else ""  # the style beats the class
        shapes.append(f'<rect class="{"bar-low" if low else "bar"}"{fill} x="{x(lo) + 0.5:.1f}" '
                     f'y="{base - h:.1f}" width="{max(x(hi) - x(lo) - 1, 1):.1f}" '
                     f'height="{h:.1f}"><title>{lo:g} to {hi:g}: {value:,} texts</title></rect>')
    for tick in (1, 3, 4.5, 7, 10, 14, 21):
        parts.append(f'<text class="tick" x="{x(tick):.1f}" y="{base + 16}" '
                     f'text-anchor="middle">{tick:g}</text>')
    parts.append(f'<text class="tick" x="{left + plot_w / 2:.1f}" y="{height - 8}" '
                 f'text-anchor="middle">contrast ratio (:1)</text>')
    parts.append(f'<text class="tick" x="{left - 6}" y="{top + 4}" '
                 f'text-anchor="end">{peak:,}</text>')
    parts.append(f'<text class="tick" x="{left - 6}" y="{base}" text-anchor="end">0</text>')
    parts.append(f'<text class="tick" x="{left + plot_w}" y="{top - 6}" text-anchor="end">'
                 f'texts per half unit (square-root scale)</text>')
    for i, t in enumerate(sorted(thresholds)):
        shapes.append(f'<line class="rule" x1="{x(t):.1f}" y1="{top - 14}" x2="{x(t):.1f}" '
                      f'y2="{base}" stroke-dasharray="5 3"/>')
        parts.append(f'<text class="tick" x="{x(t) + 4:.1f}" y="{top - 6}">'
                     f'{m.required(t)}:1</text>')
    parts.extend(shapes)
    parts.append("</svg>")
    return "".join(parts)


def page_bars(rows, limit: int = 20) -> str:
    """Horizontal bars: findings per page, the ``limit`` pages with most. ``rows``: (page, n)."""
    rows = list(rows)[:limit]
    if not rows:
        return ""
    bar_h, gap, label_w, width = 18, 6, 300, 680
    height = len(rows) * (bar_h + gap) + 8
    peak = max(n for _, n in rows) or 1
    room = width - label_w - 60
    _, svg = _open(width, height, "Findings per page",
                   f"The {len(rows)} pages with most findings; the table that follows lists "
                   f"every page with findings.")
    parts, shapes = [svg], []
    for i, (page, n) in enumerate(rows):
        y = 4 + i * (bar_h + gap)
        w = max(n / peak * room, 1.0)
        label = page if len(page) <= 44 else "\u2026" + page[-43:]
        parts.append(f'<text class="tick" x="{label_w - 8}" y="{y + 13}" '
                     f'text-anchor="end">{escape(label)}</text>')
        shapes.append(f'<rect class="bar" x="{label_w}" y="{y}" width="{w:.1f}" '
                      f'height="{bar_h}"/>')
        parts.append(f'<text class="tick" x="{label_w + w + 6:.1f}" y="{y + 13}">{n:,}</text>')
    parts.extend(shapes)
    parts.append("</svg>")
    return "".join(parts)
