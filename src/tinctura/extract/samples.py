"""Walk a page's tree in one scheme and produce a Sample for every rendered text.

Computed styles are shared between elements whose style inputs are the same, within a page and
across pages: the key of an element is its tag and attributes (reduced to the answers selectors
need), its parent's key and, only for elements a sibling-sensitive selector can reach (``+``,
``~``, ``:nth-child``, ``:last-of-type``...), its previous siblings and the tags of the following
ones. Pages of one site repeat the same navigation, so most elements are computed once per site;
the :hover and :focus samples of its links likewise. Positional facts (XPaths, lines, texts) are
filled in per element and never shared.

Whole subtrees that repeat (the navigation's sections) are recorded once and replayed
(``fragments``). So that a replay gives exactly what a walk gives, in the same order, every
container element is a scope: the :hover and :focus samples of the interactive elements inside
it are produced when its walk ends.
"""
from __future__ import annotations

import itertools

from ..colour.composite import over, with_alpha
from ..colour.parse import parse_color
from ..model import DETERMINED, REST, UNDETERMINED, Cause, Layer, Sample
from . import behaviours as behaviours_mod
from . import disclosure as disclosure_mod
from . import exempt as exempt_mod
from . import fragments as frag_mod
from . import links as link_mod
from . import nontext as nontext_mod
from .overlay import Kept
from .sheet import mark_states, parse_declarations, unmark_states
from .structure import PageStructure
from .style import BLACK, ROOT_PARENT, Resolver, Winner, cascade

FIELDS = frozenset({"input", "textarea", "select"})  # their value is text, not their content
LISTED = frozenset({"option", "optgroup"})  # rows of a list box (``_listed``)
NO_TEXT = frozenset({"script", "style", "template", "noscript", "title", "head", "textarea",
                     "select", "option", "optgroup", "iframe", "object", "canvas", "video",
                     "audio", "img", "input", "br", "wbr", "math"})
GLYPH_MARKERS = frozenset({"none", "disc", "circle", "square", "disclosure-open",
                           "disclosure-closed", "string"})
SVG_TEXT = frozenset({"text", "tspan", "textpath"})
SVG_SHAPES = frozenset({"rect", "circle", "ellipse", "path", "polygon", "polyline"})
# focusable by their tag (and attributes); any other element by a tabindex
INTERACTIVE = frozenset({"a", "button", "input", "select", "textarea", "summary"})
FORM_CONTROLS = frozenset({"button", "input", "select", "textarea", "optgroup", "option",
                           "fieldset"})
# what an element with no content may still show: a control, a link, a focus ring, a shape
SHOW_EMPTY = INTERACTIVE | nontext_mod.TAGS | SVG_SHAPES
MAX_ALTERNATIVES = 16
# (state, pseudo-classes on the element, pseudo-classes on its ancestors). Focus is keyboard
# focus, the case where :focus-visible styles show.
STATES = (("hover", ("hover",), ("hover",)),
          ("focus", ("focus", "focus-visible", "focus-within"), ("focus-within",)))
CACHE_LIMIT = 120000  # style keys; a large site adds about a hundred per page
# Elements whose subtrees are scopes (and may be recorded and replayed): HTML containers. SVG
# content is left out (shapes earlier in the same <svg> are backgrounds of later text), and so is
# anything inside an interactive element (its :hover walk reads the keys of its descendants).
SCOPE_TAGS = frozenset({
    "html", "body", "div", "nav", "ul", "ol", "li", "dl", "dt", "dd", "section", "article",
    "aside", "header", "footer", "main", "table", "thead", "tbody", "tfoot", "tr", "td", "th",
    "caption", "form", "fieldset", "label", "details", "summary", "p", "span", "a", "button",
    "figure", "figcaption", "blockquote", "pre", "code", "h1", "h2", "h3", "h4", "h5", "h6",
    "em", "strong", "small", "mark", "abbr", "cite", "kbd", "samp", "var", "sub", "sup", "b",
    "i", "u", "s", "q", "time", "output", "menu", "hgroup", "address", "center", "font"})


class StyleCache:
    """Computed styles by structural key, shared across pages for one rule index and scheme.

    ``styles_of``: the cache of the other kind of walk of the same rule index and scheme (one
    keeping every sample's layers, one not: ``engine.Site._walker``), whose structural ids and
    computed styles this one shares: they do not depend on the kind, while recorded fragments,
    state samples and colour cores do (the fixes' verification walks a page checked warm
    without them keeping every sample: cold, a manual's code page took 138 ms, 83 ms warm)."""

    def __init__(self, styles_of=None):
        if styles_of is None:
            self.ids = {}
            self.styles = {}
            self.inert = {}  # structural id -> _inert(element): it cannot show anything
            # the key an element would have without a page's own rules
            # (``PageWalker._plain``) -> the rules of the stylesheets it matches: a page's
            # rows, keyed apart, match what the rows of other pages matched
            self.base_matches = {}
            self._numbers = itertools.count(1)  # ids, never reused (one count for both)
        else:
            self.ids, self.styles, self.inert = styles_of.ids, styles_of.styles, styles_of.inert
            self.base_matches, self._numbers = styles_of.base_matches, styles_of._numbers
        self.cores = {}
        self.states = {}  # (key, state, subtree signature) -> samples that differ from rest
        self.memo = frag_mod.Memo()  # repeated subtrees

    def fresh(self) -> int:
        """An id shared with nothing (where selectors read more than the key holds)."""
        if len(self.styles) > CACHE_LIMIT:
            self._clear()
        return next(self._numbers)

    def intern(self, key) -> int:
        ident = self.ids.get(key)
        if ident is None:
            if len(self.ids) > CACHE_LIMIT:
                self._clear()
            # never reused: a walk in progress may still hold ids from before a clear
            ident = self.ids[key] = next(self._numbers)
        return ident

    def _clear(self) -> None:  # bound memory on large sites
        self.ids.clear()
        self.styles.clear()
        self.cores.clear()
        self.states.clear()
        self.inert.clear()
        self.memo.clear()
        self.base_matches.clear()


