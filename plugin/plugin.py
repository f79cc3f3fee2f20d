"""The MkDocs plugin: check each page as it is written, report problems after the build.

The engine computes; these events only feed it pages and log its results. Per-page results are
kept between ``mkdocs serve`` rebuilds (``on_startup`` keeps this object alive): a page whose
HTML did not change is not checked again unless a stylesheet changed.
"""
from __future__ import annotations

import fnmatch
import gc
import logging
import os

from mkdocs.exceptions import PluginError
from mkdocs.plugins import BasePlugin, event_priority, get_plugin_logger

from tinctura import baseline as baseline_mod
from tinctura import config as config_mod
from tinctura import engine, mkdocs_project, problems, rules, situations
from tinctura import gate as gated
from tinctura import palette as palette_mod
from tinctura.extract import prepared as prepared_mod
from tinctura.extract import sheet_cache
from tinctura.report import messages as m
from tinctura.report import outputs, plain
from tinctura.report.base import Header
from tinctura.report.appearance import is_appearance
from tinctura.report.appearance import problem_lines as appearance_lines
from tinctura.report.notice import DISCLAIMER
from tinctura.report.scope import scope_of
from tinctura.report.status import at_or_above
from tinctura.report.store import FindingStore
from tinctura.report.summary import summarise
from tinctura.report.text_report import (EXAMPLES, headline, problem_lines, summary_line,
                                         terminal_width, wrapped)
from tinctura.writer import WriterAid, page_costs

from . import ahead
from .config import TincturaConfig

log = get_plugin_logger(__name__)


SHARED_MOST = 200_000  # distinct record parts shared (TincturaPlugin.keep): a bound only
CHECK_AHEAD = True  # pages rendered and checked in the worker during the conversion (ahead)


class PageRecord:
    """What one page produced, and the digest of the HTML it was computed from."""

    __slots__ = ("digest", "result", "findings", "uses")

    def __init__(self, digest, result, findings, uses):
        self.digest = digest
        self.result = result  # PageResult with samples reduced to counts (memory stays flat)
        self.findings = findings  # how many; the findings wait on disk (TincturaPlugin.found)
        self.uses = uses  # declaration -> backgrounds, for fixes at the cause


digest = engine.html_digest  # (a page's HTML, compared with an earlier build's)


