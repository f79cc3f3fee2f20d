"""The writer's loop, shared by the command line and the plugin: each problem's fix as a
verified CSS override in a stylesheet the site owns, and each finding's place as a readable
locator and a Markdown line (or theme template).

It reads built pages (only those a report shows) and, with an MkDocs project, Markdown sources;
reports receive its results through ``Location`` records and ``Problem.override``.
"""
from __future__ import annotations

import os
import posixpath
from dataclasses import dataclass
from typing import Optional

from tinctura import overrides as overrides_mod
from tinctura import problems as problems_mod
from tinctura.extract.html import unrendered
from tinctura.extract.loader import SheetLoader
from tinctura.locator import (Pages, by_style, content_scope, landmarks, pseudo, readable,
                              selector)
from tinctura.mkdocs_project import owned, sphinx_sheet
from tinctura.sourcemap import Source, SourceMap


@dataclass(frozen=True)
class Location:
    locator: str  # "div.admonition.warning > p"
    source: Optional[Source] = None
    landmarks: tuple = ()  # (tag, classes, id) innermost first, for plain sentences


class WriterAid:
    def __init__(self, site_root: str, project=None, options=None):
        self.site_root = os.path.abspath(site_root)
        self.project = project
        self.pages = Pages([self.site_root], script_behaviours(options))
        self._sheets = SheetLoader(self.site_root)  # resolves the pages' stylesheet links
        self.sources = SourceMap(project) if project is not None else None
        self._cache: dict = {}
        self._room = LOCATED_MOST  # places kept (more while a report asks: ``locate_all``)
        self._landmarks: dict = {}
        self._options = None
        self._layered = None  # a Site keeping background layers, for faded text
        self._loader = None  # the check's SheetLoader, where ``plan_overrides`` is given it
        # ``call(func, arg)`` in a worker the check kept (``engine.kept_call``), or None
        self.elsewhere = None
        self._opacities: dict = {}  # (page, scheme) -> ``engine.opacity_layers``
        self._above: dict = {}  # (page, XPath) -> ``locator`` of an ancestor, located ahead

    # -- locations -----------------------------------------------------------------------

    def locate(self, sample) -> Location:
        got = self._cache.get((sample.page, sample.xpath))
        if got is not None:
            return got
        el = self.pages.element(sample.page, sample.xpath)
        return self._located(sample, None if el is None else tree_part(
            el, sample.xpath, self.sources is not None and bool(sample.text)))

    __call__ = locate  # reports call the aid itself to locate a sample

    def _located(self, sample, part) -> Location:
        """The Location of ``sample`` from what its page's tree gave (``tree_part``; None: no
        such element), kept."""
        if part is None:
            got = Location("")
        else:
            locator, marks, own = part
            # (an ancestor's landmark, one object for every place below it: 17,000 places
            # each held their ancestors' anew, 2.7 KB a place)
            marks = tuple(self._landmarks.setdefault(mark, mark) for mark in marks)
            source = None
            if self.sources is not None and sample.text:
                source = self.sources.locate(sample.page, sample.text, marks, own)
            got = Location(locator, source, marks)
        if len(self._cache) > self._room:
            self._cache.clear()
            self._room = LOCATED_MOST
        self._cache[(sample.page, sample.xpath)] = got
        return got

    def locate_all(self, samples, until=None, spread=None, ancestors=()) -> None:
        """``locate`` the places of ``samples``, page by page (a page is parsed once), and keep
        them all for the report that asks for them: it asks problem by problem, which jumps
        between pages (each page's trees are kept within a budget: ``locator.Pages``). Kept
        up to a bound instead, the rest were located as the report asked, parsing pages again:
        1,000 pages with problems of their own name 17,000 places, and the report took 24 s of
        a 60 s check. A place is named in several problems' sentences: counted once.
        ``ancestors``: ``(page, XPath)`` of the elements colours are inherited from, whose
        ``locator`` the text report's detail names (asked as it wrote, 1,806 ancestors of
        200 pages with styles of their own parsed 573 pages again: 1.3 s of a 1.9 s report).
        ``until()``: stop before the next page once it is true (the rest is located later);
        ``spread(func, items)``: ``func`` over ``items`` in other processes too
        (``engine.kept_spread``): the trees of the pages are read there, a share each."""
        places = {}
        for sample in samples:
            key = (sample.page, sample.xpath)
            if key not in self._cache:
                places.setdefault(key, sample)
        # (a Location is a few hundred bytes; the problems that name them hold far more)
        self._room = max(self._room, len(self._cache) + len(places) + LOCATED_MOST)
        pages: dict = {}
        for sample in places.values():
            pages.setdefault(sample.page, ([], set()))[0].append(sample)
        for page, xpath in ancestors:
            if (page, xpath) not in self._above:
                pages.setdefault(page, ([], set()))[1].add(xpath)
        pages = sorted(pages.items())
        if spread is not None and len(pages) >= SPREAD_PAGES:
            self._spread(pages, spread)
            return
        for page, (located, above) in pages:
            if until is not None and until():
                return
            for sample in located:
                self.locate(sample)
            for xpath in above:
                self._above[(page, xpath)] = self.locator(page, xpath)

    def _spread(self, pages, spread) -> None:
        """``locate_all``'s pages in three shares, two of them read in other processes."""
        text = self.sources is not None
        shares = [pages[n::3] for n in range(3)]
        items = [(self.site_root, self.pages.behaviours, text,
                  [(page, [s.xpath for s in located], sorted(above))
                   for page, (located, above) in share])
                 for share in shares]
        for share, (parts, above) in zip(shares, spread(tree_parts, items)):
            for _, (located, _) in share:
                for sample in located:
                    self._located(sample, parts.get((sample.page, sample.xpath)))
            self._above.update(above)

    def locator(self, page: str, xpath: str) -> str:
        """The readable locator of any element of a page (an ancestor a colour came from)."""
        got = self._above.get((page, xpath))
        if got is not None:
            return got
        return element_locator(self.pages.element(page, xpath), xpath)

    def element_selector(self, finding) -> Optional[str]:
        """A CSS selector for a finding's element, for a fix where no rule holds the colour:
        when a style attribute sets it, every element with that attribute as written (on
        this element or the ancestor it inherits from: ``locator.by_style``), else the
        element by its place on the page (``locator.selector``)."""
        s = finding.sample
        el = self.pages.element(s.page, s.xpath)
        if el is None:
            return None
        cause = s.fg_cause
        if cause is not None and cause.declaration is not None and \
                cause.declaration.origin == "inline":
            holder = el if cause.inherited_from is None else \
                self.pages.element(s.page, cause.inherited_from)
            styled = by_style(holder) if holder is not None else None
            if styled:
                return styled + (pseudo(s.xpath) if holder is el else "")
        return selector(el) + pseudo(s.xpath)

    def opacity_of(self, finding) -> list:
        """``(declaration, value)`` of the opacities fading a finding's text, nearest first:
        its page checked once more with background layers kept (only for faded text), in a
        worker the check kept (``elsewhere``), warm from the pages, or here."""
        s = finding.sample
        key = (s.page, s.scheme)
        if key not in self._opacities:
            from tinctura import engine

            found = self.elsewhere(engine.worker_opacity_layers, key) \
                if self.elsewhere is not None else None
            if found is None:
                found = engine.opacity_layers(self._layered_site(), *key)
            self._opacities[key] = found
        return list(self._opacities[key].get((s.xpath, s.state), ()))

    def _layered_site(self):
        """A Site keeping every sample's background layers, on the check's loader if known."""
        if self._layered is None:
            from dataclasses import replace

            from tinctura import engine

            self._layered = engine.Site(self.site_root, replace(self._options, keep_samples=True))
            if self._loader is not None:  # (its parsed sheets, rule sets and computed styles)
                self._layered.loader = self._loader
        return self._layered

    def sheet_order(self, page: str) -> list:
        """Site-relative stylesheets a page links, in order."""
        tree = self.pages.tree(page)
        if tree is None:
            return []
        base = posixpath.dirname(page)
        out = []
        for link in tree.iter("link"):
            if "stylesheet" not in (link.get("rel") or "").lower().split():
                continue
            href = (link.get("href") or "").split("?")[0].split("#")[0]
            if not href or "://" in href or href.startswith("//") or unrendered(href):
                continue  # (remote, or a theme template's: `{{ pathto('...') }}`)
            # resolved as the check loads them: a site served below a path (its site_url's,
            # `/manual/`) links `/manual/stylesheets/extra.css` for its own
            # `stylesheets/extra.css` (mkdocs-material's 404 page does)
            found, _ = self._sheets.resolve(href, os.path.join(self.site_root, base))
            if found is not None:
                out.append(self._sheets.rel(found))
            else:  # not a file of the site: named as written
                path = href.lstrip("/") if href.startswith("/") else posixpath.join(base, href)
                out.append(posixpath.normpath(path))
        return out

    def _linked_sheets(self, pages, tried: int = 8) -> list:
        """``sheet_order`` of the first of ``pages`` that links a stylesheet (the first in path
        order may link none: a theme's template copied into ``_static/``)."""
        for page in list(pages)[:tried]:
            order = self.sheet_order(page)
            if order:
                return order
        return []

    # -- overrides -----------------------------------------------------------------------

    def plan_overrides(self, problems, schemes, options, pages_with_findings, loader=None,
                       cache=None, helper=None, meanwhile=None, cost=None) -> dict:
        """Attach a verified ``Override`` (or None) to every problem; returns the verification
        counts. ``loader``, ``cache``, ``helper``, ``meanwhile`` (in the first round),
        ``cost``: see ``overrides.verify``."""
        self.show_fix_sources(problems)
        planner = overrides_mod.Planner(schemes, self.project,
                                        self._linked_sheets(pages_with_findings))
        self._options, self._loader = options, loader
        planner.cue_scopes = self.cue_scopes(problems)
        narrow: frozenset = frozenset()
        exclude: dict = {}
        for _ in range(NARROWING_ROUNDS + 1):
            planned = overrides_mod.plan_all(problems, planner, self.element_selector,
                                             self.opacity_of, narrow)
            overrides_mod.excluding(planned, exclude)
            for problem, override in zip(problems, planned):
                problem.override = override
                if override is not None and self.project is not None:
                    override.shown_file = self.project.docs_path(override.file)
            if not any(planned):
                counts = {"pages": 0, "remaining": 0}
                break
            counts = overrides_mod.verify(self.site_root, options, problems, planned,
                                          verification_pages(problems), loader, cache, helper,
                                          meanwhile, cost)
            meanwhile = None
            again = narrow | _to_narrow(problems, planned)
            more = _gather_taken(planned, exclude)
            wider = _to_widen(planned) - planner.unscoped
            planner.unscoped |= wider
            if again == narrow and not more and not wider:
                break
            narrow = again
        problems_mod.joined(problems)  # one value per declaration, before it is written
        overrides_mod.plan_own_css(problems, planner)
        for problem in problems:
            own = getattr(problem.fix_at_cause, "own_css", None)
            if own is not None and self.project is not None:
                own.shown_file = self.project.docs_path(own.file)
        problems_mod.settled(problems)  # (once the overrides are known: theirs come first)
        return counts


    def cue_scopes(self, problems) -> dict:
        """For each rule colouring every link of a page (``a``) that TC120 would underline:
        the container of its failing links that keeps the site's menus out
        (``locator.content_scope``), found over its problems' examples."""
        found: dict = {}
        for p in problems:
            if p.rule not in overrides_mod.CUE_RULES:
                continue
            for f in p.worst_and_pool():
                cause = f.sample.fg_cause
                d = cause.declaration if cause is not None and \
                    not overrides_mod.from_a_block(cause) else None  # (that block's links)
                if d is not None and d.origin == "author" and overrides_mod.page_wide(d.selector):
                    found.setdefault(overrides_mod.declaration_key(d), []).append(f.sample)
        scopes = {}
        for key, samples in found.items():
            tree = self.pages.tree(samples[0].page)
            within = content_scope(tree, [s.xpath for s in samples]) if tree is not None \
                else None
            if within:
                scopes[key] = within
        return scopes

    def show_fix_sources(self, problems) -> None:
        """Each fix at the cause in a stylesheet of the writer's names its source (``docs/
        stylesheets/extra.css:12:3``), not the built site's copy they would edit in vain."""
        if self.project is None:
            return
        for problem in problems:
            fix = getattr(problem, "fix_at_cause", None)
            d = fix.declaration if fix is not None else None
            if d is not None and owned(d.sheet, self.project):
                fix.shown = self.project.docs_path(d.sheet) + d.where()[len(d.sheet):]


