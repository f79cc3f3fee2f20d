"""The rule catalogue: every rule's metadata and documentation, as data.

Check functions live in one module per family (``text.py``...); this module holds only what a
reader needs to know about a rule, so reports, the ``rules`` command and the JSON Schema share one
source. Each rule's documentation carries a failing and a passing example; the test suite runs
both (``tests/rules/test_examples.py``), so the documentation cannot drift from the code.
"""
from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Criterion:
    """A WCAG 2 success criterion, as numbered and named by W3C."""

    number: str  # "1.4.3"
    name: str  # "Contrast (Minimum)"
    level: str  # "A", "AA", "AAA"
    url: str  # W3C "Understanding" document


@dataclass(frozen=True)
class Example:
    """A tiny page that shows a rule's verdict, and the colours it renders.

    ``html`` is a complete document an engine can check; ``fg``, ``bg``, ``size_px`` and
    ``weight`` restate what it renders so the rule can be tested without the engine.
    """

    html: str
    fg: str
    bg: str
    size_px: float = 16.0
    weight: int = 400
    bg_alternatives: tuple = ()  # other backgrounds (gradient stops) as CSS colours
    note: str = ""
    # site-level rules: the palette uses the page shows, as (entry, colour, background, scheme)
    contexts: tuple = ()
    subject: str = ""  # the judged sample's text begins with this (pages with other texts)
    exempt: str = ""  # the sample's exemption (TC110 judges "icon" glyphs)
    surround: str = ""  # a link's surrounding text colour (TC120)
    cues: tuple = ()  # a link's non-colour cues at rest, with hover, with focus (TC120)
    hover: tuple = ()
    focus: tuple = ("outline",)


@dataclass(frozen=True)
class Docs:
    checks: str  # what the rule checks
    why: str  # why it matters
    bad: Example
    good: Example
    fix: str  # how to fix
    references: tuple = ()  # (title, url) pairs


@dataclass(frozen=True)
class Rule:
    code: str  # "TC100"
    slug: str  # "text-ratio"
    title: str
    family: str  # module in tinctura.rules holding the check
    severity: str  # default severity: "error", "warning", "info"
    criteria: tuple  # tuple[Criterion]; the one applied depends on the level checked
    message: str  # template, formatted late by the reports (see tinctura.report.messages)
    docs: Docs
    measure: str = ""  # what a finding measures, when it is not a contrast ratio (reports)
    # what it measures when its ratio meets the requirement and an APCA Lc level was lost
    # (TC400 judges both): then ``measure``, a ratio against its requirement, reads as a pass
    measure_lc: str = ""

    def criterion(self, level: str) -> Criterion:
        """The success criterion that applies when checking at ``level`` ("AA" or "AAA")."""
        for criterion in self.criteria:
            if criterion.level == level:
                return criterion
        return self.criteria[0]


SC_1_4_3 = Criterion(
    "1.4.3", "Contrast (Minimum)", "AA",
    "https://www.w3.org/WAI/WCAG22/Understanding/contrast-minimum.html",
)
SC_1_4_6 = Criterion(
    "1.4.6", "Contrast (Enhanced)", "AAA",
    "https://www.w3.org/WAI/WCAG22/Understanding/contrast-enhanced.html",
)
# SC 1.4.1 asks that colour is not the only means of conveying information: TC120 tests links
# told apart by colour alone; the appearance rules (TC300, TC310) report risks around colour
# codes, never a failure of it.
SC_1_4_1 = Criterion(
    "1.4.1", "Use of Color", "A",
    "https://www.w3.org/WAI/WCAG22/Understanding/use-of-color.html",
)

_PAGE = (
    '<!doctype html><html lang="en"><head><meta charset="utf-8"><title>{title}</title></head>'
    '<body style="margin:0;background-color:#ffffff;color:#1a1a1a">{body}</body></html>'
)