class TincturaPlugin(BasePlugin[TincturaConfig]):
    def __init__(self) -> None:
        self.command = "build"
        self.site = None
        self.site_dir = None
        self.config_dir = "."  # the folder of mkdocs.yml: option paths are relative to it
        self.docs_dir = "."
        self.options = None
        self.records: dict = {}  # output path (site-relative) -> PageRecord
        self.current: dict = {}  # output path -> source path, for the pages of this build
        self.stale: set = set()  # pages whose record predates a stylesheet change
        self.digesting = True  # whether pages are compared with earlier builds' (on_pre_build)
        self.sheets_checked = False
        self.pool = None  # worker processes checking pages while MkDocs renders the next
        self.helper = None  # the same workers after the last page: they verify fixes too
        self.digests: dict = {}  # page -> digest of the HTML sent to a worker
        self.unwritten: list = []  # (page, digest): its worker failed before MkDocs wrote it
        self.project = None  # mkdocs_project.Project: Markdown sources, the site's own sheets
        self.rechecked: list = []  # pages checked in this build (serve logs them)
        self.previous = None  # problem key -> sentence after the previous build (serve)
        self.verify_cache: dict = {}  # overrides verified on the same pages are not redone
        # each page's findings on disk, as situations and small records (report.store), kept
        # between serve rebuilds; each build gates them into a store of its own
        self.found = FindingStore()
        self.early = None  # Gating of this build's first pages while MkDocs renders the rest
        self.gc_before = None  # the collector's thresholds while pages are checked (release)
        self.kept_now: set = set()  # pages checked in this build
        self.prepared = None  # stylesheets parsed ahead while MkDocs converts the Markdown
        self.shared: dict = {}  # one object for equal parts of the pages' records (keep)
        self.files = self.nav = None  # this build's, for pages rendered ahead (``ahead``)

    # -- lifecycle -------------------------------------------------------------------------

    def on_startup(self, *, command, dirty) -> None:
        # Defining on_startup keeps this object (and its records) across serve rebuilds.
        self.command = command
        self.previous = None  # the first build of a session logs every problem

    def on_shutdown(self) -> None:
        """MkDocs is about to exit: what is alive moves out of the collector's reach
        (``gc.freeze``). Python's shutdown would otherwise collect the whole heap, which the
        check made larger (its caches, the store's records): 0.2 s of a 200-page build's
        3.5 s, measured. The young generations are collected first, so that garbage made
        lately (a file some code left in a reference cycle, say) is still finalized; objects
        made later are collected as usual."""
        gc.collect(1)
        gc.freeze()

    def engine_options(self) -> engine.Options:
        try:
            chosen = rules.selection(self.config.select, self.config.ignore)
        except ValueError as exc:
            raise PluginError(f"tinctura: {exc}") from None
        return engine.Options(
            level=self.config.level,
            viewport_width=self.config.viewport_width,
            states=self.config.states,
            schemes=self.config.schemes,
            behaviours=tuple(self.config.behaviours or ()),
            theme_behaviours=self.config.theme_behaviours,
            cache_dir=sheet_cache.folder_for(self.config.cache),
            keep_samples=False,  # a build log needs counts, findings and declaration uses
            rules=chosen,
            severity=tuple(sorted(self.config.severity.items())),
            lc_levels=self.config.lc_levels,
            cvd_severity=self.config.cvd_severity,
            profiles=tuple(self.config.profiles),
            palette=palette_mod.palette_setting(self.config.palette),
            exemptions=config_mod.exemptions_kept(self.config.no_exempt),
            logotypes=tuple(self.config.logotypes),
            encode_occurrences=self.encodes_occurrences(),
        )

    def wants_fingerprints(self) -> bool:
        from tinctura import report

        return self.config.fingerprints or any(
            report.FORMATS[name].wants_fingerprints for name, _ in self.config.report)

    def encodes_occurrences(self) -> bool:
        """Whether each page's records are written for a JSON report where the page is judged
        (in a worker), as on the command line (the gate marks findings when it computes
        fingerprints or reads a baseline)."""
        return outputs.records_written_as_judged(
            [name for name, _ in self.config.report], False,
            self.wants_fingerprints() or bool(self.config.baseline))

    def workers(self) -> int:
        """Worker processes beside MkDocs: the cores but the one MkDocs renders on. `serve`
        checks in-process (its file watcher runs threads, and forking them is unsafe)."""
        jobs = self.config.jobs or os.cpu_count() or 1
        if self.command == "serve" or not engine.can_fork():
            return 0
        return max(0, jobs - 1)

    def on_pre_build(self, *, config) -> None:
        self.config_dir = os.path.dirname(os.path.abspath(config.config_file_path or "."))
        self.docs_dir = config.docs_dir
        options = self.engine_options()
        options.site_url = config.site_url or ""  # absolute links below its path
        if config.site_dir != self.site_dir or options != self.options:
            self.site = None
            self.records.clear()
            self.found = FindingStore()
            self.stale.clear()
            self.previous = None
        self.site_dir = config.site_dir
        self.options = options
        self.sheets_checked = False
        self.early, self.kept_now = None, set()
        # a page's digest tells whether it changed since an earlier build of this process:
        # `mkdocs build` has none (0.25 ms a page on the build's own process, measured)
        self.digesting = bool(self.records) or self.command == "serve"

    @event_priority(-100)  # after plugins that add pages in on_files
    def on_files(self, files, *, config):
        self.current = {
            f.dest_uri: f.src_uri for f in files.documentation_pages()
            if not self.excluded(f.src_uri)
        }
        for gone in set(self.records) - set(self.current):
            del self.records[gone]
            self.found.discard(gone)
        self.project = mkdocs_project.from_files(config, files)
        self.rechecked = []
        self.prepare_sheets(files, config.extra_css)
        self.files, self.nav = files, None
        return files

    @event_priority(-100)  # after plugins that change the navigation
    def on_nav(self, nav, *, config, files):
        self.nav = nav
        return nav

    @event_priority(-100)  # last: the content as MkDocs will render it
    def on_page_content(self, html: str, *, page, config, files):
        self.check_ahead(page, html, config)
        return html

    def check_ahead(self, page, html: str, config) -> None:
        """A page whose Markdown is converted goes to the worker, which renders and checks it
        while MkDocs converts the next ones (``ahead``); the worker is forked at the first,
        once the stylesheets are in place. Only where pages are checked in a worker."""
        if not CHECK_AHEAD or self.workers() == 0 or self.nav is None or self.files is None \
                or self.excluded(page.file.src_uri):
            return
        try:
            if self.pool is None:
                ahead.copy_sheets(self.files, self.site_dir)
                ahead.begin(config, self.files, self.nav)
                self.pool = engine.PagePool(self.site_dir, self.options, self.workers(),
                                            self.get_site())
            self.pool.ahead(page.file.dest_uri, ahead.render, ahead.payload(page, html))
        except Exception as exc:  # (the pages are checked once MkDocs has written them)
            log.info(f"pages not checked ahead: {exc!r}")
            self.nav = None

    def prepare_sheets(self, files, extra_css) -> None:
        """Have the stylesheets MkDocs will copy parsed in another process while it converts
        the Markdown (``extract/prepared.py``): the first page then finds them parsed. Only
        for a new Site, and where pages are checked in workers (``mkdocs serve`` forks
        nothing; one core would gain nothing). The writer's ``extra_css`` first: every page
        links them, and the first page takes only the sheets parsed by the time it asks."""
        if self.site is not None or self.prepared is not None or self.workers() == 0:
            return
        root, extra = os.path.abspath(self.site_dir), {str(path) for path in extra_css}
        css = sorted(ahead.stylesheet_files(files),  # (stable: MkDocs' order otherwise)
                     key=lambda f: f.dest_uri not in extra)
        sources = [(os.path.join(root, f.dest_uri), f.abs_src_path) for f in css]
        if sources:  # parsed as this build's Site will parse them
            self.prepared = prepared_mod.start(engine.Site(root, self.options).loader, sources)

    def excluded(self, src_uri: str) -> bool:
        return any(fnmatch.fnmatchcase(src_uri, pattern) for pattern in self.config.exclude)

    def get_site(self):
        """The engine's Site, created on first use (static files are in place by then).

        Once per build, ask whether a stylesheet changed since the Site read them; if so (or if
        the Site cannot tell), start afresh and treat every earlier result as stale.
        """
        if self.site is not None and not self.sheets_checked:
            changed = getattr(self.site, "stylesheets_changed", None)
            if changed is None or changed():
                self.site = None
                self.stale = set(self.records)
                self.verify_cache.clear()  # fixes were verified against the old stylesheets
        self.sheets_checked = True
        if self.site is None:
            self.site = engine.Site(self.site_dir, self.options)
            self.site.loader.prepared = self.prepared
        return self.site

    def check(self, rel: str, html: str | None, key: str | None) -> None:
        # packed as a worker packs them: the stores keep and count the records unread
        self.keep(rel, key, engine.judge_page(self.get_site(), rel, self.options, html,
                                              packed=True))

    def keep(self, rel: str, key: str | None, judged) -> None:
        result, findings, uses = judged
        self.found.replace(rel, findings)
        if len(self.shared) > SHARED_MOST:  # (later pages then share among themselves)
            self.shared.clear()
        result.palette = palette_mod.shared(result.palette, self.shared)
        uses = problems.shared_uses(uses, self.shared)
        self.records[rel] = PageRecord(key, result, len(findings), uses)
        self.stale.discard(rel)
        self.rechecked.append(rel)
        self.kept_now.add(rel)

    def submit(self, rel: str, html: str, key: str) -> None:
        """Check in a worker when there are spare cores, else now."""
        if self.workers() == 0:
            self.check(rel, html, key)
            return
        if self.pool is None:
            # The first page goes to a worker too: checked here, cold, it held MkDocs' process
            # 0.2 s, while the worker's time spent on it only moves the end of its queue, which
            # a copy of the worker shares (``PagePool.defer``). The worker takes the sheets
            # parsed ahead; the process that parsed them ends once it has answered.
            self.pool = engine.PagePool(self.site_dir, self.options, self.workers(),
                                        self.get_site())
        if self.pool.submit(rel, html) or self.pool.defer(rel, html):
            self.digests[rel] = key
        else:
            self.check(rel, html, key)
        for done in self.pool.ready():  # to disk as they come: memory holds a few pages
            self.end_preparation()  # (the workers parse any other sheet themselves)
            self.take(*done)

    def collect(self) -> None:
        """Results of the pages checked in workers; a page whose check failed is reported.
        The workers are kept (``helper``) to verify fixes beside this process."""
        if self.pool is None:
            return
        self.helper, self.pool = self.pool, None
        for n, done in enumerate(self.helper.results(keep=True)):
            self.end_preparation()
            if n == 0:  # (the last pages are under way: this process waits for them)
                engine.ready_for_site_rules(self.options)
            self.take(*done)
            # (while the last pages are checked this process waits: it gates those in)
            self.gate_early()

    def release(self) -> None:
        """End the workers (kept by ``collect``, or left by a failed build); the collector
        as before the first page."""
        for workers in (self.pool, self.helper):
            if workers is not None:
                workers.close()
        self.pool = self.helper = None
        self.end_preparation()
        if self.gc_before is not None:
            gc.set_threshold(*self.gc_before)
            self.gc_before = None

    def end_preparation(self) -> None:
        """The first page has taken what it could (a worker has answered, or the page was
        checked here): the process parsing stylesheets ahead ends (it would compete with the
        workers for the cores) and its folder goes."""
        if self.prepared is not None:
            self.prepared.close()
            self.prepared = None
            if self.site is not None:
                self.site.loader.prepared = None

    def take(self, rel: str, outcome) -> None:
        """A worker's answer for ``rel``: kept, or the page checked here when it failed."""
        key = self.digests.pop(rel, None)
        if isinstance(outcome, Exception):
            log.info(f"{rel}: a worker failed ({outcome!r}); checking it here")
            if os.path.isfile(os.path.join(self.site_dir, rel)):
                self.check(rel, None, key)
            else:  # (failed at once: MkDocs writes the page after it hands it over)
                self.unwritten.append((rel, key))
            return
        self.keep(rel, key, outcome)

    def check_unwritten(self) -> None:
        """The pages whose worker failed before MkDocs wrote them, checked here from disk."""
        unwritten, self.unwritten = self.unwritten, []
        for rel, key in unwritten:
            self.check(rel, None, key)

    # -- events ----------------------------------------------------------------------------

    @event_priority(-100)  # last: see the HTML after every other plugin changed it
    def on_post_page(self, output: str, *, page, config):
        if self.excluded(page.file.src_uri):
            return output
        rel = page.file.dest_uri
        self.current.setdefault(rel, page.file.src_uri)  # pages added after on_files
        if self.gc_before is None:  # as `tinctura check` does; MkDocs's heap is large too
            self.gc_before = engine.relax_gc()
        self.gate_early()
        key = digest(output) if self.digesting else None
        self.get_site()  # the first call of a build decides which records are stale
        record = self.records.get(rel)
        if record is None or record.digest != key or rel in self.stale:
            self.submit(rel, output, key)
        return output

    def on_post_build(self, *, config) -> None:
        try:
            self.collect()
            self.check_unwritten()
            self.after_pages()
        finally:
            self.release()
            if self.command == "serve":  # (in-process: no worker has named entries)
                situations.keep_entries(self.found.entry_uids())

    def on_build_error(self, *, error) -> None:
        self.release()
        self.unwritten = []

    def after_pages(self) -> None:
        if self.current:
            self.get_site()  # a --dirty build may have sent no page through on_post_page
        # With --dirty, unchanged pages skip on_post_page: re-read the stale ones from disk.
        for rel in sorted(self.stale & set(self.current)):
            if os.path.isfile(os.path.join(self.site_dir, rel)):
                self.check(rel, None, None)
        self.stale.clear()
        records = [self.records[rel] for rel in sorted(self.records)]
        # what is said once per site (a theme's note) stays on the first of its pages in
        # MkDocs' order (the order pages are converted and written in), whoever checked which
        # first: ``noted_once`` drops the others from their pages as it goes
        place = {rel: n for n, rel in enumerate(self.current)}
        in_mkdocs_order = sorted(self.records, key=lambda rel: (place.get(rel, len(place)), rel))
        for _ in engine.noted_once(self.records[rel].result for rel in in_mkdocs_order):
            pass
        pages = [r.result for r in records]
        found, store, gate, gate_notes = self.gated(records)
        schemes = sorted({n for page in pages for n in page.stats["schemes"]})
        aid = self.writer_aid(found, pages, records, fixes=self.fixes_read())
        if self.helper is not None:  # (they verified the fixes: nothing more for them)
            self.helper.end_soon()
        locate = aid  # callable: sample -> Location
        changes = self.log_changes(found) if self.serving_again() else None
        findings = outputs.GateView(store, marked=False, counts=gate.counts)  # those that count
        if changes is None:
            self.log_results(found, findings, many_schemes=len(schemes) > 1, locate=locate)
        else:
            self.log_results(changes[0], findings, many_schemes=len(schemes) > 1,
                             locate=locate, label="New: ",
                             numbers={id(p): n for n, p in enumerate(found, 1)})
        if self.command == "serve":  # what the next build of this session compares with
            self.previous = {problems.problem_key(p.worst): m.message(p.worst) if
                             is_appearance(p.worst) else plain.sentence(p) for p in found}
        for d, elsewhere in m.grouped_diagnostics(
                [d for page in pages for d in page.diagnostics] + gate_notes):
            (log.warning if d.severity == "error" else log.info)(
                m.diagnostic_line(d, elsewhere, severity=False))
        header = Header(level=self.config.level, schemes=schemes, fail_on=self.config.fail_on,
                        rules=self.options.rules, source=self.source_of, uri=self.built_uri,
                        gone=gate.gone(), version=plugin_version(), locate=aid,
                        scope=scope_of([self.site_dir], self.options))
        self.write_reports(header, pages, store, found, gate_notes, gate.counts)
        summary = summarise(pages, findings, found, (), schemes)
        total = summary_line(summary, header)
        if changes is not None:
            total = (f"{m.plural(len(changes[0]), 'new problem')}, "
                     f"{m.plural(len(changes[1]), 'problem')} fixed; " + total)
        log.info(total)
        if gate.note():
            log.info(gate.note())
        if changes is None:
            log.info(DISCLAIMER)
        bad = {severity: n for severity, n in gate.counts["severity"].items()
                if n and at_or_above(severity, self.config.fail_on)}
        store.close()
        if bad and self.command != "serve":  # serve keeps serving; the warnings say enough
            raise PluginError(
                quiet_summary(bad, found, self.config.fail_on, locate, len(schemes) > 1)
                + (f"\n{gate.note()}" if gate.note() else ""))

    def gated(self, records) -> tuple:
        """This build's findings through the gate into a store of their own (pages in order,
        then the site-level rules), as ``tinctura check`` does: ``(problems, store, gate,
        the gate's diagnostics)``."""
        gating, self.early = self.early, None
        if not gating or not gating.agrees(records):  # (pages came in another order)
            if gating:
                gating.store.close()
            gating = Gating(self.make_gate())
        for r in records[len(gating.done):]:
            gating.take(r, self.found)
        return gating.finish(self.options)

    def gate_early(self) -> None:
        """While MkDocs renders: the pages whose findings are in go through the gate, in the
        order ``gated`` takes them (sorted), as far as that order has them; the worker goes
        on checking meanwhile, and ``gated`` finds most of the work done. Only pages written
        already (checked in this build, and not the page being rendered): the gate reads them
        for suppressions. Not in `mkdocs serve`, whose records outlive a build."""
        if self.command == "serve" or self.early is False:
            return
        if self.early is None:
            try:
                self.early = Gating(self.make_gate())
            except PluginError:  # raised again, as before, when the build ends
                self.early = False
                return
            self.early.order = sorted(self.current)
        gating = self.early
        while len(gating.done) < len(gating.order):
            rel = gating.order[len(gating.done)]
            record = self.records.get(rel)
            if rel not in self.kept_now or record is None:
                return
            gating.take(record, self.found)

    # -- the maintainer's gate and reports ------------------------------------------------

    def path(self, value: str) -> str:
        """A path from the options, relative to the folder of mkdocs.yml."""
        return value if os.path.isabs(value) else os.path.join(self.config_dir, value)

    def make_gate(self) -> gated.Gate:
        base = None
        if self.config.baseline:
            try:
                base = baseline_mod.load(self.path(self.config.baseline))
            except baseline_mod.BaselineError as exc:
                raise PluginError(f"tinctura: {exc}") from None
        return gated.Gate(allow=self.config.allow, allow_source="mkdocs.yml: plugins.tinctura",
                          baseline=base, rules_run=self.options.rules,
                          read=gated.site_reader([self.site_dir]),
                          fingerprints=self.wants_fingerprints())

    def source_of(self, page: str, line: int):
        """The Markdown source of a built page (line unknown: 0), from the working folder."""
        src = self.current.get(page)
        if src is None:
            return None
        return (_shown(os.path.join(self.docs_dir, src)), 0)

    def built_uri(self, page: str) -> str:
        return _shown(os.path.join(self.site_dir, page))

    def write_reports(self, header, pages, findings, found, diagnostics, counts) -> None:
        specs = [(name, self.path(path) if path else None) for name, path in self.config.report]
        for name, path in specs:
            if path is None:
                raise PluginError(f"tinctura: report {name!r} needs a file (FORMAT:FILE)")
        try:
            outputs.write_reports(specs, None, header, pages, findings, found, diagnostics,
                                  counts=counts)
        except OSError as exc:
            raise PluginError(f"tinctura: {exc.filename}: {exc.strerror or exc}") from None
        for name, path in specs:
            log.info(f"{name} report written to {path}")

    def fixes_read(self) -> bool:
        """Whether an output of this build shows the fixes as CSS: a report, the problems
        logged as warnings (hidden by `mkdocs build -q`), or `mkdocs serve`. The build's
        final error (``quiet_summary``) does not show them."""
        return bool(self.config.report) or self.command == "serve" or \
            log.isEnabledFor(logging.WARNING)

    def writer_aid(self, found, pages, records, fixes: bool = True):
        """Markdown locations and, with ``fixes``, overrides for the site's own stylesheets
        (verified by checking pages again, the longest part of this)."""
        if self.site_dir is None:
            return None
        aid = WriterAid(self.site_dir, self.project, self.options)
        if found and fixes:
            schemes = {}
            for page in pages:
                for scheme in page.schemes:
                    schemes.setdefault(scheme.name, scheme)
            with_findings = [r.result.page for r in records if r.findings]  # (counts)
            loader = self.site.loader if self.site is not None else None
            # what the log and the reports will locate, while the worker rechecks pages
            meanwhile = (lambda _ready: outputs.locate_ahead(aid, found)) \
                if self.config.report or log.isEnabledFor(logging.WARNING) else None
            if self.helper is not None:  # (a faded text's page checked there, warm)
                aid.elsewhere = self.helper.caller()
            try:
                aid.plan_overrides(found, list(schemes.values()), self.options, with_findings,
                                   loader, self.verify_cache,
                                   self.helper.rechecker() if self.helper is not None else None,
                                   meanwhile, cost=page_costs(pages))
            except Exception as exc:  # a fix that cannot be worked out must not stop the build
                log.info(f"fixes as CSS overrides could not be worked out: {exc!r}")
        return aid

    def serving_again(self) -> bool:
        return self.command == "serve" and self.previous is not None

    def log_changes(self, found):
        """`mkdocs serve` after the first build: which pages were checked again, then only the
        problems that are new or fixed since the previous build. Returns (new, fixed)."""
        checked = sorted(self.current.get(rel, rel) for rel in set(self.rechecked))
        if checked:
            shown = ", ".join(checked[:10]) + (f" and {len(checked) - 10} more"
                                               if len(checked) > 10 else "")
            log.info(f"Checked again: {m.plural(len(checked), 'page')} ({shown})")
        else:
            log.info("No page changed: nothing checked again")
        now = {problems.problem_key(p.worst): p for p in found}
        new = [p for key, p in now.items() if key not in self.previous]
        fixed = [sentence for key, sentence in self.previous.items() if key not in now]
        for sentence in fixed:
            log.info(f"Fixed: {sentence}")
        return new, fixed

    def log_results(self, found, findings, many_schemes: bool, locate=None,
                    label: str = "", numbers=None) -> None:
        if self.config.log_every:
            for f in findings:
                level = logging.INFO if f.severity == "info" else logging.WARNING
                if log.isEnabledFor(level):
                    log.log(level, finding_line(f, many_schemes, locate))
            return
        # numbered as in the reports when there are several: fixes name other problems by
        # number ("it settles problems 2, 4 too"); ``numbers``: those of the whole build
        numbered = numbers if numbers is not None else \
            {id(p): n for n, p in enumerate(found, 1)}
        several = len(numbered) > 1
        detail, briefed = self.config.log_detail, False
        if log.isEnabledFor(logging.WARNING):  # (each line names its examples' places)
            outputs.locate_ahead(locate, found)
        for problem in found:
            level = logging.INFO if problem.severity == "info" else logging.WARNING
            if log.isEnabledFor(level):  # (`mkdocs build -q`: each line would be dropped)
                log.log(level, label + problem_line(problem, many_schemes, locate,
                                                    numbered.get(id(problem)) if several else 0,
                                                    detail))
                briefed = briefed or not is_appearance(problem.worst)
        if briefed and not detail:
            log.info(BRIEF_NOTE)