# more verifications, at most, for fixes moved to the rules using a variable or keeping out of
# the elements of rules they took over
NARROWING_ROUNDS = 2
LOCATED_MOST = 4096  # places' locations kept beyond a report's (WriterAid.locate)
SPREAD_PAGES = 12  # pages left to locate worth reading in other processes too


def _to_narrow(problems, planned) -> frozenset:
    """The problems whose fix set a custom property and failed verification: planned once
    more on the rules using the property (``overrides.narrowable``)."""
    return frozenset(n for n, (p, o) in enumerate(zip(problems, planned))
                     if o is not None and o.verified is False
                     and (overrides_mod.narrowable(p) or overrides_mod.narrowable(p, "bg")))


def _to_widen(planned) -> set:
    """The declarations whose underline, limited to a container, failed its check: planned
    once more on the whole rule."""
    return {key for o in planned if o is not None and o.verified is False
            for key in o.scoped}


def _gather_taken(planned, exclude: dict) -> bool:
    """Add to ``exclude`` the rules the unverified overrides took elements from
    (``Override.took_over``); True when there are new ones."""
    more = False
    for o in planned:
        if o is None or o.verified is not False:
            continue
        for key, rules in o.took_over.items():
            known = exclude.setdefault(key, set())
            more = more or not rules <= known
            known |= rules
    return more


