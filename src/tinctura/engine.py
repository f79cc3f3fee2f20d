"""Samples in, findings out: the engine ties extraction to the rules.

Interface (stable; the CLI, the plugin and the benchmarks use only this):

- ``Options``: what to check and how.
- ``Site(root, options)``: a built site directory; stylesheets are parsed once and shared.
  ``site.pages()`` lists the HTML pages (site-relative, sorted); ``site.check_page(rel, html=None)``
  returns a ``PageResult`` with samples (all schemes and states) and diagnostics.
- ``check_paths(paths, options) -> Report``: everything for the CLI, pages in a stable order.
- ``iter_pages(paths, options)``: the same, page by page (``tinctura pairs`` streams it).
- ``evaluate(samples, options) -> list[Finding]``: run the rule set on samples.
"""
from __future__ import annotations

import bisect
import dataclasses
import fnmatch
import gc
import hashlib
import importlib
import os
import pickle
import re
import shutil
import tempfile
import threading
from contextlib import ExitStack, contextmanager
from dataclasses import dataclass, field
from urllib.parse import urlsplit

from lxml import etree

from . import palette as palette_mod
from . import problems as problems_mod
from . import situations
from .colour import wcag
from .extract import bounds
from .extract import behaviours as behaviour_mod
from .extract import exempt as exempt_mod
from .extract import fragments as frag_mod
from .extract import links as link_mod
from .extract.nontext import KINDS as NON_TEXT
from .extract import schemes as scheme_mod
from .extract import sheet_cache
from .extract.disclosure import Disclosure
from .extract.html import decode, parse_html, parser_warnings, unrendered
from .extract.loader import SheetLoader
from .extract.media import Environment
from .extract.overlay import Overlay
from .extract.samples import PageWalker, StyleCache
from .extract.sheet import STATE_ATTR
from .extract.style import MAX_VAR_TOKENS
from .extract.structure import PageStructure
from .model import UNDETERMINED, Diagnostic, PageResult, state_rank
from .cyclic_gc import no_collections
from . import distribution  # the contrast ratios of each page, for the audit report


@dataclass
class Options:
    level: str = "AA"  # "AA" or "AAA"
    viewport_width: int = 1280
    schemes: list | None = None  # list[model.Scheme]; None: discover from the site
    states: bool = True  # also evaluate :hover / :focus / :focus-visible
    exclude: tuple = ()  # glob patterns on page paths
    jobs: int = 1
    rules: tuple = ()  # rule codes or slugs to run; empty: all
    severity: tuple = ()  # (code, severity) overrides, applied by rules.run
    keep_samples: bool = True  # False: drop each page's samples once judged (large sites)
    replay: bool = True  # replay repeated subtrees instead of walking them (off: for tests)
    lc_levels: dict | None = None  # TC200/TC400: APCA Lc per text tier (body, content, headline, any)
    cvd_severity: float = 1.0  # TC400: Machado 2009 severity, 0..1
    profiles: tuple = ("daylight",)  # TC500: viewing profiles judged (office, dim, daylight)
    # site-level appearance rules (TC300, TC310): palette.palette_setting(name -> colour or
    # --property) pairs, and the viewing conditions of CIECAM02
    palette: tuple = ()
    surround: str = "Average"  # "Average", "Dim" or "Dark"
    white_luminance: float = 80.0  # cd/m2 of the display white
    shift_threshold: float = 10.0  # TC300: CAM02-UCS units (rules/catalogue.py says why)
    lookalike_threshold: float = 15.0  # TC310: CAM02-UCS units
    # share computed styles between elements and pages, and verdicts between equal colour
    # situations (off: every element's cascade and every sample judged afresh; for tests)
    share: bool = True
    # bounds on hostile or broken input (extract/bounds.py); each is reported when hit
    max_file_bytes: int = bounds.MAX_FILE_BYTES  # pages and stylesheets larger are not read
    max_elements: int = bounds.MAX_ELEMENTS  # pages with more elements are not checked
    max_rules: int = bounds.MAX_RULES  # style rules kept per stylesheet
    max_var_tokens: int = MAX_VAR_TOKENS  # longer var() expansions are invalid
    debug: bool = False  # internal errors keep their traceback in the diagnostic
    # exemptions switched on (extract/exempt.py ids); None: all of them
    exemptions: tuple | None = None
    logotypes: tuple = ()  # CSS selectors of logos and brand names set as text (SC 1.4.3)
    site_url: str = ""  # the site's public URL: its path prefixes absolute stylesheet links
    behaviours: tuple = ()  # user-declared script behaviours (extract.behaviours.Behaviour)
    theme_behaviours: bool = True  # apply the built-in table of theme script behaviours
    # parsed stylesheets kept between runs here (extract/sheet_cache.py); "": none kept
    cache_dir: str = ""
    # a compact JSON report will be written: each page's occurrences are written for it where
    # the page is judged (in the worker, with --jobs N)
    encode_occurrences: bool = False
    # some output reads the pages' records back from the store (every report but the text
    # one grouped by problem; a baseline written; see cli.run_check): when not, the pages
    # checked in this process are not pickled nor written to it, only counted
    keep_records: bool = True


@dataclass
class Report:
    pages: list = field(default_factory=list)  # list[model.PageResult], stable order
    findings: list = field(default_factory=list)  # list[model.Finding]
    diagnostics: list = field(default_factory=list)  # site-wide diagnostics
    schemes: list = field(default_factory=list)  # list[model.Scheme] evaluated
    uses: dict = field(default_factory=dict)  # declaration -> {background: schemes} (problems)
    palette: dict = field(default_factory=dict)  # palette uses of the site (site-level rules)
    # the Site of each path checked (its parsed stylesheets serve the verification of fixes)
    sites: list = field(default_factory=list)


_REFRESH = re.compile(rb"<meta[^>]+http-equiv=[\"']?refresh", re.I)


