"""Stylesheets to flat style rules: the part of CSS that can change colour, visibility or font.

A stylesheet is parsed once per site. Each style rule becomes one ``StyleRule`` per selector of its
comma list (one bad selector must not drop its neighbours), carrying the conditions it sits under
(``@media`` queries, ``@layer``, origin, order). Declarations of properties that cannot affect
colour, visibility or font size are dropped here, and so are rules left with none.
"""
from __future__ import annotations

import itertools
import re
from dataclasses import dataclass, field
from functools import cached_property

import cssselect2
import cssselect2.compiler
import cssselect2.parser
import tinycss2

from ..cyclic_gc import no_collections
from ..model import Declaration
from ..tokens import significant, split_commas
from . import supports as supports_mod
from .bounds import MAX_RULES

# Properties the engine reads. Custom properties (--*) are always kept: they may feed any of these.
RELEVANT = frozenset(
    """color background background-color background-image background-clip -webkit-background-clip
    opacity display visibility content font font-size font-weight color-scheme
    -webkit-text-fill-color text-shadow filter mix-blend-mode backdrop-filter fill
    position clip clip-path width height overflow all list-style list-style-type
    box-shadow""".split()
)
# Properties that draw cues other than colour (links in running text, SC 1.4.1). Kept apart in
# ``StyleRule.cue_decls``: a rule with only these is never in the colour index (no cost to the
# walk); ``extract/links.py`` matches them for the few links that need it.
CUES = frozenset(
    """text-decoration text-decoration-line border border-bottom border-block-end border-style
    border-bottom-style border-block-end-style border-top border-block border-block-start
    box-shadow outline outline-style outline-width font-style border-color border-bottom-color
    outline-color outline-offset""".split()
)

# Dynamic pseudo-classes are rewritten into attributes that the engine sets on an element to
# evaluate a state; in the resting state no element has them, so `:hover` never matches and
# `:not(:hover)` does, as in a browser with no pointer over the page.
STATE_ATTR = "data-tinctura-state-"


def mark_states(target, on_self, on_path=()) -> list:
    """Put dynamic pseudo-classes in force: the state attributes of ``on_self`` on ``target``
    and of ``on_path`` on its ancestors. Returns what was set, for :func:`unmark_states`
    (attributes already there are left alone)."""
    marked = []
    for el in [target] + (list(target.iterancestors()) if on_path else []):
        for name in (on_self if el is target else on_path):
            attr = STATE_ATTR + name
            if el.get(attr) is None:
                el.set(attr, "")
                marked.append((el, attr))
                IN_A_STATE[el] = IN_A_STATE.get(el, 0) + 1
    return marked


def unmark_states(marked) -> None:
    for el, attr in marked:
        del el.attrib[attr]
        left = IN_A_STATE.pop(el, 1) - 1
        if left:
            IN_A_STATE[el] = left


# the elements ``mark_states`` has put in a state, with how many state attributes each (a
# state walk's target and, for some states, its ancestors): ``Structure`` reads them instead
# of looking for the attributes in the whole page
IN_A_STATE: dict = {}
DYNAMIC = ("hover", "focus-visible", "focus-within", "focus", "active", "visited", "target",
           "target-within", "user-invalid", "user-valid", "autofill", "-webkit-autofill")
_DYNAMIC_RE = re.compile(r":(%s)(?![\w-])" % "|".join(re.escape(d) for d in DYNAMIC), re.I)
# cssselect2 rejects some pseudo-classes that have a fixed answer for a static page
_STATIC_PSEUDO = {":defined": "", ":placeholder-shown": "", ":indeterminate": ":not(*)",
                  ":open": "[open]", ":modal": ":not(*)", ":popover-open": ":not(*)"}
_STATIC_RE = re.compile(r"(%s)(?![\w-])" % "|".join(re.escape(k) for k in _STATIC_PSEUDO), re.I)


@dataclass(slots=True)  # slots: a large stylesheet has hundreds of thousands
class Decl:
    name: str
    parsed: list | None = field(compare=False)  # the value's tokens once read (``tokens``)
    important: bool
    line: int
    text: str  # serialized value, stripped
    column: int = 0
    _shifted: bool = False  # line already counted from the page (loader._shift_lines)

    @property
    def tokens(self) -> list:
        """The value's tokens, read from ``text`` on first use: most declarations of a large
        stylesheet are never matched, and their token trees were most of its memory."""
        parsed = self.parsed
        if parsed is None:
            parsed = self.parsed = [t for t in tinycss2.parse_component_value_list(self.text)
                                    if t.type != "comment"]
        return parsed

    def provenance(self, sheet: str, selector: str, origin: str) -> Declaration:
        return Declaration(self.name, self.text, sheet, self.line, selector, origin,
                           self.important, self.column)