def tree_part(el, xpath: str, text: bool) -> tuple:
    """What locating a place reads of its page's tree: ``(readable locator, landmarks, the
    element's own text where ``text``, else "")``."""
    own = " ".join("".join(el.itertext()).split()) if text else ""
    return element_locator(el, xpath), tuple(landmarks(el)), own


def tree_parts(item) -> tuple:
    """``tree_part`` of each place of ``item`` and ``element_locator`` of each ancestor:
    ``(site root, script behaviours, text, [(page, [place's XPath], [ancestor's XPath])])``
    -> ``({(page, XPath): part, None for a place whose element is not there}, {(page, XPath):
    locator})``. Runs in another process (``WriterAid.locate_all``'s ``spread``): each page is
    parsed once."""
    root, behaviours, text, places = item
    pages = Pages([root], behaviours)
    parts, above = {}, {}
    for page, xpaths, ancestors in places:
        for xpath in xpaths:
            el = pages.element(page, xpath)
            parts[(page, xpath)] = None if el is None else tree_part(el, xpath, text)
        for xpath in ancestors:
            above[(page, xpath)] = element_locator(pages.element(page, xpath), xpath)
    return parts, above


def element_locator(el, xpath: str) -> str:
    """The readable locator of an element (its XPath where the page has no such element)."""
    return xpath if el is None else readable(el) + pseudo(xpath)


