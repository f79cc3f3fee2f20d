"""Palette colours: the colours of a site that carry a meaning, and where each one is used.

A palette entry is found four ways, in this order:

1. declared by the user (``Options.palette``: name -> a CSS colour or a custom property);
2. a modifier family: the declaration that holds the colour (past ``var()`` aliases) has a
   selector with a compound of two or more classes (``.badge.fail``, ``.admonition.warning``),
   the first class being the family and the others the modifier (it counts even alone); or,
   failing that, a family of variants: selectors that differ only in their last class
   (``.status .ok``, ``.status .fault``; another class must stay fixed), which counts once at
   least two members occur on the site;
3. a colour named by a custom property (``--tw-state-caution: #b26b00`` and every
   ``var(--tw-state-caution)`` that paints it); its family is the name without its last
   hyphenated part (``--tw-state``), and it counts once at least two members of the family
   occur on the site (``--tw-state-ok``, ``--tw-state-fault``): a theme's many single
   variables (a brand colour, a link colour, syntax colours) are styles, not codes;
4. a colour written in a style attribute (a legend's cells, `<td style="background:
   #4caf50">Clear</td>`; each colour as written is one entry, text colours one family and
   backgrounds another), counting once two members occur on the site; not inside code (a
   highlighter that writes its colours inline is not a legend).

Discovered entries (2 to 4) must be chromatic and opaque: greys are text and rules, and a
translucent tint is a shade of whatever lies below it, not a code of its own.

Each judged sample whose text colour (role ``text``) or background (role ``fill``, judged on the
area around it, ``Sample.surround``) comes from an entry adds one *use*: the entry, the colour as
seen, its immediate background, the scheme. Uses are deduplicated (a count and a few example
locations per distinct situation), merged page by page and fragment by fragment, and handed to
the site-level rules (``rules/appearance.py``) once the whole site has been read. Pure: records
in, records out; no colour-science here.
"""
from __future__ import annotations

import re
from dataclasses import dataclass, field
from functools import lru_cache

from .colour.convert import linear_srgb_to_oklab, quantize, srgb_to_linear
from .extract.fragments import PathFinder
from .extract.nontext import KINDS as NONTEXT_KINDS
from .model import DETERMINED, REST

EXAMPLES = 3  # example locations kept per distinct use
NEUTRAL_CHROMA = 0.03  # OKLab chroma below which a discovered colour is a grey, not a code
USES_LIMIT = 5000  # distinct uses kept per site; beyond that, new situations are counted only

_CLASS = re.compile(r"\.[A-Za-z_][\w-]*")
_COMPOUND = re.compile(r"(?:^|[\s>+~(,])((?:[a-zA-Z*][\w-]*)?(?:\.[\w-]+){2,})")


@dataclass(frozen=True, slots=True)
class Entry:
    """A palette entry: its name, how it was found, and its family (entries compared as meanings
    of one code: the same base class, the same property stem, or the user's palette)."""

    name: str  # "--tw-caution", ".badge.fail", or the user's name
    source: str  # "palette", "modifier", "variant", "property"
    family: str  # "palette", the base class ("badge"), the selector with its last class open
    # (".status .*") or the property's stem ("--tw-state")


@dataclass(slots=True)
class Use:
    """One distinct situation of a palette entry: counted, with its first locations."""

    count: int = 0
    where: list = field(default_factory=list)  # [(page, line, xpath, text)], at most EXAMPLES
    cause: object = None  # the Cause of the colour (its declaration, for the report)


def palette_setting(mapping) -> tuple:
    """The user's ``palette`` mapping (name -> CSS colour or ``--property``) as Options data;
    ValueError naming the entry when a value is neither."""
    from .colour.parse import parse_color

    out = []
    for name, value in dict(mapping or {}).items():
        text = str(value).strip()
        wrapped = re.fullmatch(r"var\(\s*(--[\w-]+)\s*\)", text)
        text = wrapped.group(1) if wrapped else text  # var(--x) names the property --x
        if text.startswith("--"):
            out.append((str(name), "property", text))
            continue
        parsed = parse_color(text)
        if parsed is None or isinstance(parsed, str) or len(parsed) < 3:
            raise ValueError(f"palette entry {name!r}: {value!r} is neither a CSS colour nor a "
                             f"custom property (--name)")
        out.append((str(name), "colour", quantize(tuple(parsed)[:3])))
    return tuple(out)