@dataclass(slots=True)
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
    cue_decls: list = field(default_factory=list)  # declarations of CUES properties


@dataclass
class ParsedSheet:
    """One stylesheet file or <style> block, flattened; ``imports`` are resolved by the loader."""

    name: str
    rules: list = field(default_factory=list)  # StyleRule, or ("import", url, media, layer)
    layer_names: list = field(default_factory=list)  # layer declaration order seen in this sheet
    errors: list = field(default_factory=list)  # (line, message)
    skipped_selectors: int = 0
    uses_has: bool = False
    line_offset: int = 0  # lines before the chunk being parsed (``_chunks``)
    column_shift: int = 0  # characters before the chunk on its first line (``_chunks``)
    max_rules: int = MAX_RULES  # style rules kept (one per selector); beyond: ``truncated``
    truncated: bool = False
    uses_color_scheme_media: bool = False
    uses_light_dark: bool = False
    has_color_scheme_property: bool = False


def parse_declarations(content, *, relevant_only: bool = True, line_offset: int = 0,
                       keep=RELEVANT, column_shift: int = 0) -> list:
    """``column_shift``: added to the columns of the first line (a chunk that starts inside a
    line: ``_chunks``)."""
    out = []
    for item in tinycss2.parse_blocks_contents(content, skip_whitespace=True, skip_comments=True):
        if item.type != "declaration":
            continue
        name = item.lower_name if not item.name.startswith("--") else item.name
        if relevant_only and not name.startswith("--") and name not in keep:
            continue
        text = tinycss2.serialize([t for t in item.value if t.type != "comment"]).strip()
        column = item.source_column + (column_shift if item.source_line == 1 else 0)
        out.append(Decl(name, None, item.important, item.source_line + line_offset, text,
                        column))
    return out


def parse_stylesheet(css: str, name: str, origin: str = "author",
                     max_rules: int | None = None) -> ParsedSheet:
    sheet = ParsedSheet(name)
    if max_rules is not None:
        sheet.max_rules = max_rules
    # The cyclic garbage collector rescans everything parsed so far each time it runs: on a
    # 20 MB stylesheet that made parsing quadratic (half the time at 8 MB, measured). Parsing
    # makes no reference cycles, so it runs without it.
    with no_collections():
        parse_chunks(css, sheet, origin)
    # searched without a lower-cased copy (a large sheet's copy is its size again)
    sheet.uses_color_scheme_media = bool(_PREFERS.search(css))
    sheet.uses_light_dark = bool(_LIGHT_DARK.search(css))
    sheet.has_color_scheme_property = bool(_COLOR_SCHEME.search(css))
    return sheet


_PREFERS = re.compile("prefers-color-scheme", re.I)
_LIGHT_DARK = re.compile(r"light-dark\(", re.I)
_COLOR_SCHEME = re.compile("(?<!prefers-)color-scheme", re.I)


CHUNK_CHARS = 1 << 18


def parse_chunks(css: str, sheet: ParsedSheet, origin: str = "author",
                 size: int = CHUNK_CHARS) -> None:
    """The rules of ``css`` into ``sheet``, parsed a chunk at a time (``_chunks``), with lines
    and columns counted from the start of ``css``."""
    for lines, shift, chunk in _chunks(css, size):
        sheet.line_offset, sheet.column_shift = lines, shift
        rules = tinycss2.parse_stylesheet(chunk, skip_whitespace=True, skip_comments=True)
        _walk(rules, sheet, origin, (), (), True)
    sheet.line_offset = sheet.column_shift = 0


# What can hide a bracket from the top-level structure: comments, strings (a bad string ends
# at its newline, as in CSS Syntax 3), escapes and unquoted url()s; and the brackets themselves
# (a `}` inside an open `(` block closes nothing, as in tinycss2).
# An escape takes the rest of its name with it: `\{url(` is the function `{url(`, not a url,
# and so are `xurl(`, `#url(` and `5url(` (tinycss2 tokenizes them so: a url token is `url(`
# alone, unquoted; a bad one, with a quote or a space inside, runs to its `)` as well).
_ESCAPE = r"\\(?:[0-9a-fA-F]{1,6}[ \t\n]?|[^\n0-9a-fA-F])"
# What continues a name (U+0000 reads as U+FFFD): a word character, `-`, U+0000 or any
# character past ASCII, written as what it is not: the same set for every code point, and
# compiled in 0.1 ms where `[\w\-\x00\x80-\U0010ffff]` took 5 ms at every start
_NAME = r"[^\x01-\x2c./:-@\[-\^`{-\x7f]"
_NAME_HASH_AT = r"[^\x01-\x22\x24-\x2c./:-?\[-\^`{-\x7f]"  # the same, `#` and `@` too
_STRUCTURE = re.compile(
    r"""/\*[\s\S]*?(?:\*/|\Z)|"(?:[^"\\\n]|\\[\s\S])*"?|'(?:[^'\\\n]|\\[\s\S])*'?"""
    rf"|{_ESCAPE}(?:{_NAME}|{_ESCAPE})*|\\\n"
    rf"|(?:(?<=<!--)|(?<!{_NAME_HASH_AT}))(?i:url)\((?![ \t\n]*[\"'])"
    r"(?:[^)\\]|\\[^\n])*\)?"
    r"|[{}()\[\]]")