class PageWalker:
    def __init__(self, page, root, index, ruleset, scheme, preferred, cache,
                 viewport_width, skipped, keep_layers=True, lazy=False, fingerprints=None,
                 replay=True, structure=None, share=True, exemptions=None, disclosure=None,
                 overlay=None):
        self.page = page
        # the page's own trailing <style> blocks over the rule set whose cache this is
        # (``overlay.Overlay``): the elements they match get keys of their own, and no
        # subtree holding one is replayed or recorded
        self.overlay = overlay
        self._marked, self._holding = {}, frozenset()
        # the keys of this page alone (an element its own rules match, and its subtree): let
        # go from the shared cache once the page is done (``forget_own``)
        self._own_ids = set() if overlay is not None else None
        self._own = []  # (cache, key) of what was kept under them
        # each of them -> the key the element would have without the page's own rules: what
        # the stylesheets' rules match is the same for equal ones (``StyleCache.base_matches``)
        self._plain = {}
        # disclosure.Disclosure: closed <details> and tab panels, walked open too (None: none)
        self.disclosure = disclosure or None
        self.exemptions = exemptions  # exempt.Decisions of the page (None: disabled only)
        self.keep_layers = keep_layers  # `check` reports name causes, not every layer
        # lazy: replayed fragments go to ``replays`` as (fragment, Stamp) for the engine to
        # judge once, instead of being re-stamped sample by sample into ``samples``
        self.lazy = lazy
        self.replays = []
        self.fingerprints = {} if fingerprints is None else fingerprints  # element -> fp
        self.memo = cache.memo if replay and not ruleset.uses_has else None
        self.root = root
        self.index = index
        self.ruleset = ruleset
        self.scheme = scheme
        self.cache = cache
        self.resolver = Resolver(ruleset, preferred, viewport_width)
        self.skipped = skipped
        self.samples = []
        self.uncached = ruleset.uses_has or not share
        # the page's wrappers and structural ids, shared with the other schemes' walks
        self.structure = structure if structure is not None else \
            PageStructure(root, ruleset.structure)

    # -- keys ------------------------------------------------------------------------------
    def _key(self, parent_id: int, element_id: int) -> int:
        """The style-sharing key: the parent's key and the element's structural id."""
        if self.uncached:  # :has() looks at descendants: nothing is shared
            return self.cache.fresh()
        ident = self.cache.intern((parent_id, element_id))
        own = self._own_ids
        if own is not None and (parent_id in own or type(element_id) is tuple
                                and type(element_id[1]) is not Kept):
            own.add(ident)
            self._own.append((self.cache.ids, (parent_id, element_id)))
            self._own.append((self.cache.styles, ident))
            if type(element_id) is tuple:
                self._own.append((self.cache.inert, element_id))
            self._plain[ident] = self.cache.intern((
                self._plain.get(parent_id, parent_id),
                element_id[0] if type(element_id) is tuple else element_id))
        return ident

    def forget_own(self) -> None:
        """Let go of what the page's own rules made the shared cache keep (its styles, the
        colour work and states of their keys): no other page has those keys."""
        styles = self.cache.styles
        for kept, key in self._own:
            gone = kept.pop(key, None)
            if kept is styles and gone is not None and gone.pseudo:
                for pseudo in gone.pseudo.values():  # (a pseudo-element's parent is its
                    pseudo.parent = None  # element's style: a cycle, never collected here)
        self._own.clear()
        self._plain.clear()
        if self._own_ids is not None:
            self._own_ids.clear()

    # -- styles ----------------------------------------------------------------------------
    def style_for(self, el, parent_style, key_id, is_root):
        cache = self.cache.styles
        style = cache.get(key_id)
        if style is not None:
            if is_root:  # rem units below resolve against the root's font size
                self.resolver.root_font_size = style.font_size
            return style
        plain = self._plain.get(key_id) if self._plain else None
        if plain is None:
            rules = self.index.match(self.structure.wrapper_of(el))
        else:  # keyed apart by the page's own rules: the stylesheets' part is known
            wrapper = self.structure.wrapper_of(el)
            base = self.cache.base_matches.get(plain)
            if base is None:
                base = self.cache.base_matches[plain] = self.index.base.match(wrapper)
            rules = self.index.match_over(wrapper, base)
        inline = el.get("style")
        inline_decls = parse_declarations(inline) if inline else ()
        winners = cascade(rules, inline_decls, self.ruleset)
        fill = el.get("fill")
        if fill is not None and "fill" not in winners:
            # SVG presentation attribute: an author declaration below every style rule
            decl = parse_declarations(f"fill:{fill}")
            if decl:
                decl[0].line = el.sourceline or 0
                winners["fill"] = Winner(decl[0], None, "presentation", (2, 0, -1, (0, 0, 0), -1))
        ua_winners = None
        if any(w.decl.text.lower() in ("revert", "revert-layer") for w in winners.values()):
            ua_winners = cascade([r for r in rules if r.origin == "user-agent"], (), self.ruleset)
        style = self.resolver.compute(winners, parent_style, is_root, ua_winners)
        style.has_opacity_above = parent_style.has_opacity_above or parent_style.opacity < 1
        style.disabled = parent_style.disabled or _disabled(el)
        style.hidden_within = parent_style.hidden_within or style.visually_hidden
        if parent_style.in_link:
            style.in_link = parent_style.in_link
        elif el.tag == "a" and el.get("href") is not None:  # 2: a link in running text
            style.in_link = 2 if el.get(link_mod.RUNNING) is not None else 1
        pseudos = {}
        for rule in rules:
            if rule.pseudo in ("before", "after", "placeholder", "marker"):
                pseudos.setdefault(rule.pseudo, None)
        if pseudos:
            style.pseudo = {p: self.resolver.compute(cascade(rules, (), self.ruleset, p), style,
                                                     False)
                            for p in pseudos}
            style.generated = _generated(style.pseudo)
        else:
            style.pseudo = None
        cache[key_id] = style
        return style

    # -- walk ------------------------------------------------------------------------------
    def walk(self, states: bool = False):
        self.meta = {}
        self.texts = {}  # element -> its own text, from the resting walk
        self.interactive = []
        self._stated = set()  # controls whose states a walk has worked out
        self.rest = {}  # (xpath, kind) -> (fg, bg) of resting samples, for the state walks
        self._svg_shapes = {}
        self._path_memo = {}
        self._causes = {}  # (id(cause), inherited-from XPath) -> (Cause, the cause kept alive)
        self._own_texts = self.structure.texts
        self._recording = []  # open recordings, innermost last
        self.collect = bool(states and self.index.dynamic_rules)
        # the resting samples and the sibling facts the walks after the resting one read
        self.keep_rest = self.collect or self.disclosure is not None
        self._getpath = self.structure.path
        self.state = self.base_state = REST  # base: what state walks compare with
        if self.memo is not None:
            self.memo.begin_page()
        self._mark()
        root_key = self._key(0, self._root_id())
        self._walk([(self.root, ROOT_PARENT, root_key, True, (), True)], rest=True)
        if self.interactive:  # outside every scope (a root that is not a container)
            self._run_states(self.interactive)
            self.interactive = []
        self._closed_menus = []
        if self.disclosure is not None and self.disclosure.menus:
            # a menu shown at rest (a site's own CSS) is not walked open again
            found = [(m, self._path(m, REST)) for m in self.disclosure.menus]
            self._closed_menus = [m for m, at in found
                                  if at is not None and at[3].display == "none"]
        return self.samples

    def disclose(self) -> list:
        """After ``walk``, with the page's ``disclosure`` applied to the tree (closed
        <details> open, tabs shown, menus open: the engine applies it once for every scheme):
        the samples that are new about it, in the state ``shown``."""
        before = len(self.samples)
        self._path_memo.clear()  # (worked out in the tree as it was at rest)
        self._mark(opened=True)  # (what the page's own rules match in the tree opened)
        try:
            for target in self.disclosure.targets:
                self._shown(target)
            for menu in self._closed_menus:
                self._open(menu)
            for target, classes in self.disclosure.spied:
                self._spied(target, classes)
        finally:
            self.state = self.base_state = REST
            self._path_memo.clear()
        return self.samples[before:]

    def _shown(self, target) -> None:
        """Opened content (a details, a tab set): what differs from the resting samples, in
        the state ``shown``, then the states of the controls the resting walk did not meet
        (compared with their opened look)."""
        for sample in self._state(target, disclosure_mod.SHOWN, (), (), self.rest,
                                  gather=True):
            # what its controls' states are compared with
            self.rest[(sample.xpath, sample.kind)] = (sample.fg, sample.bg)
        controls = [(el, k) for el, k in self.interactive if el not in self._stated]
        self.interactive = []
        if controls:
            self.base_state = disclosure_mod.SHOWN
            try:
                self._run_states(controls)
            finally:
                self.state = self.base_state = REST

    def _spied(self, target, classes: str) -> None:
        """An element as a theme's scroll spy marks it (``classes`` added: the table-of-contents
        entry of the section in view): what differs from the resting samples, in the state
        ``current``. The classes are taken off again; what read them is forgotten both ways.
        Entries alike (their resting key and subtree, as ``_state_shared`` compares them) are
        walked once per site: the others are re-stamped from the first, unmarked."""
        state, known = disclosure_mod.CURRENT, self.meta.get(target)
        sig = (classes, self._signature(target)) if known is not None else None
        if sig is not None and (known[1], state, sig) in self.cache.states:
            self._state_shared(target, known[1], sig, state, (), (), self.rest)
            return
        before = target.get("class")
        behaviours_mod.add_classes(target, classes)
        self.structure.reclassed(target)
        try:
            if sig is None:
                self._state(target, state, (), (), self.rest)
            else:
                self._state_shared(target, known[1], sig, state, (), (), self.rest)
        finally:
            if before is None:
                target.attrib.pop("class", None)
            else:
                target.set("class", before)
            self.structure.reclassed(target)
            self.state = self.base_state

    def _open(self, menu) -> None:
        """A menu hidden whole at rest, walked open as the resting walk goes (scopes
        replayed, links hovered and focused: compared with the menu open), in the state
        ``shown``; its replays go to ``replays`` like the resting walk's."""
        found = self._path(menu, disclosure_mod.SHOWN)
        if found is None or not _displayed(found[3]):
            return
        parent_style, kid, chain, _ = found
        self.state = self.base_state = disclosure_mod.SHOWN
        self._walk([(menu, parent_style, kid, False, chain, True)], rest=True)
        if self.interactive:
            self._run_states(self.interactive)
            self.interactive = []

    def _run_states(self, targets):
        can_matter = self.index.state_can_matter
        self._stated.update(el for el, _ in targets)
        targets = [(el, kid) for el, kid in targets if can_matter(el)]  # once for every state
        signatures = {}  # element -> (len(self.texts) then, _signature)
        for state, on_self, on_path in STATES:
            for el, kid in targets:
                # texts only grow (a state walk may find new ones): the same count, the same
                # texts, the same signature
                known = signatures.get(el)
                if known is None or known[0] != len(self.texts):
                    known = signatures[el] = (len(self.texts), self._signature(el))
                self._state_shared(el, kid, known[1], state, on_self, on_path, self.rest)
        self.state = self.base_state

    def _open_scope(self, el, key_id, is_root):
        """Start a scope at ``el``; returns True when a recorded fragment was replayed instead."""
        recording = None
        if self.disclosure is not None and el in self.disclosure.holders:
            # walked open afterwards: its resting samples must be this page's own
            return (None, len(self.interactive))
        if self.memo is not None and not is_root and el not in self._holding \
                and self.memo.worth_trying(key_id):
            fp = self.fingerprints.get(el)
            if fp is None:
                fp = self.fingerprints[el] = frag_mod.fingerprint(el)
            fragment, record = self.memo.lookup(key_id, fp)
            if fragment is not None:
                self._replay(fragment, el)
                return None
            if record:
                recording = frag_mod.Recording((key_id, fp), self._getpath(el), len(self.samples),
                                               self.skipped)
                self._recording.append(recording)
        return (recording, len(self.interactive))

    def _close_scope(self, scope):
        recording, first_interactive = scope
        if len(self.interactive) > first_interactive:
            targets = self.interactive[first_interactive:]
            del self.interactive[first_interactive:]
            self._run_states(targets)
        if recording is None:
            return
        self._recording.pop()
        fragment = recording.finish(self.samples, self.skipped)
        self.memo.keep(recording.memo_key, fragment)
        if self._recording:
            outer = self._recording[-1]
            outer.nested.append((recording.start, len(self.samples),
                                 recording.base[len(outer.base):], fragment))

    def _replay(self, fragment, el):
        for reason, count in fragment.skipped.items():
            self.skipped[reason] = self.skipped.get(reason, 0) + count
        stamp = frag_mod.Stamp(self.page, self.scheme, el, self._getpath(el))
        first = len(self.samples)
        if self.lazy:
            self.replays.append((fragment, stamp))
        else:
            frag_mod.materialize(fragment, stamp, self.samples)
        if self._recording:
            outer = self._recording[-1]
            outer.nested.append((first, len(self.samples), stamp.new_base[len(outer.base):],
                                 fragment))

    def _walk(self, stack, rest=False, gather=False):
        """``rest``: the resting walk (or a menu's, as one); ``gather``: a walk outside it that
        still gathers the controls for their states and the sibling facts (opened content)."""
        key = self._key
        # the common paths inlined (a page walks thousands of elements): a cached style,
        # a known children list, an interned key
        styles = self.cache.styles
        kids = self.structure.kids
        ids = None if self.uncached else self.cache.ids
        children_of = self.structure.children
        meta = self.meta
        collect = (rest or gather) and self.collect
        keep_meta = (rest or gather) and self.keep_rest
        # what a reader cannot see is counted where it is walked as shown; a state walk keeps
        # only what differs from that (and is shared between elements alike, uncounted)
        counted = rest or gather
        memo = self.memo
        interactive = self.interactive  # emptied in place by _close_scope
        inert = self.cache.inert
        own_texts, text_of, texts = self._own_texts, self.structure.text, self.texts
        marked = self._marked
        while stack:
            item = stack.pop()
            el = item[0]
            if el is None:
                scope = item[1]
                if scope[0] is not None or len(interactive) > scope[1]:
                    self._close_scope(scope)
                continue
            _, parent_style, key_id, is_root, chain, scopable = item
            tag = el.tag
            tag = tag.lower() if isinstance(tag, str) else ""
            size = len(el)
            if rest and scopable and size and tag in SCOPE_TAGS:
                if memo is None or is_root:  # a scope without replay: states only
                    stack.append((None, (None, len(interactive))))
                else:
                    scope = self._open_scope(el, key_id, is_root)
                    if scope is None:
                        continue  # replayed
                    stack.append((None, scope))
            style = None if is_root else styles.get(key_id)
            if style is None:
                style = self.style_for(el, parent_style, key_id, is_root)
            if is_root:
                self.canvas = self._canvas(style)
            if style.display == "none":
                if counted:
                    self._skip("display:none", el)
                continue
            if style.opacity <= 0:
                if counted:
                    self._skip("opacity:0", el)
                continue
            chain = chain + ((el, style),)
            if tag in SVG_SHAPES and style.visibility == "visible":
                self._shape(el, style)
            focusable = _focusable(el, tag) if tag in INTERACTIVE \
                else el.get("tabindex") is not None
            if collect and focusable and not style.disabled:
                interactive.append((el, key_id))
            if tag in NO_TEXT:
                text = _listed(el, tag) if tag in LISTED else ""
            else:
                text = own_texts.get(el)
                if text is None:
                    text = text_of(el)
                if text:
                    texts[el] = text
            if text or style.generated or tag in FIELDS:  # most elements show nothing
                self._texts(el, tag, style, chain, key_id, text)
            if tag in nontext_mod.TAGS:  # SC 1.4.11: boundaries, focus rings, icons
                nontext_mod.emit(self, el, tag, style, chain)
            if not size:  # a leaf (most elements of highlighted code)
                continue
            children = kids.get(el)
            if children is None:
                children = children_of(el)
            if not children:
                continue
            scopable = scopable and not focusable and tag != "svg"
            items = []
            for child, element_id, siblings in children:
                if marked and child in marked:
                    element_id = (element_id, marked[child])
                cid = ids.get((key_id, element_id)) if ids is not None else None
                if cid is None:
                    cid = key(key_id, element_id)
                if keep_meta:
                    meta[child] = (siblings, cid)
                quiet = inert.get(element_id)  # the id stands for tag, attributes, emptiness
                if quiet is None:
                    quiet = inert[element_id] = _inert(child)
                if quiet:  # a visit would find nothing to show (whitespace in code, mostly)
                    known = styles.get(cid)
                    if known is not None and not known.generated:
                        continue
                items.append((child, style, cid, False, chain, scopable))
            stack.extend(reversed(items))

    def _signature(self, el) -> tuple:
        """The descendants' style keys (from the resting walk) stand for their tags,
        attributes and ancestors; which of them carry text decides which samples exist."""
        meta, texts = self.meta, self.texts
        return tuple((meta[d][1] if d in meta else d.tag, d in texts) for d in el.iter()
                     if isinstance(d.tag, str))

    def _state_shared(self, target, kid, sig, state, on_self, on_path, rest):
        """A state's samples, reused from an earlier element with the same style key and the
        same subtree (``sig``: ``_signature``): a site's navigation repeats on every page, so
        each link's :hover and :focus are computed once per site."""
        el = target
        texts = self.texts
        memo_key = (kid, state, sig)
        template = self.cache.states.get(memo_key)
        base = self._getpath(el)
        if template is None:
            before = len(self.samples)
            self._state(target, state, on_self, on_path, rest)
            self.cache.states[memo_key] = (base, self.samples[before:])
            if self._own_ids and kid in self._own_ids:
                self._own.append((self.cache.states, memo_key))
            return
        old_base, samples = template
        stamp = frag_mod.Stamp(self.page, self.scheme, el, base)
        for sample in samples:
            moved = stamp.sample(sample, old_base)
            if sample.kind in ("text", "svg-text"):  # the signature has no texts
                at = stamp.element(sample.xpath[len(old_base):].split("::")[0])
                moved.text = " ".join(texts.get(at, "").split())[:60]
            self.samples.append(moved)

    def _state(self, target, state, on_self, on_path, rest, gather=False) -> list:
        """Samples of ``target``'s subtree with a dynamic pseudo-class (or, with none, what
        the tree as it is now shows) in force: those that differ from ``rest``, kept and
        returned. ``gather``: as ``_walk``'s."""
        marked = mark_states(target, on_self, on_path)
        try:
            found = self._path(target, state)
            if found is None or not _displayed(found[3]):
                return []
            parent_style, kid, chain, _ = found
            before = len(self.samples)
            self.state = state
            self._walk([(target, parent_style, kid, False, chain, False)], gather=gather)
            new = self.samples[before:]
            del self.samples[before:]
            for sample in new:
                sample.state = state
                if rest.get((sample.xpath, sample.kind)) != (sample.fg, sample.bg):
                    self.samples.append(sample)
            return self.samples[before:]
        finally:
            unmark_states(marked)

    def _path(self, target, state):
        """``(parent style, target's key, ancestors' chain, target's style)`` of ``target`` in
        the tree as it is now (a state or a disclosure in force: ``state`` names it for the
        ancestors' memo), or None when an ancestor is not displayed."""
        path = [target] + list(target.iterancestors())
        path.reverse()
        parent_style, parent_id, chain = ROOT_PARENT, 0, ()
        memo = self._path_memo
        for k, el in enumerate(path):
            if self._reads_state_below(el):  # (`tr:has(a:hover)`): from here down, which
                memo = {}  # control below is in the state counts: nothing is kept for others
            if el is not target:  # ancestors carry the same state for every target below
                hit = memo.get((el, state))
                if hit is not None:
                    if hit is False:
                        return None
                    parent_style, parent_id, chain = hit
                    continue
            if k == 0:  # the root
                kid = self._key(0, self._root_id())
            else:
                kid = self._key(parent_id, self._with_marks(el, self._element_id(el)))
            style = self.style_for(el, parent_style, kid, k == 0)
            if el is target:
                return parent_style, kid, chain, style
            if not _displayed(style):
                memo[(el, state)] = False
                return None
            chain = chain + ((el, style),)
            parent_style, parent_id = style, kid
            memo[(el, state)] = (parent_style, parent_id, chain)
        return None

    def _reads_state_below(self, el) -> bool:
        """Whether a ``:has()`` compound that reads a state (``tr:has(a:hover)``) could match
        ``el``: its style in a state then depends on which control below is in it."""
        has = self.structure.structure.has
        return has is not None and bool(has.dynamic) and \
            any(text in has.dynamic for text, _ in has.candidates(el))

    def _mark(self, opened: bool = False) -> None:
        if self.overlay is not None:
            self._marked, self._holding = self.overlay.marks(self.root,
                                                             self.structure.wrapper_of, opened)

    def _root_id(self):
        return self._with_marks(self.root, self.structure.root_id())

    def _with_marks(self, el, ident):
        """``el``'s structural id, with the page's own rules it matches where it matches some
        (``overlay.Overlay.marks``; the walk's loop over children does the same inline)."""
        marked = self._marked
        return (ident, marked[el]) if marked and el in marked else ident

    def _element_id(self, el) -> int:
        """The structural id of ``el`` at its place: worked out from what sibling-reading
        selectors need of it as the resting walk found it, or (an element it replayed, not
        walked: a menu of a replayed navigation bar, met on every page in every scheme) taken
        from its parent's children list, which holds both."""
        known = self.meta.get(el)
        if known is not None:
            return self.structure.structure.element_id(el, known[0], self.structure.wrapper_of)
        parent = el.getparent()
        if parent is not None:
            for child, ident, _ in self.structure.children(parent):
                if child is el:
                    return ident
        return self.structure.structure.element_id(el, 0, self.structure.wrapper_of)

    def _skip(self, reason, el):
        if el.tag in ("head", "script", "style", "template", "title", "noscript"):
            return
        if len(el) or (el.text or "").strip():
            self.skipped[reason] = self.skipped.get(reason, 0) + 1

    def _canvas(self, root_style):
        canvas = parse_color("Canvas", scheme=root_style.scheme)
        return canvas if isinstance(canvas, tuple) else (1.0, 1.0, 1.0, 1.0)

    # -- samples ---------------------------------------------------------------------------
    def _texts(self, el, tag, style, chain, key_id, text):
        """The samples of ``el``: generated content, form values, its own ``text``."""
        if tag == "textarea":  # its text is its value (placeholder when empty)
            self._field(el, style, chain, key_id, el.text or "")
            return
        if tag == "select":
            shown = _shown_option(el)
            if shown.strip():
                self._emit(el, style, chain, shown, "value", ("value", key_id))
            return
        for pseudo, ps, content in style.generated:
            self._emit(el, ps, chain + ((None, ps),), content, "generated",
                       ("pseudo", pseudo, key_id), f"::{pseudo}")
        if tag == "input":
            itype = (el.get("type") or "text").lower()
            if itype in ("button", "submit", "reset"):
                label = el.get("value") or {"submit": "Submit", "reset": "Reset"}.get(itype, "")
                if label.strip():
                    self._emit(el, style, chain, label, "value", ("value", key_id))
            elif itype in ("text", "search", "email", "url", "tel", "number", "password"):
                self._field(el, style, chain, key_id, el.get("value") or "")
            return
        if not text:
            return
        if style.visibility != "visible":
            self.skipped["visibility:hidden"] = self.skipped.get("visibility:hidden", 0) + 1
            return
        if style.hidden_within:
            self.skipped["visually hidden"] = self.skipped.get("visually hidden", 0) + 1
            return
        if tag in LISTED:  # a list box's row: what the control shows, as a value
            self._emit(el, style, chain, text, "value", ("value", key_id))
            return
        if tag == "li" and style.display == "list-item" and style.list_style not in GLYPH_MARKERS:
            self._marker(el, style, chain, key_id)
        if tag in SVG_TEXT:
            shapes = tuple(self._svg_shapes.get(_svg_root(el), ()))
            self._emit(el, style, chain, text, "svg-text", ("svg", key_id, shapes),
                       shapes=shapes)
            return
        self._emit(el, style, chain, text, "text", ("text", key_id))

    def _field(self, el, style, chain, key_id, value: str) -> None:
        """A text field's value, or its placeholder when it is empty (a blank value shows
        neither)."""
        if value:
            if value.strip():
                self._emit(el, style, chain, value, "value", ("value", key_id))
        elif el.get("placeholder") and style.pseudo and "placeholder" in style.pseudo:
            ps = style.pseudo["placeholder"]
            self._emit(el, ps, chain + ((None, ps),), el.get("placeholder"),
                       "placeholder", ("placeholder", key_id), "::placeholder")
        elif el.get("placeholder"):
            ps = self.resolver.compute({}, style, False)
            ps.color = parse_color("GrayText", scheme=style.scheme)
            self._emit(el, ps, chain + ((None, ps),), el.get("placeholder"),
                       "placeholder", ("placeholder-ua", key_id), "::placeholder")

    def _marker(self, el, style, chain, key_id):
        """A numbered list item's marker is text ("3."); bullets are symbols and are not."""
        parent = el.getparent()
        if parent is None or parent.tag != "ol":
            return
        index = sum(1 for sib in parent[:parent.index(el)] if sib.tag == "li") + 1
        start = parent.get("start")
        if start and start.lstrip("-").isdigit():
            index += int(start) - 1
        ps = style.pseudo.get("marker") if style.pseudo else None
        marker_style = ps if ps is not None else style
        self._emit(el, marker_style, chain + ((None, marker_style),) if ps is not None else chain,
                   f"{index}.", "marker", ("marker", key_id), "::marker")

    def _shape(self, el, style):
        """Record an SVG shape's fill: later text in the same <svg> may lie on it."""
        fill = style.svg_fill[0] if style.svg_fill is not None else BLACK  # SVG initial fill
        if fill[3] > 0:  # each fill once (a diagram of 2,000 shapes has a few fills)
            self._svg_shapes.setdefault(_svg_root(el), {})[fill] = None

    def _emit(self, el, style, chain, text, kind, core_key, suffix="", shapes=()):
        """Append a Sample. The colour work is cached by style key; anything positional
        (XPaths of the element, of the ancestor a colour is inherited from, of background
        layers) is filled in here, because elements sharing a key may stand elsewhere."""
        core = self.cache.cores.get(core_key)
        if core is None:
            core = self._core(el, style, chain, kind, shapes) + (round(style.font_size, 4),
                                                                 style.font_weight)
            self.cache.cores[core_key] = core
            if self._own_ids and core_key[1] in self._own_ids:
                self._own.append((self.cache.cores, core_key))
        fg, bg, fg_raw, status, reason, alts, exempt, fg_cause, inherited_at, layers, \
            bg_cause, surround, size, weight = core
        getpath = self._getpath
        xpath = getpath(el) + suffix if suffix else getpath(el)
        if self.keep_rest and self.state == self.base_state:
            self.rest[(xpath, kind)] = (fg, bg)
        if inherited_at is not None:
            # texts inheriting from one ancestor share one (immutable) Cause
            at = _path_at(chain, inherited_at, getpath)
            shared = self._causes.get((id(fg_cause), at))
            if shared is None:
                shared = self._causes[(id(fg_cause), at)] = (
                    Cause(fg_cause.declaration, at, fg_cause.chain), fg_cause)
            fg_cause = shared[0]
        layers = tuple(Layer(_path_at(chain, at, getpath), kind_, colour, cause)
                       for at, kind_, colour, cause in layers) if self.keep_layers else ()
        decisions = self.exemptions
        if decisions is not None:  # per element, after the caches (extract/exempt.py)
            found = decisions.by_element.get(el, "")
            exempt = exempt_mod.settle(el, found, kind, text, fg, bg, decisions.enabled,
                                       self.structure.text) if found or kind == "generated" \
                else ""
        link = link_mod.context(self, el, chain, fg, bg) \
            if style.in_link == 2 and self.state == REST and kind == "text" and not exempt \
            else None
        # own texts arrive collapsed; generated content and attribute values may not
        text = text[:60] if kind == "text" else " ".join(text.split())[:60]
        self.samples.append(Sample(
            self.page, self.scheme, self.state, xpath, el.sourceline or 0, text, kind, fg, bg,
            fg_raw, size, weight, status, reason, alts, exempt, fg_cause, layers, bg_cause,
            surround, link))

    def _core(self, el, style, chain, kind, shapes=()):
        if kind == "svg-text":  # SVG text paints with fill, initially black
            text_colour, fg_cause = style.svg_fill if style.svg_fill is not None else (
                BLACK, Cause())
        elif style.fill_color is not None:
            text_colour, fg_cause = style.fill_color
        else:
            text_colour, fg_cause = style.color, style.color_cause
        inherited_at = None
        if fg_cause is not None and fg_cause.declaration is not None and style.color_inherited \
                and text_colour is style.color:
            inherited_at = _inherited_index(chain)
        reasons, shadow = [], None
        for _, s in chain:
            for prop, value, _decl in s.effects:
                if prop == "text-shadow":
                    if s is style:  # inherited into the style already
                        shadow = value
                    continue
                reasons.append(f"{prop}: {value}")
        layers, bg_cause, image_reason, surround = self._layers(chain)
        pairs = self._paint(chain, text_colour)
        if image_reason:
            reasons.append(image_reason)
        fg, bg = pairs[0]
        alts = tuple(b for _, b in pairs[1:])  # the other gradient stops' backgrounds
        if shapes:
            # Shapes drawn earlier in the same <svg> may lie under the text; where exactly is
            # geometry tinctura does not compute, so each fill is one more possible background.
            alts = alts + tuple(tuple(over(c, bg + (1.0,))[:3]) for c in shapes)
        if shadow is not None:
            outline = outline_shadows(shadow, text_colour, style)
            if outline:
                # an outline-like shadow hugs every glyph: the text reads against it as much
                # as against the background, so it is one more background to pass against
                alts = alts + tuple(tuple(over(c, bg + (1.0,))[:3]) for c in outline)
        status = UNDETERMINED if reasons else DETERMINED
        exempt = "inactive-control" \
            if style.disabled or any(s.disabled for _, s in chain) else ""
        return (fg, bg, text_colour, status, "; ".join(reasons), alts, exempt, fg_cause,
                inherited_at, tuple(layers), bg_cause, surround)

    def _paint(self, chain, top):
        """(text pixel, background pixel) pairs for ``top`` painted in the element.

        Each ancestor paints its background under the group, then the group is faded by the
        ancestor's opacity; the result lands on the canvas. A gradient yields one pair per stop.
        """
        transparent = (0.0, 0.0, 0.0, 0.0)
        options = [(top, transparent)]
        for _, s in reversed(chain):
            paints = _paints(s)
            options = [((over(f, p) if p[3] > 0 else f), (over(b, p) if p[3] > 0 else b))
                       for f, b in options for p in paints][:MAX_ALTERNATIVES]
            if s.opacity < 1:
                options = [(with_alpha(f, s.opacity), with_alpha(b, s.opacity))
                           for f, b in options]
            if not s.has_opacity_above and all(f[3] >= 1 and b[3] >= 1 for f, b in options):
                break
        return [(tuple(over(f, self.canvas)[:3]), tuple(over(b, self.canvas)[:3]))
                for f, b in options]

    def _layers(self, chain):
        """Background layers, top-most first, as (chain index, kind, colour, cause)."""
        layers, bg_cause, reason, surround = [], None, "", None
        opaque_seen = False
        for at in range(len(chain) - 1, -1, -1):
            s = chain[at][1]
            if s.shadows and not opaque_seen:  # painted above the backgrounds
                shadows, cause = s.shadows
                for colour, _whole in reversed(shadows):
                    layers.append((at, "shadow", colour, cause))
                bg_cause = bg_cause or cause
            if s.images and not opaque_seen:
                images, cause = s.images
                for kind, data in images:
                    if kind == "url":
                        reason = f"background image {data}"
                        layers.append((at, "image", None, cause))
                    else:
                        layers.append((at, "gradient", data[0], cause))
                        if bg_cause is None:
                            bg_cause = cause
            if s.bg[3] > 0 and not opaque_seen:
                layers.append((at, "background-color", s.bg, s.bg_cause))
                if bg_cause is None:
                    bg_cause = s.bg_cause
            elif s.bg[3] > 0 and surround is None:
                surround = s.bg[:3]
            if s.opacity < 1:
                layers.append((at, "opacity", (0, 0, 0, s.opacity), s.opacity_cause))
            if s.bg[3] >= 1 and not opaque_seen:
                opaque_seen = True
        if not opaque_seen:
            layers.append((None, "canvas", self.canvas, None))
        elif surround is None:  # nothing painted around the element's background: the canvas
            surround = tuple(self.canvas[:3])
        return layers, bg_cause, reason, surround