TEXT_RATIO = Rule(
    code="TC100",
    slug="text-ratio",
    title="Text contrast ratio",
    family="text",
    severity="error",
    criteria=(SC_1_4_3, SC_1_4_6),
    message=(
        "text contrast {ratio}:1 is below the {required}:1 required for {size} text "
        "(WCAG {level}, SC {sc}){against}"
    ),
    docs=Docs(
        checks=(
            "The WCAG 2 contrast ratio between each rendered text and the background it is "
            "painted on, after compositing translucent colours. At level AA (SC 1.4.3) text needs "
            "4.5:1 and large text 3:1; at level AAA (SC 1.4.6) 7:1 and 4.5:1. Large text is at "
            "least 24 px, or at least 18.67 px (14 pt) when bold (weight 700 or more). Ratios are "
            "compared unrounded: 4.499:1 does not meet 4.5:1. When a text sits on a gradient, it "
            "must meet the ratio against every stop; the worst one is reported. Text that WCAG "
            "does not cover (disabled controls, logotypes, pure decoration) is not checked, and "
            "text whose colours could not be determined is counted separately, not judged."
        ),
        why=(
            "Readers with low vision, older readers and anyone reading a screen in bright light "
            "need enough difference in luminance between text and its background to read it. "
            "The ratio is a lower bound agreed in WCAG 2; meeting it does not guarantee that a "
            "text is comfortable to read."
        ),
        bad=Example(
            html=_PAGE.format(
                title="Lending rules",
                body='<p style="color:#8a8a8a">Return unused seed packets before the first frost.</p>',
            ),
            fg="#8a8a8a",
            bg="#ffffff",
            note="Mid grey on white: 3.45:1, below 4.5:1 for 16 px text.",
        ),
        good=Example(
            html=_PAGE.format(
                title="Lending rules",
                body='<p style="color:#595959">Return unused seed packets before the first frost.</p>',
            ),
            fg="#595959",
            bg="#ffffff",
            note="Dark grey on white: 7.00:1, enough for AA and AAA.",
        ),
        fix=(
            "Darken the text or lighten the background (or the reverse on dark schemes) until the "
            "ratio is met. Change the colour where it is declared, usually a stylesheet rule or a "
            "theme variable, rather than on each element: the report names the declaration and "
            "suggests the nearest passing value that keeps the hue."
        ),
        references=(
            ("WCAG 2.2, Understanding SC 1.4.3 Contrast (Minimum)", SC_1_4_3.url),
            ("WCAG 2.2, Understanding SC 1.4.6 Contrast (Enhanced)", SC_1_4_6.url),
            ("WCAG 2.2, definition of contrast ratio",
             "https://www.w3.org/TR/WCAG22/#dfn-contrast-ratio"),
        ),
    ),
)


_SAFETY = (
    "This is a risk to review, not a failure of a WCAG 2 success criterion. Safety colours and "
    "signs (warnings, hazards, emergency stops) follow their own standards, ISO 3864 and ANSI "
    "Z535, and local rules, which tinctura does not check or replace."
)

_BOARD = (
    '<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Pump status</title>'
    '<style>.card{{background:#ffffff;padding:8px}}.panel{{background:#1e2530;padding:8px}}'
    '.chip{{color:#1a1a1a}}{css}</style></head>'
    '<body style="margin:0;background-color:#ffffff;color:#1a1a1a">{body}</body></html>'
)

_NOTICE_SHIFT = (
    "Appearance: CIECAM02 (CIE 159:2004) with a D65 display white of 80 cd/m2, an adapting "
    "luminance of 20 % of it, the luminance factor of the colour's immediate background as Y_b "
    "and an Average surround; differences in CAM02-UCS (Luo, Cui and Li 2006). "
)

