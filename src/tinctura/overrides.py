"""Fixes as CSS the writer can add to a stylesheet of their own site.

A colour that comes from the theme is fixed by overriding it, never by editing the theme's
(minified, rebuilt) files: each problem's fix at the cause becomes one or more rules that set the
custom property (when the colour comes through ``var()``) or the property itself, scoped to the
colour scheme it must apply in (the scheme's attribute selector, or a ``prefers-color-scheme``
media block). Where one value cannot serve every background the declaration meets, the rule is
scoped to the background's own selector instead. Every override is then verified by checking
the affected pages again with all overrides applied (``verify``).

Computation only: the CLI and the plugin hand in problems, schemes and what they know of the
site's stylesheets; reports format the records.
"""
from __future__ import annotations

import functools
import math
import re
from dataclasses import dataclass, field, replace
from typing import Optional

from tinctura.colour import suggest
from tinctura.colour.convert import to_hex
from tinctura.colour.parse import parse_color
from tinctura.cyclic_gc import no_collections
from tinctura.extract.values import colour_longhand
from tinctura.mkdocs_project import owned, sphinx_sheet
from tinctura.model import REST
from tinctura.problems import _quantize, faded, target_declaration
from tinctura.situations import slot as slot_of

DEFAULT_FILE = "stylesheets/colour-fixes.css"  # when the site has no stylesheet of its own
SPHINX_FILE = "_static/colour-fixes.css"  # the same, on a site Sphinx built
_COLOUR_PROPS = ("background-color", "background")
_SPACE = re.compile(r"\s+")


@dataclass
class Rule:
    """One CSS rule: ``selector { property: value; ... }``, inside ``media`` when given."""

    selector: str
    declarations: tuple  # ((property, value, important), ...)
    media: str = ""  # "(prefers-color-scheme: dark)" or ""

    def _declared(self) -> list:
        return [f"{p}: {v}{' !important' if imp else ''};" for p, v, imp in self.declarations]

    def compact(self) -> str:
        """The rule on one line, for a sentence."""
        rule = f"{self.selector} {{ {' '.join(self._declared())} }}"
        return f"@media {self.media} {{ {rule} }}" if self.media else rule

    def css(self) -> str:
        body = "".join(f"  {d}\n" for d in self._declared())
        rule = f"{self.selector} {{\n{body}}}\n"
        if not self.media:
            return rule
        inner = "".join(f"  {line}\n" if line else "\n" for line in rule.splitlines())
        return f"@media {self.media} {{\n{inner}}}\n"


@dataclass
class Override:
    """A problem's fix as CSS, the stylesheet it belongs in, and whether a re-check proved it."""

    file: str  # site-relative path of a stylesheet the writer owns
    rules: list = field(default_factory=list)  # list[Rule]
    schemes: tuple = ()  # the schemes it applies in (empty: all)
    target: str = "foreground"  # or "background": what it changes
    note: str = ""  # what the writer should know (e.g. "a new file: add it to extra_css")
    verified: Optional[bool] = None  # None: not re-checked
    shown_file: str = ""  # ``file`` as the writer sees it (relative to mkdocs.yml), when known
    shared_with: tuple = ()  # numbers (from 1) of other problems this same CSS fixes
    # (normalized selector, property) -> selectors of the rules whose elements it took over
    # (``recheck``): planned again without them (``excluding``)
    took_over: dict = field(default_factory=dict)
    within: str = ""  # the container an underline was limited to (``Planner._cue``), if any
    scoped: tuple = ()  # ``declaration_key``s of the rules whose underline ``within`` limits
    # why a re-check did not prove it (``_mark``): the problem is still there, and the rules of
    # the findings its own values cause
    remains: bool = False
    causes: tuple = ()

    def keys(self) -> set:
        """What it sets: (media, selector, property, value) for every declaration."""
        return {(r.media, _normal(r.selector), d[0], d[1]) for r in self.rules
                for d in r.declarations if not d[1].startswith("var(")}

    @property
    def where(self) -> str:
        return self.shown_file or self.file

    def css(self) -> str:
        return "".join(rule.css() for rule in self.rules)

    def compact(self) -> str:
        """The rules on one line, for a sentence."""
        return " ".join(rule.compact() for rule in self.rules)


@dataclass
class Scope:
    """How a rule is limited to one colour scheme."""

    attribute: str = ""  # '[data-md-color-scheme="slate"]'
    holder: str = ""  # the element carrying the attribute: "body" or "html"
    media: str = ""  # "(prefers-color-scheme: dark)"


