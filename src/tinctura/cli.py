"""The ``tinctura`` command line: check sites, dump samples, test one pair, list the rules."""
from __future__ import annotations

import argparse
import contextlib
import functools
import json
import os
import sys
import textwrap
import traceback

from tinctura import baseline as baseline_mod
from tinctura import config, engine, problems, report, rules
from tinctura import gate as gated
from tinctura.extract import sheet_cache
from tinctura.model import Diagnostic
from tinctura.palette import palette_setting
from tinctura.report import messages as m
from tinctura.report import outputs
from tinctura.report.store import FindingStore
from tinctura.report.status import ERROR, exit_status
from tinctura.report.terminal import TerminalWriter

PROG = "tinctura"


class UsageError(Exception):
    """Bad input from the user: reported in one line on stderr, exit status 2."""


def version() -> str:
    try:
        from importlib.metadata import version as dist_version

        return dist_version("tinctura")
    except Exception:  # not installed (running from a checkout)
        return "0+unknown"


# -- argument parsing --------------------------------------------------------------------------


def positive_int(text: str) -> int:
    try:
        value = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a whole number, got {text!r}") from None
    if value < 1:
        raise argparse.ArgumentTypeError(f"expected a number of at least 1, got {value}")
    return value


def positive_float(text: str) -> float:
    try:
        value = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a number, got {text!r}") from None
    if not value > 0:
        raise argparse.ArgumentTypeError(f"expected a number above 0, got {text}")
    return value


def font_weight(text: str) -> int:
    named = {"normal": 400, "bold": 700}
    if text.lower() in named:
        return named[text.lower()]
    value = positive_int(text)
    if value > 1000:  # CSS Fonts 4: font-weight is 1..1000
        raise argparse.ArgumentTypeError(f"font weight must be 1 to 1000, got {value}")
    return value


def byte_size(text: str) -> int:
    """A size in bytes: a whole number, optionally with K, M or G (powers of 1024)."""
    units = {"k": 1 << 10, "m": 1 << 20, "g": 1 << 30}
    scale = units.get(text[-1:].lower(), 1)
    return positive_int(text[:-1] if scale > 1 else text) * scale


def _limit_options(p: argparse.ArgumentParser) -> None:
    """Bounds on hostile or broken input; the defaults are far above any real site."""
    from tinctura.extract import bounds
    from tinctura.extract.style import MAX_VAR_TOKENS

    p.add_argument("--max-file-size", type=byte_size, default=bounds.MAX_FILE_BYTES,
                   metavar="BYTES", help="pages and stylesheets larger than this are not read "
                   f"(K, M, G suffixes; default {bounds.MAX_FILE_BYTES >> 20}M)")
    p.add_argument("--max-elements", type=positive_int, default=bounds.MAX_ELEMENTS,
                   metavar="N", help="pages with more elements are not checked "
                   f"(default {bounds.MAX_ELEMENTS:,})")
    p.add_argument("--max-rules", type=positive_int, default=bounds.MAX_RULES, metavar="N",
                   help=f"style rules read per stylesheet (default {bounds.MAX_RULES:,})")
    p.add_argument("--max-var-tokens", type=positive_int, default=MAX_VAR_TOKENS, metavar="N",
                   help="a var() expansion longer than this is invalid "
                        f"(default {MAX_VAR_TOKENS:,})")
    p.add_argument("--allow-unchecked", action="store_true",
                   help="pages and stylesheets that could not be read (binary, too large, "
                        "broken) are reported but do not make the exit status 2")


def _add_debug(parser: argparse.ArgumentParser) -> None:
    """``--debug`` before or after the command: internal errors show their traceback."""
    parser.add_argument("--debug", action="store_true",
                        help="show the traceback of an internal error (for a bug report)")
    for action in parser._actions:
        if isinstance(action, argparse._SubParsersAction):
            for sub in action.choices.values():
                sub.add_argument("--debug", action="store_true", default=argparse.SUPPRESS,
                                 help=argparse.SUPPRESS)


def _site_options(p: argparse.ArgumentParser, command: str) -> None:
    p.add_argument("paths", nargs="*", metavar="PATH",
                   help="built site directories or HTML files (default: site_dir from the "
                        "configuration)")
    config.add_flags(p, command)  # every setting with a flag, from the one table
    p.add_argument("--output", "-o", metavar="FILE", help="write to FILE instead of stdout")
    _limit_options(p)


