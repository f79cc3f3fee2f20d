"""The cascade for one element and the computed values tinctura reads.

Cascade order (CSS Cascade 5, 6.1): origin and importance, then element-attached (style
attribute) over rule-based, then layer order (reversed for !important), then specificity, then
order of appearance. Custom properties are inherited and resolved where they are declared, at
token level, before colours are parsed (CSS Custom Properties 1); a cycle makes every property in
it invalid at computed-value time. Substitution is bounded, as CSS Custom Properties 1 (section
3.3) allows: a value whose expansion exceeds ``max_var_tokens`` tokens, or a chain of references
longer than ``MAX_VAR_DEPTH``, is invalid at computed-value time and noted in ``problems``, so
that a stylesheet that doubles a property thirty times costs a bounded amount of work. (A long
chain declared last link first meets the bound while resolving, and the properties it passes
through are then invalid too: no real stylesheet has a chain of even ten.)
"""
from __future__ import annotations

import tinycss2

from ..colour.parse import parse_color
from ..model import Cause, Declaration
from . import values as V

INHERITED = frozenset({"color", "visibility", "font-size", "font-weight", "color-scheme",
                       "-webkit-text-fill-color", "text-shadow", "fill", "list-style-type"})
GLOBAL_KEYWORDS = frozenset({"inherit", "initial", "unset", "revert", "revert-layer"})
BLACK = (0.0, 0.0, 0.0, 1.0)
TRANSPARENT = (0.0, 0.0, 0.0, 0.0)
NO_FILL = (TRANSPARENT, Cause())  # SVG `fill: none`
_ALL_PROPERTIES = ("color", "background-color", "background-image", "opacity", "display",
                   "visibility", "font-size", "font-weight", "color-scheme",
                   "-webkit-text-fill-color", "text-shadow", "filter", "mix-blend-mode",
                   "backdrop-filter", "background-clip", "position", "clip", "clip-path",
                   "width", "height", "overflow", "content", "fill")
# Shorthands (and aliases) -> the longhands tinctura reads; each longhand parses its part.
SHORTHANDS = {
    "all": _ALL_PROPERTIES,
    "background": ("background-color", "background-image"),
    "font": ("font-size", "font-weight"),
    "list-style": ("list-style-type",),
    "-webkit-background-clip": ("background-clip",),
}


class Winner:
    """The declaration that won the cascade for a property, with where it came from."""

    __slots__ = ("decl", "rule", "origin", "key")

    def __init__(self, decl, rule, origin, key):
        self.decl, self.rule, self.origin, self.key = decl, rule, origin, key

    def provenance(self, name=None) -> Declaration:
        if self.rule is None:
            where = "presentation attribute" if self.origin == "presentation" else \
                "style attribute"
            return Declaration(name or self.decl.name, self.decl.text, where,
                               self.decl.line, "", self.origin, self.decl.important)
        return Declaration(name or self.decl.name, self.decl.text, self.rule.sheet, self.decl.line,
                           self.rule.selector_text, self.origin, self.decl.important,
                           self.decl.column)


class Custom:
    """Inherited custom properties: name -> (tokens, Declaration, chain of Declarations)."""

    __slots__ = ("values",)

    def __init__(self, values):
        self.values = values


EMPTY_CUSTOM = Custom({})

# Bounds on var() substitution. No real stylesheet comes near them: a large theme's longest
# expanded value is a few hundred tokens and its deepest chain of references under ten.
MAX_VAR_TOKENS = 10000
MAX_VAR_DEPTH = 64
_DEPTH_NOTE = (f"chain of more than {MAX_VAR_DEPTH} custom properties; the value is treated as "
               "invalid")


class _Overflow(Exception):
    """A var() expansion went past a bound; the value is invalid at computed-value time."""


class _TooDeep(_Overflow):
    """A chain of var() references longer than ``MAX_VAR_DEPTH``."""


def _size(tokens) -> int:
    """Tokens in a value, counting those inside functions and blocks."""
    n = 0
    for t in tokens:
        n += 1
        if t.type == "function":
            n += _size(t.arguments)
        elif t.type in ("() block", "[] block", "{} block"):
            n += _size(t.content)
    return n