class Planner:
    """Turns problems into overrides for one site."""

    def __init__(self, schemes, project=None, sheet_order=()):
        self.schemes = {s.name: s for s in schemes if hasattr(s, "name")}
        self.project = project
        # the site's stylesheets in the order a page links them: the last owned one is where
        # an override of a theme value goes (it must come after the theme's sheets)
        own = [s for s in sheet_order if owned(s, project)]
        if project is not None and project.extra_css:
            own = [s for s in project.extra_css if s.endswith(".css")] or own
        self.last_own = own[-1] if own else None
        # a site Sphinx built (its stylesheets in _static/): a new file goes there
        self.sphinx = any(map(sphinx_sheet, sheet_order))
        # TC120's underlines: declaration_key -> the container to limit a page-wide rule to
        # (``WriterAid.cue_scopes``); the keys whose limited rule failed its check
        self.cue_scopes: dict = {}
        self.unscoped: set = set()

    # -- scopes ---------------------------------------------------------------------------

    def scope(self, name: str) -> Scope:
        if len(self.schemes) < 2 or name not in self.schemes:
            return Scope()
        scheme = self.schemes[name]
        if scheme.attributes:
            holder, attr, value = scheme.attributes[0]
            parts = [(attr, value)]
            clash = [s for s in self.schemes.values() if s.name != name and s.attributes
                     and s.attributes[0][1:] == (attr, value)]
            if clash:  # two palette entries with one scheme value: name the rest too
                parts += [(a, v) for h, a, v in scheme.attributes[1:] if h == holder]
            return Scope("".join(f'[{a}="{v}"]' for a, v in parts), holder)
        pref = scheme.media_value("prefers-color-scheme")
        return Scope(media=f"(prefers-color-scheme: {pref})") if pref else Scope()

    def scoped(self, scope: Scope, selector: str) -> str:
        """``selector`` limited to the scope's attribute (media are added by the Rule).

        The attribute is wrapped in ``:where()``: the override keeps the specificity of the
        declaration it replaces, so it wins over that one by coming later and over nothing
        that used to win over it (bootstrap's ``.nav-link`` over a scoped ``a``, say)."""
        selector = _SPACE.sub(" ", (selector or "").strip()) or ":root"
        if not scope.attribute:
            return selector
        if _normal(scope.attribute) in _normal(selector):
            return selector  # the theme's own rule for this scheme
        only = f":where({scope.attribute})"
        first, rest = _first_compound(selector)
        base = re.match(r"^(:root|[a-zA-Z][a-zA-Z0-9-]*)?", first).group(0)
        if scope.holder == "body" and base in (":root", "html"):
            # declared above the attribute's holder: declare it on the holder instead (alone,
            # the attribute has the specificity of :root)
            return f"{first} {only}{rest}" if rest.strip() else scope.attribute
        if base == scope.holder or (scope.holder == "html" and base == ":root"):
            return first + only + rest
        if first.startswith("["):
            # an attribute alone may be the holder's own: a theme sets its palette attributes
            # side by side on one element (material: scheme, primary and accent on body)
            return f"{only}{first}{rest}, {only} {selector}"
        return f"{only} {selector}"

    # -- per problem ----------------------------------------------------------------------

    def plan(self, problem, element_selector=None, opacity_of=None,
             narrow: bool = False) -> Optional[Override]:
        """The override for one problem, or None when no colour on the same side exists or
        the text is faded by an ancestor's opacity (``faded``), which no colour undoes.

        ``element_selector(finding)`` gives a CSS selector for a finding's element (used when
        the colour comes from a style attribute or from no declaration at all);
        ``opacity_of(finding)`` the ``(declaration, value)`` of the opacities that fade it,
        nearest first (then the fix raises the nearest one). ``narrow``: set the colour on
        the rule that uses a custom property rather than the property itself (``narrowable``)."""
        if problem.rule not in OVERRIDE_RULES:
            return None  # advice (appearance rules): the colour suggested at the cause only
        if problem.rule in CUE_RULES:
            return self._cue(problem, element_selector)
        if problem.rule in GRAPHIC_RULES and not _one_line_colour(problem):
            return None  # advice at the cause only
        if faded(problem.worst):
            if opacity_of is None:
                return None
            unfaded = problem.worst_unfaded
            if unfaded is None:
                return self._opacity(problem, opacity_of)
            return self._mixed(problem, unfaded, element_selector, opacity_of, narrow)
        return self._colours(problem, element_selector, narrow)

    def _colours(self, problem, element_selector, narrow=False) -> Optional[Override]:
        """The text colour (or, where no text colour passes, the background) the problem's
        worst texts need, scheme by scheme."""
        fix = problem.fix_at_cause
        if fix is None:
            return None
        narrow_bg = narrow and narrowable(problem, "bg")
        narrow = narrow and narrowable(problem)
        decl = problem.fg_cause.declaration if narrow else target_declaration(problem.fg_cause)
        failing = list(problem.schemes) or [problem.scheme]
        rules, schemes, target = [], [], "foreground"
        if fix.possible:
            # the value passes wherever the declaration is used; where it is not used (a rule
            # inside a media block, say) the override must not apply either
            used = [n for n in fix.schemes if n in self.schemes]
            everywhere = not used or set(used) >= set(self.schemes)
            for name in ([None] if everywhere else used):
                scope = Scope() if name is None else self.scope(name)
                for one in (_using(problem) if narrow else [decl]):
                    rules += self._fg_rules(problem, one, scope, fix.colour, element_selector,
                                            None)
            schemes = [] if everywhere else used
        else:
            per = {}  # scheme -> (its rules, what they change)
            for name in failing:
                per[name] = self._scheme_rules(problem, fix, decl, name, self.scope(name),
                                               element_selector, narrow_bg)
                if per[name] is None:
                    return None
            if len(per) > 1 and set(per) >= set(self.schemes):
                # the same rules in every scheme once unscoped: one set (:where() gave the
                # scoped ones no specificity, so it wins where they won)
                plain = [self._scheme_rules(problem, fix, decl, name, Scope(),
                                            element_selector, narrow_bg) for name in per]
                if None not in plain and len({_rules_key(got) for got in plain}) == 1:
                    per = {None: plain[0]}
            for got, changed in per.values():
                rules += got
                target = changed
            schemes = [name for name in per if name is not None]
        if not rules:
            return None
        file, note = self._file(decl if target == "foreground" else
                                target_declaration(problem.bg_cause))
        if target == "background" and any(d[0] == "background-image" and "gradient(" in d[1]
                                           for r in rules for d in r.declarations):
            note = GRADIENT_NOTE
        bg_decl = target_declaration(problem.bg_cause)
        if target == "foreground" and decl is not None and decl.origin == "inline":
            note = ("the colour is set by a style attribute in the page: changing it there is "
                    "better than this rule")
        elif target == "background" and bg_decl is not None and bg_decl.origin == "inline":
            note = ("the background is set by a style attribute in the page: changing it there "
                    "is better than this rule")
        return Override(file, rules, tuple(schemes), target, note)

    def _scheme_rules(self, problem, fix, decl, name, scope, element_selector, narrow_bg):
        """``(rules, "foreground" or "background")`` for the scheme ``name`` under ``scope``:
        the text colour its worst texts need, else their background; None when neither."""
        figures = problem.schemes.get(name)
        worst = figures.worst if figures is not None else problem.worst
        context = _context_for(fix.contexts, name, worst)
        if context is not None and context.colour is not None:
            per_bg = sum(1 for c in fix.contexts if name in c.schemes) > 1
            return self._fg_rules(problem, decl, scope, context.colour, element_selector,
                                  worst if per_bg else None), "foreground"
        got = self._bg_rules(problem, scope, worst, narrow_bg, element_selector)
        return (got, "background") if got else None

    def _cue(self, problem, element_selector=None) -> Optional[Override]:
        """Links told apart by colour alone: underlined, on the rules that colour them (every
        link they colour gets the same cue; a theme variable may colour links through
        several rules, `.md-typeset a` and `.md-meta__link`), else on the element. A rule for
        every link of the page (``a``) is limited to the container of the failing ones that
        keeps the site's menus out (``cue_scopes``), unless that failed its check
        (``unscoped``)."""
        cause = problem.fg_cause
        decl = cause.declaration if cause is not None else None
        if not _cue_rule(decl):
            selector = element_selector(problem.worst) if element_selector else None
            return self._underline(decl, [selector], (), ()) if selector else None
        selectors, scoped, containers = [], [], []
        inherited = _inherited_by_links(problem)
        for d in dict.fromkeys([decl] + [u for u in problem.using_declarations("fg")
                                         if _cue_rule(u)]):
            selector = _SPACE.sub(" ", d.selector.strip())
            if d in inherited:  # the rule colours a block its links inherit from: its links
                links = [f"{part.strip()} a" for part in selector.split(",")]
                selectors.append(", ".join(links + _outbid(problem, links)))
                continue
            key = declaration_key(d)
            within = self.cue_scopes.get(key, "") if key not in self.unscoped else ""
            if within:
                selector = ", ".join(f"{within} {part.strip()}" for part in selector.split(","))
                scoped.append(key)
                containers.append(within)
            selectors.append(selector)
        return self._underline(decl, selectors, scoped, containers)

    def _underline(self, decl, selectors, scoped, containers) -> Override:
        file, note = self._file(decl)
        containers = list(dict.fromkeys(containers))
        if not note:
            named = " and ".join(f"`{c}`" for c in containers)
            them = "it" if len(containers) == 1 else "them"
            note = UNDERLINE_NOTE + (f", within {named} only: the menus outside {them} keep "
                                     "their look" if containers else "")
        return Override(file, [Rule(", ".join(dict.fromkeys(selectors)),
                                    (("text-decoration-line", "underline", False),))],
                        (), "cue", note, within=containers[0] if containers else "",
                        scoped=tuple(scoped))

    def _mixed(self, problem, unfaded, element_selector, opacity_of,
               narrow=False) -> Optional[Override]:
        """The worst text is faded by an opacity and others fail unfaded: the colour change
        the unfaded ones need (planned as for their worst), and then the opacity the faded
        ones need over the new colours, if any (raising the opacity alone leaves the unfaded
        texts failing)."""
        # (a scheme whose worst is faded is planned for the unfaded worst met in any scheme:
        # the Collector keeps one; the verification tells where that is not enough)
        schemes = {name: figures if figures.worst is None or not faded(figures.worst) else
                   replace(figures, worst=unfaded, worst_ratio=unfaded.ratio)
                   for name, figures in problem.schemes.items()}
        as_unfaded = replace(problem, worst_finding=unfaded, schemes=schemes)
        colours = self._colours(as_unfaded, element_selector, narrow)
        if colours is None:
            return None
        new = [parse_color(d[1])[:3] for r in colours.rules for d in r.declarations
               if d[1].startswith("#")]
        raised = self._opacity(problem, opacity_of, new, colours.target)
        if raised is not None:
            colours.rules += raised.rules
        return colours

    def _opacity(self, problem, opacity_of, new=(), target="") -> Optional[Override]:
        """Faded text: the least opacity of the nearest fading element that lets every
        failing scheme's text pass (in steps of 0.05)."""
        needed, decl = 0.0, None
        for name in list(problem.schemes) or [problem.scheme]:
            figures = problem.schemes.get(name)
            worst = figures.worst if figures is not None else problem.worst
            if not faded(worst):
                continue  # (``_mixed``: the colour change serves the unfaded ones)
            layers = opacity_of(worst) or []
            if not layers or layers[0][0] is None or not layers[0][0].selector:
                return None
            decl, value = layers[0]
            others = math.prod(v for _, v in layers[1:])
            for colours in _seen_with(worst, new, target):
                found = _least_opacity(worst, value, others, problem.required, *colours)
                if found is None:
                    return None
                needed = max(needed, found)
        if decl is None or not needed:
            return None
        rule = Rule(decl.selector, (("opacity", f"{needed:g}", decl.important),))
        file, note = self._file(decl)
        return Override(file, [rule], (), "opacity", note)

    def _fg_rules(self, problem, decl, scope, colour, element_selector, per_bg_finding):
        value = to_hex(colour)
        important = bool(decl is not None and (decl.important or decl.origin == "inline"))
        if per_bg_finding is not None:  # one value per group of backgrounds: scope to this one
            bg = problem.bg_cause.declaration if problem.bg_cause is not None else None
            if (bg is None or not bg.selector) and decl is not None and decl.origin == "inline":
                # both colours in the element's style attribute (a legend's cells, each its
                # own background, all `color: #fff`): that attribute as written
                return self._on_element(scope, element_selector, per_bg_finding, "color",
                                        value)
            if bg is None or not bg.selector:
                return []
            prop = "color"
            if decl is not None and decl.property.startswith("--") and \
                    problem.fg_cause.inherited_from is None:
                prop = decl.property  # resolved on the text element itself: set the variable
            selectors = [self.scoped(scope, bg.selector)]
            if prop == "color":
                selectors = self._within(scope, problem, decl, bg) + selectors
            return [Rule(", ".join(dict.fromkeys(selectors)), ((prop, value, important),),
                         scope.media)]
        if decl is None or decl.origin == "inline" or not decl.selector:
            return self._on_element(scope, element_selector, problem.worst, "color", value)
        # (a shorthand's colour alone: `outline: #c` would also reset its style to none)
        declarations = [(colour_longhand(decl.property), value, important)]
        scoped = [self.scoped(scope, one) for one in _matched(problem, decl)]
        declarations += self._aliases(problem.fg_cause, decl, scoped[0])
        return [Rule(", ".join(dict.fromkeys(scoped)), tuple(declarations), scope.media)]

    def _within(self, scope, problem, decl, bg) -> list:
        """The text's own colour rule below the background's (``.dusk .tide-note``): a colour
        set on the background's element reaches only texts that have no colour rule of their
        own, and the texts of this problem have one (``decl``); below the background's rule,
        the text's rule is more specific than it, and only texts on that background match.
        Only where ``decl`` colours the text element itself (not by inheritance: an ancestor
        it is set on may lie above the background's element, a variable on ``body``, and then
        the background's rule alone serves)."""
        if decl is None or decl.origin == "inline" or not decl.selector or \
                decl.property.startswith("--") or problem.fg_cause.inherited_from is not None:
            return []
        pairs = [(b, f) for b in _listed(bg.selector) if "::" not in b
                 for f in _matched(problem, decl) if _normal(f) != _normal(b)]
        return [self.scoped(scope, f"{b} {f}") for b, f in pairs[:WITHIN_MOST]]

    def _aliases(self, cause, decl, selector) -> list:
        """Custom properties between the colour's use and ``decl`` that were resolved on
        another element: declared again beside the override so they resolve to it."""
        if cause is None or not decl.property.startswith("--"):
            return []
        out = []
        for step in cause.chain:
            if step == decl:  # equal, not identical: target_declaration is cached
                break
            if step.property.startswith("--") and _normal(step.selector) != _normal(selector):
                out.append((step.property, step.value, step.important))
        return out

    def _bg_rules(self, problem, scope, worst, narrow=False, element_selector=None) -> list:
        """When no text colour on the same side passes: a new background colour (``narrow``:
        on the rules using the custom property that holds it, ``narrowable``). A gradient
        becomes one colour, found for its worst stop (MkDocs' own theme's navigation bar)."""
        bg_cause = problem.bg_cause
        decl = target_declaration(bg_cause)
        if decl is not None and decl.origin == "inline":
            return self._inline_bg(problem, scope, worst, decl, element_selector)
        if decl is None or not decl.selector or decl.origin == "user-agent":
            return []
        gradient = "gradient(" in decl.value and decl.property in GRADIENT_PROPS
        if not (decl.property in _COLOUR_PROPS or decl.property.startswith("--") or gradient):
            return []
        if "url(" in decl.value or ("gradient(" in decl.value and (narrow or not gradient)):
            return []
        found = self._background_for(problem, worst)
        if found is None:
            return []
        if narrow:
            return [Rule(self.scoped(scope, d.selector),
                         (("background-color" if d.property == "background" else d.property,
                           to_hex(found[0]), d.important),), scope.media)
                    for d in _using(problem, "bg")]
        colour = to_hex(found[0])
        if gradient:  # one colour as the image it replaces: it paints over any background
            # colour below it, which may win otherwise (Bootstrap's `.bg-primary` is !important)
            declarations = [("background-image", f"linear-gradient({colour}, {colour})",
                             decl.important)]
        else:
            prop = "background-color" if decl.property == "background" else decl.property
            declarations = [(prop, colour, decl.important)]
        scoped = [self.scoped(scope, one) for one in _matched(problem, decl, "bg")]
        declarations += self._aliases(bg_cause, decl, scoped[0])
        return [Rule(", ".join(dict.fromkeys(scoped)), tuple(declarations), scope.media)]

    def _inline_bg(self, problem, scope, worst, decl, element_selector) -> list:
        """A background set by a style attribute whose text colour is set there too (a
        legend's cells, each its own background, white text): that attribute as written
        (``element_selector``) gets the new background."""
        fg = problem.fg_cause.declaration if problem.fg_cause is not None else None
        if element_selector is None or fg is None or fg.origin != "inline" \
                or decl.property not in _COLOUR_PROPS or "(" in decl.value:
            return []
        found = self._background_for(problem, worst)
        if found is None:
            return []
        return self._on_element(scope, element_selector, worst, "background-color",
                                to_hex(found[0]))

    def _on_element(self, scope, element_selector, finding, prop, value) -> list:
        """``prop: value !important`` on the finding's element (``element_selector``: by its
        style attribute as written, else by its place), or none when it cannot be named."""
        selector = element_selector(finding) if element_selector is not None else None
        if not selector:
            return []
        return [Rule(self.scoped(scope, selector), ((prop, value, True),), scope.media)]

    def _background_for(self, problem, worst):
        """``(colour, ratio)`` of the nearest background on which the worst text passes (its
        composite over it, when the text is translucent), or None."""
        from tinctura.report.messages import finding_colours

        fg, bg = finding_colours(worst)
        raw = worst.sample.fg_raw
        if raw is not None and len(raw) > 3 and raw[3] < 1:  # translucent text moves with it
            return suggest.background_under(raw, bg, problem.required)
        return suggest.background(fg, bg, problem.required)

    def _file(self, decl):
        if decl is not None and owned(decl.sheet, self.project):
            return decl.sheet, ""
        if self.last_own:
            return self.last_own, ""
        if self.project is None and self.sphinx:
            return SPHINX_FILE, ("a new stylesheet: copy it to a folder of html_static_path and "
                                 "list it in html_css_files in conf.py")
        return DEFAULT_FILE, "a new stylesheet: add it last to extra_css in mkdocs.yml"