# An outline-like text shadow: offsets and blur this small surround each glyph (common
# practice for legibility halos; not a published threshold).
SHADOW_MAX_OFFSET_PX = 2.0
SHADOW_MAX_BLUR_PX = 4.0


def _displayed(style) -> bool:
    return style.display != "none" and style.opacity > 0


def outline_shadows(value: str, text_colour, style) -> list:
    """Colours of the shadows in ``value`` when every one of them outlines the glyphs.

    Returns [] for drop shadows (offset or blurred away from the text), which leave the text
    against its background.
    """
    import tinycss2

    from .values import LengthContext, length, significant, split_commas

    ctx = LengthContext(style.font_size, 16.0)
    colours = []
    for part in split_commas(tinycss2.parse_component_value_list(value)):
        tokens = significant(part)
        lengths, colour = [], None
        for t in tokens:
            v = length(t, ctx) if t.type in ("dimension", "number") else None
            if v is not None:
                lengths.append(v)
                continue
            c = parse_color([t], current=text_colour, scheme=style.scheme)
            if isinstance(c, tuple):
                colour = c
        if colour is None:
            colour = text_colour  # a shadow without a colour uses currentcolor
        if len(lengths) < 2 or colour[3] <= 0:
            continue
        ox, oy = lengths[0], lengths[1]
        blur = lengths[2] if len(lengths) > 2 else 0.0
        if max(abs(ox), abs(oy)) > SHADOW_MAX_OFFSET_PX or blur > SHADOW_MAX_BLUR_PX:
            return []
        colours.append(colour)
    return colours