def script_behaviours(options) -> tuple:
    """The theme script behaviours the engine applies to pages with these options."""
    if options is None:
        return ()
    from tinctura.extract import behaviours

    return ((behaviours.BUILTIN if getattr(options, "theme_behaviours", True) else ())
            + tuple(getattr(options, "behaviours", ()) or ()))


VERIFY_LIMIT = 24  # pages in all: a site-wide cause costs a few pages, not the whole site


def page_costs(pages):
    """``overrides.verify``'s ``cost``: a page's text samples in the check (``PageResult``s)."""
    samples = {page.page: (page.stats or {}).get("samples", 0) for page in pages}
    return samples.get


def verification_pages(problems) -> list:
    """Few pages that together meet every problem with an override (a cause fixed there is
    fixed everywhere the same declarations meet), bounded. Each page is checked again cold
    (the overrides make new rule sets), about a first page's cost, so the fewer the better:
    the page meeting most problems not yet met is taken first (a greedy cover); on a tie, the
    page of an earlier problem's examples, then the first in site order."""
    wanted = [p for p in problems if getattr(p, "override", None) is not None]
    met = [_met_on(p) for p in wanted]
    order: dict = {}  # page -> rank for ties
    for p in wanted:
        for f in p.example_pool():
            order.setdefault(f.sample.page, len(order))
    for page in sorted(set().union(*met)):
        order.setdefault(page, len(order))
    return _greedy_cover(met, order, VERIFY_LIMIT)