def _least_opacity(finding, current: float, others: float, required: float, fg=None,
                   bg=None):
    """The least opacity (0.05 steps, above ``current``) at which the text passes; None when
    even 1 does not; 0 when ``current`` passes already. The text's colour is composited with
    the product of the opacities. ``fg``, ``bg``: a new text colour or background (an
    override's) in place of the finding's."""
    from tinctura.colour.composite import over
    from tinctura.colour.wcag import contrast_ratio

    s = finding.sample
    new = fg is not None or bg is not None
    r, g, b, a = (tuple(fg if fg is not None else s.fg_raw) + (1.0,))[:4]
    bg = tuple(bg if bg is not None else s.bg)[:3]
    if new and contrast_ratio(over((r, g, b, a * current * others), bg)[:3], bg) >= required:
        return 0.0
    steps = [round(0.05 * k, 2) for k in range(1, 21)]
    for value in [v for v in steps if v > current] or [1.0]:
        seen = over((r, g, b, a * value * others), bg)[:3]
        if contrast_ratio(seen, bg) >= required:
            return value
    return None


def _seen_with(finding, new, target) -> list:
    """``(fg, bg)`` pairs to judge a faded text with: its own colours, or each new colour an
    override sets on the side it changes (``_mixed``)."""
    if not new:
        return [(None, None)]
    if target == "background":
        return [(None, colour) for colour in new]
    return [(colour, None) for colour in new]