SURROUND_SHIFT = Rule(
    code="TC300",
    slug="surround-shift",
    title="Palette colour shifts with its surround",
    family="appearance",
    severity="warning",
    criteria=(SC_1_4_1,),
    message=(
        "palette colour {entry} looks {terms} on {to_bg} than on {from_bg}: "
        "{delta:.1f} CAM02-UCS units apart, over {threshold:g} (a risk to review, not a WCAG 2 "
        "failure)"
    ),
    measure="{delta:.1f} CAM02-UCS units between its contexts, over {threshold:g}",
    docs=Docs(
        checks=(
            "Each palette colour (a colour that carries a meaning: a status, a callout type, a "
            "signal word) in every context where the site shows it: its immediate background, "
            "in every colour scheme. Palette colours are found without configuration from "
            "a base class with a modifier class (.chip.caution, .admonition.warning), from "
            "families of rules that differ only in their last class (.status .ok, .status "
            ".fault) and of custom properties (--tw-state-ok, --tw-state-fault) with at least "
            "two members on the site, when the colour is chromatic and opaque; "
            "the palette option (or --palette NAME=COLOUR) declares them by name. Each context's "
            "appearance is modelled with CIECAM02 (" + _NOTICE_SHIFT.strip() + "), and the "
            "rule reports a colour whose two most different contexts lie more than 10 "
            "CAM02-UCS units apart. The threshold is this project's default, not a published "
            "limit: one unit is roughly a just-noticeable difference between large patches "
            "side by side, while chips, icons and words are small and seen on different parts "
            "of a page or on different pages, so a shift must be several times larger before a "
            "reader may no longer take it for the same code; 10 units is about the step between "
            "neighbouring shades such as amber and orange. The shift is explained in opponent "
            "terms: lighter or darker, redder or greener, yellower or bluer, more or less "
            "colourful. " + _SAFETY
        ),
        why=(
            "A colour is never seen alone. The same caution amber looks lighter and more "
            "colourful on a dark panel than on a white card (simultaneous contrast), so readers "
            "who learnt the code on one page may not recognise it on the next, or may take it "
            "for another code. Manuals rely on such codes for states and hazards."
        ),
        bad=Example(
            html=_BOARD.format(
                css=".chip.caution{background:#e0a000}.chip.ok{background:#7cc47f}",
                body='<div class="card"><span class="chip caution">Caution: low battery</span>'
                     '</div><div class="panel"><span class="chip caution">Caution: low battery'
                     '</span></div><div class="card"><span class="chip ok">Running</span></div>'),
            fg="#1a1a1a",
            bg="#e0a000",
            contexts=(("caution", "#e0a000", "#ffffff", "light"),
                      ("caution", "#e0a000", "#1e2530", "light")),
            note="The amber chip on a white card and on a dark panel: 13.9 units apart.",
        ),
        good=Example(
            html=_BOARD.format(
                css=".chip.caution{background:#e0a000}.chip.ok{background:#7cc47f}",
                body='<div class="card"><span class="chip caution">Caution: low battery</span>'
                     '</div><div class="card"><span class="chip ok">Running</span></div>'),
            fg="#1a1a1a",
            bg="#e0a000",
            contexts=(("caution", "#e0a000", "#ffffff", "light"),
                      ("caution", "#e0a000", "#f4f4f0", "light")),
            note="The amber chip on white and on an off-white card: under one unit apart.",
        ),
        fix=(
            "Show the code on one kind of surround (cards of the same lightness), or give it a "
            "companion value for dark surrounds that looks like the light one: `tinctura pair "
            "FG BG --on OTHER_BG` shows how a colour's lightness, colourfulness and hue move "
            "between two backgrounds. Pair the colour with a word or an icon, so that the "
            "meaning never rests on the colour alone."
        ),
        references=(
            ("CIE 159:2004, A colour appearance model for colour management systems: CIECAM02",
             "https://cie.co.at/publications/colour-appearance-model-colour-management-systems-ciecam02"),
            ("M. R. Luo, G. Cui, C. Li, Uniform colour spaces based on CIECAM02 colour appearance "
             "model, Color Research & Application 31(4), 2006", "https://doi.org/10.1002/col.20227"),
            ("WCAG 2.2, Understanding SC 1.4.1 Use of Color",
             "https://www.w3.org/WAI/WCAG22/Understanding/use-of-color.html"),
        ),
    ),
)