def _greedy_cover(met: list, order: dict, most: int) -> list:
    """Pages (at most ``most``) meeting every set of ``met``: each time the page in most sets
    not yet met, the lowest ``order`` on a tie."""
    meeting: dict = {}  # page -> the sets (indexes) it is in that no chosen page is in
    for n, pages in enumerate(met):
        for page in pages:
            meeting.setdefault(page, set()).add(n)
    chosen = []
    while meeting and len(chosen) < most:
        best = min(meeting, key=lambda page: (-len(meeting[page]), order[page]))
        chosen.append(best)
        for n in meeting.pop(best):
            for page in met[n]:
                left = meeting.get(page)
                if left is not None:
                    left.discard(n)
                    if not left:
                        del meeting[page]
    return chosen


def _met_on(problem) -> set:
    """The pages ``problem`` was met on (a Collector's problems know them all), or those of
    its example findings."""
    pages = getattr(problem, "met_on", None)
    return set(pages) if pages else {f.sample.page for f in problem.example_pool()}


def write_fixes(path: str, problems, project=None) -> tuple:
    """Write every verified override into one stylesheet, then the advice rules' values for
    the theme's declarations (``CauseFix.own_css``) commented out: they were not checked
    again. Returns (overrides written, advice values written, how to add the file to the
    site: mkdocs.yml, or conf.py for a site Sphinx built)."""
    chosen = [p.override for p in problems
              if getattr(p, "override", None) is not None and p.override.verified]
    css = overrides_mod.combined_css(chosen)
    header = ("/* Fixes suggested by tinctura (colours, and underlines for links told apart by\n"
              "   colour alone) and verified by checking the site again with\n"
              "   them applied. Automated checks cover only part of WCAG: review the result. */\n\n")
    advice = _advice_css(problems)
    with open(path, "w", encoding="utf-8") as fh:
        fh.write(header + css + ("\n" + ADVICE_HEADER + "\n".join(advice) if advice else ""))
    sphinx = project is None and any(sphinx_sheet(o.file) for o in chosen)
    return len(chosen), len(advice), how_to_add(path, project, sphinx)


ADVICE_HEADER = ("/* Advice beyond WCAG 2 (APCA lightness contrast, colour-vision deficiency,\n"
                 "   daylight viewing): values for the theme's colours that pass each problem's\n"
                 "   own test on the colours measured, NOT checked again on the site. They are\n"
                 "   commented out: remove the comment marks around those you accept, then\n"
                 "   check the site again. Numbers are the report's problems. */\n\n")


def _advice_css(problems) -> list:
    """One commented rule per declaration with an ``own_css`` (the first problem's: its
    value settles the later ones it names, ``CauseFix.settles``), in report order."""
    out, settled = [], set()
    for n, p in enumerate(problems, 1):
        fix = getattr(p, "fix_at_cause", None)
        own = getattr(fix, "own_css", None)
        if own is None or n in settled:
            continue
        settled |= {n, *getattr(fix, "settles", ())}
        rules = own.css()
        if "*/" in rules:  # (cannot stand inside a comment)
            continue
        also = f", settles {', '.join(map(str, fix.settles))} too" if fix.settles else ""
        out.append(f"/* {n}. {p.rule} {p.slug}{also}:\n{rules}*/\n")
    return out


def how_to_add(path: str, project=None, sphinx: bool = False) -> str:
    name = os.path.basename(path)
    if sphinx:  # a site Sphinx built (``overrides.Planner.sphinx``)
        return (f"Copy it into a folder listed in html_static_path in conf.py and add "
                f"{name!r} last to html_css_files there.")
    target = f"stylesheets/{name}"
    if project is not None and project.docs_dir:
        absolute = os.path.abspath(path)
        if absolute.startswith(project.docs_dir + os.sep):
            target = os.path.relpath(absolute, project.docs_dir).replace(os.sep, "/")
        where = f"{project.docs_path(target)}"
        if target in project.extra_css:
            return f"{where} is listed in extra_css already: build the site again to apply it."
    else:
        where = f"docs/{target}"
    return (f"Copy it to {where} (if it is not there yet) and list it last under extra_css in "
            f"mkdocs.yml:\n  extra_css:\n    - {target}")