def cascade(rules, inline_decls, ruleset, pseudo=None) -> dict:
    """Winning declarations by property for an element (pseudo=None) or a pseudo-element."""
    winners = {}
    unl = ruleset.unlayered_rank
    for rule in rules:
        if rule.pseudo != pseudo:
            continue
        origin_rank = 2 if rule.origin == "author" else 0
        layer = ruleset.layer_rank(rule.layer) if rule.layer else unl
        for d in rule.decls:
            if d.important:
                key = (origin_rank + 3, 0, -layer, rule.specificity, rule.order)
            else:
                key = (origin_rank, 0, layer, rule.specificity, rule.order)
            _offer(winners, d, rule, rule.origin, key)
    if pseudo is None:
        for n, d in enumerate(inline_decls):
            key = (5 if d.important else 2, 1, 0, (0, 0, 0), n)
            _offer(winners, d, None, "inline", key)
    return winners


def latest_winner(winners: dict, names) -> "Winner | None":
    """Of the winners for ``names`` (a shorthand and its longhands), the one that comes last in
    cascade order: it decides what the element shows."""
    best = None
    for name in names:
        w = winners.get(name)
        if w is not None and (best is None or w.key > best.key):
            best = w
    return best


def _offer(winners, d, rule, origin, key):
    for name in SHORTHANDS.get(d.name, (d.name,)):
        _offer_one(winners, name, d, rule, origin, key)


def _offer_one(winners, name, d, rule, origin, key):
    current = winners.get(name)
    if current is None or key >= current.key:
        winners[name] = Winner(d, rule, origin, key)


class Style:
    """Computed values of one element (or pseudo-element) in one scheme and state."""

    __slots__ = ("color", "color_cause", "color_inherited", "bg", "bg_cause", "images",
                 "opacity", "opacity_cause", "display", "visibility", "font_size", "font_weight",
                 "custom", "scheme", "fill_color", "effects", "visually_hidden", "content",
                 "parent", "has_opacity_above", "svg_fill", "disabled", "pseudo", "list_style",
                 "hidden_within", "shadows", "in_link", "generated")

    def __init__(self):
        self.color = BLACK
        self.color_cause = Cause()
        self.color_inherited = False
        self.bg = TRANSPARENT
        self.bg_cause = None
        self.images = ()
        self.shadows = ()  # (((colour, covers whole box), ...), Cause): inset box shadows
        self.opacity = 1.0
        self.opacity_cause = None
        self.display = "inline"
        self.visibility = "visible"
        self.font_size = 16.0
        self.font_weight = 400
        self.custom = EMPTY_CUSTOM
        self.scheme = "light"
        self.fill_color = None
        self.effects = ()
        self.visually_hidden = False
        self.content = None
        self.parent = None
        self.pseudo = None
        self.list_style = "disc"
        self.has_opacity_above = False
        self.hidden_within = False  # this element or an ancestor is visually hidden
        self.svg_fill = None
        self.disabled = False
        self.in_link = 0  # inside an <a href> (itself included): 1; one in running text: 2
        # (pseudo-element, its Style, its text) of the ::before and ::after that show text
        self.generated = ()


ROOT_PARENT = Style()


