"""Turning records into words: messages, colours, ratios, causes, locators. Pure."""
from __future__ import annotations

import functools
import re

from tinctura import rules
from tinctura.colour.convert import to_hex
from tinctura.colour.wcag import format_ratio
from tinctura.model import Cause, Declaration, Finding
from tinctura.rules.catalogue import UI_RATIO

EXCERPT = 40  # characters of text shown in terminal reports


def colour(rgb) -> str:
    """``#rrggbb``, or ``?`` when unknown."""
    if rgb is None:
        return "?"
    return _hex(rgb) if type(rgb) is tuple else to_hex(rgb)


@functools.lru_cache(maxsize=4096)
def _hex(rgb) -> str:
    # (a report writes the same few hundred colours tens of thousands of times: 34,000 for the
    # 1,899 problems of 200 pages with styles of their own)
    return to_hex(rgb)


def ratio(value: float) -> str:
    """Contrast ratio floored to 2 decimals for display: 4.478 -> ``4.47`` (never rounded up)."""
    return format_ratio(value, 2)


def required(value: float) -> str:
    """A threshold as WCAG writes it: 4.5, 3, 7."""
    return f"{value:g}"


def lc(value: float) -> str:
    """APCA Lc for display, rounded to 2 decimals as APCA's reference values are quoted
    (#888 on #fff: 63.056 -> ``63.06``); verdicts compare the unrounded value."""
    shown = f"{value:.2f}"
    return "0.00" if shown == "-0.00" else shown


def plural(n: int, word: str, words: str | None = None) -> str:
    return f"{n:,} {word if n == 1 else (words or word + 's')}"


_CONTROL = re.compile("[\x00-\x08\x0e-\x1f\x7f-\x9f]")


def excerpt(text: str, limit: int = EXCERPT) -> str:
    """Whitespace collapsed, control characters shown as ``\\xNN`` (page text must not drive
    a terminal), cut at ``limit`` characters with an ellipsis."""
    text = " ".join((text or "").split())
    if _CONTROL.search(text):
        text = _CONTROL.sub(lambda mo: f"\\x{ord(mo.group()):02x}", text)
    return text if len(text) <= limit else text[: limit - 1].rstrip() + "\u2026"


_STEP = re.compile(r"^([^\[]+)(?:\[(\d+)\])?$")


def css_path(xpath: str, keep: int = 3) -> str:
    """A short CSS-like locator from an XPath: ``/html/body/main/p[3]`` -> ``main > p:nth-of-type(3)``.

    Only the last ``keep`` steps are shown (``...`` marks the cut); the XPath stays exact.
    """
    steps = [s for s in (xpath or "").split("/") if s]
    out = []
    for step in steps:
        m = _STEP.match(step)
        if not m:
            out.append(step)
            continue
        name, index = m.groups()
        out.append(f"{name}:nth-of-type({index})" if index else name)
    if keep and len(out) > keep:
        return "\u2026 > " + " > ".join(out[-keep:])
    return " > ".join(out)


def message_args(finding: Finding) -> dict:
    """Template arguments for a finding's message, converted for display."""
    args = dict(finding.args)
    rule = rules.get(finding.rule)
    stops = args.get("stops", 1)
    against = f"; worst of {stops} backgrounds it sits on" if stops > 1 else ""
    for key, value in list(args.items()):
        if isinstance(value, tuple) and len(value) in (3, 4) and all(
            isinstance(c, float) for c in value
        ):
            args[key] = colour(value)
    for key, value in list(args.items()):  # appearance rules' numbers (TC200, TC400, TC500)
        if isinstance(value, float):
            if key == "lc" or key.endswith("_lc"):
                args[key] = lc(value)
            elif key.endswith("_ratio"):
                args[key] = ratio(value)
            elif key.endswith("_cd"):
                args[key] = f"{value:.1f}"
            elif key == "lc_required":
                args[key] = f"{value:g}"
    args.update(
        ratio=ratio(finding.ratio),
        required=required(finding.required),
        level=finding.level,
        sc=args.get("sc") or rule.criterion(finding.level).number,
        size="large" if args.get("large") else "normal",
        against=against,
        rule=finding.rule,
        slug=finding.slug,
    )
    return args


def message(finding: Finding) -> str:
    """The finding's message: its rule's template filled in late."""
    return rules.get(finding.rule).message.format(**message_args(finding))


def measure(finding: Finding) -> str:
    """What was measured against what is needed, e.g. ``3.45:1, needs 4.5:1`` or
    ``Lc 52.10, needs Lc 75 (dark on light)``: the rule's template (``measure_template``)."""
    return measure_template(rules.get(finding.rule), finding).format(**message_args(finding))


RATIO_MEASURE = "{ratio}:1, needs {required}:1"