class Site:
    """A built site directory: stylesheets parsed once, computed styles shared across pages."""

    def __init__(self, root: str, options: Options | None = None):
        self.root = os.path.abspath(root)
        self.options = options or Options()
        self.loader = SheetLoader(self.root, prefix=urlsplit(self.options.site_url).path,
                                  max_file_bytes=self.options.max_file_bytes,
                                  max_rules=self.options.max_rules)
        self.loader.cache = sheet_cache.open_cache(self.options.cache_dir)
        self._behaviours = (behaviour_mod.BUILTIN if self.options.theme_behaviours else ()) \
            + tuple(self.options.behaviours)

    @property
    def _caches(self):
        """A rule set -> its style caches (one per environment, scheme and kind of walk), kept
        by the loader (``SheetLoader.style_caches``)."""
        return self.loader.style_caches

    def pages(self) -> list:
        found = []
        for dirpath, dirnames, filenames in os.walk(self.root):
            dirnames.sort()
            for name in filenames:
                if name.lower().endswith((".html", ".htm")):
                    rel = os.path.relpath(os.path.join(dirpath, name), self.root)
                    found.append(rel.replace(os.sep, "/"))
        found.sort()
        return [p for p in found if not self.excluded(p)]

    def excluded(self, rel: str) -> bool:
        return any(fnmatch.fnmatch(rel, pat) for pat in self.options.exclude)

    def stylesheets_changed(self) -> bool:
        return self.loader.changed()

    def prepare(self, rel: str) -> None:
        """The rule set of page ``rel`` built ahead (its stylesheets parsed, or read from the
        cache), the page not checked: processes forked after start from it. A page that
        cannot be read or parsed is left to ``check_page``, which reports it."""
        path = os.path.join(self.root, rel)
        try:
            data = bounds.read_inside(path, self.loader.real_root, self.options.max_file_bytes)
            text = decode(data)
            self.loader.ruleset_for(parse_html(text), path, text)
        except Exception:  # (reported where the page is checked)
            pass

    def check_page(self, rel: str, html=None) -> PageResult:
        result = PageResult(rel)
        path = os.path.join(self.root, rel)
        try:
            if html is None:
                html = bounds.read_inside(path, self.loader.real_root,
                                          self.options.max_file_bytes)
            data = html.encode("utf-8") if isinstance(html, str) else html
            if _is_redirect(data):
                result.skipped["redirect page"] = 1
                return result
            refused = _refuse_page(data, self.options)
            if refused:
                raise bounds.Refused(refused)
            text = decode(html) if isinstance(html, bytes) else html  # behaviours read it too
            root = parse_html(text)
            if _unrendered_template(root):
                result.skipped["unrendered template"] = 1
                return result
            for line, message in parser_warnings():
                result.diagnostics.append(Diagnostic(rel, message, line=line))
            written = _own_marks_removed(root, text)
            if written:
                result.diagnostics.append(Diagnostic(rel, "the page writes attributes tinctura "
                                                     "sets while it checks, ignored: " + written))
            refused = _too_many_elements(root, data, self.options.max_elements)
            if refused:
                raise bounds.Refused(refused)
            spied = self._script_behaviours(root, result, text)
        except bounds.Refused as exc:  # outside the site (a warning); too large, binary
            result.diagnostics.append(Diagnostic(rel, f"page not checked: {exc}",
                                                 severity="warning" if exc.outside else "error"))
            return result
        except (OSError, ValueError) as exc:
            message = exc.strerror if isinstance(exc, OSError) and exc.strerror else str(exc)
            result.diagnostics.append(Diagnostic(rel, f"cannot read page: {message}",
                                                 severity="error"))
            return result
        except Exception as exc:  # a broken page must not stop the site
            result.diagnostics.append(Diagnostic(rel, f"cannot parse page: {exc}",
                                                 severity="error"))
            return result
        try:
            ruleset, diags = self.loader.ruleset_for(root, path, text)
            result.diagnostics.extend(diags)
            schemes = self.options.schemes or scheme_mod.discover(root, ruleset)
            result.schemes = list(schemes)
            fingerprints = {}  # subtree fingerprints, shared by the schemes' walks
            marks = {}  # what the page's own rules match, likewise (``overlay.Overlay``)
            # (a page's own trailing <style> blocks laid over its stylesheets' rule set: the
            # keys are that rule set's, ``extract/overlay.py``)
            structure = PageStructure(root, (ruleset.base or ruleset).structure)  # likewise
            # scope decisions mark the tree before any walk: the marks reach every style key
            exemptions = exempt_mod.mark(root, exempt_mod.enabled_set(self.options.exemptions),
                                         self.options.logotypes, structure.text,
                                         source=None if data[:2] in (b"\xff\xfe", b"\xfe\xff")
                                         else data, per_link=link_mod.page_marker())
            # closed <details>, tabs, menus: walked open too; a scroll spy's marks, in turn
            disclosure = Disclosure(root, text, spied)
            walkers = []
            for scheme in schemes:
                with _scheme_applied(root, scheme, fingerprints, structure):
                    walker = self._walker(rel, root, ruleset, scheme, result, fingerprints,
                                          structure, exemptions, disclosure, marks)
                    result.samples.extend(walker.walk(states=self.options.states))
                    result.replays.extend(walker.replays)
                    _report_resolver(walker.resolver, result.diagnostics)
                    walkers.append((scheme, walker))
            if disclosure:
                _disclosed(root, disclosure, walkers, structure, result, fingerprints)
            for _, walker in walkers:  # (keys of this page alone: see extract/overlay.py)
                walker.forget_own()
        except Exception as exc:  # report, keep the other pages
            result.diagnostics.append(internal_error(rel, exc, self.options.debug))
        return result

    def _walker(self, rel, root, ruleset, scheme, result, fingerprints, structure,
                exemptions, disclosure, marks=None) -> PageWalker:
        """A walker of the page in ``scheme`` (its attributes applied to the tree)."""
        env = Environment(self.options.viewport_width, scheme_media=scheme.media)
        index = ruleset.index(env)
        # the scheme's name too, since replayed fragments carry it; a walk that keeps every
        # sample records and replays fragments of its own kind (``keep_samples``)
        key = (env.key, scheme.attributes, scheme.name, self.options.keep_samples)
        keyed = ruleset.base or ruleset
        caches = self._caches.get(keyed)
        if caches is None:
            caches = self._caches[keyed] = {}
        cache = caches.get(key)
        if cache is None:  # (styles shared with the other kind of walk's, if any)
            cache = caches[key] = StyleCache(caches.get(key[:-1] + (not key[-1],)))
        preferred = scheme.media_value("prefers-color-scheme", "light")
        walker = PageWalker(rel, root, index, ruleset, scheme.name, preferred, cache,
                            self.options.viewport_width, result.skipped,
                            keep_layers=self.options.keep_samples,
                            lazy=not self.options.keep_samples, fingerprints=fingerprints,
                            replay=self.options.replay and self.options.share,
                            structure=structure, share=self.options.share,
                            exemptions=exemptions, disclosure=disclosure,
                            overlay=Overlay(ruleset.own_rules, env, ruleset, marks,
                                            [name for _, name, _ in scheme.attributes])
                            if ruleset.base is not None else None)
        walker.resolver.max_var_tokens = self.options.max_var_tokens
        return walker

    def _script_behaviours(self, root, result, source=None) -> list:
        """Apply what the page's theme scripts change before a reader sees it; say on the page
        what those scripts change that tinctura does not model (on every page of the theme:
        the reports keep the first, ``noted_once``). Returns what a scroll spy marks as the
        reader scrolls, ``(element, classes)``: with states checked, each is walked in that
        look (``extract/disclosure.py``)."""
        detected = behaviour_mod.DETECTED if self.options.theme_behaviours else ()
        spied = [] if self.options.states else None
        for theme in dict.fromkeys(behaviour_mod.apply(root, self._behaviours, source, detected,
                                                       spied)):  # (each theme once)
            note = behaviour_mod.NOTES_BY_THEME.get(theme)
            if note:
                result.diagnostics.append(Diagnostic(result.page, note, once=True))
        return spied or []


def _disclosed(root, disclosure, walkers, structure, result, fingerprints) -> None:
    """What a reader opens (``extract/disclosure.py``), walked in each scheme once every
    scheme's resting walk is done: the tree is changed once for all of them (a class a menu
    gets makes the page's structure forget every children list)."""
    changed, undo = disclosure.apply()
    structure.changed(changed, disclosure.attributes)
    _forget(fingerprints, changed)  # (a menu's subtree is fingerprinted open, on every page)
    try:
        for scheme, walker in walkers:
            with _scheme_applied(root, scheme, fingerprints, structure):
                before = len(walker.replays)
                result.samples.extend(walker.disclose())
                result.replays.extend(walker.replays[before:])
    finally:
        undo()


@contextmanager
def _scheme_applied(root, scheme, fingerprints, structure):
    """The tree with ``scheme``'s attributes set, and what read the changed elements forgotten
    (their subtrees' fingerprints, the structure's lists) on the way in and out."""
    restore = scheme_mod.apply(root, scheme)
    changed = [attr for _, attr, _ in scheme.attributes]
    _forget(fingerprints, restore.elements)
    structure.changed(restore.elements, changed)
    try:
        yield
    finally:
        restore()
        _forget(fingerprints, restore.elements)
        structure.changed(restore.elements, changed)


def internal_error(rel: str, exc: BaseException, debug: bool = False) -> Diagnostic:
    """An error in tinctura itself while checking a page: short, with what to report; the
    traceback only when debugging."""
    message = (f"page not checked: internal error ({type(exc).__name__}: {exc}); please report "
               "it with the page and the output of the same command with --debug")
    if debug:
        import traceback

        message += "\n" + "".join(traceback.format_exception(type(exc), exc, exc.__traceback__))
    return Diagnostic(rel, message, severity="error")


def _refuse_page(data: bytes, options: Options) -> str | None:
    """Why a page's bytes are not checked (too large, not text), or None."""
    if len(data) > options.max_file_bytes:
        return bounds.too_large(len(data), options.max_file_bytes)
    return bounds.not_text(data)


def _too_many_elements(root, data: bytes, limit: int) -> str | None:
    if data.count(b"<") <= limit:  # every element needs a tag: cheap upper bound
        return None
    count = sum(1 for _ in root.iter())
    if count <= limit:
        return None
    return (f"{count:,} elements, above the limit of {limit:,} per page "
            "(--max-elements)")


def _report_resolver(resolver, diagnostics) -> None:
    """Custom properties whose value was dropped for going past a bound, once per site (each
    process that computed the style says it: ``noted_once`` keeps the first)."""
    _said_once(diagnostics, [Diagnostic(sheet, f"{name}: {why}", line=line, once=True)
                             for (sheet, line, name), why in resolver.problems.items()])
    resolver.problems.clear()


def _said_once(diagnostics: list, notes) -> None:
    """Add ``notes`` to ``diagnostics`` but those already there (met again in another
    scheme's walk, or said by the page's check ahead as well)."""
    for note in notes:
        if note not in diagnostics:
            diagnostics.append(note)