class Resolver:
    """Computes Styles from cascade winners; one per page, scheme and state."""

    def __init__(self, ruleset, preferred_scheme: str, viewport_width: float = 1280.0):
        self.ruleset = ruleset
        self.preferred = preferred_scheme  # "light" or "dark": the reader's preference
        self.vw = float(viewport_width)
        self.root_font_size = 16.0
        self.max_var_tokens = MAX_VAR_TOKENS
        # (sheet, line, property) -> why its value was dropped; the engine reports them
        self.problems = {}

    def _note(self, winner, name, why):
        decl = winner.provenance(name)
        self.problems.setdefault((decl.sheet, decl.line, name), why)

    # -- custom properties -------------------------------------------------------------
    def _customs(self, winners, parent_custom: Custom) -> Custom:
        declared = {n: w for n, w in winners.items() if n.startswith("--")}
        if not declared:
            return parent_custom
        values = dict(parent_custom.values)
        resolved = {}
        state = {}
        stack = []

        def resolve(name):
            if name in resolved:
                return resolved[name]
            if name not in declared:
                return values.get(name)
            if state.get(name) in ("busy", "cycle"):  # every property in a cycle is invalid
                for other in stack[stack.index(name):]:
                    state[other] = "cycle"
                return None
            w = declared[name]
            if len(stack) >= MAX_VAR_DEPTH:
                self._note(w, name, _DEPTH_NOTE)
                return None
            state[name] = "busy"
            stack.append(name)
            tokens = w.decl.tokens
            text = w.decl.text.strip().lower()
            if text in GLOBAL_KEYWORDS:
                result = values.get(name) if text in ("inherit", "unset", "revert",
                                                      "revert-layer") else None
            else:
                out, chain, ok = self._bounded(w, name, tokens, resolve)
                result = (out, w.provenance(), chain) if ok else None
            stack.pop()
            if state.get(name) == "cycle":
                result = None
            else:
                state[name] = "done"
            resolved[name] = result
            return result

        for name in declared:
            resolve(name)
        # (``resolve`` refers to itself: a cycle, never collected while the check holds off
        # the cyclic collector, that kept every page's resolver and what it had computed)
        resolve = None
        for name, value in resolved.items():
            if value is None:
                values.pop(name, None)
            else:
                values[name] = value
        return Custom(values)

    def _bounded(self, winner, name, tokens, lookup):
        """``_substitute`` within the bounds: an expansion past them is invalid, and noted."""
        try:
            return self._substitute(tokens, lookup)
        except _TooDeep:
            why = _DEPTH_NOTE
        except _Overflow:
            why = (f"var() expansion longer than {self.max_var_tokens} tokens; the value is "
                   "treated as invalid (CSS Custom Properties 1, section 3.3)")
        except RecursionError:
            why = "var() substitution nested too deeply; the value is treated as invalid"
        self._note(winner, name, why)
        return None, (), False

    def _substitute(self, tokens, lookup, budget=None):
        """Replace var() in tokens; returns (tokens, chain of Declarations, valid).

        ``budget`` is a one-item list: tokens the expansion may still add (``_Overflow``)."""
        if not _has_var(tokens):
            return tokens, (), True
        if budget is None:
            budget = [self.max_var_tokens]
        out, chain = [], []
        for t in tokens:
            if t.type == "function":
                if t.lower_name == "var":
                    args = t.arguments
                    sig = V.significant(args)
                    if not sig or sig[0].type != "ident" or not sig[0].value.startswith("--"):
                        return None, (), False
                    name = sig[0].value
                    found = lookup(name)
                    if found is not None:
                        value, decl, sub_chain = found
                        budget[0] -= _size(value)
                        if budget[0] < 0:
                            raise _Overflow
                        out.extend(value)
                        chain.append(decl)
                        chain.extend(sub_chain)
                        continue
                    comma = next((i for i, a in enumerate(args)
                                  if a.type == "literal" and a.value == ","), None)
                    if comma is None:
                        return None, (), False
                    fb, fb_chain, ok = self._substitute(args[comma + 1:], lookup, budget)
                    if not ok:
                        return None, (), False
                    out.extend(fb)
                    chain.extend(fb_chain)
                    continue
                if _has_var(t.arguments):
                    inner, sub_chain, ok = self._substitute(t.arguments, lookup, budget)
                    if not ok:
                        return None, (), False
                    t = tinycss2.ast.FunctionBlock(t.source_line, t.source_column, t.name, inner)
                    chain.extend(sub_chain)
            elif t.type in ("() block", "[] block", "{} block") and _has_var(t.content):
                inner, sub_chain, ok = self._substitute(t.content, lookup, budget)
                if not ok:
                    return None, (), False
                cls = type(t)
                t = cls(t.source_line, t.source_column, inner)
                chain.extend(sub_chain)
            out.append(t)
        if len(chain) > 1:  # a property used twice is one link (and chains stay small)
            chain = dict.fromkeys(chain)
            if len(chain) > MAX_VAR_DEPTH:
                raise _TooDeep
        return out, tuple(chain), True

    def value(self, winner, style):
        """Tokens of a winner after var() substitution, with the custom-property chain."""
        values = style.custom.values
        tokens, chain, ok = self._bounded(winner, winner.decl.name, winner.decl.tokens,
                                          values.get)
        return (tokens if ok else None), chain

    # -- the element ---------------------------------------------------------------------
    def compute(self, winners, parent: Style, is_root: bool, ua_winners=None) -> Style:
        s = Style()
        s.parent = parent
        s.custom = self._customs(winners, parent.custom)

        def keyword(name):
            w = winners.get(name)
            if w is None:
                return None, None
            text = w.decl.text.lower()
            if text in GLOBAL_KEYWORDS:
                if text in ("revert", "revert-layer"):
                    uaw = (ua_winners or {}).get(name)
                    if uaw is not None:
                        return "value", uaw
                    return ("inherit" if name in INHERITED else "initial"), w
                if text == "unset":
                    return ("inherit" if name in INHERITED else "initial"), w
                return text, w
            return "value", w

        # color-scheme first: it decides light-dark() and system colours below
        kind, w = keyword("color-scheme")
        s.scheme = parent.scheme if parent is not ROOT_PARENT else "light"
        if kind == "value":
            toks, _ = self.value(w, s)
            words = {t.lower_value for t in V.significant(toks or []) if t.type == "ident"}
            if "dark" in words and ("light" not in words or self.preferred == "dark"):
                s.scheme = "dark"
            elif words & {"light", "normal"} or "only" in words:
                s.scheme = "light"
        elif kind == "initial":
            s.scheme = "light"

        # font size (needed by em units) and weight
        s.font_size = self._font(keyword("font-size"), s, 0, parent.font_size, 16.0, lambda t: (
            V.font_size(t, parent.font_size, self.root_font_size, self.vw)))
        if is_root:
            self.root_font_size = s.font_size
        s.font_weight = self._font(keyword("font-weight"), s, 1, parent.font_weight, 400,
                                   lambda t: V.font_weight(t, parent.font_weight))

        # colour (inherited; currentcolor means the parent's colour)
        kind, w = keyword("color")
        s.color, s.color_cause, s.color_inherited = parent.color, parent.color_cause, True
        if kind == "value":
            toks, chain = self.value(w, s)
            c = parse_color(toks, current=parent.color, scheme=s.scheme) if toks else None
            if isinstance(c, tuple):
                s.color = c
                s.color_cause = Cause(w.provenance("color"), None, chain)
                s.color_inherited = False
        elif kind == "initial":
            s.color, s.color_cause, s.color_inherited = BLACK, Cause(w.provenance("color")), False

        kind, w = keyword("-webkit-text-fill-color")
        s.fill_color = parent.fill_color
        if kind == "value":
            toks, chain = self.value(w, s)
            c = parse_color(toks, current=s.color, scheme=s.scheme) if toks else None
            s.fill_color = None if c is None or isinstance(c, str) else (
                c, Cause(w.provenance(), None, chain))
        elif kind == "initial":
            s.fill_color = None

        kind, w = keyword("fill")
        s.svg_fill = parent.svg_fill
        if kind == "value":
            toks, chain = self.value(w, s)
            c = parse_color(toks, current=s.color, scheme=s.scheme) if toks else None
            if c == "currentcolor":
                c = s.color
            if isinstance(c, tuple):
                s.svg_fill = (c, Cause(w.provenance(), None, chain))
            elif toks and V.significant(toks) and V.significant(toks)[0].type == "ident" \
                    and V.significant(toks)[0].lower_value == "none":
                s.svg_fill = NO_FILL

        # background colour and images (not inherited)
        kind, w = keyword("background-color")
        if kind == "value":
            toks, chain = self.value(w, s)
            if toks is not None:
                if w.decl.name == "background":
                    c, _ = V.background_layers(toks, s.color, s.scheme)
                    c = c or TRANSPARENT
                else:
                    c = parse_color(toks, current=s.color, scheme=s.scheme)
                    if c == "currentcolor":
                        c = s.color
                if isinstance(c, tuple):
                    s.bg = c
                    s.bg_cause = Cause(w.provenance("background-color"), None, chain)
        elif kind == "inherit":
            s.bg, s.bg_cause = parent.bg, parent.bg_cause
        kind, w = keyword("background-image")
        if kind == "value":
            toks, chain = self.value(w, s)
            if toks is not None:
                if w.decl.name == "background":
                    _, images = V.background_layers(toks, s.color, s.scheme)
                else:
                    images = V.background_images(toks, s.color, s.scheme)
                if images:
                    s.images = (tuple(images), Cause(w.provenance("background-image"), None,
                                                     chain))

        kind, w = keyword("box-shadow")
        if kind == "value":
            toks, chain = self.value(w, s)
            ctx = V.LengthContext(s.font_size, self.root_font_size, self.vw)
            shadows = V.inset_shadows(toks or [], s.color, s.scheme, ctx)
            if shadows:
                s.shadows = (tuple(shadows), Cause(w.provenance("box-shadow"), None, chain))

        kind, w = keyword("opacity")
        if kind == "value":
            toks, _ = self.value(w, s)
            sig = V.significant(toks or [])
            if len(sig) == 1 and sig[0].type in ("number", "percentage"):
                v = sig[0].value / (100 if sig[0].type == "percentage" else 1)
                s.opacity = min(1.0, max(0.0, v))
                s.opacity_cause = Cause(w.provenance())

        s.display = self._ident(keyword("display"), s, "inline")
        vis = self._ident(keyword("visibility"), s, None)
        s.visibility = vis if vis in ("visible", "hidden", "collapse") else parent.visibility

        effects = []
        for prop in ("text-shadow", "filter", "mix-blend-mode", "backdrop-filter"):
            kind, w = keyword(prop)
            if kind == "value" and w.decl.text.lower() not in ("none", "normal"):
                effects.append((prop, w.decl.text, w.provenance()))
            elif kind == "inherit" and prop == "text-shadow" or (
                    kind is None and prop == "text-shadow"):
                effects.extend(e for e in parent.effects if e[0] == "text-shadow")
        kind, w = keyword("background-clip")
        if kind == "value" and "text" in w.decl.text.lower():
            effects.append(("background-clip", w.decl.text, w.provenance()))
        s.effects = tuple(effects)

        kind, w = keyword("list-style-type")
        s.list_style = parent.list_style
        if kind == "value":
            toks, _ = self.value(w, s)
            sig = V.significant(toks or [])
            idents = [t.lower_value for t in sig if t.type == "ident"]
            strings = [t for t in sig if t.type == "string"]
            if strings:
                s.list_style = "string"
            elif idents:  # in the shorthand, the type is the ident that is not a position
                rest = [i for i in idents if i not in ("inside", "outside")]
                s.list_style = rest[0] if rest else s.list_style
        elif kind == "initial":
            s.list_style = "disc"
        s.visually_hidden = self._visually_hidden(keyword, s)
        kind, w = keyword("content")
        if kind == "value":  # a theme's icon glyph may come from a custom property
            s.content = self.value(w, s)[0]  # (a value without var() as it is)
        return s

    def _font(self, kw, s, part, inherited, initial, parse):
        """font-size or font-weight, from its own property or from the ``font`` shorthand
        (``part`` 0: size, 1: weight); inherited unless set."""
        kind, w = kw
        if kind == "initial":
            return initial
        if kind != "value":
            return inherited
        toks, _ = self.value(w, s)
        if toks is not None and w.decl.name == "font":
            parts = V.font_shorthand(toks)
            toks = parts[part] if parts else None
        value = parse(toks) if toks is not None else None
        return inherited if value is None else value

    def _ident(self, kw, s, default):
        kind, w = kw
        if kind != "value":
            return default
        toks, _ = self.value(w, s)
        sig = V.significant(toks or [])
        return sig[0].lower_value if sig and sig[0].type == "ident" else default

    def _visually_hidden(self, keyword, s) -> bool:
        """The clip patterns used to hide text from sight but not from screen readers."""
        position = self._ident(keyword("position"), s, "static")
        if position not in ("absolute", "fixed"):
            return False
        kind, w = keyword("clip")
        if kind == "value":
            text = w.decl.text.lower().replace(" ", "").replace(",", "")
            if text.startswith("rect(") and all(ch in "0px1()rect" for ch in text):
                return True
        kind, w = keyword("clip-path")
        if kind == "value":
            text = w.decl.text.lower().replace(" ", "")
            if text in ("inset(50%)", "inset(100%)", "circle(0)", "circle(0px)",
                        "polygon(000000)"):
                return True
        ctx = V.LengthContext(s.font_size, self.root_font_size, self.vw)
        sizes = []
        for prop in ("width", "height"):
            kind, w = keyword(prop)
            size = None
            if kind == "value":
                sig = V.significant(w.decl.tokens)
                if len(sig) == 1:
                    size = V.length(sig[0], ctx)
            sizes.append(size)
        overflow = self._ident(keyword("overflow"), s, "visible")
        return all(x is not None and x <= 1 for x in sizes) and overflow in ("hidden", "clip")


def _has_var(tokens) -> bool:
    for t in tokens:
        if t.type == "function":
            if t.lower_name == "var" or _has_var(t.arguments):
                return True
        elif t.type in ("() block", "[] block", "{} block") and _has_var(t.content):
            return True
    return False