SITE_RULES = ("TC300", "TC310")
# Reports group site-level findings under this name, after every page: they compare pages.
SITE_PAGE = "(whole site)"


def report_page(finding) -> str:
    """The page a report lists a finding under: its own, or the whole site for site rules."""
    return SITE_PAGE if finding.rule in SITE_RULES else finding.sample.page


def collect_for(samples, options, same=None, every: bool = False) -> dict:
    """:func:`collect` when a site-level rule is selected (``options.rules``), else nothing."""
    if not site_rules_selected(options):
        return {}
    return collect(samples, getattr(options, "palette", ()) or (), same, every)


def site_rules_selected(options) -> bool:
    """Whether ``options.rules`` (none: every rule) selects a site-level rule."""
    chosen = getattr(options, "rules", ()) or ()
    if not chosen:
        return True
    from .rules import get

    return bool({get(name).code for name in chosen} & set(SITE_RULES))


def collect(samples, palette: tuple = (), same=None, every: bool = False) -> dict:
    """Uses of palette entries among ``samples``: {(entry, role, colour, bg, scheme): Use}.
    ``same``: the samples' ``situations.Alike`` (made here if None). Each use keeps the
    first places of one page in (line, XPath) order (``offer``); ``every``: every place, in
    the samples' order (a fragment's, placed anew in each replay: ``ReplayPlaces``)."""
    from .situations import Alike

    if same is None:
        samples = list(samples)
        same = Alike(samples)
    memo = _memo(palette)
    # what a sample adds depends on what Alike groups by: worked out once per group (most
    # groups add nothing)
    found = [_uses_of(memo, s, palette) for s in same.firsts]
    uses: dict = {}
    if any(found):
        for s, g in zip(samples, same.of):
            for key, cause in found[g]:
                _add(uses, key, s, cause, every=every)
    return uses


def _uses_of(memo: dict, s, palette) -> tuple:
    """``(use key, cause)`` of each use a sample adds (``collect``)."""
    if s.state != REST or s.status != DETERMINED or s.fg is None or s.bg is None \
            or s.kind in NONTEXT_KINDS:  # control boundaries, focus rings: not a colour code
        return ()
    in_code = "/pre" in s.xpath or "/code" in s.xpath
    found = [((entry, "text", _quantized(s.fg), _quantized(s.bg), s.scheme), s.fg_cause)
             for entry in _entries_of(memo, s.fg_cause, s.fg, palette)
             if not (in_code and entry.source == "inline")]
    if s.surround is not None and s.bg_cause is not None:
        found.extend(((entry, "fill", _quantized(s.bg), _quantized(s.surround), s.scheme),
                      s.bg_cause) for entry in _entries_of(memo, s.bg_cause, s.bg, palette)
                     if not (in_code and entry.source == "inline"))
    return tuple(found)


@lru_cache(maxsize=4096)  # a site's pages use a few dozen colours, thousands of times each
def _quantized(rgb) -> tuple:
    return quantize(rgb)


def _entries_of(memo: dict, cause, rgb, palette) -> tuple:
    """:func:`entries`, memoized per cause object and colour: a page has thousands of samples
    and few causes. Keyed by the cause's id (hashing the record costs more than the lookup);
    the memo keeps the cause alive, so the id cannot be reused while the entry exists."""
    key = (id(cause), rgb)
    hit = memo.get(key)
    if hit is None:
        hit = memo[key] = (cause, entries(cause, _quantized(rgb), palette))
    return hit[1]


_MEMOS: dict = {}
# entries: a page's own causes (inherited from an XPath of it) are new objects, which the
# memo keeps alive with their XPaths until it is cleared (20,000 entries: 0.9 MB of entries
# over 300 pages, besides the causes and XPaths they keep; tracemalloc, 1,000 pages)
_MEMO_LIMIT = 4000