def measure_template(rule, finding: Finding) -> str:
    """``rule``'s ``measure`` template for ``finding`` (a ratio when it has none), or its
    ``measure_lc`` when the finding's ratio holds and what it lost is an Lc level."""
    lost_lc = getattr(rule, "measure_lc", "")
    if lost_lc and finding.required is not None and finding.ratio >= finding.required:
        return lost_lc
    return getattr(rule, "measure", "") or RATIO_MEASURE


def measured(finding: Finding) -> str:
    """What was measured, without the requirement: ``3.45:1`` or ``Lc 52.10 (dark on light)``."""
    return measure(finding).split(", needs")[0]


def needs(finding: Finding) -> str:
    """What is needed, as ``measure`` says it: ``4.5:1`` or ``Lc 75 (dark on light)``."""
    said = measure(finding)
    return said.split(", needs ", 1)[1] if ", needs " in said else \
        f"{required(finding.required)}:1"


RAISE_OPACITY = "raise (or remove) the opacity of the element around the text that fades it"


def unfaded_too(finding: Finding, quoted: bool = False) -> str:
    """Said of a problem whose worst text is faded by an opacity, of ``finding``, its worst
    text that nothing fades: raising the opacity leaves it failing (``quoted``: with its
    text)."""
    text = f', "{excerpt(finding.sample.text)}"' if quoted else ""
    return (f"texts of this problem that no opacity fades fail too ({measured(finding)} at "
            f"worst{text})")


def finding_colours(finding: Finding) -> tuple:
    """(fg, bg) the finding was judged on: the worst background when there were several."""
    s = finding.sample
    return finding.args.get("fg") or s.fg, finding.args.get("bg") or s.bg


def declaration(d: Declaration) -> str:
    return f"`{d.property}: {d.value}` at {d.where()}"


def cause(c: Cause | None, initial: str = "the initial value") -> str:
    """One line of provenance: the winning declaration, the variables it went through."""
    if c is None:
        return "unknown origin"
    if c.declaration is None:
        text = initial
    else:
        text = declaration(c.declaration)
        if c.declaration.selector:
            text += f" ({c.declaration.selector})"
    for link in c.chain:
        text += f", via {declaration(link)}"
    if c.inherited_from:
        text += f", inherited from {c.inherited_from}"
    return text


# what a TC110 finding judged (its ``what``), named for a writer
_NON_TEXT = {"control boundary": "control boundary", "focus outline": "focus outline",
             "svg icon": "SVG icon", "icon glyph": "icon"}


def non_text(finding: Finding) -> str | None:
    """``control boundary``, ``focus outline``, ``SVG icon``, ``icon``: the graphical object a
    non-text finding (TC110) judged; None for text."""
    if finding.rule != UI_RATIO.code:
        return None
    what = finding.args.get("what") or "graphical object"
    return _NON_TEXT.get(what, what)


def fixes(finding: Finding) -> str:
    """``text #767676 (4.54:1) or background #ffffff (...)``; empty when none was found."""
    parts = []
    for fix in finding.fixes:
        what = (non_text(finding) or "text") if fix.target == "foreground" else fix.target
        parts.append(f"{what} {colour(fix.colour)} ({ratio(fix.ratio)}:1)")
    return " or ".join(parts)


def not_verified(override) -> str:
    """Why checking again with an override applied did not prove it, in a clause."""
    if override.causes and not override.remains:
        named = []
        for code in override.causes:
            try:
                named.append(f"{code} {rules.get(code).slug}")
            except KeyError:
                named.append(code)
        return ("the problem is gone with it applied, but its values cause new findings: "
                + ", ".join(named))
    return ("the check still fails with it; the cause may be opacity or a rule this override "
            "does not beat")


def grouped_diagnostics(diagnostics) -> list:
    """``(diagnostic, where else)`` for a human-read list: a diagnostic whose severity and
    message recur on other pages (a theme's remote stylesheet, linked from every page) is
    listed once, at its first place, with the other pages' paths (``diagnostic_line``); its
    other places in the same file stay listed. The JSON and SARIF reports keep every one."""
    out, firsts = [], {}
    for d in diagnostics:
        key = (d.severity, d.message)
        first = firsts.get(key)
        if first is None or first[0].path == d.path:
            entry = (d, [])
            out.append(entry)
            firsts.setdefault(key, entry)
        elif d.path not in first[1]:
            first[1].append(d.path)
    return out


def diagnostic_line(d, elsewhere=(), shown: int = 3, severity: bool = True) -> str:
    """``path:line: severity: message`` (without the severity: ``severity`` False, for a log
    that shows it as its level), then the other pages it recurs on (a few named)."""
    at = f"{d.path}:{d.line}" if d.line else d.path
    line = f"{at}: {d.severity}: {d.message}" if severity else f"{at}: {d.message}"
    if elsewhere:
        named = ", ".join(elsewhere[:shown])
        more = len(elsewhere) - shown
        line += (f"; the same on {plural(len(elsewhere), 'more page')} ({named}"
                 f"{f', and {more} more' if more > 0 else ''})")
    return line