def _paints(style):
    """The colours one element paints behind its content: bg colour, each gradient stop, then
    inset box shadows (above the backgrounds, below the content)."""
    base = style.bg
    if not style.images and not style.shadows:
        return [base]
    options = [base]
    for kind, data in (style.images[0] if style.images else ()):
        if kind == "gradient":
            options = [over(stop, b) for b in options for stop in data]
    for colour, whole in (style.shadows[0] if style.shadows else ()):
        shaded = [over(colour, b) for b in options]
        # a shadow over part of the box: the text may sit on it or beside it
        options = shaded if whole else options + shaded
    return _dedupe(options)[:MAX_ALTERNATIVES]


def _dedupe(colours):
    seen, out = set(), []
    for c in colours:
        k = tuple(round(x, 6) for x in c)
        if k not in seen:
            seen.add(k)
            out.append(c)
    return out


def _inherited_index(chain):
    """Index in the chain of the nearest ancestor whose colour was set, not inherited."""
    for at in range(len(chain) - 2, -1, -1):
        el, s = chain[at]
        if el is not None and not s.color_inherited:
            return at
    return None


def _path_at(chain, at, getpath):
    if at is None:
        return ""
    el = chain[at][0]
    return getpath(el) if el is not None else ""


def _shown_option(select) -> str:
    """The text a closed drop-down ``select`` shows: its selected option's (the last marked
    selected), else its first option's (HTML Living Standard, the select element's selectedness
    setting algorithm); none for a list box, whose options are rows of their own (``_listed``)."""
    if _list_box(select):
        return ""
    options = list(select.iter("option"))
    if not options:
        return ""
    chosen = [o for o in options if o.get("selected") is not None]
    shown = chosen[-1] if chosen else options[0]
    return shown.get("label") or "".join(shown.itertext())  # (_emit collapses it)