def _forget(fingerprints: dict, elements) -> None:
    """Drop the fingerprints a scheme's attribute changes made stale (elements and ancestors)."""
    for el in elements:
        fingerprints.pop(el, None)
        for up in el.iterancestors():
            fingerprints.pop(up, None)


def _unrendered_template(root) -> bool:
    """A theme's template copied into the site as it is (pydata-sphinx-theme's
    ``_static/webpack-macros.html``), not a page: its links' addresses still hold template
    syntax, which no rendered page's do. (The links looked at alone: scanning the page's text
    first took ten times as long.)"""
    return any(unrendered(link.get("href") or "") for link in root.iter("link"))


# attributes the check sets on a page's elements (a state in force, a link in running text,
# an exemption decided): a page that writes them itself would put an element in a state at
# rest or a link in running text
_OWN_MARKS = (STATE_ATTR, link_mod.RUNNING, exempt_mod.MARK)
_MARKED = etree.XPath("//*[@*[starts-with(name(), 'data-tinctura-')]]")


def _own_marks_removed(root, text: str) -> str:
    """Take the attributes of ``_OWN_MARKS`` a page's source writes off its elements; what was
    taken off, for a diagnostic ("" where none was)."""
    if "data-tinctura-" not in text:
        return ""
    taken = {}
    for el in _MARKED(root):
        for name in [n for n in el.attrib if n.startswith(_OWN_MARKS)]:
            del el.attrib[name]
            taken[name] = taken.get(name, 0) + 1
    return ", ".join(f"{name} ({n} element{'s' if n > 1 else ''})"
                     for name, n in sorted(taken.items()))


def _is_redirect(data: bytes) -> bool:
    head = data[:2048]
    return bool(_REFRESH.search(head)) and len(data) < 4096


def evaluate(samples, options: Options) -> list:
    from . import rules

    judge_gradients(samples, options.level)
    return rules.run(samples, options)


# Verdicts by situation (``situations.sample_key``) per rule selection: a site repeats a few
# hundred colour situations thousands of times (every navigation link in every state on every
# page); each is judged once, and each further occurrence only gets a Finding that points at
# the shared verdict. Bounded; rules are pure, so this only saves time.
_JUDGED: dict = {}
JUDGED_LIMIT = 50000


def judge(samples, options: Options) -> list:
    """``evaluate``, with each distinct situation judged once per process."""
    return _judge(samples, options)[0]


def _judge(samples, options: Options) -> tuple:
    """(findings, their ``situations.finding_key``s)."""
    return _findings_of(_situations(samples, options))


def _findings_of(judged: list) -> tuple:
    """``_judge``'s answer from ``_situations``'."""
    out, out_keys = [], []
    for s, k, templates in judged:
        for t in templates:
            out.append(t if t.sample is s else situations.occurrence(t, s))
            out_keys.append((t.rule, k))
    return out, out_keys


def _situations(samples, options: Options, same=None) -> list:
    """``(sample, situation key, template findings)`` of each sample with findings: each
    distinct situation is judged once per process (the templates were made for the first
    sample of the situation). ``same``: the samples' ``situations.Alike``, made after
    ``judge_gradients`` (which may change what they look like)."""
    if same is None:
        judge_gradients(samples, options.level)
        same = situations.Alike(samples)
    memo = _JUDGED.setdefault(verdict_key(options), {})
    keys = list(map(situations.sample_key, same.firsts))  # the samples are alive: looks hold
    found = list(map(memo.get, keys))
    todo = {}
    for s, k, templates in zip(same.firsts, keys, found):
        if templates is None and k not in todo:
            todo[k] = s
    if todo:
        _judge_new(todo, memo, options)
    for g, (s, k, templates) in enumerate(zip(same.firsts, keys, found)):
        if templates is None:
            templates = memo.get(k)
            if templates is None:  # cleared meanwhile: judge it alone
                from . import rules

                templates = tuple(rules.run([s], options))
            found[g] = templates
    if not any(found):  # most pages' own texts pass
        return []
    return [(s, keys[g], found[g]) for s, g in zip(samples, same.of) if found[g]]


def _judge_new(todo: dict, memo: dict, options: Options) -> None:
    """Judge the situations ``todo`` (key -> the sample first met) into ``memo``."""
    if len(memo) + len(todo) > JUDGED_LIMIT:
        memo.clear()
    from . import rules

    found: dict = {}
    for f in rules.run(list(todo.values()), options):
        found.setdefault(id(f.sample), []).append(f)
    for k, s in todo.items():
        memo[k] = tuple(found.get(id(s), ()))


def _survey(samples, options: Options, every: bool = False) -> tuple:
    """``(_situations, declaration uses, counts, palette uses)`` of samples, grouped once
    (``situations.Alike``); ``every``: the palette uses keep every place
    (``palette.collect``)."""
    judge_gradients(samples, options.level)
    same = situations.Alike(samples)
    return (_situations(samples, options, same), problems_mod.declaration_uses(same.firsts),
            sample_stats(same.firsts, same.counts),
            palette_mod.collect_for(samples, options, same, every))


_VERDICT_KEYS: dict = {}  # id(options) -> (options, key): a run asks for every fragment


def verdict_key(options: Options) -> str:
    """What a verdict may depend on: every option but those that only say how to run."""
    known = _VERDICT_KEYS.get(id(options))
    cheap = (options.level, tuple(options.rules))  # what a caller might change in place
    if known is not None and known[0] is options and known[2] == cheap:
        return known[1]
    key = repr(dataclasses.replace(options, jobs=1, keep_samples=True, replay=True,
                                   exclude=(), share=True, encode_occurrences=False,
                                   cache_dir=""))
    if len(_VERDICT_KEYS) > 64:
        _VERDICT_KEYS.clear()
    _VERDICT_KEYS[id(options)] = (options, key, cheap)
    return key


def judge_gradients(samples, level: str) -> None:
    """Text with several possible backgrounds (gradient stops, an outlining text shadow, the
    shapes of a diagram) is judged only when all of them agree; otherwise it is
    undetermined."""
    from .rules.text import backgrounds, foreground_on

    spans = {}  # (bg, id of its alternatives) -> their luminances, sorted: texts share them
    known = {}  # colour -> relative luminance (a diagram's texts share most of its fills)

    def luminance(colour) -> float:
        found = known.get(colour)
        if found is None:
            found = known[colour] = wcag.relative_luminance(colour)
        return found

    for s in samples:
        if not s.bg_alternatives or s.status == UNDETERMINED or s.fg is None:
            continue
        required = wcag.required_ratio(level, wcag.is_large_text(s.font_size_px, s.font_weight))
        raw = s.fg_raw
        if raw is None or len(raw) < 4 or raw[3] >= 1.0:  # the same text colour on each
            key = (s.bg, id(s.bg_alternatives))
            found = spans.get(key)
            if found is None:
                found = spans[key] = sorted(map(luminance, backgrounds(s)))
            low, high = _ratio_span(luminance(s.fg), found)
        else:  # composited again over each background
            ratios = [wcag.contrast_ratio(foreground_on(s, bg), bg) for bg in backgrounds(s)]
            low, high = min(ratios), max(ratios)
        if low < required <= high:
            s.status = UNDETERMINED
            s.reason = ("backgrounds disagree (gradient stops, a partial inset shadow or an "
                        f"outlining text shadow): {low:.2f}:1 to {high:.2f}:1 "
                        f"against {required:g}:1")


def _ratio_span(text: float, backgrounds: list) -> tuple:
    """The lowest and highest contrast ratio of a text of luminance ``text`` on backgrounds
    of the luminances ``backgrounds`` (sorted): the ratio grows with the distance between
    the luminances, so the lowest is next to ``text`` and the highest at an end."""
    at = bisect.bisect_left(backgrounds, text)
    near = backgrounds[max(0, at - 1):at + 1]
    ends = (backgrounds[0], backgrounds[-1])
    return (min(wcag.ratio_from_luminances(text, b) for b in near),
            max(wcag.ratio_from_luminances(text, b) for b in ends))