def _context_for(contexts, scheme, finding):
    """The group of backgrounds holding ``finding``'s background in ``scheme``."""
    from tinctura.report.messages import finding_colours

    mine = [c for c in contexts if scheme in c.schemes]
    if not mine:
        return None
    if len(mine) == 1:
        return mine[0]
    bg = _quantize(tuple(finding_colours(finding)[1]))
    for c in mine:
        if bg in c.backgrounds:
            return c
    return None


def _normal(selector: str) -> str:
    return (selector or "").replace('"', "").replace("'", "").replace(" ", "")


_COMBINATOR = re.compile(r"\s*[>+~]\s*|\s+")


def _first_compound(selector: str):
    """``("body", " .x > p")`` for ``body .x > p``."""
    depth, i = 0, 0
    while i < len(selector):
        ch = selector[i]
        if ch in "([":
            depth += 1
        elif ch in ")]":
            depth -= 1
        elif depth == 0 and (ch.isspace() or ch in ">+~"):
            break
        i += 1
    return selector[:i], selector[i:]


# The rules whose problems get a CSS override: the WCAG 2 ratios of text and of graphics, and
# links told apart by colour alone. The appearance rules are advice (their problems keep a
# suggested colour at the cause); overrides for them would compete with the text-ratio
# overrides for the same properties.
OVERRIDE_RULES = frozenset({"TC100", "TC110", "TC120"})
# Rules about graphics and controls (TC110: boundaries, focus rings, icons): overridden only by
# one colour for the line or glyph that passes everywhere it is used; never by repainting
# what lies around it (the page, a toolbar), which would change far more than the problem
GRAPHIC_RULES = frozenset({"TC110"})
# Rules met by a cue besides colour (TC120: links in running text told apart by colour alone):
# the override underlines them, the cue readers expect (W3C technique G183, failure F73)
CUE_RULES = frozenset({"TC120"})
UNDERLINE_NOTE = "an underline tells the links apart from the text around them without colour"
_COMBINATOR = re.compile(r"[\s>+~]")