LOOKALIKE = Rule(
    code="TC310",
    slug="lookalike",
    title="Palette colours that look alike",
    family="appearance",
    severity="warning",
    criteria=(SC_1_4_1,),
    message=(
        "palette colours {entry} and {other} look alike under {conditions}: {delta:.1f} "
        "CAM02-UCS units apart under {condition}, under {threshold:g} (a risk to review, not a "
        "WCAG 2 failure)"
    ),
    measure="{delta:.1f} CAM02-UCS units apart under {condition}, under {threshold:g}",
    docs=Docs(
        checks=(
            "Pairs of palette colours of one family (the modifiers of one base class, the "
            "variants of one rule, the members of one family of custom properties, or the "
            "declared palette), in the same role (two text colours or two fills), that are "
            "different colours but look alike where the site shows them: in one colour scheme, "
            "the two closest contexts (colour on its immediate background) are compared in CAM02-UCS "
            "after CIECAM02, for normal vision and under simulated protanopia, deuteranopia "
            "and tritanopia (Machado, Oliveira and Fernandes 2009, severity 1). The rule "
            "reports a pair closer than 15 units under any of them and names the conditions. "
            "The threshold is this project's default: codes are small and rarely side by side, "
            "so a few just-noticeable differences are not enough to tell them apart, and "
            "palettes of categorical colours are commonly built with differences of about 10 "
            "to 20 units between categories (common practice, in CIEDE2000 units, which are "
            "of about the same size); 15 is the middle of that range. Two names for the very "
            "same colour (under 0.5 units for normal vision) are an alias, not a collapse. "
            + _SAFETY
        ),
        why=(
            "About 8 % of men and 0.5 % of women of Northern European descent have a red-green "
            "colour-vision deficiency (common figure). To them a 'fault' red and an 'ok' green "
            "of similar lightness are one colour: the code collapses and the manual misinforms."
        ),
        bad=Example(
            html=_BOARD.format(
                css=".chip{color:#ffffff}.chip.ok{background:#2e7d32}"
                    ".chip.fault{background:#c62828}",
                body='<div class="card"><span class="chip ok">Pump running</span> '
                     '<span class="chip fault">Pump stopped</span></div>'),
            fg="#ffffff",
            bg="#2e7d32",
            contexts=(("ok", "#2e7d32", "#ffffff", "light"),
                      ("fault", "#c62828", "#ffffff", "light")),
            note="Green and red of similar lightness: 7.6 units apart under deuteranopia.",
        ),
        good=Example(
            html=_BOARD.format(
                css=".chip{color:#ffffff}.chip.ok{background:#1565c0}"
                    ".chip.fault{background:#c62828}",
                body='<div class="card"><span class="chip ok">Pump running</span> '
                     '<span class="chip fault">Pump stopped</span></div>'),
            fg="#ffffff",
            bg="#1565c0",
            contexts=(("ok", "#1565c0", "#ffffff", "light"),
                      ("fault", "#c62828", "#ffffff", "light")),
            note="Blue and red: over 40 units apart for every condition.",
        ),
        fix=(
            "Make the two colours differ in lightness, not only in hue (a dark red against a "
            "light green survives every deficiency), or use a blue-orange pair, and always add "
            "a second cue: a word, an icon or a shape. `tinctura pair FG BG --vs OTHER_FG` "
            "shows how far apart two colours stay under each deficiency."
        ),
        references=(
            ("G. M. Machado, M. M. Oliveira, L. A. F. Fernandes, A physiologically-based model "
             "for simulation of color vision deficiency, IEEE TVCG 15(6), 2009",
             "https://doi.org/10.1109/TVCG.2009.113"),
            ("M. R. Luo, G. Cui, C. Li, Uniform colour spaces based on CIECAM02 colour appearance "
             "model, Color Research & Application 31(4), 2006", "https://doi.org/10.1002/col.20227"),
            ("WCAG 2.2, Understanding SC 1.4.1 Use of Color",
             "https://www.w3.org/WAI/WCAG22/Understanding/use-of-color.html"),
        ),
    ),
)

SC_1_4_11 = Criterion(
    "1.4.11", "Non-text Contrast", "AA",
    "https://www.w3.org/WAI/WCAG22/Understanding/non-text-contrast.html",
)