def check_paths(paths, options: Options | None = None, findings_to=None) -> Report:
    """Check site directories and single HTML files; pages in a stable order.

    Each page is judged as soon as it is checked. With ``keep_samples=False`` its samples are
    then reduced to counts and to the backgrounds each colour declaration meets (what the
    grouping into problems needs), so memory does not grow with the number of samples.
    ``findings_to(page, findings)``, when given, receives each page's findings instead of
    ``Report.findings`` (``tinctura check`` stores them on disk).
    """
    options = options or Options()
    report = Report()
    seen, schemes = {}, {}
    for item in iter_pages(paths, options, judged=True, sites=report.sites):
        if isinstance(item, Diagnostic):
            report.diagnostics.append(item)
            continue
        page, findings, uses = item
        report.pages.append(page)
        if findings_to is None:
            report.findings.extend(findings)
        else:
            findings_to(page, findings)
        problems_mod.merge_uses(report.uses, uses)
        # the pages are kept to the end: what is merged site-wide leaves them, and equal
        # schemes are one object (the palette uses kept 5.6 KB a page: tracemalloc, 1,000
        # pages of the benchmark's baseline)
        palette_mod.merge(report.palette, page.palette)
        page.palette = {}
        page.schemes = [schemes.setdefault(scheme, scheme) for scheme in page.schemes]
        for scheme in page.schemes:
            seen.setdefault(scheme.name, scheme)
    report.schemes = list(seen.values())
    site_findings = judge_site(report.palette, options, ordered=True)
    if findings_to is None:
        report.findings.extend(site_findings)
    elif site_findings:  # after every page: reports list them last, under the whole site
        findings_to(PageResult(palette_mod.SITE_PAGE), site_findings)
    return report


def judge_site(palette_uses: dict, options: Options, ordered: bool = False) -> list:
    """The site-level rules (palette colours across pages and contexts), run once at the end;
    ``ordered``: in report order."""
    if not palette_uses:
        return []
    from . import rules

    found = rules.run_site(palette_uses, options)
    if ordered:
        found.sort(key=lambda f: _finding_order(f, (None, f.sample.xpath, f.sample.line)))
    return found


def ready_for_site_rules(options: Options) -> None:
    """Import what ``judge_site`` computes with (numpy, for CIECAM02: 45 ms) ahead of it,
    while workers check pages and this process only waits: the plugin's while they check the
    last ones, ``check --jobs N``'s as they start (it cost 78 ms after the last page). Only
    when a site-level rule is selected."""
    if palette_mod.site_rules_selected(options):
        importlib.import_module(".colour.ciecam02", __package__)


def iter_pages(paths, options: Options, judged: bool = False, sites=None):
    """Yield, in a stable order, a PageResult per page (or ``(page, findings, uses)`` when
    ``judged``) and a Diagnostic per path that cannot be read. ``sites``: a list that receives
    each Site used (with --jobs N, the main process's: it built the first page's rule set).

    With ``options.jobs > 1`` the pages of a site are spread over processes in contiguous
    chunks (so each worker's style cache stays warm); results keep the single-process order.
    """
    for path in paths:
        if os.path.isdir(path):
            site = Site(path, options)
            if sites is not None:
                sites.append(site)
            pages = site.pages()
            if not pages:
                yield Diagnostic(path, "no HTML pages found", severity="error")
            yield from noted_once(_site_pages(site, pages, options, judged))
        elif os.path.isfile(path):
            site = Site(os.path.dirname(os.path.abspath(path)) or ".", options)
            if sites is not None:
                sites.append(site)
            yield from _site_pages(site, [os.path.basename(path)], options, judged)
        else:
            yield Diagnostic(path, "no such file or directory", severity="error")


def noted_once(results):
    """Keep the first of each diagnostic said once per site (``Diagnostic.once``: what theme
    scripts change that is not modelled, on every page of the theme; a custom property
    dropped for going past a bound, by each process that computed it), so that the report
    says it once, on the first page of ``results`` that has it, whichever process checked
    which page first."""
    seen = set()
    for item in results:
        page = item[0] if isinstance(item, tuple) else item
        if any(d.once for d in page.diagnostics):
            kept = []
            for d in page.diagnostics:
                if d.once:
                    key = (d.message, d.line, None if d.path == page.page else d.path)
                    if key in seen:
                        continue
                    seen.add(key)
                kept.append(d)
            page.diagnostics = kept
        yield item


def _process(site, rel, options, judged, html=None):
    with no_collections():
        return _processed(site, rel, options, judged, html)


def _processed(site, rel, options, judged, html=None):
    page = site.check_page(rel, html=html)
    if not judged:
        return page
    judged_samples, findings = (), ()
    if options.share:  # findings of the walked samples are never built, only placed
        judged_samples, uses, stats, page.palette = _survey(page.samples, options)
    else:
        findings = evaluate(page.samples, options)
        uses = problems_mod.declaration_uses(page.samples)
        page.palette = palette_mod.collect_for(page.samples, options)
        stats = None
    more = []
    if not options.keep_samples:
        page.stats = stats if stats is not None else sample_stats(page.samples)
        more = _judge_replays(page, uses, options)
        page.samples = []  # (their layer lists were not built: reports name the causes)
    page.replays = []
    # findings as situations and places: replayed ones are never built, and a worker sends
    # each situation once
    return page, situations.PageFindings.build(page.page, findings, None, (), None,
                                               judged=judged_samples, replays=more,
                                               template_order=_template_order), uses


def _template_order(template) -> tuple:
    """Report order within a page after line and XPath (``_finding_order``)."""
    s = template.sample
    return (state_rank(s.state), s.scheme, template.rule)


def _finding_order(template, where) -> tuple:
    """Report order within a page: line, XPath, state (at rest first), scheme, rule."""
    s = template.sample
    return (where[2], where[1], state_rank(s.state), s.scheme, template.rule)


def _judge_replays(page, uses, options) -> list:
    """What the replayed fragments contribute: their findings as ``(fragments.Placement,
    Stamp)`` blocks for this page (returned), their declaration uses and their counts (added
    to ``uses`` and the page's stats). Each fragment is judged once per site."""
    found, placed = [], []
    tally = {}  # verdict id -> [verdict, occurrences]
    key = verdict_key(options)
    for fragment, stamp in page.replays:
        verdict = fragment.verdicts.get(key) or _verdict(fragment, options)
        if verdict.findings:  # placed as a block, worked out on the first replay
            placement = verdict.placement
            if placement is None:
                placement = verdict.placement = frag_mod.Placement(verdict.findings,
                                                                   stamp.anchor)
            found.append((placement, stamp))
        if verdict.places:
            placed.append((verdict, stamp))
        entry = tally.get(id(verdict))
        if entry is None:
            tally[id(verdict)] = [verdict, 1]
        else:
            entry[1] += 1
    merged = set()
    counted = {}  # id(stats) -> [stats, occurrences]: equal counts are one shared object
    for verdict, times in tally.values():
        counted.setdefault(id(verdict.stats), [verdict.stats, 0])[1] += times
        palette_mod.merge(page.palette, verdict.palette, times, places=False)
        if verdict.uses_key not in merged:  # uses are sets: once per distinct content
            merged.add(verdict.uses_key)
            problems_mod.merge_uses(uses, verdict.uses)
    for stats, times in counted.values():
        _add_stats(page.stats, stats, times)
    for verdict, stamp in placed:  # the palette uses' examples at this page's places
        if verdict.place_plan is None:
            verdict.place_plan = palette_mod.ReplayPlaces(verdict.places, stamp.anchor)
        verdict.place_plan.offer(page.palette, page.page, stamp.anchor, stamp.new_base)
    return found


class _Verdict:
    """A fragment judged once: findings as (relative XPath, base, finding, its situation key),
    declaration uses
    (with a hashable form, so that equal ones merge once) and counts. Equal uses and counts
    are one shared object: a large navigation has thousands of fragments and few distinct
    verdicts."""

    __slots__ = ("findings", "uses", "uses_key", "stats", "palette", "placement", "places",
                 "place_plan")

    def __init__(self, findings, uses, stats, palette=None, places=None):
        self.findings = findings or ()
        self.placement = None  # fragments.Placement of the findings, from the first replay
        self.palette = palette or {}  # palette uses (site-level rules), counted per replay
        # their places: {use key: [(XPath relative to the fragment's root, has a line,
        # text)]}, and palette.ReplayPlaces of them, from the first replay
        self.places = places or {}
        self.place_plan = None
        uses_key = frozenset((decl, bg, frozenset(schemes))
                             for decl, bgs in uses.items() for bg, schemes in bgs.items())
        self.uses_key, self.uses = _canonical(("uses", uses_key), (uses_key, uses))
        self.stats = _canonical(("stats", stats["samples"], stats["exempt"],
                                 tuple(sorted(stats["exempt_reasons"].items())),
                                 tuple(sorted(stats["undetermined"].items())),
                                 tuple(stats["schemes"]),
                                 distribution.key(stats.get("ratios", {}))), stats)


_CANONICAL: dict = {}
_CANONICAL_LIMIT = 20000


