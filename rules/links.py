"""Links in running text (family ``links``): samples in, findings out, no I/O.

TC120 link-cue, WCAG 2.2 SC 1.4.1 Use of Color, by W3C technique G183 (failure F73): a link told
apart from the surrounding text by colour alone must differ from that text by 3:1 and must
get a non-colour cue on hover and focus. The walk carries what this needs on the link's sample
(``model.LinkCues``, ``extract/links.py``).
"""
from __future__ import annotations

from tinctura.colour import wcag
from tinctura.model import DETERMINED, REST, Finding

from .catalogue import LINK_CUE

REQUIRED = 3.0  # W3C technique G183: 3:1 between the link text and the surrounding text


def check_link_cue(samples, options) -> list:
    """TC120: one finding per colour-only link sample (at rest) that misses a G183 condition."""
    level = getattr(options, "level", "AA") or "AA"
    findings = []
    for sample in samples:
        link = sample.link
        if link is None or sample.state != REST or sample.exempt or link.rest \
                or sample.status != DETERMINED or sample.fg is None or link.surround is None:
            continue
        ratio = wcag.contrast_ratio(tuple(sample.fg), tuple(link.surround))
        problems = []
        if ratio < REQUIRED:
            problems.append(f"{ratio_text(ratio)}:1 against the surrounding text, "
                            f"below {REQUIRED:g}:1")
        missing = [state for state, cues in (("hover", link.hover), ("focus", link.focus))
                   if not cues]
        if missing:
            problems.append("no cue other than colour on " + " or ".join(missing))
        if not problems:
            continue
        findings.append(Finding(
            rule=LINK_CUE.code, slug=LINK_CUE.slug, severity=LINK_CUE.severity, sample=sample,
            ratio=ratio, required=REQUIRED, level=level,
            # "bg" is the colour the ratio is taken against: the surrounding text
            args={"problems": "; ".join(problems), "sc": "1.4.1", "fg": tuple(sample.fg),
                  "bg": tuple(link.surround), "surround": tuple(link.surround),
                  "missing": tuple(missing)},
        ))
    return findings


def ratio_text(value: float) -> str:
    return wcag.format_ratio(value, 2)