UI_RATIO = Rule(
    code="TC110",
    slug="ui-ratio",
    title="Non-text contrast of icons and controls",
    family="nontext",
    severity="error",
    criteria=(SC_1_4_11,),
    message=(
        "{what} contrast {ratio}:1 is below the {required}:1 required for graphical objects and "
        "user-interface components (WCAG SC 1.4.11){against}"
    ),
    docs=Docs(
        checks=(
            "The WCAG 2 contrast ratio of graphical objects and user-interface indicators "
            "against the colours next to them, 3:1 (SC 1.4.11). Judged: (1) icon glyphs: "
            "characters of the Unicode Private Use Areas (icon fonts, as text or ::before "
            "content) inside a link or control or with an accessible name, and a single letter "
            "or symbol that is all the visible text of a button or link with an accessible name; "
            "they leave TC100 (not text in a human language) and are judged here; (2) the "
            "boundary of text fields, text areas and selects whose border or fill the author "
            "set: whichever of border and fill differs from the colour around the control must "
            "reach 3:1 against it (buttons are identified by their text, judged by TC100; "
            "controls left to the user agent's look are exempt); (3) an outline the author "
            "draws on :focus or :focus-visible, against the colour around the element; (4) "
            "inline SVG icons inside a link or control or with an accessible name, drawn with "
            "one fill. Not judged: decorative icons (hidden from assistive technology beside "
            "words, or neither in a control nor named) and disabled controls. Undetermined, "
            "because geometry decides and tinctura does not lay pages out: an inset focus "
            "outline (it lies on the element's own fill), SVG icons drawn with strokes or "
            "several fills (an icon's <use> of a symbol counts what the symbol draws), and "
            "those drawn from a symbol in another file. Not checked: a focus indicator made "
            "of a colour change alone (its contrast with the unfocused state), checkbox and "
            "radio marks, chart graphics."
        ),
        why=(
            "An icon that is the only visible label of a control, such as a cross that closes a "
            "panel, must be seen to be used. Readers with low vision need the same difference "
            "in luminance for it as for large text."
        ),
        bad=Example(
            html=_PAGE.format(
                title="Tide alarms",
                body='<button aria-label="Close the alarm list" style="color:#b8b8b8;'
                     'background-color:#ffffff;border:0">\u00d7</button>',
            ),
            fg="#b8b8b8",
            bg="#ffffff",
            exempt="icon",
            subject="\u00d7",
            note="Light grey cross on white: 1.98:1, below 3:1 for a graphical object.",
        ),
        good=Example(
            html=_PAGE.format(
                title="Tide alarms",
                body='<button aria-label="Close the alarm list" style="color:#767676;'
                     'background-color:#ffffff;border:0">\u00d7</button>',
            ),
            fg="#767676",
            bg="#ffffff",
            exempt="icon",
            subject="\u00d7",
            note="Mid grey cross on white: 4.54:1, above 3:1.",
        ),
        fix=(
            "Darken the icon (or lighten what is behind it) until it reaches 3:1. Where the icon "
            "is not needed to use the control, hide it from assistive technology "
            "(aria-hidden=\"true\") and give the control a visible text label instead."
        ),
        references=(
            ("WCAG 2.2, Understanding SC 1.4.11 Non-text Contrast", SC_1_4_11.url),
            ("WCAG 2.2, definition of text", "https://www.w3.org/TR/WCAG22/#dfn-text"),
        ),
    ),
)

_LINK_PAGE = (
    '<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Tide log</title>'
    '<style>a{{color:{link};text-decoration:none}}{extra}</style></head>'
    '<body style="margin:0;background-color:#ffffff;color:#1a1a1a"><p>Copy the readings '
    'to the <a href="log.html">Subject: harbour log</a> before the next high water.</p>'
    '</body></html>'
)

