"""The MkDocs plugin: check each page as it is written, report problems after the build.

The engine computes; these events only feed it pages and log its results. Per-page results are
kept between ``mkdocs serve`` rebuilds (``on_startup`` keeps this object alive): a page whose
HTML did not change is not checked again unless a stylesheet changed.
"""
from __future__ import annotations

import fnmatch
import hashlib
import os

from mkdocs.exceptions import PluginError
from mkdocs.plugins import BasePlugin, event_priority, get_plugin_logger

from tinctura import baseline as baseline_mod
from tinctura import config as config_mod
from tinctura import engine, problems, rules
from tinctura import gate as gated
from tinctura import palette as palette_mod
from tinctura.report import messages as m
from tinctura.report import outputs
from tinctura.report.base import Header
from tinctura.report.appearance import is_appearance
from tinctura.report.appearance import problem_lines as appearance_lines
from tinctura.report.notice import DISCLAIMER
from tinctura.report.status import failing
from tinctura.report.summary import summarise
from tinctura.report.text_report import cause_fix_lines, headline, problem_measure, summary_line

from .config import TincturaConfig

log = get_plugin_logger(__name__)


class PageRecord:
    """What one page produced, and the digest of the HTML it was computed from."""

    __slots__ = ("digest", "result", "findings", "uses")

    def __init__(self, digest, result, findings, uses):
        self.digest = digest
        self.result = result  # PageResult with samples reduced to counts (memory stays flat)
        self.findings = findings
        self.uses = uses  # declaration -> backgrounds, for fixes at the cause


def digest(html: str) -> str:
    return hashlib.blake2b(html.encode("utf-8", "surrogatepass"), digest_size=16).hexdigest()


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
        self.sheets_checked = False
        self.pool = None  # worker processes checking pages while MkDocs renders the next
        self.digests: dict = {}  # page -> digest of the HTML sent to a worker

    # -- lifecycle -------------------------------------------------------------------------

    def on_startup(self, *, command, dirty) -> None:
        # Defining on_startup keeps this object (and its records) across serve rebuilds.
        self.command = command

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
            keep_samples=False,  # a build log needs counts, findings and declaration uses
            rules=chosen,
            severity=tuple(sorted(self.config.severity.items())),
            lc_levels=self.config.lc_levels,
            cvd_severity=self.config.cvd_severity,
            profiles=tuple(self.config.profiles),
            palette=palette_mod.palette_setting(self.config.palette),
            exemptions=config_mod.exemptions_kept(self.config.no_exempt),
            logotypes=tuple(self.config.logotypes),
        )

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
            self.stale.clear()
        self.site_dir = config.site_dir
        self.options = options
        self.sheets_checked = False

    @event_priority(-100)  # after plugins that add pages in on_files
    def on_files(self, files, *, config):
        self.current = {
            f.dest_uri: f.src_uri for f in files.documentation_pages()
            if not self.excluded(f.src_uri)
        }
        for gone in set(self.records) - set(self.current):
            del self.records[gone]
        return files

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
        self.sheets_checked = True
        if self.site is None:
            self.site = engine.Site(self.site_dir, self.options)
        return self.site

    def check(self, rel: str, html: str | None, key: str | None) -> None:
        self.keep(rel, key, engine.judge_page(self.get_site(), rel, self.options, html))

    def keep(self, rel: str, key: str | None, judged) -> None:
        result, findings, uses = judged
        self.records[rel] = PageRecord(key, result, findings, uses)
        self.stale.discard(rel)

    def submit(self, rel: str, html: str, key: str) -> None:
        """Check in a worker when there are spare cores, else now."""
        if self.workers() == 0:
            self.check(rel, html, key)
            return
        if self.pool is None:
            self.pool = engine.PagePool(self.site_dir, self.options, self.workers())
        if self.pool.submit(rel, html):
            self.digests[rel] = key
        else:
            self.check(rel, html, key)

    def collect(self) -> None:
        """Results of the pages checked in workers; a page whose check failed is reported."""
        if self.pool is None:
            return
        pool, self.pool = self.pool, None
        for rel, outcome in pool.results():
            key = self.digests.pop(rel, None)
            if isinstance(outcome, Exception):
                log.info(f"{rel}: a worker failed ({outcome!r}); checking it here")
                self.check(rel, None, key)  # the page is on disk by now
                continue
            self.keep(rel, key, outcome)

    # -- events ----------------------------------------------------------------------------

    @event_priority(-100)  # last: see the HTML after every other plugin changed it
    def on_post_page(self, output: str, *, page, config):
        if self.excluded(page.file.src_uri):
            return output
        rel = page.file.dest_uri
        self.current.setdefault(rel, page.file.src_uri)  # pages added after on_files
        key = digest(output)
        self.get_site()  # the first call of a build decides which records are stale
        record = self.records.get(rel)
        if record is None or record.digest != key or rel in self.stale:
            self.submit(rel, output, key)
        return output

    def on_post_build(self, *, config) -> None:
        self.collect()
        if self.current:
            self.get_site()  # a --dirty build may have sent no page through on_post_page
        # With --dirty, unchanged pages skip on_post_page: re-read the stale ones from disk.
        for rel in sorted(self.stale & set(self.current)):
            if os.path.isfile(os.path.join(self.site_dir, rel)):
                self.check(rel, None, None)
        self.stale.clear()
        records = [self.records[rel] for rel in sorted(self.records)]
        pages = [r.result for r in records]
        gate = self.make_gate()
        gate_notes = []
        for r in records:
            gate_notes.extend(gate.page(r.result.page, r.findings))
        gate_notes.extend(gate.finish())
        every = [f for r in records for f in r.findings]
        findings = [f for f in every if gated.active(f)]  # not suppressed, not in the baseline
        uses = {}
        for r in records:
            problems.merge_uses(uses, r.uses)
        palette = {}
        for r in records:
            palette_mod.merge(palette, r.result.palette)
        findings += engine.judge_site(palette, self.options)  # site-level appearance rules
        found = problems.group(findings, uses=uses)
        schemes = sorted({n for page in pages for n in page.stats["schemes"]})
        self.log_results(found, findings, many_schemes=len(schemes) > 1)
        for d in [d for page in pages for d in page.diagnostics] + gate_notes:
            at = f"{d.path}:{d.line}" if d.line else d.path
            (log.warning if d.severity == "error" else log.info)(f"{at}: {d.message}")
        header = Header(level=self.config.level, schemes=schemes, fail_on=self.config.fail_on,
                        rules=self.options.rules, source=self.source_of, uri=self.built_uri,
                        gone=gate.gone(), version=plugin_version())
        self.write_reports(header, pages, every, found, gate_notes, gate.counts)
        summary = summarise(pages, findings, found, (), schemes)
        log.info(summary_line(summary, header))
        if gate.note():
            log.info(gate.note())
        log.info(DISCLAIMER)
        bad = failing(findings, self.config.fail_on)
        if bad and self.command != "serve":  # serve keeps serving; the warnings say enough
            raise PluginError(
                f"{m.plural(len(bad), 'contrast finding')} at or above fail_on: "
                f"{self.config.fail_on} (see the log above)"
                + (f"; {gate.note()}" if gate.note() else "")
            )

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
                          read=gated.site_reader([self.site_dir]))

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

    def log_results(self, found, findings, many_schemes: bool) -> None:
        if self.config.log_every:
            for f in findings:
                emit = log.info if f.severity == "info" else log.warning
                emit(finding_line(f, many_schemes))
            return
        for problem in found:
            emit = log.info if problem.severity == "info" else log.warning
            emit(problem_line(problem, many_schemes))