def _canonical(key, value):
    """One shared object per distinct verdict part (never mutated once shared)."""
    got = _CANONICAL.get(key)
    if got is None:
        if len(_CANONICAL) >= _CANONICAL_LIMIT:
            _CANONICAL.clear()
        got = _CANONICAL[key] = value
    return got


def _verdict(fragment, options) -> _Verdict:
    key = verdict_key(options)
    verdict = fragment.verdicts.get(key)
    if verdict is not None:
        return verdict
    samples = fragment.samples()
    judged, uses, stats, palette = _survey(samples, options, every=True)
    found = [("", fragment.base, f, k) for f, k in zip(*_findings_of(judged))]
    places = _relative_places(palette, fragment.base)
    for rel, nested in fragment.nested():
        inner = _verdict(nested, options)
        found.extend((rel + deeper, base, f, k) for deeper, base, f, k in inner.findings)
        problems_mod.merge_uses(uses, inner.uses)
        palette_mod.merge(palette, inner.palette, places=False)
        for use_key, items in inner.places.items():
            places.setdefault(use_key, []).extend((rel + deeper, lined, text)
                                                  for deeper, lined, text in items)
        _add_stats(stats, inner.stats)
    verdict = fragment.verdicts[key] = _Verdict(found, uses, stats, palette, places)
    if not options.keep_samples:
        # judged: its samples are not needed again (only failing ones, kept in the findings)
        fragment.items = fragment.nested()
    return verdict


def _relative_places(palette: dict, base: str) -> dict:
    """A fragment's palette uses' places (``palette.collect``'s ``every``) relative to its
    root ``base``, taken out of the uses: each replay places them on its own page."""
    places = {}
    for use_key, use in palette.items():
        places[use_key] = [(xpath[len(base):], bool(line), text)
                           for _, line, xpath, text in use.where]
        use.where = []
    return places


def sample_stats(samples, counts=None) -> dict:
    """What the summary needs of a page's samples once they are dropped. The counts are of
    texts: samples of controls and graphics (``extract/nontext.py``) are judged by TC110 but
    not counted as texts. ``counts``: how many samples each one stands for (1 each if None;
    ``situations.Alike``)."""
    undetermined, exempt = {}, {}
    texts = 0
    for s, n in distribution.weighted(samples, counts):
        if s.kind in NON_TEXT:
            continue
        texts += n
        if s.exempt:
            exempt[s.exempt] = exempt.get(s.exempt, 0) + n
        elif s.status == UNDETERMINED:
            key = s.reason or "unknown"
            undetermined[key] = undetermined.get(key, 0) + n
    return {"samples": texts, "exempt": sum(exempt.values()), "exempt_reasons": exempt,
            "undetermined": undetermined, "schemes": sorted({s.scheme for s in samples}),
            "ratios": distribution.histogram(samples, counts)}  # for the audit report's chart


def _add_stats(into: dict, more: dict, times: int = 1) -> None:
    into["samples"] += more["samples"] * times
    into["exempt"] += more["exempt"] * times
    for reason, count in more["exempt_reasons"].items():
        into["exempt_reasons"][reason] = into["exempt_reasons"].get(reason, 0) + count * times
    for reason, count in more["undetermined"].items():
        into["undetermined"][reason] = into["undetermined"].get(reason, 0) + count * times
    distribution.merge(into.setdefault("ratios", {}), more.get("ratios", {}), times)
    if not set(more["schemes"]) <= set(into["schemes"]):
        into["schemes"] = sorted(set(into["schemes"]) | set(more["schemes"]))


_WORKER = None


def _worker_init(root, options, judged, site=None):
    """A worker's Site: ``site`` when forked from a process whose Site has checked a page
    already (its stylesheets parsed, its styles and fragments recorded), else a new one."""
    global _WORKER
    _WORKER = (site if site is not None else Site(root, options), options, judged)
    # A worker lives only to check pages, and checking makes no reference cycles (a test
    # holds it to that): reference counting frees everything, and a cyclic collection would
    # only scan what the caches keep (tens of milliseconds each, two to four a worker).
    gc.disable()


def _worker_check(rel):
    site, options, judged = _WORKER
    return _packed(_process(site, rel, options, judged), options)


def _worker_check_all(rels) -> list:
    return [_worker_check(rel) for rel in rels]


def _packed(result, options, here: bool = False):
    """A worker's answer with its findings' records pickled here (``PageFindings.pack``),
    and written for the JSON report when one is made: the main process keeps them without
    reading them. ``here``: the page goes to this process's own store, which needs the
    records pickled only when an output reads them back (``Options.keep_records``)."""
    if isinstance(result, tuple) and isinstance(result[1], situations.PageFindings):
        encode = None
        if options.encode_occurrences:
            from .report.block_occurrences import encoded_page as encode
        result[1].pack(encode, keep=options.keep_records or not here)
    return result


def judge_page(site, rel, options, html=None, packed: bool = False):
    """Check and judge one page: ``(PageResult, findings, declaration uses)``; ``packed``:
    the findings' records pickled, as a worker hands them over (``_packed``)."""
    judged = _process(site, rel, options, True, html)
    return _packed(judged, options) if packed else judged


PAGE_TIMEOUT_S = 300  # far beyond any page seen (tens of milliseconds)
PAGES_AHEAD = 8  # pages waiting per plugin worker (PagePool)
AHEAD_WAITING = 2  # pages waiting to be checked ahead (PagePool.ahead)
# pages kept for the end while the workers are behind (PagePool.defer), their HTML in the
# spool folder: 400 pages of 100 KB hold 40 MB there; beyond, MkDocs' process checks them
DEFERRED_MOST = 400


def can_fork() -> bool:
    import multiprocessing

    return "fork" in multiprocessing.get_all_start_methods()