_CLOSES = {"{": "}", "(": ")", "[": "]"}


def _chunks(css: str, size: int = CHUNK_CHARS):
    """(lines before, characters before on its first line, text) pieces of a stylesheet cut
    after top-level blocks.

    tinycss2 builds the whole token tree of what it is given; a 20 MB stylesheet would hold
    gigabytes at once. Cut between top-level rules, each piece parses to the same rules, and
    only one piece's tree is alive at a time. (A minified sheet is one line: a piece starts
    inside it, and tinycss2 counts its columns from the piece's start.)"""
    if len(css) <= size:
        yield 0, 0, css
        return
    open_, start, lines, line_start = [], 0, 0, 0  # the closers of the blocks open, innermost last
    for m in _STRUCTURE.finditer(css):
        char = m.group()
        closer = _CLOSES.get(char)
        if closer is not None:
            open_.append(closer)
        elif open_ and char == open_[-1]:  # any other closer is a token of the block it is in
            open_.pop()
            if not open_ and char == "}" and m.end() - start >= size:
                yield lines, start - line_start, css[start:m.end()]
                lines += css.count("\n", start, m.end())
                line_start = css.rfind("\n", start, m.end()) + 1 or line_start
                start = m.end()
    yield lines, start - line_start, css[start:]


def _walk(rules, sheet: ParsedSheet, origin, media, layer, top_level):
    for rule in rules:
        try:
            if rule.type == "error":
                sheet.errors.append((rule.source_line + sheet.line_offset, rule.message))
            elif rule.type == "qualified-rule":
                _style_rule(rule, sheet, origin, media, layer)
            elif rule.type == "at-rule":
                _at_rule(rule, sheet, origin, media, layer, top_level)
        except RecursionError:  # blocks or functions nested hundreds deep: skip this rule
            sheet.errors.append((rule.source_line + sheet.line_offset,
                                 "rule nested too deeply to read; skipped"))


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
            column = rule.source_column + (sheet.column_shift if rule.source_line == 1 else 0)
            path = layer + (tuple(names[0].split(".")) if names else (
                f"#anon:{sheet.name}:{rule.source_line + sheet.line_offset}:{column}",))
            sheet.layer_names.append(path)
            inner = tinycss2.parse_blocks_contents(rule.content, skip_whitespace=True,
                                                   skip_comments=True)
            _walk(inner, sheet, origin, media, path, False)
    elif kw == "import" and top_level:
        _import(rule, sheet, media, layer)
    elif kw in ("container", "scope", "starting-style", "document", "-moz-document"):
        # Depend on layout or on states a static page does not have: not applied, counted.
        sheet.errors.append((rule.source_line + sheet.line_offset,
                             f"@{kw} rules are not evaluated"))
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
        sheet.errors.append((rule.source_line + sheet.line_offset, "@import without a URL"))
        return
    rest = tokens[1:]
    imp_layer = layer
    if rest and rest[0].type == "ident" and rest[0].lower_value == "layer":
        imp_layer = layer + (f"#anon-import{rule.source_line + sheet.line_offset}",)
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
                        rule.source_line + sheet.line_offset))


def split_selector_list(prelude) -> list:
    """Split a selector list at top-level commas, keeping each part's tokens."""
    return [p for p in split_commas(prelude) if significant(p)]