class Gating:
    """This build's findings through the gate into a store of their own (pages in order,
    then the site-level rules), as ``tinctura check`` does."""

    def __init__(self, gate) -> None:
        self.gate = gate
        self.store, self.collector = FindingStore(), problems.Collector(keep_indexes=False)
        self.notes: list = []
        self.uses: dict = {}
        self.palette: dict = {}
        self.done: list = []  # the PageRecords taken, in order
        self.order: list = []  # pages in the order they are to be taken (``gate_early``)

    def take(self, record, found) -> None:
        rel = record.result.page
        self.notes.extend(gated.intake(self.gate, self.store, self.collector, rel,
                                       found.page_findings(rel)))
        problems.merge_uses(self.uses, record.uses)
        palette_mod.merge(self.palette, record.result.palette)
        self.done.append(record)

    def agrees(self, records) -> bool:
        """Whether the records taken are the first of ``records``, the same objects."""
        return len(self.done) <= len(records) and \
            all(a is b for a, b in zip(self.done, records))

    def finish(self, options) -> tuple:
        """``(problems, store, gate, the gate's diagnostics)``."""
        site_findings = engine.judge_site(self.palette, options, ordered=True)
        if site_findings:  # after every page, under the whole site, as reports list them
            self.notes.extend(gated.intake(self.gate, self.store, self.collector,
                                           palette_mod.SITE_PAGE, site_findings))
        self.notes.extend(self.gate.finish())
        return self.collector.problems(self.uses), self.store, self.gate, self.notes