class _Parser(argparse.ArgumentParser):
    """Usage mistakes in one line (with where to find help), exit status 2."""

    def error(self, message):
        self.exit(2, f"{self.prog}: error: {message} (see '{self.prog} --help')\n")


def build_parser() -> argparse.ArgumentParser:
    parser = _Parser(
        prog=PROG,
        description="Check colour contrast in built documentation sites.",
    )
    parser.add_argument("-V", "--version", action="version", version=f"%(prog)s {version()}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    sub.required = True

    check = sub.add_parser("check", help="check built pages and report findings",
                           description="Check built pages and report contrast findings.")
    _site_options(check, "check")
    check.add_argument("--write-baseline", metavar="FILE",
                       help="record the current findings in FILE (then exit 0 unless the run "
                            "failed)")
    check.add_argument("--color", "--colour", dest="colour", default="auto",
                       choices=("auto", "always", "never"),
                       help="colour in the text report (default auto: NO_COLOR, FORCE_COLOR, tty)")
    check.add_argument("--write-fixes", metavar="FILE",
                       help="write every verified fix into one stylesheet FILE and say how to "
                            "add it to mkdocs.yml")
    check.add_argument("--flat-findings", action="store_true",
                       help="JSON report: list every finding in full (format 1) instead of "
                            "each situation once with small occurrence records (format 3)")
    check.set_defaults(run=run_check)

    pairs = sub.add_parser("pairs", help="print every text sample as JSON Lines",
                           description="Print every rendered text (per scheme and state) with its "
                                       "colours and their provenance, one JSON object a line.")
    _site_options(pairs, "pairs")
    pairs.set_defaults(run=run_pairs)

    pair = sub.add_parser("pair", help="contrast ratio of one text and background colour",
                          description="Contrast ratio of a text colour on a background colour "
                                      "(any CSS colour syntax), with pass/fail and fixes.")
    pair.add_argument("fg", metavar="FG", help="text colour, e.g. '#777' or 'rgb(0 0 0 / 60%%)'")
    pair.add_argument("bg", metavar="BG", help="background colour, e.g. white")
    pair.add_argument("--size", type=positive_float, default=16.0, metavar="PX",
                      help="font size in CSS pixels (default 16)")
    pair.add_argument("--weight", type=font_weight, default=400, metavar="N",
                      help="font weight, 1-1000, normal or bold (default 400)")
    pair.add_argument("--color", "--colour", dest="colour", default="auto",
                      choices=("auto", "always", "never"), help="colour output (default auto)")
    pair.add_argument("--on", metavar="OTHER_BG",
                      help="also show how FG's appearance (CIECAM02) shifts on this background")
    pair.add_argument("--vs", metavar="OTHER_FG",
                      help="also show whether FG and this colour look alike on BG, for normal "
                           "vision and each simulated colour-vision deficiency")
    pair.add_argument("--level", choices=("AA", "AAA"), default="AA", type=str.upper,
                      help="the level whose failure makes the exit status 1 (default AA)")
    pair.add_argument("-q", "--quiet", action="store_true",
                      help="print only the summary line (the ratio and the verdict)")
    for name in ("lc_levels", "cvd_severity"):  # the colour-appearance lines' settings
        setting = config.BY_NAME[name]
        pair.add_argument(setting.flag, dest=name, default=setting.default,
                          type=config._flag_type(setting), metavar=setting.metavar,
                          help=setting.help)
    pair.set_defaults(run=run_pair)

    trace_cmd = sub.add_parser(
        "trace", help="why is this text this colour? one element's cascade, per scheme",
        description="Show, for one element and each colour scheme, the matched rules in cascade "
                    "order, the winning declarations, the custom-property chain, the background "
                    "layers and the resulting colours and ratios.")
    trace_cmd.add_argument("page", metavar="PAGE", help="a built HTML page")
    trace_cmd.add_argument("target", metavar="TARGET",
                           help="an XPath (/html/body/...), a CSS selector, or a text excerpt")
    trace_cmd.add_argument("--site", metavar="DIR",
                           help="the site root (default: the highest folder above PAGE that "
                                "holds an index.html)")
    trace_cmd.add_argument("--viewport-width", type=positive_int, default=1280, metavar="N",
                           help="viewport width in CSS pixels for media queries (default 1280)")
    trace_cmd.set_defaults(run=run_trace)

    rules_cmd = sub.add_parser("rules", help="describe the rules",
                               description="Describe every rule, or one by code or slug.")
    rules_cmd.add_argument("rule", nargs="?", metavar="RULE",
                           help="a rule code or slug, e.g. TC100, or `exemptions`")
    rules_cmd.set_defaults(run=run_rules)
    _add_debug(parser)
    return parser


# -- commands ----------------------------------------------------------------------------------


def options_from(args) -> engine.Options:
    try:
        chosen = rules.selection(getattr(args, "select", ()), getattr(args, "ignore", ()))
    except ValueError as exc:
        raise UsageError(str(exc)) from None
    return engine.Options(
        level=getattr(args, "level", "AA"),
        viewport_width=args.viewport_width,
        states=args.states,
        exclude=tuple(args.exclude),
        jobs=args.jobs or os.cpu_count() or 1,
        schemes=args.schemes,
        site_url=args.site_url or "",
        behaviours=tuple(args.behaviours or ()),
        theme_behaviours=args.theme_behaviours,
        cache_dir=sheet_cache.folder_for(getattr(args, "cache", True)),
        rules=chosen,
        severity=tuple(sorted(getattr(args, "severity", {}).items())),
        lc_levels=getattr(args, "lc_levels", None),
        cvd_severity=getattr(args, "cvd_severity", 1.0),
        profiles=tuple(getattr(args, "profiles", None) or ("daylight",)),
        palette=palette_setting(getattr(args, "palette", None) or {}),  # checked by config
        **limits_from(args),
        exemptions=config.exemptions_kept(getattr(args, "no_exempt", [])),
        logotypes=tuple(getattr(args, "logotypes", ()) or ()),
    )


def limits_from(args) -> dict:
    """The input bounds and --debug given on the command line, as Options fields."""
    names = ("max_file_bytes", "max_elements", "max_rules", "max_var_tokens")
    flags = ("max_file_size", "max_elements", "max_rules", "max_var_tokens")
    found = {name: getattr(args, flag) for name, flag in zip(names, flags)
             if getattr(args, flag, None) is not None}
    found["debug"] = bool(getattr(args, "debug", False))
    return found


def settle(args, command: str) -> None:
    """Settings from the configuration file and the flags; the site to check."""
    try:
        config.apply(args, command)
    except config.ConfigError as exc:
        raise UsageError(str(exc)) from None
    if not args.paths:
        if not args.site_dir:
            raise UsageError("no site to check: name a built site directory, or set site_dir "
                             "in the configuration (pyproject.toml [tool.tinctura] or "
                             "tinctura.toml)")
        if not os.path.isdir(args.site_dir):
            where = f" in {args.config_path}" if args.config_path else ""
            raise UsageError(f"{args.site_dir}: the built site named by site_dir{where} does "
                             f"not exist; build the site first (for example: mkdocs build)")
        args.paths = [args.site_dir]


def check_inputs(paths) -> None:
    for path in paths:
        if not os.path.exists(path):
            raise UsageError(f"{path}: no such file or directory")
        if os.path.isfile(path) and not path.lower().endswith((".html", ".htm")):
            raise UsageError(f"{path}: not an HTML file or a site directory")


@contextlib.contextmanager
def output(path: str | None, stdout):
    """``stdout``, or ``path`` written atomically (a temporary file renamed at the end)."""
    if not path:
        yield stdout
        return
    with outputs.atomic_output(path) as stream:  # names the path when it cannot write
        yield stream


def diagnostics_of(result) -> list:
    return list(result.diagnostics) + [d for page in result.pages for d in page.diagnostics]


def where(d) -> str:
    return f"{d.path}:{d.line}" if d.line else d.path


def input_errors(result, stderr) -> bool:
    """Name on stderr each input that could not be checked at all; True if there was one."""
    errors = [d for d in diagnostics_of(result) if d.severity == "error"]
    for d in errors:
        stderr.write(f"{PROG}: error: {where(d)}: {d.message}\n")
    return bool(errors)


def run_check(args, stdout, stderr) -> int:
    settle(args, "check")
    check_inputs(args.paths)
    options = options_from(args)
    options.keep_samples = False  # the report needs counts, findings and declaration uses
    specs = report_specs(args)
    gate = make_gate(args, options)
    # the compact JSON report's page records are then written as each page is judged
    options.encode_occurrences = outputs.records_written_as_judged(
        [name for name, _ in specs], args.flat_findings, gate.fingerprints)
    options.keep_records = outputs.records_read_back(
        [name for name, _ in specs], args.group, args.flat_findings, gate.fingerprints,
        bool(args.write_baseline))
    bar = report.progress_for(args, options, stderr)  # on a terminal: pages done, time left
    # findings go to disk page by page and problems are built as they come: memory does not
    # grow with the number of findings. Every finding is stored (JSON and SARIF list the
    # suppressed and baseline-known ones, marked); only those that count are grouped.
    store = FindingStore(keep_records=options.keep_records, hand_on=False)
    collector = problems.Collector(keep_indexes=args.flat_findings)
    written = []

    def keep(page, findings):
        page.diagnostics.extend(gated.intake(gate, store, collector, page.page, findings))
        if args.write_baseline:  # (each page comes once)
            written.extend(f for f in store.by_page(page.page) if not f.suppressed)
        bar.advance()

    # --config naming an mkdocs.yml (config.py tells it from tinctura's own settings): the
    # Markdown sources and the site's own stylesheets
    project = load_project(args.mkdocs_config, stderr) \
        if getattr(args, "mkdocs_config", None) else None
    # (with --jobs N the workers, warm from the pages, stay to verify the fixes)
    with engine.pools_kept():
        result = engine.check_paths(list(args.paths), options, findings_to=keep)
        # what the check keeps lives to the end of the command and makes no cycles: the
        # collections of what follows (verifying fixes, writing reports) need not scan it
        with engine.kept_out_of_collections():
            return _after_check(args, stdout, stderr, options, specs, gate, store, collector,
                                written, project, result)


def _after_check(args, stdout, stderr, options, specs, gate, store, collector, written,
                 project, result) -> int:
    """``run_check`` once the pages are checked: fixes verified, reports written, the exit
    status."""
    # the sites' parsed stylesheets serve the verification of fixes; their style caches go
    loaders = {site.root: site.loader for site in result.sites}
    result.sites = []
    result.diagnostics.extend(gate.finish())
    result.findings = store
    found = collector.problems(result.uses)
    aid = writer_aid(args.paths, project, options)
    if aid is not None and found:
        from tinctura.writer import page_costs

        loader = loaders.get(aid.site_root)
        # with --jobs N the check's workers, kept, recheck the verification pages (where
        # none were kept, a worker forked now rechecks half of them beside this process)
        with engine.recheck_helper(aid.site_root, options, loader) as helper:
            # while the workers recheck, this process locates the reports' examples; once
            # they are done, the workers take a share of the pages left
            above = outputs.names_ancestors(specs)
            aid.elsewhere = engine.kept_call(aid.site_root)  # (faded texts' layers, warm)
            aid.plan_overrides(found, result.schemes, options, store.pages(), loader,
                               helper=helper,
                               meanwhile=lambda ready: outputs.locate_ahead(
                                   aid, found, ready, ancestors=above),
                               cost=page_costs(result.pages))
            outputs.locate_ahead(aid, found, spread=engine.kept_spread(aid.site_root),
                                 ancestors=above)
    header = report.Header(
        scope=report.scope_of(args.paths, options),
        version=version(),
        level=args.level,
        group=args.group,
        fail_on=args.fail_on,
        schemes=[getattr(s, "name", s) for s in result.schemes],
        findings_layout="flat" if args.flat_findings else "compact",
        rules=options.rules,
        uri=built_uri(args.paths),
        source=markdown_source(args),
        gone=gate.gone(),
        locate=aid,
    )
    outputs.write_reports(specs, stdout, header, result.pages, store, found,
                          result.diagnostics, counts=gate.counts, colour_choice=args.colour)
    if getattr(args, "write_fixes", None):
        report_written_fixes(args.write_fixes, found, project, stderr)
    note = gate.note()
    if note:
        stderr.write(f"{PROG}: {note}\n")
    gone = header.gone
    for entry in gone[:GONE_SHOWN]:  # fixed since the baseline: worth removing from it
        stderr.write(f"{PROG}: gone from the baseline: {entry.get('page')} {entry.get('rule')} "
                     f"[{entry.get('scheme')}, {entry.get('state')}] "
                     f"\u201c{m.excerpt(entry.get('text', ''), 60)}\u201d\n")
    if len(gone) > GONE_SHOWN:
        stderr.write(f"{PROG}: ... and {len(gone) - GONE_SHOWN:,} more gone (SARIF lists them "
                     f"all as absent)\n")
    unreadable = input_errors(result, stderr) and not args.allow_unchecked
    if args.write_baseline:  # the same as --format baseline:FILE, and exit 0
        with outputs.atomic_output(args.write_baseline) as fh:
            fh.write(baseline_mod.dumps(written, version()))
        stderr.write(f"{PROG}: wrote {m.plural(len(written), 'finding')} to the baseline "
                     f"{args.write_baseline}\n")
        return exit_status(error=unreadable)
    return exit_status(gate, args.fail_on, error=unreadable)


GONE_SHOWN = 20  # baseline entries no longer found, named on stderr


def report_specs(args) -> list:
    """(format, file or None) for each report; ``--output`` takes the first one without a
    file; without ``--output``, text goes to the terminal when no report does."""
    specs = list(args.report) or [("text", None)]
    if args.output:
        for n, (name, path) in enumerate(specs):
            if path is None:
                specs[n] = (name, args.output)
                break
        else:
            raise UsageError("--output names the file of a report given without one "
                             "(--format FORMAT); every --format here names its file")
    on_terminal = [name for name, path in specs if path is None]
    if len(on_terminal) > 1:
        raise UsageError(f"only one report can go to the terminal, not {', '.join(on_terminal)}"
                         f"; give the others a file (--format FORMAT:FILE)")
    if not on_terminal and not args.output:
        specs.append(("text", None))
    return specs


def make_gate(args, options) -> gated.Gate:
    base = None
    if args.baseline and not args.write_baseline:
        try:
            base = baseline_mod.load(args.baseline)
        except baseline_mod.BaselineError as exc:
            raise UsageError(str(exc)) from None
    wanted = args.fingerprints or bool(args.write_baseline) or any(
        report.FORMATS[name].wants_fingerprints for name, _ in report_specs(args))
    return gated.Gate(allow=args.allow, allow_source=args.config_path or "configuration",
                      baseline=base, rules_run=options.rules, read=gated.site_reader(args.paths),
                      fingerprints=wanted)


def markdown_source(args):
    """page -> (Markdown source path, line or 0) when ``--config`` named an mkdocs.yml, else
    None. The hook a source map (page and line -> Markdown file and line) plugs into; until
    then the file follows MkDocs' page naming and the line is unknown (0)."""
    if not getattr(args, "mkdocs_config", None):
        return None
    from mkdocs.utils.yaml import yaml_load

    base = os.path.dirname(os.path.abspath(args.mkdocs_config))
    with open(args.mkdocs_config, encoding="utf-8") as fh:
        docs = os.path.join(base, (yaml_load(fh) or {}).get("docs_dir") or "docs")

    def source(page: str, line: int):
        stem = page[: -len("index.html")].rstrip("/") if page.endswith("index.html") \
            else page.rsplit(".", 1)[0]
        for candidate in (f"{stem}.md", f"{stem}/index.md", f"{stem}/README.md", "index.md"
                          if not stem else None):
            if candidate and os.path.isfile(os.path.join(docs, candidate)):
                path = os.path.relpath(os.path.join(docs, candidate))
                return (path if not path.startswith("..") else os.path.join(docs, candidate)
                        ).replace(os.sep, "/"), 0
        return None
    return source


def built_uri(paths):
    """page -> the built page's path from the working directory (where CI runs), when the
    site lies below it; else the site-relative path."""
    roots = [p if os.path.isdir(p) else os.path.dirname(p) or "." for p in paths]

    @functools.lru_cache(maxsize=4096)  # asked once per finding, the same page many times
    def uri(page: str) -> str:
        for root in roots:
            path = os.path.join(root, page)
            if os.path.isfile(path):
                rel = os.path.relpath(path)
                return page if rel.startswith("..") else rel.replace(os.sep, "/")
        return page
    return uri


def load_project(path: str, stderr):
    """The MkDocs project of an mkdocs.yml given to ``--config``: which Markdown file each page
    comes from, which stylesheets are the site's own (read with MkDocs' own loader). When MkDocs
    cannot load it (a docs folder that is not there, a theme not installed), the check goes on
    without them and says so."""
    from tinctura import mkdocs_project

    try:
        return mkdocs_project.load(path)
    except ValueError as exc:
        stderr.write(f"{PROG}: note: {exc}; findings point at the built pages and fixes at "
                     f"stylesheets judged by their names\n")
        return None


def writer_aid(paths, project, options=None):
    """Locations and overrides for the first site directory checked (or a page's folder)."""
    from tinctura.writer import WriterAid

    for path in paths:
        if os.path.isdir(path):
            return WriterAid(path, project, options)
        if os.path.isfile(path):
            return WriterAid(os.path.dirname(os.path.abspath(path)) or ".", project, options)
    return None


def report_written_fixes(path: str, found, project, stderr) -> None:
    from tinctura.writer import write_fixes

    try:
        count, advice, how = write_fixes(path, found, project)
    except OSError as exc:
        raise UsageError(f"{path}: cannot write: {exc.strerror or exc}") from None
    skipped = sum(1 for p in found if getattr(p, "override", None) is not None
                  and not p.override.verified)
    none = sum(1 for p in found if getattr(p, "override", None) is None)
    stderr.write(f"{PROG}: wrote {m.plural(count, 'verified fix', 'verified fixes')} to {path}")
    if skipped or none:
        stderr.write(f" ({skipped} not verified and {none} without a fix left out: "
                     f"see the report)")
    if advice:
        stderr.write(f", and {m.plural(advice, 'advice value')} for the theme's colours "
                     f"commented out (not checked again)")
    stderr.write(f".\n{how}\n")


def run_pairs(args, stdout, stderr) -> int:
    from tinctura.report.json_report import sample_dict

    settle(args, "pairs")
    check_inputs(args.paths)
    result = engine.Report()
    with output(args.output, stdout) as stream:  # streamed page by page: memory stays flat
        for page in engine.iter_pages(list(args.paths), options_from(args)):
            if isinstance(page, Diagnostic):
                result.diagnostics.append(page)
                continue
            for sample in page.samples:
                stream.write(json.dumps(sample_dict(sample), ensure_ascii=False) + "\n")
            page.samples = []
            result.pages.append(page)
    for d in diagnostics_of(result):
        if d.severity != "error":
            stderr.write(f"{PROG}: {d.severity}: {where(d)}: {d.message}\n")
    return exit_status(error=input_errors(result, stderr) and not args.allow_unchecked)


def parse_pair_colour(text: str, what: str):
    from tinctura.colour.parse import CURRENTCOLOR, parse_color

    value = parse_color(text)
    if value is None:
        raise UsageError(f"{what} {text!r} is not a CSS colour")
    if value == CURRENTCOLOR:
        raise UsageError(f"{what} {text!r} depends on currentcolor, which has no value here")
    return tuple(value)


def run_pair(args, stdout, stderr) -> int:
    from tinctura.colour import suggest, wcag
    from tinctura.colour.composite import over

    fg_raw = parse_pair_colour(args.fg, "text colour")
    bg_raw = parse_pair_colour(args.bg, "background colour")
    tw = TerminalWriter(stdout, choice=args.colour)
    notes = []
    bg = tuple(bg_raw[:3])
    if bg_raw[3] < 1.0:
        bg = tuple(over(bg_raw, (1.0, 1.0, 1.0, 1.0))[:3])
        notes.append(f"the background is translucent (alpha {bg_raw[3]:g}); "
                     f"composited over white, as on a page without another background: "
                     f"{m.colour(bg)}")
    fg = tuple(fg_raw[:3])
    if fg_raw[3] < 1.0:
        fg = tuple(over(fg_raw, bg)[:3])
        notes.append(f"the text colour is translucent (alpha {fg_raw[3]:g}); "
                     f"composited over the background: {m.colour(fg)}")
    ratio = wcag.contrast_ratio(fg, bg)
    large = wcag.is_large_text(args.size, args.weight)
    selected_need = wcag.required_ratio(args.level, large)
    failed = not wcag.passes(ratio, selected_need)
    if args.quiet:
        verdict = "fails" if failed else "passes"
        tw.line(f"{m.colour(fg)} on {m.colour(bg)}: {m.ratio(ratio)}:1, {verdict} "
                f"{args.level} ({m.required(selected_need)}:1)")
        return exit_status(failed=failed)
    tw.line(f"{m.colour(fg)} on {m.colour(bg)}: {m.ratio(ratio)}:1", "bold")
    for note in notes:
        tw.line(f"note: {note}", "dim")
    size = "large" if large else "normal"
    tw.line(f"{args.size:g} px at weight {args.weight}: {size} text")
    for rule_level, criterion in (("AA", "1.4.3"), ("AAA", "1.4.6")):
        need = wcag.required_ratio(rule_level, large)
        ok = wcag.passes(ratio, need)
        verdict = tw.markup("pass", "green") if ok else tw.markup("fail", "red", "bold")
        tw.line(f"  {rule_level:<3} (SC {criterion}) needs {m.required(need)}:1: {verdict}")
        if ok:
            continue
        parts, missing = [], []
        for what, found, moving, other in (
                ("text", suggest.foreground(fg, bg, need), fg, bg),
                ("background", suggest.background(fg, bg, need), bg, fg)):
            if found is not None:
                parts.append(f"{what} {m.colour(found[0])} ({m.ratio(found[1])}:1)")
            else:
                missing.append(f"no {suggest.describe_side(moving, other)} {what} colour")
        if parts:
            tw.line(f"        nearest passing: {' or '.join(parts)}")
        if missing:
            tw.line(f"        {' and '.join(missing)} of this hue reaches it"
                    + ("" if parts else "; change both colours"))
    from tinctura.report.pair_text import appearance_lines
    from tinctura.rules.perception import lc_levels

    def mark(ok):
        return tw.markup("pass", "green") if ok else tw.markup("fail", "red", "bold")

    for text, styles in appearance_lines(fg, bg, args.size, args.weight, selected_need,
                                         lc_levels(args), args.cvd_severity, mark):
        tw.line(text, *styles)
    pair_appearance(args, fg, bg, tw)
    return exit_status(failed=failed)


def pair_appearance(args, fg, bg, tw) -> None:
    """``--on OTHER_BG`` and ``--vs OTHER_FG``: appearance in context (TC300, TC310)."""
    from tinctura.colour.composite import over
    from tinctura.report import appearance as words
    from tinctura.rules import appearance

    def opaque(text, what, under):
        raw = parse_pair_colour(text, what)
        return tuple(over(raw, under)[:3]) if raw[3] < 1.0 else tuple(raw[:3])

    if getattr(args, "on", None):
        other_bg = opaque(args.on, "other background colour", (1.0, 1.0, 1.0, 1.0))
        shift = appearance.shift_between(fg, bg, other_bg)
        for line in words.shift_lines(fg, bg, other_bg, shift):
            tw.line(line)
    if getattr(args, "vs", None):
        other = opaque(args.vs, "other text colour", bg + (1.0,))
        for line in words.lookalike_lines(fg, other, bg,
                                          appearance.lookalike_between(fg, other, bg)):
            tw.line(line)


def describe_rule(rule, tw: TerminalWriter) -> None:
    def para(label: str, text: str) -> None:
        tw.line(f"  {label}", "bold")
        for line in textwrap.wrap(text, 84):
            tw.line(f"    {line}")

    criteria = ", ".join(f"SC {c.number} {c.name} ({c.level})" for c in rule.criteria)
    tw.line(f"{rule.code} {rule.slug}: {rule.title}", "bold")
    if rule.code in rules.SITE_LEVEL:  # risks around colour codes, not a test of the criterion
        tw.line(f"  default severity {rule.severity}; related to WCAG 2 {criteria} (a risk to "
                f"review, not a test of it)")
    else:
        tw.line(f"  default severity {rule.severity}; WCAG 2 {criteria}")
    para("What it checks", rule.docs.checks)
    para("Why", rule.docs.why)
    for label, example in (("Failing example", rule.docs.bad), ("Passing example", rule.docs.good)):
        tw.line(f"  {label}", "bold")
        if example.note:
            tw.line(f"    {example.note}")
        tw.line(f"    {example.html}", "dim")
    para("How to fix", rule.docs.fix)
    tw.line("  References", "bold")
    for title, url in rule.docs.references:
        tw.line(f"    {title}: {url}")


def describe_exemptions(tw: TerminalWriter) -> None:
    from tinctura.extract.exempt import EXEMPTIONS

    tw.line("What the contrast rules leave out, and why (WCAG 2.2 scope)", "bold")
    tw.line("  Each can be switched off with --no-exempt ID (plugin and configuration: no_exempt).")
    for e in EXEMPTIONS:
        tw.line()
        tw.line(f"{e.id}: {e.title}" + (f" (judged by {e.judged_by})" if e.judged_by else ""),
                "bold")
        for line in textwrap.wrap("Applies to " + e.applies_to + ".", 84):
            tw.line(f"    {line}")
        for line in textwrap.wrap(f"{e.source}: \u201c{e.quote}\u201d", 84):
            tw.line(f"    {line}")
        tw.line(f"    {e.url}")
        tw.line("  Exempt example", "bold")
        tw.line(f"    {e.exempt_example}", "dim")
        tw.line("  Judged example", "bold")
        tw.line(f"    {e.judged_example}", "dim")


def run_rules(args, stdout, stderr) -> int:
    if args.rule and args.rule.strip().lower() in ("exemptions", "exempt", "scope"):
        describe_exemptions(TerminalWriter(stdout))
        return exit_status()
    if args.rule:
        try:
            chosen = [rules.get(args.rule)]
        except KeyError:
            known = ", ".join(f"{r.code} ({r.slug})" for r in rules.RULES)
            raise UsageError(f"unknown rule {args.rule!r}; known rules: {known}") from None
    else:
        chosen = list(rules.RULES)
    tw = TerminalWriter(stdout)
    for n, rule in enumerate(chosen):
        if n:
            tw.line()
        describe_rule(rule, tw)
    if not args.rule:
        tw.line()
        describe_exemptions(tw)
    return exit_status()


def run_trace(args, stdout, stderr) -> int:
    from .trace import format_trace, trace

    page = os.path.abspath(args.page)
    if not os.path.isfile(page):
        raise UsageError(f"{args.page}: no such file")
    root = os.path.abspath(args.site) if args.site else _site_root(page)
    rel = os.path.relpath(page, root).replace(os.sep, "/")
    from tinctura.extract.bounds import Refused

    try:
        result = trace(root, rel, args.target,
                       engine.Options(viewport_width=args.viewport_width, **limits_from(args)))
    except LookupError as exc:
        raise UsageError(str(exc)) from None
    except (Refused, ValueError) as exc:  # outside the site, too large, empty
        raise UsageError(f"{args.page}: {exc}") from None
    stdout.write(format_trace(result) + "\n")
    return exit_status()


def _site_root(page: str) -> str:
    root = os.path.dirname(page)
    parent = os.path.dirname(root)
    while parent != root and os.path.isfile(os.path.join(parent, "index.html")):
        root, parent = parent, os.path.dirname(parent)
    return root


# -- entry point -------------------------------------------------------------------------------


def command() -> None:
    """The ``tinctura`` command and ``python -m tinctura``: ``main`` on the process's own
    arguments, then the process ends (``end_now``)."""
    end_now(main())


def end_now(code) -> None:
    """End the process with exit status ``code`` once its output is flushed and its exit
    handlers have run, without freeing its heap object by object.

    After a check the heap holds the style caches, recorded fragments, judged situations and
    the store: hundreds of thousands of objects. Python's own shutdown frees them one at a
    time, which took 0.14 s after `tinctura check --jobs 2` and 0.28-0.33 s after `--jobs 1`
    on 200 generated pages (3-5 % of the command); the operating system reclaims the memory
    at once. The exit handlers (``atexit``: temporary folders, worker pools, logging) run
    as they would. A normal exit is taken instead while a thread that is not a daemon is
    still running (Python waits for it), or when the output cannot be flushed (a closed
    pipe: Python's own exit reports it as usual)."""
    import atexit
    import threading

    status = code if isinstance(code, int) else (0 if code is None else 1)
    main_thread = threading.main_thread()
    if any(t is not main_thread and t.is_alive() and not t.daemon
           for t in threading.enumerate()):
        raise SystemExit(status)
    try:
        sys.stdout.flush()
        sys.stderr.flush()
    except (OSError, ValueError):
        raise SystemExit(status)
    atexit._run_exitfuncs()  # (what Python's shutdown would run first)
    try:
        sys.stdout.flush()
        sys.stderr.flush()
    except (OSError, ValueError):
        pass
    os._exit(status)


def main(argv=None, stdout=None, stderr=None) -> int:
    stdout = sys.stdout if stdout is None else stdout
    stderr = sys.stderr if stderr is None else stderr
    parser = build_parser()
    try:
        with contextlib.redirect_stderr(stderr), contextlib.redirect_stdout(stdout):
            args = parser.parse_args(argv)
    except SystemExit as e:  # argparse: --help/--version (0) or a usage error (2)
        return e.code if isinstance(e.code, int) else ERROR
    try:
        return args.run(args, stdout, stderr)
    except UsageError as e:
        stderr.write(f"{PROG}: error: {e}\n")
    except BrokenPipeError:  # piped into `head`: the reader left, nothing more to say
        if stdout is sys.stdout:  # keep Python from failing again when it flushes at exit
            os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
    except OSError as e:  # a file that exists but cannot be read
        where = f"{e.filename}: " if e.filename else ""
        stderr.write(f"{PROG}: error: {where}{e.strerror or e}\n")
    except Exception as exc:  # a bug in tinctura: never a silent pass
        stderr.write(f"{PROG}: internal error: {type(exc).__name__}: {exc}\n")
        if getattr(args, "debug", False):
            traceback.print_exc(file=stderr)
            stderr.write(f"{PROG}: please report this to the tinctura maintainers with the "
                         "command, the input it read and the traceback above\n")
        else:
            stderr.write(f"{PROG}: please report this to the tinctura maintainers: run the same "
                         "command again with --debug and send its output with the input\n")
    return exit_status(error=True)