def _shown(path: str) -> str:
    """``path`` relative to the working folder (where CI runs) when it lies below it."""
    rel = os.path.relpath(path)
    return (path if rel.startswith("..") else rel).replace(os.sep, "/")


def plugin_version() -> str:
    from tinctura.cli import version

    return version()


def problem_line(problem, many_schemes: bool = False) -> str:
    """One log message per problem: count, cause, ratio, an example and the fix."""
    if is_appearance(problem.worst):  # site-level appearance rules: entries and contexts
        return (f"{problem.rule} {problem.slug}: {m.message(problem.worst)}\n  "
                + "\n  ".join(appearance_lines(problem, many_schemes)))
    fg, bg = m.finding_colours(problem.worst)
    example = problem.worst.sample
    scheme = f" [scheme {problem.scheme}]" if many_schemes else ""
    text = (
        f"{problem.rule} {problem.slug}{scheme}: "
        f"{m.plural(problem.occurrences, 'occurrence')} on {m.plural(problem.pages, 'page')}: "
        f"{headline(problem.fg_cause, fg, 'color')} on {headline(problem.bg_cause, bg, 'background')}, "
        f"{problem_measure(problem)}; "
        f"e.g. {example.page}:{example.line} {m.css_path(example.xpath)}"
    )
    lines = cause_fix_lines(problem.fix_at_cause)
    if lines:
        text += "\n  " + "\n  ".join(lines)
    return text


def finding_line(f, many_schemes: bool = False) -> str:
    s = f.sample
    fg, bg = m.finding_colours(f)
    extra = []
    if many_schemes:
        extra.append(f"scheme {s.scheme}")
    if s.state != "rest":
        extra.append(f":{s.state}")
    tail = f" [{', '.join(extra)}]" if extra else ""
    fix = m.fixes(f)
    return (
        f"{s.page}:{s.line} {s.xpath}{tail}: {f.rule} {f.slug}: {m.message(f)} "
        f"({m.colour(fg)} on {m.colour(bg)})" + (f"; try {fix}" if fix else "")
    )
