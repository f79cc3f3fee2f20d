"""How the contrast ratios of every judged text are spread, per colour scheme.

The audit report charts them (failures alone do not show how close the passing text is to a
threshold). Counted while checking, page by page, in bins of half a ratio unit, so the counts
travel with a page's statistics after its samples are dropped. Pure.
"""
from __future__ import annotations

from tinctura.colour import wcag

STEP = 0.5  # bin width; the WCAG thresholds 3, 4.5 and 7 fall on bin edges
LAST = int(20.5 / STEP)  # the bin holding 20.5..21 (21:1 is the highest ratio)
_MEMO: dict = {}  # (fg, bg, alternatives, fg_raw) -> worst ratio; a site has few of them
_MEMO_LIMIT = 20000


def bin_of(ratio: float) -> int:
    """Index of the bin holding ``ratio``: bin ``k`` covers ``k * STEP`` up to ``(k+1) * STEP``."""
    return min(max(int(ratio / STEP), 0), LAST)


def bin_range(k: int) -> tuple:
    return k * STEP, min((k + 1) * STEP, 21.0)


def worst_ratio(sample) -> float:
    """The ratio a text rule judges: the worst over every background the text may sit on."""
    from tinctura.rules.text import backgrounds, foreground_on

    key = (sample.fg, sample.bg, sample.bg_alternatives, sample.fg_raw)
    ratio = _MEMO.get(key)
    if ratio is None:
        ratio = min(wcag.contrast_ratio(foreground_on(sample, bg), bg)
                    for bg in backgrounds(sample))
        if len(_MEMO) >= _MEMO_LIMIT:
            _MEMO.clear()
        _MEMO[key] = ratio
    return ratio


def weighted(samples, counts=None):
    """``(sample, how many it stands for)`` pairs: ``counts`` one per sample
    (``situations.Alike``), or 1 each if None."""
    return zip(samples, counts) if counts is not None else ((s, 1) for s in samples)


def histogram(samples, counts=None) -> dict:
    """``{scheme: {bin: count}}`` over the samples a text rule can judge; ``counts``: how
    many samples each one stands for (1 each if None)."""
    from tinctura.rules.text import judged

    # Samples of one style share their colour tuples: counted by identity first (the samples
    # keep the tuples alive during the call), so most are hashed as a few ints, and each
    # distinct one is judged and binned once.
    alike: dict = {}
    for s, n in weighted(samples, counts):
        same = (id(s.fg), id(s.bg), id(s.bg_alternatives), id(s.fg_raw), s.scheme, s.status,
                s.kind, s.exempt)
        entry = alike.get(same)
        if entry is None:
            alike[same] = [s, n]
        else:
            entry[1] += n
    out: dict = {}
    for s, n in alike.values():  # in the order first met, as the samples
        if judged(s):
            bins = out.setdefault(s.scheme, {})
            k = bin_of(worst_ratio(s))
            bins[k] = bins.get(k, 0) + n
    return out


def merge(into: dict, more: dict, times: int = 1) -> dict:
    for scheme, bins in more.items():
        target = into.setdefault(scheme, {})
        for k, n in bins.items():
            target[k] = target.get(k, 0) + n * times
    return into


def key(hist: dict) -> tuple:
    """A hashable form, for sharing equal statistics."""
    return tuple(sorted((scheme, tuple(sorted(bins.items()))) for scheme, bins in hist.items()))
