"""Stylesheets to flat style rules: the part of CSS that can change colour, visibility or font.

A stylesheet is parsed once per site. Each style rule becomes one ``StyleRule`` per selector of its
comma list (one bad selector must not drop its neighbours), carrying the conditions it sits under
(``@media`` queries, ``@layer``, origin, order). Declarations of properties that cannot affect
colour, visibility or font size are dropped here, and so are rules left with none.
"""
from __future__ import annotations

import re
from dataclasses import dataclass, field

import cssselect2
import tinycss2

from ..model import Declaration
from ..tokens import significant, split_commas
from . import supports as supports_mod

# Properties the engine reads. Custom properties (--*) are always kept: they may feed any of these.
RELEVANT = frozenset(
    """color background background-color background-image background-clip -webkit-background-clip
    opacity display visibility content font font-size font-weight color-scheme
    -webkit-text-fill-color text-shadow filter mix-blend-mode backdrop-filter fill
    position clip clip-path width height overflow all list-style list-style-type
    box-shadow""".split()
)

# Dynamic pseudo-classes are rewritten into attributes that the engine sets on an element to
# evaluate a state; in the resting state no element has them, so `:hover` never matches and
# `:not(:hover)` does, as in a browser with no pointer over the page.
STATE_ATTR = "data-tinctura-state-"
DYNAMIC = ("hover", "focus-visible", "focus-within", "focus", "active", "visited", "target",
           "target-within", "user-invalid", "user-valid", "autofill", "-webkit-autofill")
_DYNAMIC_RE = re.compile(r":(%s)(?![\w-])" % "|".join(re.escape(d) for d in DYNAMIC), re.I)
# cssselect2 rejects some pseudo-classes that have a fixed answer for a static page
_STATIC_PSEUDO = {":defined": "", ":placeholder-shown": "", ":indeterminate": ":not(*)",
                  ":open": "[open]", ":modal": ":not(*)", ":popover-open": ":not(*)"}
_STATIC_RE = re.compile(r"(%s)(?![\w-])" % "|".join(re.escape(k) for k in _STATIC_PSEUDO), re.I)


@dataclass
class Decl:
    name: str
    tokens: list
    important: bool
    line: int
    text: str  # serialized value, stripped
    column: int = 0

    def provenance(self, sheet: str, selector: str, origin: str) -> Declaration:
        return Declaration(self.name, self.text, sheet, self.line, selector, origin,
                           self.important, self.column)


@dataclass
class StyleRule:
    selector_text: str
    compiled: object  # cssselect2 CompiledSelector
    specificity: tuple
    pseudo: str | None  # pseudo-element: "before", "after", "placeholder", "marker"...
    decls: list
    media: tuple  # media query lists (strings) that must all hold
    layer: tuple  # layer path, () when unlayered
    origin: str  # "author" or "user-agent"
    sheet: str
    order: int = 0
    attr_names: tuple = ()  # attribute names the rightmost compound requires (for indexing)
    dynamic: bool = False  # uses a rewritten dynamic pseudo-class


@dataclass
class ParsedSheet:
    """One stylesheet file or <style> block, flattened; ``imports`` are resolved by the loader."""

    name: str
    rules: list = field(default_factory=list)  # StyleRule, or ("import", url, media, layer)
    layer_names: list = field(default_factory=list)  # layer declaration order seen in this sheet
    errors: list = field(default_factory=list)  # (line, message)
    skipped_selectors: int = 0
    uses_has: bool = False
    uses_color_scheme_media: bool = False
    uses_light_dark: bool = False
    has_color_scheme_property: bool = False


def parse_declarations(content, *, relevant_only: bool = True) -> list:
    out = []
    for item in tinycss2.parse_blocks_contents(content, skip_whitespace=True, skip_comments=True):
        if item.type != "declaration":
            continue
        name = item.lower_name if not item.name.startswith("--") else item.name
        if relevant_only and not name.startswith("--") and name not in RELEVANT:
            continue
        value = [t for t in item.value if t.type != "comment"]
        text = tinycss2.serialize(value).strip()
        out.append(Decl(name, value, item.important, item.source_line, text, item.source_column))
    return out


def parse_stylesheet(css: str, name: str, origin: str = "author") -> ParsedSheet:
    sheet = ParsedSheet(name)
    rules = tinycss2.parse_stylesheet(css, skip_whitespace=True, skip_comments=True)
    _walk(rules, sheet, origin, (), (), True)
    low = css.lower()
    sheet.uses_color_scheme_media = "prefers-color-scheme" in low
    sheet.uses_light_dark = "light-dark(" in low
    sheet.has_color_scheme_property = "color-scheme" in low.replace("prefers-color-scheme", "")
    return sheet


def _walk(rules, sheet: ParsedSheet, origin, media, layer, top_level):
    for rule in rules:
        if rule.type == "error":
            sheet.errors.append((rule.source_line, rule.message))
        elif rule.type == "qualified-rule":
            _style_rule(rule, sheet, origin, media, layer)
        elif rule.type == "at-rule":
            _at_rule(rule, sheet, origin, media, layer, top_level)