def _rules_key(planned) -> tuple:
    """What a planned ``(rules, target)`` writes, to compare plans."""
    rules, target = planned
    return target, tuple((r.media, r.selector, r.declarations) for r in rules)


GRADIENT_PROPS = frozenset({"background", "background-image"})
GRADIENT_NOTE = ("the gradient becomes one colour (a gradient from it to itself); the same "
                 "darkening or lightening of each of its stops would serve as well")


def _one_line_colour(problem) -> bool:
    """Whether a graphics problem's fix is one colour, for a site's own rule with a selector,
    that passes on every background it is used on (``fix_at_cause.possible``)."""
    fix = problem.fix_at_cause
    decl = target_declaration(problem.fg_cause)
    return fix is not None and fix.possible and not faded(problem.worst) and \
        decl is not None and decl.origin == "author" and bool(decl.selector)


def _matched(problem, decl, side: str = "fg") -> list:
    """The selectors of ``decl``'s rule that the problem's texts matched, ``decl``'s first: a
    finding's declaration names the selector of its list that matched (one rule colours a
    collapsible note's summary and a note's title alike; another, readthedocs', the titles of
    warnings and of to-do notes). ``side`` "bg": of the rule that sets their background."""
    where = declaration_key(decl)
    return list(dict.fromkeys([decl.selector] + [
        d.selector for d in problem.using_declarations(side)
        if d.selector and declaration_key(d) == where]))


def _inherited_by_links(problem) -> set:
    """The declarations that colour a problem's links by inheritance (set on an ancestor: a
    post's meta line whose category link takes its colour), as its examples show."""
    found = set()
    for f in problem.worst_and_pool():
        cause = f.sample.fg_cause
        if cause is not None and cause.declaration is not None and from_a_block(cause):
            found.add(cause.declaration)
    return found


def from_a_block(cause) -> bool:
    """Whether a text's colour comes by inheritance from a block around its link (a post's
    meta line), not from a link's own rule (text in a span inside the link inherits that)."""
    return bool(cause.inherited_from) and not _is_link_path(cause.inherited_from)


def _is_link_path(xpath: str) -> bool:
    """Whether ``xpath`` names a link (``.../a[2]``): text inside a link (a span in it)
    inherits the link's own colour, which is no block's."""
    return xpath.rsplit("/", 1)[-1].split("[")[0].lower() == "a"


def _outbid(problem, selectors) -> list:
    """The selectors of the rules that take the underline away from a problem's links with
    more specificity than one of ``selectors`` (``.meta .tag`` against ``.meta a``): the
    underline goes on them too, and wins there by coming last."""
    from tinctura.extract.sheet import compile_one

    ours = [compile_one(s)[0] for s in selectors]
    weakest = min((c.specificity for c in ours if c is not None), default=None)
    found = []
    for f in problem.worst_and_pool():
        plain = f.sample.link.undecorated if f.sample.link is not None else ()
        if plain and weakest is not None and plain[1] > weakest:
            found.append(_SPACE.sub(" ", plain[0].strip()))
    return list(dict.fromkeys(found))


def _cue_rule(decl) -> bool:
    """Whether ``decl`` is a site's rule an underline can be added to."""
    return decl is not None and decl.origin == "author" and bool(decl.selector) \
        and "::" not in decl.selector


def page_wide(selector: str) -> bool:
    """Whether each selector of a list is one compound (``a``, ``a:link``): it reaches every
    link of the page, menus too."""
    parts = [part.strip() for part in (selector or "").split(",")]
    return all(part and not _COMBINATOR.search(part) for part in parts)


def declaration_key(decl) -> tuple:
    return (decl.sheet, decl.line, decl.column, decl.property)


def narrowable(problem, side: str = "fg") -> bool:
    """Whether the text colour (``side`` "bg": the background) comes from a rule that uses a
    custom property: a theme's accent set as a variable may colour text here and a background
    elsewhere, and a value that serves one use can fail the other; then the using rules are
    overridden instead."""
    cause = problem.fg_cause if side == "fg" else problem.bg_cause
    if cause is None or cause.declaration is None or not cause.declaration.selector:
        return False
    target = target_declaration(cause)
    return target is not None and target is not cause.declaration and \
        target.property.startswith("--") and cause.declaration.origin != "inline"


def _using(problem, side: str = "fg") -> list:
    """The rules setting a problem's text colour (``side`` "bg": background) from its cause,
    each with a selector."""
    cause = problem.fg_cause if side == "fg" else problem.bg_cause
    return [d for d in problem.using_declarations(side) if d.selector and d.origin != "inline"] \
        or [cause.declaration]


def plan_all(problems, planner: Planner, element_selector=None, opacity_of=None,
             narrow=frozenset()) -> list:
    """One Override (or None) per problem, in the problems' order; overrides that set the same
    property on the same selector name each other (one rule fixes several problems).
    ``narrow``: the numbers (from 0) of problems planned with ``Planner.plan``'s ``narrow``."""
    planned = [planner.plan(p, element_selector, opacity_of, n in narrow)
               for n, p in enumerate(problems)]
    _joined_backgrounds(problems, planned)
    owners: dict = {}
    for n, o in enumerate(planned, 1):
        for key in (o.keys() if o is not None else ()):
            owners.setdefault(key, []).append(n)
    for n, o in enumerate(planned, 1):
        if o is not None:
            o.shared_with = tuple(sorted({m for key in o.keys() for m in owners[key]} - {n}))
    return planned


_HEX = re.compile(r"^#[0-9a-f]{6}$")  # as to_hex writes them
_ONE_COLOUR = re.compile(r"^linear-gradient\((#[0-9a-f]{6}), \1\)$")


