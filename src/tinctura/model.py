"""Plain records passed between extraction, rules and reports.

Everything here is data: no I/O, no formatting. Colours are ``(r, g, b)`` or ``(r, g, b, a)``
tuples of floats in 0..1 (sRGB-encoded); reports turn them into ``#rrggbb`` late.
"""
from __future__ import annotations

from dataclasses import dataclass, field
from typing import Optional

RGB = tuple  # (r, g, b) floats 0..1, sRGB encoded
RGBA = tuple  # (r, g, b, a)

DETERMINED = "determined"
UNDETERMINED = "undetermined"

REST = "rest"  # the resting state; other states: "hover", "focus", "focus-visible",
# "shown": in a closed <details> or a tab not selected, opened, and "current": a table-of-contents
# entry as a theme's scroll spy marks it (extract/disclosure.py)
# Reports list an element's states in this order: at rest first, as a reader first sees it
_STATE_ORDER = {REST: 0, "hover": 1, "focus": 2, "focus-visible": 3, "shown": 4, "current": 5}


def state_rank(state: str) -> tuple:
    """Where ``state`` stands in report order among one element's findings."""
    return (_STATE_ORDER.get(state, len(_STATE_ORDER)), state)


@dataclass(frozen=True, slots=True)
class Scheme:
    """A colour scheme as a theme applies it: media features plus attribute overrides.

    ``attributes`` holds ``(css selector, attribute, value)`` triples set on the matching elements
    before the cascade runs (mkdocs-material's palette switch, ``data-bs-theme``...).
    """

    name: str
    media: tuple = ()  # (("prefers-color-scheme", "dark"),)
    attributes: tuple = ()  # (("body", "data-md-color-scheme", "slate"),)
    source: str = "default"  # where it was discovered: "default", "media", "palette", "setting"...

    def media_value(self, feature: str, default: str | None = None) -> str | None:
        for key, value in self.media:
            if key == feature:
                return value
        return default


LIGHT = Scheme("light", (("prefers-color-scheme", "light"),))


@dataclass(frozen=True, slots=True)
class Declaration:
    """Where a value came from: one declaration in one stylesheet (or a style attribute)."""

    property: str
    value: str
    sheet: str  # site-relative path, "<style>#n" with page, "style attribute", "user-agent"
    line: int
    selector: str
    origin: str  # "author", "inline", "user-agent"
    important: bool = False
    column: int = 0  # minified stylesheets put everything on a few lines
    # hashed once: declarations key the per-page grouping of every sample
    _hash: int = field(default=0, init=False, repr=False, compare=False)

    def __post_init__(self):
        object.__setattr__(self, "_hash", hash((self.property, self.value, self.sheet, self.line,
                                                self.selector, self.origin, self.important,
                                                self.column)))

    def __hash__(self) -> int:
        return self._hash

    def __reduce__(self):  # rebuilt through __init__: string hashes differ between processes
        return (Declaration, (self.property, self.value, self.sheet, self.line, self.selector,
                              self.origin, self.important, self.column))

    def where(self) -> str:
        if not self.line:
            return self.sheet
        return f"{self.sheet}:{self.line}:{self.column}" if self.column else \
            f"{self.sheet}:{self.line}"


@dataclass(frozen=True, slots=True)
class Cause:
    """Why a computed colour is what it is.

    ``declaration`` is the winning declaration for the property (None: initial value);
    ``inherited_from`` the XPath of the ancestor it was inherited from (None: set on the element);
    ``chain`` the custom properties substituted on the way, outermost first.
    """

    declaration: Optional[Declaration] = None
    inherited_from: Optional[str] = None
    chain: tuple = ()  # tuple[Declaration] of the custom-property declarations used

    def key(self) -> tuple:
        """Identity of the cause for grouping: the declarations, not the elements."""
        d = self.declaration
        head = (d.sheet, d.line, d.column, d.property, d.value) if d else ("initial",)
        return head + tuple((c.sheet, c.line, c.column, c.property) for c in self.chain)


@dataclass(frozen=True, slots=True)
class Layer:
    """One layer composited into an element's effective background (top-most first)."""

    xpath: str
    kind: str  # "background-color", "opacity", "canvas", "gradient", "image", "shadow"
    colour: Optional[RGBA]
    cause: Optional[Cause] = None