class LazySelector(cssselect2.compiler.CompiledSelector):
    """A cssselect2 compiled selector whose Python test is built on first use.

    cssselect2 turns every selector into Python source and ``eval``s it: on a large stylesheet
    that is a quarter of the parse time and half of the memory, for selectors that are mostly
    never tried (``ruleset.Index`` asks for ``test`` only when an element could match). The
    other attributes are set as ``CompiledSelector.__init__`` sets them."""

    def __init__(self, parsed_selector):  # noqa: super().__init__ would compile
        self._source = cssselect2.compiler._compile_node(parsed_selector.parsed_tree)
        self.never_matches = self._source == "0"
        self.specificity = parsed_selector.specificity
        self.pseudo_element = parsed_selector.pseudo_element
        self.id = self.class_name = self.local_name = self.lower_local_name = None
        self.namespace = None
        self.requires_lang_attr = False
        node = parsed_selector.parsed_tree
        if isinstance(node, cssselect2.parser.CombinedSelector):
            node = node.right
        for simple in node.simple_selectors:
            if isinstance(simple, cssselect2.parser.IDSelector):
                self.id = simple.ident
            elif isinstance(simple, cssselect2.parser.ClassSelector):
                self.class_name = simple.class_name
            elif isinstance(simple, cssselect2.parser.LocalNameSelector):
                self.local_name = simple.local_name
                self.lower_local_name = simple.lower_local_name
            elif isinstance(simple, cssselect2.parser.NamespaceSelector):
                self.namespace = simple.namespace
            elif isinstance(simple, cssselect2.parser.AttributeSelector) \
                    and simple.name == "lang":
                self.requires_lang_attr = True

    def __getstate__(self) -> dict:
        """Pickled without its test once built (a lambda, which pickle cannot name): built
        again on first use (``extract/prepared.py`` pickles parsed sheets)."""
        state = dict(self.__dict__)
        state.pop("test", None)
        return state

    @cached_property
    def test(self):
        # :has() lists a subtree's wrappers whole before any() reads them; read lazily, the
        # test stops at the first match (`:root:has(input:checked)`: the page's first
        # checked input, not every element of the page)
        source = self._source.replace("list(el.iter_subtree())[1:]",
                                      "_islice(el.iter_subtree(), 1, None)")
        return eval("lambda el: " + source, {  # as cssselect2 builds it
            "split_whitespace": cssselect2.compiler.split_whitespace,
            "ascii_lower": cssselect2.compiler.ascii_lower,
            "urlparse": cssselect2.compiler.urlparse, "_islice": itertools.islice}, {})


# cssselect2's private source builder, used by LazySelector; without it, compile at once
_SELECTOR_CLASS = LazySelector if hasattr(cssselect2.compiler, "_compile_node") else \
    cssselect2.compiler.CompiledSelector
_COMPILED: dict = {}  # selector text -> (LazySelector or None, dynamic): equal selectors once
_COMPILED_LIMIT = 20_000


def with_state_attributes(text: str) -> str:
    """``text`` with its dynamic pseudo-classes written as the attributes that stand for them
    (``mark_states``)."""
    return _DYNAMIC_RE.sub(lambda m: f"[{STATE_ATTR}{m.group(1).lower().lstrip('-')}]", text)


def compile_one(text: str, tokens=None):
    """Compile one selector (no commas at top level); None when cssselect2 cannot.

    ``tokens``: the selector's tinycss2 tokens when the caller has them (saves a tokenizing)."""
    got = _COMPILED.get(text)
    if got is not None:
        return got
    rewritten = with_state_attributes(text)
    rewritten = _STATIC_RE.sub(lambda m: _STATIC_PSEUDO[m.group(1).lower()], rewritten)
    dynamic = rewritten != text
    try:
        if dynamic or tokens is None:
            tokens = tinycss2.parse_component_value_list(rewritten)
        parsed = list(cssselect2.parser.parse(tokens))
        compiled = _SELECTOR_CLASS(parsed[0]) if len(parsed) == 1 else None
    except Exception:  # cssselect2 raises SelectorError, and sometimes SyntaxError
        compiled = None
    if len(_COMPILED) >= _COMPILED_LIMIT:
        _COMPILED.clear()
    got = _COMPILED[text] = (compiled, dynamic)
    return got


def split_declarations(content, line_offset: int = 0, column_shift: int = 0) -> tuple:
    """(declarations the engine reads, declarations of non-colour cues), in one parse."""
    decls = parse_declarations(content, keep=_READ, line_offset=line_offset,
                               column_shift=column_shift)
    keep = [d for d in decls if d.name.startswith("--") or d.name in RELEVANT]
    return keep, [d for d in decls if d.name in CUES]


_READ = RELEVANT | CUES


def _style_rule(rule, sheet, origin, media, layer):
    decls, cue_decls = split_declarations(rule.content, sheet.line_offset, sheet.column_shift)
    if not decls and not cue_decls:
        return
    for part in split_selector_list(rule.prelude):
        if len(sheet.rules) >= sheet.max_rules:
            sheet.truncated = True
            return
        text = tinycss2.serialize(part).strip()
        compiled, dynamic = compile_one(text, part)
        if compiled is None:
            sheet.skipped_selectors += 1
            continue
        if ":has(" in text:
            sheet.uses_has = True
        sheet.rules.append(StyleRule(
            selector_text=text, compiled=compiled, specificity=compiled.specificity,
            pseudo=compiled.pseudo_element, decls=decls, media=media, layer=layer,
            origin=origin, sheet=sheet.name, attr_names=_rightmost_attrs(part), dynamic=dynamic,
            cue_decls=cue_decls,
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