def _memo(palette: tuple) -> dict:
    memo = _MEMOS.get(palette)
    if memo is None or len(memo) > _MEMO_LIMIT:
        _MEMOS.clear()  # bounded; entries() is pure, so this only saves time
        memo = _MEMOS[palette] = {}
    return memo


def _add(uses: dict, key, sample, cause, every: bool = False) -> None:
    use = uses.get(key)
    if use is None:
        if len(uses) >= USES_LIMIT:
            return
        use = uses[key] = Use(cause=cause)
    use.count += 1
    place = (sample.page, sample.line, sample.xpath, sample.text)
    if every:
        use.where.append(place)
    else:
        offer(use, place)


def offer(use: Use, place: tuple) -> None:
    """Keep ``place`` ``(page, line, XPath, text)`` among ``use``'s examples if it is one of
    the first EXAMPLES of its page in (line, XPath) order: which of a page's subtrees were
    walked and which replayed (recorded on another page, or in another process) then does
    not change the examples, nor do the order of its walks and ``--jobs``."""
    where = use.where
    at = len(where)
    if at >= EXAMPLES and (place[1], place[2]) >= (where[-1][1], where[-1][2]):
        return
    if place in where:
        return
    while at and (place[1], place[2]) < (where[at - 1][1], where[at - 1][2]):
        at -= 1
    where.insert(at, place)
    del where[EXAMPLES:]


def merge(into: dict, more: dict, times: int = 1, places: bool = True) -> dict:
    """Add ``more``'s uses to ``into`` (``times`` over: a fragment replayed that often). The
    site's uses take each page's, in page order: their examples are the site's first places.
    ``places`` False: the counts only (a replayed fragment's places are its page's:
    ``ReplayPlaces``)."""
    for key, use in more.items():
        mine = into.get(key)
        if mine is None:
            if len(into) >= USES_LIMIT:
                continue
            mine = into[key] = Use(cause=use.cause)
        mine.count += use.count * times
        if not places:
            continue
        for place in use.where:
            if len(mine.where) >= EXAMPLES:
                break
            if place not in mine.where:
                mine.where.append(place)
    return into


class ReplayPlaces:
    """Where a judged fragment's palette uses stand in any replay of it, worked out once (as
    ``fragments.Placement`` does for its findings): per use, its texts' places relative to
    the fragment's root, in document order, each with the child positions (comments
    included) that reach its element from the root. A replay offers its page the places at
    its own base, with the lines of its own elements, in that order, and stops at the first
    place past the page's examples (lines do not decrease in document order). Places with no
    line come first (line 0)."""

    __slots__ = ("by_key",)

    def __init__(self, candidates: dict, anchor):
        """``candidates``: {use key: [(relative XPath, has a line, text)]}; ``anchor``: the
        root element of one replay of the fragment."""
        find = PathFinder()
        self.by_key = {}
        for key, items in candidates.items():
            located = []
            for rel, lined, text in dict.fromkeys(items):
                positions = find.at((anchor, ()), rel.split("::")[0])[1] if lined else ()
                located.append((lined, positions, rel, text))
            located.sort(key=lambda item: (item[0], item[1]))
            self.by_key[key] = tuple(located)

    def offer(self, uses: dict, page: str, anchor, base: str) -> None:
        """Offer ``uses`` (a page's) the places of a replay at ``base`` (its root ``anchor``)."""
        for key, located in self.by_key.items():
            use = uses.get(key)
            if use is None:  # (uses past USES_LIMIT are not kept)
                continue
            where = use.where
            for lined, positions, rel, text in located:
                line = 0
                if lined:
                    el = anchor
                    for i in positions:
                        el = el[i]
                    line = el.sourceline or 0
                    if len(where) >= EXAMPLES and line > where[-1][1]:
                        break
                offer(use, (page, line, base + rel, text))


def shared(uses: dict, table: dict) -> dict:
    """``uses`` (a page's, kept by the plugin) with their keys and causes the objects
    ``table`` already holds for equal ones, as ``problems.shared_uses`` does: 19 KB a page
    kept, 10 KB shared (the examples' places stay each page's own)."""
    out = {}
    for key, use in uses.items():
        if use.cause is not None:
            use.cause = table.setdefault(("cause", use.cause), use.cause)
        out[table.setdefault(("key", key), key)] = use
    return out