LINK_CUE = Rule(
    code="TC120",
    slug="link-cue",
    title="Links told apart by colour alone",
    family="links",
    severity="error",
    criteria=(SC_1_4_1,),
    message=(
        "a link in running text is told apart by colour alone: {problems} (WCAG SC 1.4.1, "
        "technique G183)"
    ),
    docs=Docs(
        checks=(
            "Links inside a block of running text whose only cue at rest is colour (no "
            "underline or other text decoration, border, box shadow, background of their own, "
            "or weight change) must differ from the surrounding text by at least 3:1 (WCAG 2 "
            "contrast ratio between the two text colours) and must get a cue other than colour "
            "on hover and on keyboard focus (W3C technique G183; failure F73 describes links "
            "that do neither). Keyboard focus counts the user agent's focus ring unless the "
            "author removes the outline. Links alone in their block (a navigation list item, a "
            "table cell or a paragraph holding only the link) are not judged: their place tells "
            "them apart. Each colour scheme is judged on its own. The surrounding text is the "
            "text colour of the link's parent element; what :hover or :focus changes on the "
            "link's ancestors is not followed."
        ),
        why=(
            "Readers who do not see the difference between the link colour and the text colour, "
            "because of a colour-vision deficiency, low vision or a bright room, cannot find "
            "the links in a paragraph. Underlines are the common cue; colour alone is enough "
            "only when the difference is large and another cue appears on pointing or focus."
        ),
        bad=Example(
            html=_LINK_PAGE.format(link="#2f5fa8", extra=""),
            fg="#2f5fa8",
            bg="#ffffff",
            subject="Subject: harbour log",
            surround="#1a1a1a",
            cues=(),
            hover=(),
            focus=("outline",),
            note="Blue #2f5fa8: 6.31:1 on white, but only 2.75:1 against the near-black "
                 "#1a1a1a text around it, and no underline on hover.",
        ),
        good=Example(
            html=_LINK_PAGE.format(link="#2f5fa8",
                                   extra="p a{text-decoration:underline}"),
            fg="#2f5fa8",
            bg="#ffffff",
            subject="Subject: harbour log",
            surround="#1a1a1a",
            cues=("underline",),
            hover=("underline",),
            focus=("outline", "underline"),
            note="The same blue, underlined: 6.31:1 on white, and the underline tells it apart.",
        ),
        fix=(
            "Underline links in running text (the simplest cue, and what readers expect), or "
            "give them another cue that is not colour. If the design keeps colour alone, make "
            "the link colour differ from the text colour by 3:1 and add an underline on :hover "
            "and :focus."
        ),
        references=(
            ("WCAG 2.2, Understanding SC 1.4.1 Use of Color", SC_1_4_1.url),
            ("W3C technique G183: using a contrast ratio of 3:1 with surrounding text and "
             "providing additional visual cues on hover and focus",
             "https://www.w3.org/WAI/WCAG22/Techniques/general/G183"),
            ("W3C failure F73: creating links that are not visually evident without color vision",
             "https://www.w3.org/WAI/WCAG22/Techniques/failures/F73"),
        ),
    ),
)

_PANEL = (
    '<!doctype html><html lang="en"><head><meta charset="utf-8"><title>{title}</title></head>'
    '<body style="margin:0;background-color:{bg};color:{fg}">{body}</body></html>'
)
_APCA_REFERENCES = (
    ("W3C, WCAG 3 Working Drafts, where APCA 0.0.98G-4g was published for review (the "
     "readability levels are quoted from memory; APCA is not a WCAG 2 requirement)",
     "https://www.w3.org/TR/wcag-3.0/"),
)
_NOT_WCAG2 = (
    " This is advice beyond WCAG 2: the WCAG 2 success criteria ask only for the contrast "
    "ratio (TC100), and text that fails it is left to TC100. Automated checks cover only part "
    "of WCAG; conformance needs a review by qualified people."
)