@dataclass(slots=True)
class Sample:
    """One rendered text (element x scheme x state) with its colours and how they arose."""

    page: str
    scheme: str
    state: str
    xpath: str
    line: int
    text: str
    kind: str  # "text", "generated", "placeholder", "value", "svg-text", "marker"
    fg: Optional[RGB]  # foreground after compositing over bg (what the reader sees)
    bg: Optional[RGB]  # effective background (opaque)
    fg_raw: Optional[RGBA]  # computed colour before compositing
    font_size_px: float
    font_weight: int
    status: str = DETERMINED
    reason: str = ""
    bg_alternatives: tuple = ()  # other opaque backgrounds it may sit on (gradient stops...)
    exempt: str = ""  # non-empty: why WCAG does not require contrast (e.g. disabled control)
    fg_cause: Optional[Cause] = None
    bg_layers: tuple = ()  # tuple[Layer], top-most first
    bg_cause: Optional[Cause] = None  # the layer that made the background opaque
    surround: Optional[RGB] = None  # colour of the area around the element's background
    link: Optional["LinkCues"] = None  # a link in running text: what SC 1.4.1 needs (TC120)

    @property
    def fg_alpha_raw(self) -> float:
        return 1.0 if self.fg_raw is None else self.fg_raw[3]


@dataclass(frozen=True, slots=True)
class LinkCues:
    """A link inside running text, as the walk saw it (``extract/links.py``): the colour of the
    text around it and the cues other than colour that tell it apart, per state. Carried on the
    link's own sample so that TC120 judges one sample at a time."""

    surround: Optional[RGB]  # the surrounding text's colour as the reader sees it (over bg)
    rest: tuple = ()  # non-colour cues at rest: "underline", "border", "shadow", "weight"...
    hover: tuple = ()  # non-colour cues with :hover (those of rest included)
    focus: tuple = ()  # likewise with :focus / :focus-visible ("outline" for a focus ring)
    # why the surrounding text has its colour: a fix's verification tells by it whether the
    # fix coloured that text (never compared: links alike but for it are judged alike)
    surround_cause: Optional[Cause] = field(default=None, compare=False, hash=False)
    # the author rule that takes the underline away at rest, ``(selector, specificity)``, or
    # (): a fix's underline must beat it (never compared, as ``surround_cause``)
    undecorated: tuple = field(default=(), compare=False, hash=False)


@dataclass(slots=True)
class Fix:
    """A suggested colour and the ratio it would reach."""

    target: str  # "foreground" or "background"
    colour: RGB
    ratio: float


@dataclass(slots=True)
class Finding:
    """A rule's verdict on one sample: template and arguments, formatted late."""

    rule: str  # code, e.g. "TC100"
    slug: str
    severity: str  # "error", "warning", "info"
    sample: Sample
    ratio: float
    required: float
    level: str = "AA"
    fixes: list = field(default_factory=list)  # list[Fix]
    args: dict = field(default_factory=dict)  # extra template arguments
    # Set after the rules, by the maintainer's gate (tinctura.gate): a stable identity, the
    # reason when a reviewed suppression silences it, and "new"/"unchanged" against a baseline.
    fingerprint: str = ""
    suppressed: str = ""
    baseline: str = ""


@dataclass(slots=True)
class PageResult:
    """Everything one page produced: samples, skipped counts and diagnostics."""

    page: str
    samples: list = field(default_factory=list)
    skipped: dict = field(default_factory=dict)  # reason -> count
    diagnostics: list = field(default_factory=list)  # list[Diagnostic]
    schemes: list = field(default_factory=list)  # list[Scheme] evaluated on this page
    # When samples are dropped to save memory (large sites), their counts stay here:
    # {"samples": n, "exempt": n, "undetermined": {reason: n}, "schemes": [names]}
    stats: Optional[dict] = None
    # Repeated subtrees not turned into samples (findings-only checks): (fragment, stamp) pairs
    # the engine judges once per fragment; emptied before the result leaves the engine.
    replays: list = field(default_factory=list)
    # Palette uses (tinctura.palette) for the site-level rules, merged over the site.
    palette: dict = field(default_factory=dict)


@dataclass(frozen=True, slots=True)
class Diagnostic:
    """A problem with the input (not with colours): unreadable file, bad CSS, remote sheet."""

    path: str
    message: str
    line: int = 0
    severity: str = "warning"  # "error" when a file could not be read at all
    # said once per site: the reports keep the first (``engine.noted_once``), wherever and in
    # whichever process the pages were checked (not written in any report)
    once: bool = field(default=False, compare=False)