def families(uses) -> dict:
    """Family -> the discovered entries seen in it, over a site's uses."""
    seen: dict = {}
    for entry, *_ in uses:
        if entry.source != "palette":
            seen.setdefault(entry.family, set()).add(entry.name)
    return seen


def retained(uses: dict) -> dict:
    """The uses whose entry counts as a palette colour site-wide: declared ones, a base class
    with a modifier (``.badge.warn`` says what it means even alone), and other discovered ones
    whose family has at least two members on the site (one custom property, or one rule, is a
    style, not a code)."""
    members = families(uses)
    return {key: use for key, use in uses.items()
            if key[0].source in ("palette", "modifier") or len(members[key[0].family]) >= 2}


def entries(cause, rgb, palette: tuple = ()) -> tuple:
    """The palette entries a colour with this cause and value belongs to."""
    found = [Entry(name, "palette", "palette") for name, kind, value in palette
             if (kind == "colour" and value == rgb)
             or (kind == "property" and cause is not None and value in _properties(cause))]
    if found:
        return tuple(found)
    if cause is None or _neutral(rgb):
        return ()
    return _discovered(cause)


@lru_cache(maxsize=4096)  # causes are shared records
def _properties(cause) -> frozenset:
    steps = ((cause.declaration,) if cause.declaration is not None else ()) + tuple(cause.chain)
    return frozenset(d.property for d in steps)


@lru_cache(maxsize=4096)
def _discovered(cause) -> tuple:
    from .problems import target_declaration

    target = target_declaration(cause)
    if target is None or _translucent(target.value):
        return ()
    # the meaning lives in the modifier when there is one (`.lamp.ok { --state: green }`)
    selector = target.selector or ""
    for compound in _COMPOUND.findall(selector):
        classes = compound.split(".")[1:]
        if len(classes) >= 2:
            return (Entry("." + ".".join(classes), "modifier", classes[0]),)
    # rules that differ only in one class name are variants of one thing (`.status .ok`,
    # `.status .fault`): the family is the selector with its last class left open
    last = None
    for last in _CLASS.finditer(selector):
        pass
    if last is not None and _CLASS.search(selector[:last.start()]):
        # (another class must stay fixed: `.ok` alone would make every class one family)
        family = selector[:last.start()] + ".*" + selector[last.end():]
        return (Entry(selector, "variant", family),)
    if target.property.startswith("--"):
        return (Entry(target.property, "property", property_family(target.property)),)
    if target.origin == "inline" and target.property in INLINE_FAMILIES:
        family = INLINE_FAMILIES[target.property]
        return (Entry(f'style="{target.property}: {target.value.strip()}"', "inline",
                      f"style attribute {family}"),)
    return ()


# the properties a style attribute colours a legend with, and the family each belongs to
INLINE_FAMILIES = {"color": "color", "background-color": "background",
                   "background": "background"}


def _translucent(value: str) -> bool:
    """A translucent colour is a tint of whatever lies below (it looks different on purpose on
    each background and in each scheme): a style, not a code of its own."""
    from .colour.parse import parse_color

    text = re.sub(r"\s*!\s*important\s*$", "", value or "", flags=re.I)
    try:
        parsed = parse_color(text)
    except Exception:  # a value the parser cannot read on its own (var(), keywords)
        return False
    return isinstance(parsed, tuple) and len(parsed) > 3 and parsed[3] < 1.0


def property_family(name: str) -> str:
    """``--tw-status-ok`` -> ``--tw-status``: the name without its last hyphenated part."""
    head, _, last = name[2:].rstrip("-").rpartition("-")
    return "--" + head if head and last else name


@lru_cache(maxsize=4096)
def _neutral(rgb) -> bool:
    _, a, b = linear_srgb_to_oklab(srgb_to_linear(rgb))
    return (a * a + b * b) ** 0.5 < NEUTRAL_CHROMA