TEXT_LC = Rule(
    code="TC200",
    slug="text-lc",
    title="Text lightness contrast (APCA Lc)",
    family="lightness",
    severity="warning",
    criteria=(SC_1_4_3, SC_1_4_6),
    message=(
        "lightness contrast Lc {lc} ({polarity}) is below the Lc {lc_required} advised for "
        "{tier}; the WCAG 2 ratio {ratio}:1 passes{against}"
    ),
    measure="Lc {lc}, needs Lc {lc_required} ({polarity})",
    docs=Docs(
        checks=(
            "The APCA lightness contrast Lc (version 0.0.98G-4g) of each text that meets the "
            "WCAG 2 ratio, against the level its size and weight call for. Default levels, from "
            "the published APCA readability guidance (quoted from memory): body text Lc 75; "
            "other content text Lc 60; large headlines Lc 45; placeholder text Lc 30. Our "
            "mapping of size and weight to those levels (a judgement; weight 700 or more is "
            "bold): 36 px, or 24 px bold, and up is a headline; 24 px, or 16 px bold, and up "
            "other content text; anything smaller body text. Lc is signed: positive for dark "
            "text on a light background, negative for light on dark; the level applies to its "
            "magnitude, and the report names the polarity. The levels are the `lc_levels` "
            "setting (body, content, headline, any)." + _NOT_WCAG2
        ),
        why=(
            "The WCAG 2 ratio treats dark-on-light and light-on-dark alike and overrates "
            "pairs of dark colours, so thin light text on a dark panel can pass 4.5:1 and still "
            "read poorly. APCA models how lightness contrast is perceived, including polarity "
            "and the reader's adaptation to the brighter colour."
        ),
        bad=Example(
            html=_PANEL.format(
                title="Night log", bg="#1a1a1a", fg="#f0f0f0",
                body='<p style="color:#b0b0b0;font-weight:300">Lamp test every evening.</p>',
            ),
            fg="#b0b0b0", bg="#1a1a1a", weight=300,
            note="Light grey on near-black: 8.02:1 passes WCAG 2, but Lc -58.21 is below the "
                 "Lc 75 advised for body text.",
        ),
        good=Example(
            html=_PANEL.format(
                title="Night log", bg="#1a1a1a", fg="#f0f0f0",
                body='<p style="color:#e0e0e0;font-weight:300">Lamp test every evening.</p>',
            ),
            fg="#e0e0e0", bg="#1a1a1a", weight=300,
            note="Near-white on near-black: 13.18:1 and Lc -86.55.",
        ),
        fix=(
            "Raise the lightness difference: lighter text on dark backgrounds, darker text on "
            "light ones, or a larger or bolder font (which lowers the level required). The "
            "suggested colour keeps the hue and meets both this level and the WCAG 2 ratio."
        ),
        references=_APCA_REFERENCES + (
            ("WCAG 2.2, Understanding SC 1.4.3 Contrast (Minimum)", SC_1_4_3.url),
        ),
    ),
)

CVD_RATIO = Rule(
    code="TC400",
    slug="cvd-ratio",
    title="Text contrast under colour-vision deficiency",
    family="deficiency",
    severity="warning",
    criteria=(SC_1_4_3, SC_1_4_6),
    message=(
        "under {deficiency} the text reads as {sim_fg} on {sim_bg}: {ratio}:1 and Lc {lc}, "
        "against {normal_ratio}:1 and Lc {normal_lc} for normal vision (needs {required}:1, "
        "and Lc {lc_required} where normal vision reaches it); fails under "
        "{deficiencies}{against}"
    ),
    measure="{ratio}:1 under {deficiency}, needs {required}:1",
    measure_lc="Lc {lc} under {deficiency}, needs Lc {lc_required}",
    docs=Docs(
        checks=(
            "Each text that meets the WCAG 2 ratio for normal vision is seen as a reader with "
            "protanopia, deuteranopia or tritanopia would see it (Machado, Oliveira and "
            "Fernandes 2009, in linear-light sRGB; severity 1.0 by default, the `cvd_severity` "
            "setting, 0 to 1). It is reported when, under a deficiency, it falls below the "
            "WCAG 2 ratio, or below the APCA Lc level of its size (as TC200) that it reached "
            "for normal vision. The finding names every deficiency that fails and shows the "
            "simulated colours. The choice of measures and of severity 1.0 (the strongest "
            "form) is our judgement. Greys look alike to every reader in this model and are "
            "not simulated." + _NOT_WCAG2
        ),
        why=(
            "About 8 % of men and 0.5 % of women of Northern European descent have a red-green "
            "deficiency (common practice); tritan defects are rare. For a protan reader, red "
            "looks much darker: a red warning on black that passes for most readers can sink "
            "towards the background."
        ),
        bad=Example(
            html=_PANEL.format(
                title="Alarm panel", bg="#000000", fg="#f0f0f0",
                body='<p style="color:#ff3030">Flood alarm active</p>',
            ),
            fg="#ff3030", bg="#000000",
            note="Red on black: 5.71:1 for normal vision, 3.80:1 under protanopia.",
        ),
        good=Example(
            html=_PANEL.format(
                title="Alarm panel", bg="#000000", fg="#f0f0f0",
                body='<p style="color:#ffd23c">Flood alarm active</p>',
            ),
            fg="#ffd23c", bg="#000000",
            note="Amber on black: 14.53:1, and at least 13.46:1 under each deficiency.",
        ),
        fix=(
            "Prefer a lightness difference to a hue difference: make the text lighter (or the "
            "background darker) until the contrast holds for every reader, or choose a hue that "
            "keeps its lightness under the deficiency (amber or yellow rather than red on dark "
            "backgrounds). Never signal by colour alone. Safety colours and signs follow their "
            "own standards (ISO 3864, ANSI Z535) and local rules, which this rule does not check."
        ),
        references=(
            ("G. M. Machado, M. M. Oliveira, L. A. F. Fernandes, A physiologically-based model "
             "for simulation of color vision deficiency, IEEE TVCG 15(6), 2009",
             "https://doi.org/10.1109/TVCG.2009.113"),
            ("colour-science, colour.blindness (the matrices)",
             "https://colour.readthedocs.io/en/latest/colour.blindness.html"),
            ("WCAG 2.2, Understanding SC 1.4.3 Contrast (Minimum)", SC_1_4_3.url),
        ),
    ),
)

