"""Plain words for a writer who is not a CSS expert: colour names, where on the page, the
problem in one sentence ("Grey text on white in warning boxes is too faint: 2.32:1, needs
4.5:1."). Pure: records in, strings out.
"""
from __future__ import annotations

from tinctura.colour.convert import srgb_to_oklab, to_polar
from tinctura.overrides import faded
from tinctura.rules.catalogue import LINK_CUE
from tinctura.sourcemap import theme_area

from . import messages as m

# OKLCh hue angles (degrees) below which each name applies, set between the hues of the sRGB
# primaries and secondaries as computed by colour.convert (red 29, orange #ffa500 71, yellow
# 110, green 142, cyan 195, blue 264, magenta 328)
_HUES = ((50, "red"), (90, "orange"), (125, "yellow"), (170, "green"), (220, "teal"),
         (295, "blue"), (345, "purple"), (360, "red"))
_GREY_CHROMA = 0.035
STATES = {"hover": "when hovered", "focus": "when focused",
          "focus-visible": "when focused from the keyboard",
          # a closed <details>, a tab not selected, a theme's menu (extract/disclosure.py)
          "shown": "once opened",
          # a table-of-contents entry a theme's scroll spy marks (extract/behaviours.py)
          "current": "when marked as the section in view"}
_BOXES = ("note", "abstract", "summary", "info", "tip", "hint", "success", "question", "warning",
          "caution", "attention", "failure", "danger", "error", "bug", "example", "quote")


def colour_name(rgb) -> str:
    """``grey``, ``light grey``, ``dark blue``, ``white``: a name a reader would use."""
    if rgb is None:
        return "unknown"
    lightness, chroma, hue = to_polar(srgb_to_oklab(tuple(rgb[:3])))
    if chroma < _GREY_CHROMA:
        if lightness > 0.97:
            return "white"
        if lightness < 0.22:
            return "black"
        if lightness > 0.8:
            return "light grey"
        return "dark grey" if lightness < 0.45 else "grey"
    hue = hue % 360
    name = next(n for start, n in _HUES if hue < start)
    if name in ("orange", "yellow") and lightness < 0.55:
        name = "brown"
    if lightness > 0.9 and chroma < 0.12:
        return f"pale {name}"
    if lightness > 0.82:
        return f"light {name}"
    if lightness < 0.42:
        return f"dark {name}"
    return name


def area(landmarks) -> str:
    """`` in warning boxes``, `` in tables``, `` in the navigation``: where on the page, from the
    element's ancestors (innermost first); empty when nothing says more than "on the page"."""
    for n, (tag, classes, _) in enumerate(landmarks):
        if "admonition" in classes or "details" == tag:
            kind = next((c for c in classes if c in _BOXES), "")
            return f" in {kind} boxes" if kind else " in note boxes"
        if tag in ("td", "th", "table"):
            table = next((c for t, c, _ in landmarks[n:] if t == "table"), ())
            # (Pygments lays line-numbered code out as a table)
            return " in code" if "highlighttable" in table else " in tables"
        if tag in ("pre", "code") or "highlight" in classes:
            return " in code"
        if tag == "article" or "md-content" in classes:
            return ""
    found = theme_area(landmarks)
    return f" in {found[1]}" if found else ""


def subject(sample, landmarks) -> str:
    """``text``, ``link text``, ``heading``, ``generated text``."""
    if sample.kind == "generated":
        return "text added by the stylesheet"
    if sample.kind == "placeholder":
        return "placeholder text"
    if landmarks:
        tag = landmarks[0][0]
        if tag == "a" or any(t == "a" for t, _, _ in landmarks[:3]):
            return "link text"
        if tag in ("h1", "h2", "h3", "h4", "h5", "h6"):
            return "heading text"
        if tag in ("button", "input", "select", "textarea"):
            return "control text"
    return "text"


def sentence(problem, location=None, many_schemes: bool = False, others=()) -> str:
    """The problem in one sentence: colours in words, where, how faint, the state, the
    schemes with their own figures. ``location``: the worst occurrence's; ``others``: those
    of other occurrences (examples), whose areas must be the worst's for the sentence to
    name one (a site-wide link colour is not "in the footer" because its worst is there)."""
    worst = problem.worst
    fg, bg = m.finding_colours(worst)
    marks = location.landmarks if location is not None else ()
    where = area(marks)
    if where and any(o is not None and area(o.landmarks) != where for o in others):
        where = ""
    text = (told_by_colour_alone if worst.rule == LINK_CUE.code else too_faint)(
        worst, fg, bg, marks, where)
    schemes = getattr(problem, "schemes", None) or {}
    if many_schemes and len(schemes) == 1:
        text += f", in the {next(iter(schemes))} scheme"
    elif len(schemes) > 1:
        parts = [f"{name} {m.measured(f.worst)}" for name, f in schemes.items()]
        text += f", in {len(schemes)} schemes ({', '.join(parts)})"
    return text + "."


def too_faint(worst, fg, bg, marks, where: str) -> str:
    """Colours in words, ``where`` (``area``), faded or not, the state, and the rule's own
    measure (a ratio, Lc, under a deficiency)."""
    thing = m.non_text(worst) or subject(worst.sample, marks)
    what = f"{colour_name(fg)} {thing} on {colour_name(bg)}{where}"
    state = STATES.get(worst.sample.state)
    if faded(worst):
        what += ", faded by an element's opacity,"
    text = what[0].upper() + what[1:] + " is too faint"
    if state:
        text += f" {state}"
    return text + f": {m.measure(worst)}"


def told_by_colour_alone(worst, fg, surround, marks, where: str) -> str:
    """A link told apart by colour alone: its colour is set against the text around it (the
    finding's ``bg``), and what it misses is a ratio to that text, a cue on hover or focus."""
    what = f"{colour_name(fg)} link text in {colour_name(surround)} text{where}"
    misses = []
    if worst.ratio < worst.required:
        misses.append(m.measure(worst).replace(":1, needs", ":1 against that text, needs", 1))
    missing = worst.args.get("missing") or ()
    if missing:
        misses.append("no cue but colour on " + " or ".join(missing))
    return (what[0].upper() + what[1:] + " is told apart by colour alone: "
            + "; ".join(misses))