def _shown(path: str) -> str:
    """``path`` relative to the working folder (where CI runs) when it lies below it."""
    rel = os.path.relpath(path)
    return (path if rel.startswith("..") else rel).replace(os.sep, "/")


def plugin_version() -> str:
    from tinctura.cli import version

    return version()


def quiet_summary(bad, found, fail_on, locate=None, many_schemes=False, first: int = 3) -> str:
    """The build's final error: it carries the counts and the first problems itself, since
    `mkdocs build -q` hides the warnings above it. ``bad``: severity -> findings at or above
    ``fail_on``."""
    failing_problems = [p for p in found if p.severity in bad] or list(found)
    lines = [f"{m.plural(sum(bad.values()), 'contrast finding')} at or above fail_on: {fail_on} "
             f"({m.plural(len(failing_problems), 'problem')})"]
    for n, problem in enumerate(failing_problems[:first], 1):
        location = locate(problem.worst.sample) if locate is not None else None
        where = ""
        if location is not None and location.source is not None and location.source.where():
            where = f" ({location.source.where()})"
        said = headline(problem, locate, many_schemes)
        lines.append(f"  {n}. {said}{where}")
    if len(failing_problems) > first:
        lines.append(f"  and {m.plural(len(failing_problems) - first, 'more problem')}: each "
                     f"with its fix in the warnings (not shown with -q) and in `tinctura check "
                     f"SITE_DIR --config mkdocs.yml`")
    return "\n".join(lines)