def _joined_backgrounds(problems, planned) -> None:
    """Overrides that give one background (a selector's property) different colours, each
    for its own problem's text (white and 80 % white on one navigation bar), all take the
    colour furthest from the background they replace, when all move it the same way: the
    other texts pass on it too (moving a background away from a text raises their contrast;
    a translucent text's composite stays nearer the text). Else each keeps its own, and the
    check again says which fail."""
    from tinctura.colour.wcag import relative_luminance
    from tinctura.report.messages import finding_colours

    groups: dict = {}  # (media, selector, property) -> [(override, rule index, decl index, hex)]
    for problem, o in zip(problems, planned):
        if o is None or o.target != "background":
            continue
        base = relative_luminance(finding_colours(problem.worst)[1])
        for k, r in enumerate(o.rules):
            for i, (prop, value, _) in enumerate(r.declarations):
                hex_ = value if _HEX.match(value) else \
                    (_ONE_COLOUR.match(value) or [None, None])[1]
                if hex_ is not None:
                    groups.setdefault((r.media, _normal(r.selector), prop), []).append(
                        (o, k, i, hex_, base))
    for members in groups.values():
        if len({m[3] for m in members}) < 2:
            continue
        moves = [relative_luminance(parse_color(m[3])[:3]) - m[4] for m in members]
        if not (all(d < 0 for d in moves) or all(d > 0 for d in moves)):
            continue
        chosen = members[max(range(len(members)), key=lambda n: abs(moves[n]))][3]
        for o, k, i, hex_, _ in members:
            r = o.rules[k]
            prop, value, important = r.declarations[i]
            declarations = list(r.declarations)
            declarations[i] = (prop, value.replace(hex_, chosen), important)
            o.rules[k] = replace(r, declarations=tuple(declarations))


def plan_own_css(problems, planner: Planner) -> None:
    """The fix at the cause of each problem without an override, where it changes a theme's
    declaration (one the writer does not own: the next build copies the theme's file again),
    as the same rule with the new value for the writer's own stylesheet
    (``CauseFix.own_css``): the advice rules' problems, mostly. It is not checked again.
    Where an override sets the same property on the same selector, it is offered only if its
    value passes that override's problem too (``shared_with`` names it: one rule, this
    value); else None."""
    from tinctura.problems import passes

    taken: dict = {}  # (media, selector, property) -> the problem (from 1) whose override sets it
    for n, p in enumerate(problems, 1):
        for key in (p.override.keys() if getattr(p, "override", None) is not None else ()):
            taken.setdefault(key[:3], n)
    for problem in problems:
        fix = problem.fix_at_cause
        if fix is None or getattr(problem, "override", None) is not None:
            continue
        fix.own_css = None
        d = fix.declaration
        if not fix.possible or d is None or d.origin != "author" or not d.selector \
                or owned(d.sheet, planner.project) or faded(problem.worst):
            continue
        rules = planner._colours(problem, None)
        if rules is None:
            continue
        shared = sorted({taken[k[:3]] for k in rules.keys() if k[:3] in taken})
        if all(passes(fix.colour, problems[n - 1]) for n in shared):
            rules.shared_with = tuple(shared)
            fix.own_css = rules


def combined_css(overrides) -> str:
    """Every override in one stylesheet; a property already set for the same selector and
    media by an earlier problem is not set again (the first value serves both)."""
    seen, blocks = set(), []
    for n, o in enumerate(overrides, 1):
        if o is None:
            continue
        rules = []
        for rule in o.rules:
            kept = tuple(d for d in rule.declarations
                         if (rule.media, rule.selector, d[0]) not in seen)
            seen.update((rule.media, rule.selector, d[0]) for d in kept)
            if kept:
                rules.append(Rule(rule.selector, kept, rule.media).css())
        if rules:
            blocks.append("".join(rules))
    return "\n".join(blocks)


MARK = "tinctura-verify"
OVERRIDES_SHEET = f"{MARK} <style>"  # the injected block's name in causes (a <style>)


def inject(html: str, css: str) -> str:
    """The page with ``css`` as its last stylesheet (a ``<style>`` at the end of the body)."""
    block = f'<style data-{MARK}="">\n{css}\n</style>'
    at = html.lower().rfind("</body>")
    return html + block if at < 0 else html[:at] + block + html[at:]


def verify(site_root, options, problems, overrides, pages, loader=None, cache=None,
           helper=None, meanwhile=None, cost=None) -> dict:
    """Check ``pages`` again with every override applied; mark each override verified when
    its problem is gone and the override's own values cause no finding. Returns the counts
    ``{"pages": n, "remaining": findings left on them}``.

    ``loader``: a SheetLoader whose parsed stylesheets can be reused; ``cache``: a dict kept
    between calls (``mkdocs serve``): the same CSS on the same pages is not checked twice (a
    build's every round of planning, ``writer.NARROWING_ROUNDS``);
    ``helper(css, pages)``: starts ``recheck`` of some pages in another process (the plugin's
    worker, idle by then) and returns a callable giving its result (None if the worker
    failed), or None when no worker could start; those pages are then checked here. The
    pages are shared in the helper's ``shares`` (two where it names none: this process and
    one other); this process checks the first share, unless the helper's
    ``all_shares`` is true (warm workers: ``engine.pools_kept``, the plugin's), and a helper
    whose ``splits`` is true takes every page as one share (a lone worker that splits them
    with a copy of itself).
    What is found is the same wherever a page is checked: the answers are unions.
    ``meanwhile(ready)``: work of this process's own, done while the helper's workers
    recheck their shares (the reports' places located: it waited for them, idle); ``ready()``
    tells whether every share they took is in (None where the helper cannot tell).
    ``cost(page)``: what checking a page costs, about (``cost_shares``)."""
    css = combined_css(overrides)
    if not css:
        return {"pages": 0, "remaining": 0}
    key = (css, tuple(_stamp(site_root, rel) for rel in pages))
    if cache is not None and key in cache:
        remaining_keys, bad, counts, took = cache[key]
        _mark(problems, overrides, remaining_keys, bad, took)
        return counts
    shares = [list(pages)]
    if helper is not None and len(pages) > 1 and not getattr(helper, "splits", False):
        shares = cost_shares(pages, cost, getattr(helper, "shares", 2))
    # a helper with warm workers of its own takes every share; another, all but the first
    away = shares if getattr(helper, "all_shares", False) else shares[1:]
    started = [(share, helper(css, share)) for share in away]  # under way while this works
    if meanwhile is not None:
        answers = [answer for _, answer in started if answer is not None]
        told = answers and all(hasattr(answer, "ready") for answer in answers)
        meanwhile((lambda: all(answer.ready() for answer in answers)) if told else None)
    found = [recheck(site_root, options, css, share, loader)
             for share in shares[:len(shares) - len(away)]]
    for share, answer in started:  # a helper that could not start (None) or failed: here
        found.append((answer() if answer is not None else None)
                     or recheck(site_root, options, css, share, loader))
    remaining_keys, bad, remaining, took = union(found)
    counts = {"pages": len(pages), "remaining": remaining}
    if cache is not None:
        if len(cache) >= CACHED_VERIFICATIONS:
            cache.clear()
        cache[key] = (remaining_keys, bad, counts, took)
    _mark(problems, overrides, remaining_keys, bad, took)
    return counts