def _list_box(select) -> bool:
    """Whether ``select`` shows its options as a list: ``multiple``, or a display size above 1
    (HTML Living Standard, the select element)."""
    size = (select.get("size") or "").strip()
    return select.get("multiple") is not None or (size.isdigit() and int(size) > 1)


def _listed(el, tag: str) -> str:
    """The text of an option (an optgroup's label) as a list box shows it, as a row: its
    ``label`` when not empty, else its text (HTML Living Standard, the option element); "" in
    a drop-down, whose closed box shows one option as the select's value."""
    select = el.getparent()
    if tag == "option" and select is not None and select.tag == "optgroup":
        select = select.getparent()
    if select is None or select.tag != "select" or not _list_box(select):
        return ""
    if tag == "optgroup":
        return el.get("label") or ""
    return el.get("label") or "".join(el.itertext())


def _svg_root(el):
    while el is not None and el.tag != "svg":
        el = el.getparent()
    return el


def _focusable(el, tag) -> bool:
    if tag == "a":
        return el.get("href") is not None
    if tag in ("button", "select", "textarea", "summary"):
        return True
    if tag == "input":
        return (el.get("type") or "").lower() != "hidden"
    return el.get("tabindex") is not None


def _inert(el) -> bool:
    """An element that shows nothing unless its style generates content: no children, no text,
    not focusable, not a control, link or SVG shape (nothing the walk checks or counts)."""
    if len(el) or (el.text or "").strip() or el.get("tabindex") is not None:
        return False
    tag = el.tag.lower()
    # a list box's row may show its label alone (the cache of this answer is keyed by the
    # element's structural id, which keeps the attribute's presence, not its value)
    if tag in LISTED and el.get("label") is not None:
        return False
    return tag not in SHOW_EMPTY


def _disabled(el) -> bool:
    tag = el.tag.lower() if isinstance(el.tag, str) else ""
    if tag in FORM_CONTROLS and el.get("disabled") is not None:
        return True
    return el.get("aria-disabled", "").lower() == "true" and tag in ("button", "a")


def _generated(pseudo: dict) -> tuple:
    """``Style.generated`` from the element's pseudo-element styles."""
    out = []
    for name in ("before", "after"):
        ps = pseudo.get(name)
        if ps is not None and ps.content and ps.display != "none":
            content = _string_content(ps.content)
            if content:
                out.append((name, ps, content))
    return tuple(out)


def _string_content(tokens) -> str:
    out = []
    for t in tokens:
        if t.type == "string":
            out.append(t.value)
        elif t.type == "ident" and t.lower_value in ("none", "normal"):
            return ""
    return "".join(out).strip()