# said once after the problems when their detail was left out of the log
BRIEF_NOTE = ("Each problem's rule, its measures and the declarations behind its colours are in "
              "`tinctura check SITE_DIR --config mkdocs.yml` and the plugin's text report "
              "(`report: [text:FILE]`), or in this log with `log_detail: true`.")


def problem_line(problem, many_schemes: bool = False, locate=None, number: int = 0,
                 detail: bool = True) -> str:
    """One log message per problem: the plain sentence, where, the fix as CSS, the detail
    (``detail``); ``number``: the problem's in the build (0: not numbered). A problem of
    severity info shows one place, the others up to three."""
    if is_appearance(problem.worst):  # site-level appearance rules: entries and contexts
        return (f"{f'{number}. ' if number else ''}{problem.rule} {problem.slug}: "
                f"{m.message(problem.worst)}\n  "
                + "\n  ".join(appearance_lines(problem, many_schemes)))
    width = terminal_width()
    lines = problem_lines(number, problem, locate, many_schemes, detail,
                          1 if problem.severity == "info" else EXAMPLES)
    # MkDocs puts "WARNING -  tinctura: " before the first line only
    out = wrapped(0, lines[0][1], width - len("WARNING -  tinctura: "))
    for indent, text, style, wrap in lines[1:]:
        if style == "severity":
            text = text.replace(problem.severity, problem.severity.upper(), 1)
        out.extend(wrapped(indent, text, width if wrap else 0,
                           9 if text.startswith(("Where:", "       ")) else 2))
    return "\n".join(out)


def finding_line(f, many_schemes: bool = False, locate=None) -> str:
    s = f.sample
    fg, bg = m.finding_colours(f)
    extra = []
    if many_schemes:
        extra.append(f"scheme {s.scheme}")
    if s.state != "rest":
        extra.append(plain.STATES.get(s.state, s.state))
    tail = f" [{', '.join(extra)}]" if extra else ""
    fix = m.fixes(f)
    where = f"{s.page}:{s.line} {s.xpath}"
    if locate is not None:
        loc = locate(s)
        source = loc.source.where() if loc.source is not None else ""
        where = f"{s.page}:{s.line} {loc.locator or s.xpath}" + (f" ({source})" if source else "")
    return (
        f"{where}{tail}: {f.rule} {f.slug}: {m.message(f)} "
        f"({m.colour(fg)} on {m.colour(bg)})" + (f"; try {fix}" if fix else "")
    )