def _at_rule(rule, sheet, origin, media, layer, top_level):
    kw = rule.lower_at_keyword
    prelude = tinycss2.serialize(rule.prelude).strip()
    if kw == "media" and rule.content is not None:
        inner = tinycss2.parse_blocks_contents(rule.content, skip_whitespace=True, skip_comments=True)
        _walk(inner, sheet, origin, media + (prelude,), layer, False)
    elif kw == "supports" and rule.content is not None:
        if supports_mod.evaluate(rule.prelude):
            inner = tinycss2.parse_blocks_contents(rule.content, skip_whitespace=True,
                                                   skip_comments=True)
            _walk(inner, sheet, origin, media, layer, False)
    elif kw == "layer":
        names = [n.strip() for n in prelude.split(",") if n.strip()]
        if rule.content is None:  # statement: declares order
            for n in names:
                sheet.layer_names.append(layer + tuple(n.split(".")))
        else:
            path = layer + (tuple(names[0].split(".")) if names else (f"#anon{id(rule)}",))
            sheet.layer_names.append(path)
            inner = tinycss2.parse_blocks_contents(rule.content, skip_whitespace=True,
                                                   skip_comments=True)
            _walk(inner, sheet, origin, media, path, False)
    elif kw == "import" and top_level:
        _import(rule, sheet, media, layer)
    elif kw in ("container", "scope", "starting-style", "document", "-moz-document"):
        # Depend on layout or on states a static page does not have: not applied, counted.
        sheet.errors.append((rule.source_line, f"@{kw} rules are not evaluated"))
    # @font-face, @keyframes, @page, @property, @namespace, @charset: nothing for colour


def _import(rule, sheet, media, layer):
    tokens = [t for t in rule.prelude if t.type not in ("whitespace", "comment")]
    if not tokens:
        return
    first = tokens[0]
    if first.type in ("string", "url"):
        url = first.value
    elif first.type == "function" and first.lower_name == "url" and first.arguments:
        url = first.arguments[0].value
    else:
        sheet.errors.append((rule.source_line, "@import without a URL"))
        return
    rest = tokens[1:]
    imp_layer = layer
    if rest and rest[0].type == "ident" and rest[0].lower_value == "layer":
        imp_layer = layer + (f"#anon-import{rule.source_line}",)
        rest = rest[1:]
    elif rest and rest[0].type == "function" and rest[0].lower_name == "layer":
        imp_layer = layer + tuple(tinycss2.serialize(rest[0].arguments).strip().split("."))
        rest = rest[1:]
    if rest and rest[0].type == "function" and rest[0].lower_name == "supports":
        if not supports_mod.evaluate(rest[0].arguments):
            return
        rest = rest[1:]
    query = tinycss2.serialize(rest).strip()
    if imp_layer != layer:
        sheet.layer_names.append(imp_layer)
    sheet.rules.append(("import", url, media + ((query,) if query else ()), imp_layer,
                        rule.source_line))


def split_selector_list(prelude) -> list:
    """Split a selector list at top-level commas, keeping each part's tokens."""
    return [p for p in split_commas(prelude) if significant(p)]


def compile_one(text: str):
    """Compile one selector (no commas at top level); None when cssselect2 cannot."""
    rewritten = _DYNAMIC_RE.sub(lambda m: f"[{STATE_ATTR}{m.group(1).lower().lstrip('-')}]", text)
    rewritten = _STATIC_RE.sub(lambda m: _STATIC_PSEUDO[m.group(1).lower()], rewritten)
    try:
        tokens = tinycss2.parse_component_value_list(rewritten)
        compiled = cssselect2.compile_selector_list(tokens)
    except Exception:  # cssselect2 raises SelectorError, and sometimes SyntaxError
        return None, rewritten != text
    if len(compiled) != 1:
        return None, rewritten != text
    return compiled[0], rewritten != text


def _style_rule(rule, sheet, origin, media, layer):
    decls = parse_declarations(rule.content)
    if not decls:
        return
    for part in split_selector_list(rule.prelude):
        text = tinycss2.serialize(part).strip()
        compiled, dynamic = compile_one(text)
        if compiled is None:
            sheet.skipped_selectors += 1
            continue
        if ":has(" in text:
            sheet.uses_has = True
        sheet.rules.append(StyleRule(
            selector_text=text, compiled=compiled, specificity=compiled.specificity,
            pseudo=compiled.pseudo_element, decls=decls, media=media, layer=layer,
            origin=origin, sheet=sheet.name, attr_names=_rightmost_attrs(part), dynamic=dynamic,
        ))


def _rightmost_attrs(tokens) -> tuple:
    """Attribute names required by the rightmost compound selector (``a [x] > .b[y]`` -> y)."""
    names = []
    tokens = list(tokens)
    while tokens and tokens[-1].type in ("whitespace", "comment"):
        tokens.pop()
    for token in tokens:
        if token.type == "whitespace" or (token.type == "literal" and token.value in ">+~"):
            names = []
        elif token.type == "[] block":
            idents = [t for t in token.content if t.type == "ident"]
            if idents:
                names.append(idents[0].lower_value)
    return tuple(names)