CACHED_VERIFICATIONS = 8  # a build's rounds, a few times over


def cost_shares(pages, cost=None, n: int = 2) -> list:
    """``pages`` in at most ``n`` shares for as many processes, of about one cost: the costliest
    page first, each to the lightest share, each share in the pages' order; every ``n``-th page
    where no ``cost(page)`` is known. By count, a code listing's page (three of a prose page's
    cost) and a prose page went to one process, a table's page to the other."""
    pages = list(pages)
    n = max(1, min(n, len(pages)))
    if cost is None:
        return [pages[k::n] for k in range(n)]
    weights = [max(1, cost(page) or 0) for page in pages]
    shares, loads = [[] for _ in range(n)], [0] * n
    for k in sorted(range(len(pages)), key=lambda k: -weights[k]):
        lightest = loads.index(min(loads))
        shares[lightest].append(k)
        loads[lightest] += weights[k]
    return [[pages[k] for k in sorted(share)] for share in shares]


def union(found) -> tuple:
    """``recheck``'s answers for shares of the pages as one answer for them all."""
    remaining_keys, bad, remaining, took = set(), set(), 0, {}
    for got in found:
        remaining_keys |= got[0]
        bad |= got[1]
        remaining += got[2]
        for where, rules in got[3].items():
            took.setdefault(where, set()).update(rules)
    return remaining_keys, bad, remaining, took


def recheck(site_root, options, css: str, pages, loader=None) -> tuple:
    """``pages`` checked with ``css`` injected as their last stylesheet, by the rules that can
    undo an override: ``(problem keys found, each with the overrides whose values its colours
    take (``_remaining``), overrides' own declarations in findings, number of findings, the
    rules whose elements an override took over (``_took_over``))``."""
    from tinctura import engine

    options = _deciding(options)
    keeping = replace(options, keep_samples=True)  # (the page without the overrides)
    site = engine.Site(site_root, options)
    if loader is not None:
        # parsed sheets reused; rule sets are keyed by their sheets, and the overrides
        # injected last are laid over the page's (``extract/overlay.py``): their style caches,
        # warm from the check, serve every element no override matches
        site.loader = loader
    # the page without the overrides walked for every sample (a replayed subtree's too: the
    # walk of ``site`` hands those over as fragments), on the same loader
    keeping_site = engine.Site(site_root, keeping)
    keeping_site.loader = site.loader
    _same_line_for_overrides(site.loader)
    remaining_keys, bad, took = set(), set(), {}
    remaining = 0
    # (after a whole site's check many objects are alive: each collection would scan what
    # the pages keep and free nothing; none runs while these pages are checked)
    with no_collections():
        for rel in pages:
            try:
                with open(f"{site.root}/{rel}", encoding="utf-8", errors="replace") as fh:
                    html = fh.read()
            except OSError:
                continue
            _, findings, _ = engine.judge_page(site, rel, options, inject(html, css))
            remaining += len(findings)
            suspects, own = _tally_findings(findings, css, remaining_keys, bad)
            if suspects or own:  # errors on what the overrides colour: new ones?
                result, plain, _ = engine.judge_page(keeping_site, rel, keeping, html)
                # (a link that failed for want of a hover cue alone, and fails its ratio to
                # the text around it with the overrides, fails anew)
                there = {slot_of(f) for f in plain if f.rule not in CUE_RULES or _short(f)}
                bad.update(why for slot, why in suspects if slot not in there)
                _took_over(own, result.samples, took)
    return remaining_keys, bad, remaining, took


def _own_value(cause, css: str):
    """``(selector, property)`` of the override whose value a colour takes (the cause's target
    declaration, injected), else None."""
    d = target_declaration(cause)
    if d is not None and "<style>" in d.sheet and d.line and _injected(d, css):
        return (_normal(d.selector), d.property)
    return None


def _remaining(problems, overrides, remaining_keys) -> set:
    """The problem keys of the findings left on the pages checked with the overrides, each
    colour that an override's value gives keyed by the cause that override replaces: a
    variable's fix gives a problem of another rule on the same texts (a link that takes the
    text's colour, 1.00:1 to it) a new cause, and that problem is still the same one."""
    from tinctura.problems import cause_key

    replaces = {}  # (selector, property) -> the cause key its override replaces
    for problem, override in zip(problems, overrides):
        if override is None or override.target not in ("foreground", "background"):
            continue
        cause = problem.fg_cause if override.target == "foreground" else problem.bg_cause
        for r in override.rules:
            for one in _listed(r.selector):
                for d in r.declarations:
                    replaces.setdefault((_normal(one), d[0]), cause_key(cause))
    return {(rule, replaces.get(fg_own, fg), replaces.get(bg_own, bg))
            for rule, fg, bg, fg_own, bg_own in remaining_keys}


def _short(f) -> bool:
    """Whether a finding's colours fail its ratio (not only a cue other than colour)."""
    return bool(f.required) and f.ratio is not None and f.ratio < f.required


def _tally_findings(findings, css: str, remaining_keys: set, bad: set) -> list:
    """Add a rechecked page's findings to the problem keys found and to the overrides' own
    declarations that cause a finding (``recheck``). Returns ``(suspects, own)``: the
    ``(slot, declaration)`` of errors of other rules, and of links told apart by colour alone
    (TC120), that the overrides colour, theirs only when the page had no such error there
    before (a link that takes its colour from the text around it fails TC120 before and
    after that text's colour changed); and the ``(slot, side, declaration)`` of the
    overrides' own rule's findings they colour (``_took_over``)."""
    from tinctura.problems import problem_key

    suspects, own = [], []
    for f in findings:
        remaining_keys.add(problem_key(f) + (_own_value(f.sample.fg_cause, css),
                                             _own_value(f.sample.bg_cause, css)))
        if f.required and f.ratio is not None and f.ratio >= f.required:
            continue  # its colours pass (a link's missing hover cue, say): no colour's fault
        for side, cause in _sides(f):
            for d in _declarations(cause):
                if "<style>" in d.sheet and d.line and _injected(d, css):
                    why = (_normal(d.selector), d.property, f.rule, f.severity)
                    if f.rule in OVERRIDE_RULES and f.rule not in CUE_RULES:
                        bad.add(why)
                        own.append((slot_of(f), side, why))
                    else:
                        suspects.append((slot_of(f), why))
    return suspects, own