GLARE_RATIO = Rule(
    code="TC500",
    slug="glare-ratio",
    title="Text contrast in bright ambient light",
    family="viewing",
    severity="info",
    criteria=(SC_1_4_3, SC_1_4_6),
    message=(
        "in {profile} viewing ({about}) light reflected by the screen lowers the contrast to "
        "{ratio}:1 (text {fg_cd} cd/m2 on {bg_cd} cd/m2, Lc {lc}), below {required}:1; "
        "{office_ratio}:1 in the office{against}"
    ),
    measure="{ratio}:1 in {profile}, needs {required}:1",
    docs=Docs(
        checks=(
            "Each text that meets the WCAG 2 ratio in the office is judged under the selected "
            "viewing profiles (the `profiles` setting; default daylight). Light of illuminance "
            "E on a screen of reflectance R adds F = R E / (pi Lw) of the white luminance Lw to "
            "text and background alike; the effective ratio is (L1 + F) / (L2 + F). Office is "
            "the sRGB reference viewing conditions (IEC 61966-2-1: 64 lux, 80 cd/m2, flare 1 %); "
            "dim is 50 lux on a matte screen; daylight is a tablet in shade (5,000 lux, "
            "500 cd/m2, R 2 %). Our judgement: WCAG's own 0.05 flare term stands for office "
            "viewing, so a profile adds what it reflects beyond the office (F = 0.05 + "
            "F_profile - F_office) and office gives exactly the WCAG 2 ratio. The profile "
            "values are typical, not measured on your readers' devices." + _NOT_WCAG2
        ),
        why=(
            "Manuals are read on site: a tablet outdoors reflects daylight, which lifts dark "
            "colours far more than light ones, so pale text and dark backgrounds wash out first."
        ),
        bad=Example(
            html=_PAGE.format(
                title="Survey notes",
                body='<p style="color:#6b6b6b">Photograph the staff gauge at each visit.</p>',
            ),
            fg="#6b6b6b", bg="#ffffff",
            note="Grey on white: 5.32:1 in the office, 4.40:1 in daylight.",
        ),
        good=Example(
            html=_PAGE.format(
                title="Survey notes",
                body='<p style="color:#4d4d4d">Photograph the staff gauge at each visit.</p>',
            ),
            fg="#4d4d4d", bg="#ffffff",
            note="Dark grey on white: 8.45:1 in the office, 6.20:1 in daylight.",
        ),
        fix=(
            "Keep more than the minimum contrast for content read outdoors: darker text on "
            "light backgrounds (or lighter backgrounds under light text). The suggested colour "
            "keeps the hue and meets the ratio in every selected profile and in the office."
        ),
        references=(
            ("IEC 61966-2-1:1999, sRGB, reference viewing environment",
             "https://webstore.iec.ch/publication/6169"),
            ("WCAG 2.2, definition of contrast ratio (the flare term)",
             "https://www.w3.org/TR/WCAG22/#dfn-contrast-ratio"),
            ("WCAG 2.2, Understanding SC 1.4.3 Contrast (Minimum)", SC_1_4_3.url),
        ),
    ),
)

RULES = (TEXT_RATIO, UI_RATIO, LINK_CUE, TEXT_LC, SURROUND_SHIFT, LOOKALIKE, CVD_RATIO, GLARE_RATIO)