class PagePool:
    """Pages checked in worker processes while the caller goes on (the MkDocs plugin checks
    each page as MkDocs renders the next). ``submit`` returns at once; ``results`` gives
    ``(rel, result or exception)`` in submission order.

    ``site``: the caller's Site: each worker starts from a copy of it (forked, not pickled),
    with whatever it holds (the plugin's: the stylesheets parsed ahead, ``prepared``)."""

    def __init__(self, root: str, options: Options, workers: int, site=None):
        import multiprocessing
        import threading

        ctx = multiprocessing.get_context("fork")
        _preload(options)
        self._spool = _spool_folder()  # see _to_file
        # The heap so far (MkDocs's pages, the warm Site) moves out of the collector's reach
        # until ``close``: the workers' collections do not write to every inherited page of
        # memory (copying it), and this process's do not rescan it as pages go by.
        # (frozen only when nothing is, thawed by ``close``: see ``kept_out_of_collections``)
        self._frozen = ExitStack()
        self._frozen.enter_context(kept_out_of_collections())
        try:
            self._pool = ctx.Pool(workers, initializer=_worker_init,
                                  initargs=(root, options, True, site))
        except BaseException:
            self._frozen.close()
            shutil.rmtree(self._spool, ignore_errors=True)
            raise
        self._pending = []
        self._ending = None  # the thread ending the workers (``end_soon``)
        # pages given to the workers and not answered yet. When they are this far behind,
        # pages are kept for the end (``defer``), when a worker and a copy of it share them:
        # checked here, MkDocs' process, they cost it 16-140 ms each with its cold caches
        # against a worker's 13 (200 pages of the benchmark's `states`: 5-12 pages; of
        # `mkdocs-theme`, whose pages render faster, 55-62)
        self._limit = PAGES_AHEAD * workers
        self._workers = workers
        self._deferred = []  # (rel, its HTML's file): pages kept for the end (``defer``)
        self._done = 0
        self._ahead = 0  # pages sent to be checked ahead, not done yet (``ahead``)
        self._lock = threading.Lock()

    def _finished(self, _result) -> None:
        with self._lock:
            self._done += 1

    def submit(self, rel: str, html: str) -> bool:
        """Queue a page; False when the workers are behind (the caller then keeps it for the
        end, ``defer``, or checks it itself, which keeps memory bounded and shares the work).
        The pages kept for the end go to the workers first as they catch up, so those kept
        are always the last given and the answers come in page order up to them: the plugin
        takes the answers through its gate in page order, and one early page kept for the end
        held back every later one until the build's end (191 of 200 pages)."""
        self._catch_up()
        if self._deferred or self._behind():
            return False
        try:
            path = _to_file(self._spool, html)
        except OSError:  # no room for it: the caller checks it
            return False
        self._queue(rel, path)
        return True

    def _behind(self) -> bool:
        return len(self._pending) - self._done >= self._limit

    def _catch_up(self) -> None:
        """The pages kept for the end, oldest first, to the workers while they have room."""
        while self._deferred and not self._behind():
            self._queue(*self._deferred.pop(0))

    def _queue(self, rel: str, path: str) -> None:
        self._pending.append((rel, self._pool.apply_async(
            _worker_check_html, ((rel, path, self._spool),), callback=self._finished,
            error_callback=self._finished)))

    def defer(self, rel: str, html: str) -> bool:
        """Keep a page for the end, when the workers are behind (``submit`` said False):
        then each worker checks its share of them beside a copy of itself that it forks
        (``_worker_check_split``), both warm, while this process, MkDocs', has rendered every
        page. False when enough wait already (``DEFERRED_MOST``) or there is no room: the
        caller then checks the page itself, as before."""
        if len(self._deferred) >= DEFERRED_MOST:
            return False
        try:
            self._deferred.append((rel, _to_file(self._spool, html)))
        except OSError:
            return False
        return True

    def _split_deferred(self) -> None:
        """The deferred pages, one run of neighbours per worker, each split with a fork."""
        tasks, self._deferred = self._deferred, []
        size = -(-len(tasks) // self._workers)
        for at in range(0, len(tasks), size):
            run = tasks[at:at + size]
            self._pending.append((tuple(rel for rel, _ in run), self._pool.apply_async(
                _worker_check_split, ((run, self._spool),))))

    def ready(self):
        """``(rel, result or exception)`` of the pages answered so far, oldest first, in
        submission order (each given once): a caller that takes them as it goes holds no
        more than a few pages' results."""
        while self._pending and self._pending[0][1].ready():
            rel, pending = self._pending.pop(0)
            with self._lock:  # counted by _finished (run before ready() turns true)
                self._done -= 1
            try:
                yield rel, _from_file(pending.get(timeout=0))
            except Exception as exc:  # the page, not the build, failed
                yield rel, exc

    def results(self, keep: bool = False):
        """Every answer still due, the deferred pages' last; then the workers end, unless
        ``keep`` (the caller then has them ``recheck`` pages and calls ``close``)."""
        if self._deferred:
            self._split_deferred()
        try:
            for rel, pending in self._pending:
                if isinstance(rel, tuple):  # a split run: its answers in order
                    yield from _answers(rel, pending)
                    continue
                try:  # a worker that died never answers: give up on it, not on the build
                    yield rel, _from_file(pending.get(timeout=PAGE_TIMEOUT_S))
                except Exception as exc:  # the page, not the build, failed
                    yield rel, exc
        finally:
            self._pending = []
            if not keep:
                self.close()

    def ahead(self, rel: str, render, payload) -> bool:
        """Have a worker render the page ``rel`` (``render(*payload)``, a module's function:
        MkDocs has converted its Markdown and will render it later) and check it, keeping
        the answer for when the page comes (``_checked_ahead``). At most ``AHEAD_WAITING``
        wait: more would hold back the rendered pages. False when the page is not sent."""
        with self._lock:
            if self._ahead >= AHEAD_WAITING:
                return False
            self._ahead += 1
        try:
            self._pool.apply_async(_worker_ahead, ((rel, render, payload),),
                                   callback=self._ahead_done, error_callback=self._ahead_done)
        except Exception:
            self._ahead_done(None)
            return False
        return True

    def _ahead_done(self, _result) -> None:
        with self._lock:
            self._ahead -= 1

    def rechecker(self, every_page: bool = True):
        """``overrides.verify``'s helper on these workers, once every page is answered
        (``results(keep=True)``): ``overrides.recheck`` of pages in the workers, warm, with
        their options and parsed stylesheets. ``every_page``: they take every page, a lone
        worker splitting them with a copy of itself (the plugin: MkDocs' process, whose
        caches have seen no page, took 155-267 ms for its share where the worker took 104-191
        ms for the other, 200 pages of the benchmark's `baseline`; the worker taking both
        shares without a copy made no difference); else the share they are given."""
        if not every_page:
            return _pool_helper(self._pool, False)
        if self._workers == 1:
            return _pool_helper(self._pool, True, split_in=self._spool)
        return _pool_helper(self._pool, True, shares=self._workers)

    def caller(self):
        """``kept_call``'s ``call`` on these workers, once every page is answered: the fixes'
        planning checks a faded text's page again there, warm (``writer.WriterAid.elsewhere``)."""
        return _pool_caller(self._pool)

    def end_soon(self) -> None:
        """Start ending the workers, their work done, while this process writes the reports;
        ``close`` waits for it. (The collector's freeze is left to ``close``: thawed now, the
        reports' collections would scan everything the check keeps.)"""
        if self._ending is None:
            self._ending = _ending(self._pool)

    def close(self) -> None:
        """End the workers: every answer is in, and a stuck worker must not hold the build."""
        if self._ending is None:
            _end(self._pool)
        else:
            self._ending.join()
        self._frozen.close()
        shutil.rmtree(self._spool, ignore_errors=True)  # pages no worker took


@contextmanager
def recheck_helper(root: str, options: Options, loader=None):
    """``overrides.verify``'s ``helper`` for the command line, or None (--jobs 1, no fork).

    Once every page is checked the workers are gone and the other cores idle while this
    process rechecks the verification pages: the helper forks a worker (a ``PagePool``, on
    first use only) that inherits ``loader``'s parsed stylesheets and rechecks its share
    beside this process. When the worker cannot start the helper gives None, and ``verify``
    checks those pages here. On exit the worker and its folder are gone. Where the check kept
    its workers (``pools_kept``), they recheck every share instead, and on exit start ending."""
    if int(options.jobs or 1) < 2 or not can_fork():
        yield None
        return
    kept = (_KEPT or {}).get(root)
    if kept is not None:  # the check's own workers, warm: they take every share, one each
        try:
            yield _pool_helper(kept, True, shares=int(options.jobs))
        finally:  # then they end while this process writes the reports
            del _KEPT[root]
            _ENDING.append(_ending(kept))
        return
    pools = []

    def helper(css, pages):
        try:
            if not pools:
                site = Site(root, options)
                if loader is not None:
                    site.loader = loader
                pools.append(PagePool(root, options, 1, site))
            return pools[0].rechecker(every_page=False)(css, pages)
        except Exception:  # no worker: verify checks these pages itself
            return None

    try:
        yield helper
    finally:
        for pool in pools:
            pool.close()


def _pool_helper(pool, all_shares: bool, split_in: str | None = None, shares: int = 2):
    """``overrides.verify``'s helper on a pool's workers: each call starts ``recheck`` of some
    pages in one of them and returns at once a callable that waits for the answer (None when
    the worker failed: the caller then checks the pages itself), or None when the pool takes
    no work. ``all_shares``: the workers take every share (two or more, warm); ``shares``: how
    many (one a worker: with --jobs 8, two shares left six workers idle). ``split_in``: one
    worker takes every page, splitting them with a copy of itself (``_worker_recheck_split``;
    the copy's answer in a file of that folder)."""
    def helper(css, pages):
        try:
            if split_in is not None:
                pending = pool.apply_async(_worker_recheck_split, ((css, pages, split_in),))
            else:
                pending = pool.apply_async(_worker_recheck, ((css, pages),))
        except Exception:
            return None

        def answer():
            return _awaited(pending)
        answer.ready = pending.ready  # (``overrides.verify``: whether it is in)
        return answer

    helper.all_shares = all_shares or split_in is not None
    helper.splits = split_in is not None  # one share: every page
    helper.shares = max(2, shares)
    return helper


def kept_spread(root: str):
    """``spread(func, items)``: ``func`` over ``items`` in order, the first here while the
    workers the check of ``root`` kept (``pools_kept``) take the others; None when none were
    kept. (``writer.WriterAid.locate_all``: the pages the reports' examples are on, read again
    by three processes.) A worker that fails leaves its items to this process."""
    pool = (_KEPT or {}).get(root)
    if pool is None:
        return None

    def spread(func, items):
        try:
            pending = pool.map_async(func, items[1:], chunksize=1)
        except Exception:
            pending = None
        first = func(items[0])
        rest = _awaited(pending) if pending is not None else None
        return [first] + (rest if rest is not None else [func(item) for item in items[1:]])
    return spread


def kept_call(root: str):
    """``call(func, arg)``: ``func(arg)`` in one of the workers the check of ``root`` kept
    (``pools_kept``), warm from the pages, its answer or None where the worker failed; None
    when none were kept."""
    pool = (_KEPT or {}).get(root)
    return _pool_caller(pool) if pool is not None else None


def _pool_caller(pool):
    """``kept_call``'s ``call`` on a pool's workers."""
    def call(func, arg):
        try:
            return _awaited(pool.apply_async(func, (arg,)))
        except Exception:  # (the pool is ending: no work taken)
            return None
    return call


def _awaited(pending):
    """A worker's answer (an ``AsyncResult``'s), or None where the worker failed or died: the
    caller then does the work itself."""
    try:
        return pending.get(timeout=PAGE_TIMEOUT_S)
    except Exception:
        return None


def opacity_layers(site, page: str, scheme: str) -> dict:
    """``(XPath, state) -> ((declaration, value), ...)``: the opacities fading each text of
    ``page`` in ``scheme``, nearest first, where some do: the page checked once more by
    ``site``, which keeps every sample's background layers (``writer.WriterAid.opacity_of``)."""
    found = {}
    for x in site.check_page(page).samples:
        if x.scheme != scheme:
            continue
        faded = tuple((layer.cause.declaration if layer.cause is not None else None,
                       layer.colour[3]) for layer in x.bg_layers if layer.kind == "opacity")
        if faded:
            found[(x.xpath, x.state)] = faded
    return found


# in a worker: its Site's loader -> a Site keeping background layers on it
# (``worker_opacity_layers``)
_LAYERED: dict = {}


def worker_opacity_layers(key):
    """``opacity_layers`` of ``key`` ``(page, scheme)`` in a worker: on its own loader, whose
    rule sets, compiled selectors and computed styles the check warmed (checked in the main
    process, whose caches had seen no page, a manual's faded texts took 0.1 s)."""
    site, options, _ = _WORKER
    layered = _LAYERED.get(id(site.loader))
    if layered is None or layered.loader is not site.loader:
        _LAYERED.clear()
        layered = Site(site.root, dataclasses.replace(options, keep_samples=True))
        layered.loader = site.loader
        _LAYERED[id(site.loader)] = layered
    return opacity_layers(layered, *key)


def _worker_recheck(args):
    css, pages = args
    site, options, _ = _WORKER
    from . import overrides

    return overrides.recheck(site.root, options, css, pages, site.loader)


def _worker_recheck_split(args):
    """``_worker_recheck`` of every verification page by a lone worker (the plugin's): it
    forks a copy of itself, warm, that rechecks every other page while it rechecks the rest,
    where MkDocs' process, cold, took a share. A copy that cannot start or fails leaves its
    pages to this worker. The answers' union (``overrides.union``)."""
    css, pages, spool = args
    site, options, _ = _WORKER
    from . import overrides

    def recheck(share):
        return overrides.recheck(site.root, options, css, share, site.loader)

    theirs = pages[1::2]
    copy = _fork_copy(spool, lambda: recheck(theirs)) if theirs and hasattr(os, "fork") \
        else None
    mine = recheck(pages[0::2] if copy is not None else pages)
    if copy is None:
        return mine
    got = _reaped(*copy)
    return overrides.union([mine, got if got is not None else recheck(theirs)])


def _worker_check_html(args):
    rel, path, spool = args
    return _check_to_file(rel, _from_file(path), spool)


def _check_to_file(rel, html, spool) -> str:
    """A worker's answer for the page ``rel`` (its ``html``), in a file of ``spool``: the
    answer of its check ahead when it was of the same HTML (``PagePool.ahead``)."""
    site, options, judged = _WORKER
    answer = _checked_ahead(rel, html)
    if answer is None:
        answer = _packed(_process(site, rel, options, judged, html), options)
        _noted_before(answer, _UNTAKEN.pop(rel, ()))
    return _to_file(spool, answer)


def _noted_before(answer, notes) -> None:
    """Add to a page's answer the notes said once (``Diagnostic.once``) by its check ahead,
    whose answer was not taken: a custom property past its bound is said where its style is
    first computed, and the page's own check found that style computed."""
    page = answer[0] if isinstance(answer, tuple) else answer
    if getattr(page, "diagnostics", None) is not None:
        _said_once(page.diagnostics, notes)


# In a worker: page -> (digest of the HTML checked ahead, its answer) (``PagePool.ahead``)
_AHEAD: dict = {}
# page -> the notes said once by its answer ahead, which was not taken (``_noted_before``)
_UNTAKEN: dict = {}
AHEAD_KEPT = 200  # answers kept ahead at most (each is dropped once given): memory bounded
_SHEETS_SAME: list = [None]  # whether the stylesheets read ahead are the site's (first use)


def _worker_ahead(args) -> None:
    """Render a page ahead (``render(*payload)``, the caller's), check it and keep the answer
    under its HTML's digest, with the generation of the stylesheets it read (MkDocs copies
    them again meanwhile: an answer from a sheet read half written is not given once the
    sheet has been read whole, ``_checked_ahead``). A check that missed a stylesheet (not in
    place yet) is not kept; a page that cannot be rendered or checked is checked when it
    comes."""
    rel, render, payload = args
    site, options, judged = _WORKER
    if len(_AHEAD) >= AHEAD_KEPT:  # (no room: the page is checked when it comes)
        return
    missing = site.loader.missing
    try:
        html = render(*payload)
        answer = _packed(_process(site, rel, options, judged, html), options)
        if site.loader.missing == missing:
            _AHEAD[rel] = (html_digest(html), answer, site.loader.generation)
    except Exception:
        pass


def _checked_ahead(rel, html):
    """The answer kept ahead for ``rel`` when it was of this HTML and the stylesheets MkDocs
    has copied since are the bytes read ahead (compared once) and read for it, else None."""
    known = _AHEAD.pop(rel, None)
    if known is None:
        return None
    if _SHEETS_SAME[0] is None:
        _SHEETS_SAME[0] = not _WORKER[0].stylesheets_changed()
    if not _SHEETS_SAME[0]:
        return None
    if known[2] != _WORKER[0].loader.generation:  # (a sheet read since had other bytes)
        return None
    if known[0] != html_digest(html):  # (the same stylesheets: what it said once holds)
        page = known[1][0] if isinstance(known[1], tuple) else known[1]
        _UNTAKEN[rel] = [d for d in getattr(page, "diagnostics", ()) if d.once]
        return None
    return known[1]


def html_digest(html: str) -> str:
    """A page's HTML in 32 hex digits: the plugin's records (a page changed since an earlier
    build?) and the answers kept ahead (the page rendered ahead is the page written?)."""
    return hashlib.blake2b(html.encode("utf-8", "surrogatepass"), digest_size=16).hexdigest()


def _answers(rels, pending):
    """``(rel, answer or exception)`` of a split run (``_worker_check_split``)."""
    try:
        paths = pending.get(timeout=PAGE_TIMEOUT_S)
    except Exception as exc:  # the worker died: those pages, not the build, failed
        for rel in rels:
            yield rel, exc
        return
    for rel, path in zip(rels, paths):
        try:
            yield rel, _from_file(path)
        except Exception as exc:
            yield rel, exc


def _worker_check_split(args):
    """The pages kept for the end (``PagePool.defer``): this worker, warm from the pages it
    checked, forks a copy of itself that checks the second half while it checks the first
    (two cores, no cold start). The answers' files, in order. Each process reads one page at
    a time (a thousand-page site's pages are 400 KB each: read all at once, 300 of them held
    120 MB); the copy leaves its pages' files, so that a copy that cannot start, fails or dies
    leaves its half to this worker, which removes them."""
    tasks, spool = args
    half = len(tasks) // 2
    copy = _fork_checker(tasks[half:], spool) if half and hasattr(os, "fork") else None
    mine = tasks[:half] if copy is not None else tasks
    out = [_check_to_file(rel, _from_file(path), spool) for rel, path in mine]
    if copy is not None:
        theirs = _reaped(*copy)
        out += theirs if theirs is not None else [
            _check_to_file(rel, _from_file(path, keep=True), spool) for rel, path in tasks[half:]]
        for _, path in tasks[half:]:
            _remove(path)
    return out


def _fork_checker(tasks, spool):
    """``(pid, file of its answers' paths)`` of a forked copy of this worker checking the
    pages of ``tasks`` (``(rel, file of its HTML)``, the files left in place), or None when
    it cannot start."""
    return _fork_copy(spool, lambda: [_check_to_file(rel, _from_file(path, keep=True), spool)
                                      for rel, path in tasks])


def _fork_copy(spool, work):
    """``(pid, file of its answer)`` of a forked copy of this worker that pickles what
    ``work()`` returns into a file of ``spool``, or None when it cannot start."""
    fd, listing = tempfile.mkstemp(dir=spool)
    os.close(fd)
    try:
        pid = os.fork()
    except OSError:
        _remove(listing)
        return None
    if pid:
        return pid, listing
    code = 1
    try:  # the copy: its answer, then out without any of the worker's exit handlers
        _die_with_parent()
        answer = work()
        with open(listing, "wb") as fh:
            pickle.dump(answer, fh)
        code = 0
    finally:
        os._exit(code)


def _reaped(pid, listing):
    """What the forked copy ``pid`` wrote (``_fork_copy``), once it has ended; None if it
    failed."""
    try:
        _, status = os.waitpid(pid, 0)
        if os.waitstatus_to_exitcode(status) != 0:
            return None
        with open(listing, "rb") as fh:
            return pickle.load(fh)
    except (OSError, EOFError, pickle.UnpicklingError):
        return None
    finally:
        _remove(listing)


def _remove(path: str) -> None:
    try:
        os.unlink(path)
    except OSError:
        pass


def _die_with_parent() -> None:
    """Linux: end this forked copy with the worker (a build that is stopped terminates its
    workers, which would leave the copy running its pages to no one)."""
    try:
        import ctypes
        import signal

        ctypes.CDLL(None).prctl(1, signal.SIGTERM)  # PR_SET_PDEATHSIG
    except Exception:
        pass


def _spool_folder() -> str:
    """A new folder for the pages and answers in transit (``_to_file``), in memory where
    there is a shared-memory file system: on a disk one, creating and removing a file per page
    and answer cost about 1.5 ms of system time each (0.6 s on 200 pages)."""
    shm = "/dev/shm"
    if os.path.isdir(shm) and os.access(shm, os.W_OK):
        try:
            return tempfile.mkdtemp(prefix="tinctura-pages-", dir=shm)
        except OSError:
            pass
    return tempfile.mkdtemp(prefix="tinctura-pages-")


def _to_file(folder: str, value) -> str:
    """``value`` pickled into a new file in ``folder``: its path. A page and its answer go
    between the plugin and its workers as files, the pipe carries only their paths. A pipe
    holds 64 KB, an answer several hundred (its findings' records), and the main process
    reads the pipe in a thread that waits for the lock MkDocs's rendering holds, up to 5 ms
    per 64 KB: measured on 200 pages, the worker waited a fifth of its time to hand
    answers over."""
    from multiprocessing.reduction import ForkingPickler

    fd, path = tempfile.mkstemp(dir=folder)
    with os.fdopen(fd, "wb") as fh:
        ForkingPickler(fh, pickle.HIGHEST_PROTOCOL).dump(value)
    return path


def _from_file(path: str, keep: bool = False):
    """The value ``_to_file`` wrote to ``path``; the file goes, unless ``keep``."""
    try:
        with open(path, "rb") as fh:
            return pickle.load(fh)
    finally:
        if not keep:
            os.unlink(path)


@contextmanager
def kept_out_of_collections():
    """What is alive now moves out of the collector's generations until the block ends
    (``gc.freeze``): a forked worker's collections then do not write to every inherited page
    of memory (copying it), and this process's do not rescan what it keeps. Frozen only when
    nothing is, and thawed after: a caller's frozen objects are left as they are."""
    mine = gc.get_freeze_count() == 0
    if mine:
        gc.freeze()
    try:
        yield
    finally:
        if mine:
            gc.unfreeze()


@contextmanager
def relaxed_gc():
    """``cyclic_gc.no_collections`` around the run of pages of ``tinctura check``, their findings
    taken in too (which makes a few dozen cyclic objects now and then). After it, what the run
    keeps (caches, records) moves to the oldest generation unscanned (``gc.freeze`` then
    ``gc.unfreeze``): the first collection would otherwise scan it all and free next to nothing
    (0.11 s after 200 pages). Not when anything is frozen: a caller's frozen objects stay
    frozen."""
    with no_collections():
        yield
        if gc.get_freeze_count() == 0:
            gc.freeze()
            gc.unfreeze()


def relax_gc() -> tuple:
    """Raise the first-generation threshold; returns the thresholds it replaced. For the
    MkDocs plugin's process, whose own objects may form cycles: collections stay, fewer."""
    before = gc.get_threshold()
    gc.set_threshold(max(before[0], GC_THRESHOLD), before[1], before[2])
    return before


GC_THRESHOLD = 50000


def _preload(options) -> None:
    """Before forking workers: import what every worker would import for itself (they then
    share the parent's copy)."""
    from . import rules

    if rules.workers_import_library(options):
        from .colour import colour_science

        colour_science()
    # the theme scripts' selectors are read with cssselect (5 ms to import), and a JSON
    # report's occurrences are written where each page is judged
    importlib.import_module("cssselect")
    if options.encode_occurrences:
        importlib.import_module(".report.block_occurrences", __package__)


def _site_pages(site, pages, options, judged):
    jobs = max(1, int(options.jobs or 1))
    if jobs == 1 or len(pages) < 2 * jobs:
        with relaxed_gc():
            for rel in pages:
                yield _packed(_process(site, rel, options, judged), options, here=True)
        return
    import multiprocessing

    _preload(options)
    forking = hasattr(os, "fork")
    if forking:
        # The first page's rule set is built here and every worker forked after starts from
        # it; the page itself goes to a worker. (Checked here, cold, it took 0.1-0.2 s while
        # the other core idled; without it the check was faster in 21 of 25 alternating
        # runs at 200 pages, each worker learning the frame's styles on its own first page.)
        site.prepare(pages[0])
    ctx = multiprocessing.get_context("fork" if forking else "spawn")
    warm = site if forking else None  # (a forked worker inherits it; nothing is pickled)
    # the warm Site out of the workers' collections, as in PagePool; this process only takes
    # in the workers' pages (relaxed: at the default thresholds it collected about 150 times
    # on 200 pages, 0.1 s)
    with kept_out_of_collections(), relaxed_gc():
        pool = ctx.Pool(jobs, initializer=_worker_init,
                        initargs=(site.root, options, judged, warm))
        kept = False
        try:
            answers = pool.imap(_worker_check_all, shrinking_chunks(pages, jobs))
            if judged:  # (the workers are under way; this process mostly waits for them)
                ready_for_site_rules(options)
            for results in answers:
                yield from results
            kept = forking and _keep(site.root, pool)
        finally:
            if not kept:
                _end(pool)


# site root -> the pool of its pages' workers, kept after its last page while ``pools_kept``
# holds it (None: pools end with their pages)
_KEPT: dict | None = None
_ENDING: list = []  # threads ending kept pools once they verified the fixes (``_ending``)


@contextmanager
def pools_kept():
    """While the block runs, the first site's check with --jobs N keeps its workers after its
    last page instead of ending them: ``recheck_helper`` gives them the verification of the
    fixes, warm from the pages (in a process that checked none, the first page rechecked cost
    115-120 ms against 75-80 ms in one that had checked 30: 200 pages of the benchmark's
    `baseline`). They end once they have (in a thread, while the reports are written), or
    with the block."""
    global _KEPT
    outer, _KEPT = _KEPT, {}
    try:
        yield
    finally:
        kept, _KEPT = _KEPT, outer
        for pool in kept.values():
            _end(pool)
        while _ENDING:
            _ENDING.pop().join()


def _keep(root: str, pool) -> bool:
    """Keep ``pool`` for ``pools_kept``, if it holds and keeps no other: the fixes are verified
    on the first site checked (``cli.writer_aid``), and idle workers hold their memory."""
    if _KEPT is None or _KEPT:
        return False
    _KEPT[root] = pool
    return True


def _end(pool) -> None:
    """End a pool's workers (as leaving its ``with`` block does): every answer is in."""
    pool.terminate()
    pool.join()


def _ending(pool) -> threading.Thread:
    """``_end(pool)`` in a thread, started: ending two workers took 17-26 ms at the end of
    `tinctura check --jobs 2` (200 pages), mostly waiting for them to exit, which the reports
    need not wait for."""
    thread = threading.Thread(target=_end, args=(pool,), name="tinctura-end-workers",
                              daemon=True)
    thread.start()
    return thread


def shrinking_chunks(pages: list, jobs: int, most: int = 25) -> list:
    """``pages`` in runs of neighbours for ``jobs`` workers: each half a worker's share
    of what is left (at most ``most``), so that runs shrink towards the end and the workers
    finish together. Neighbouring pages share navigation fragments, which a worker records
    once and replays; one run per page at the end would lose that, one large run would leave
    a worker idle while the other finishes it."""
    out, at = [], 0
    while at < len(pages):
        size = max(1, min(most, -(-(len(pages) - at) // (jobs * 2))))
        out.append(pages[at:at + size])
        at += size
    return out