def _sides(f) -> tuple:
    """``(side, cause)`` of the colours a finding's failure depends on; a link told apart by
    colour alone (TC120) also on the colour of the text around it."""
    sides = (("fg", f.sample.fg_cause), ("bg", f.sample.bg_cause))
    link = f.sample.link
    if f.rule in CUE_RULES and link is not None and link.surround_cause is not None:
        sides += (("surround", link.surround_cause),)
    return sides


def _took_over(own, samples, took: dict) -> None:
    """Where an override's colour fails on an element that another rule coloured without the
    overrides (``samples``), the override beat that rule by coming last with the same
    specificity: the rule is recorded against the override's (selector, property) in
    ``took`` (a readthedocs ``a:hover`` override taking the menu's links from
    ``.wy-menu-vertical a``, say)."""
    before = {(s.page, s.xpath, s.state, s.scheme): s for s in samples}
    for slot, side, why in own:
        if why[1] == "color":
            family = ("color",)
        elif why[1] in _COLOUR_PROPS:
            family = _COLOUR_PROPS
        else:
            continue  # a custom property: its uses are rules of their own (``narrowable``)
        # (a state that changes nothing on an element has no sample of its own: the resting one)
        sample = before.get(slot[1:]) or before.get((slot[1], slot[2], REST, slot[4]))
        cause = None if sample is None else (sample.fg_cause if side == "fg" else
                                              sample.bg_cause)
        rule = None if cause is None else cause.declaration
        if rule is not None and rule.selector and "::" not in rule.selector \
                and rule.property in family and _normal(rule.selector) != _unscoped(why[0]):
            took.setdefault(why[:2], set()).add(_SPACE.sub(" ", rule.selector.strip()))


_SCOPE = re.compile(r":where\(\[[^\]]*\]\)")


def _unscoped(selector: str) -> str:
    """A normalized override selector without the scheme's ``:where([...])``: the selector
    of the declaration it replaces."""
    return _SCOPE.sub("", selector)


def _deciding(options):
    """``options`` running only the rules whose findings can undo an override (``_mark``):
    the overrides' own rules and those that report errors."""
    import dataclasses

    from tinctura import rules

    severity = dict(getattr(options, "severity", ()) or ())
    chosen = tuple(r.code for r in rules.selected(getattr(options, "rules", ()) or ())
                   if r.code in OVERRIDE_RULES
                   or severity.get(r.code, r.severity) == "error")
    return dataclasses.replace(options, rules=chosen)


def _stamp(root, rel) -> tuple:
    """A page as the cache of verifications knows it: path, size and modification time."""
    import os

    try:
        st = os.stat(os.path.join(root, rel))
    except OSError:
        return (rel, None, None)
    return (rel, st.st_size, st.st_mtime_ns)


def _same_line_for_overrides(loader) -> None:
    """Rule sets are keyed by their sheets, a ``<style>`` by its text and line: the injected
    block sits at a different line on every page, which would give every page its own rule set
    (and cold style caches). It is given line 1 on every page instead, and is one sheet for
    the loader (``shared_styles``): parsed once, not once a page (thousands of overrides where
    every page has its own ``<style>`` block: 0.4 s a page)."""
    if getattr(loader, "_overrides_pinned", False):
        return
    original = loader.ruleset_for

    def ruleset_for(root_el, page_path, source=None):
        for el in root_el.iter("style"):
            if el.get(f"data-{MARK}") is not None:
                el.sourceline = 1
                if el.text not in loader.shared_styles:  # (one round's overrides at a time)
                    loader.shared_styles = {el.text: OVERRIDES_SHEET}
        return original(root_el, page_path, source)

    loader.ruleset_for = ruleset_for
    loader._overrides_pinned = True


def _mark(problems, overrides, remaining_keys, bad, took=None) -> None:
    from tinctura.problems import problem_key

    remaining_keys = _remaining(problems, overrides, remaining_keys)
    for problem, override in zip(problems, overrides):
        if override is None:
            continue
        # (a declaration found in a finding names the selector of its list that matched)
        mine = {(_normal(one), d[0]) for r in override.rules for one in _listed(r.selector)
                for d in r.declarations}
        override.took_over = {key: rules for key, rules in (took or {}).items()
                              if key in mine}
        # an override undoes itself when it causes a finding of its own rule, or an error
        caused = {rule for sel, prop, rule, severity in bad
                  if (sel, prop) in mine and (rule == problem.rule or severity == "error")}
        override.remains = problem_key(problem.worst) in remaining_keys
        override.causes = tuple(sorted(caused))
        override.verified = not override.remains and not caused


def excluding(planned, exclude: dict) -> None:
    """Leave out of each override's rules the elements of the rules it took over
    (``exclude``: as ``Override.took_over``, gathered): ``a:hover:where(:not(.menu a))`` keeps
    the specificity of ``a:hover`` and no longer beats ``.menu a`` there."""
    for o in planned:
        if o is None:
            continue
        for n, rule in enumerate(o.rules):
            if "::" in rule.selector:
                continue
            gone = sorted({r for one in _listed(rule.selector) for d in rule.declarations
                           for r in exclude.get((_normal(one), d[0]), ())})
            if gone:
                o.rules[n] = replace(rule, selector=", ".join(
                    f"{one.strip()}:where(:not({', '.join(gone)}))"
                    for one in _listed(rule.selector)))


WITHIN_MOST = 8  # selectors a per-background override names below the background's rule


@functools.lru_cache(maxsize=4096)
def _listed(selector: str) -> tuple:
    """The selectors of a selector list (split where tinycss2 sees top-level commas); asked
    for every override's rule in each round and each problem marked (a tenth of the main
    process's time in planning 1,800 overrides)."""
    import tinycss2

    from tinctura.tokens import split_commas

    return tuple(tinycss2.serialize(group).strip()
                 for group in split_commas(tinycss2.parse_component_value_list(selector)))


def _declarations(cause):
    if cause is None:
        return ()
    return ((cause.declaration,) if cause.declaration is not None else ()) + tuple(cause.chain)


def _injected(d, css: str) -> bool:
    return f"{d.property}: {d.value.replace(' !important', '')}" in css
