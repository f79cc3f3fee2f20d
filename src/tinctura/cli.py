"""The ``tinctura`` command line: check sites, dump samples, test one pair, list the rules."""
from __future__ import annotations

import argparse
import contextlib
import json
import os
import sys
import textwrap
import traceback

from tinctura import engine, problems, report, rules
from tinctura.model import Diagnostic
from tinctura.report import messages as m
from tinctura.report.store import FindingStore
from tinctura.report.status import ERROR, FAIL_ON, exit_status
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


def _site_options(p: argparse.ArgumentParser) -> None:
    p.add_argument("paths", nargs="+", metavar="PATH",
                   help="built site directories or HTML files")
    p.add_argument("--viewport-width", type=positive_int, default=1280, metavar="N",
                   help="viewport width in CSS pixels for media queries (default 1280)")
    p.add_argument("--jobs", type=positive_int, default=os.cpu_count() or 1, metavar="N",
                   help="processes checking pages in parallel (default: the number of cores)")
    p.add_argument("--no-states", action="store_true",
                   help="check only the resting state, not :hover / :focus / :focus-visible")
    p.add_argument("--exclude", action="append", default=[], metavar="GLOB",
                   help="skip pages whose site-relative path matches GLOB (repeatable)")
    p.add_argument("--schemes", metavar="FILE",
                   help="JSON list of colour schemes ({name, media, attributes}) replacing "
                        "discovery")
    p.add_argument("--site-url", default="", metavar="URL",
                   help="the site's public URL (mkdocs.yml site_url): absolute links under its "
                        "path resolve inside the site directory")
    p.add_argument("--behaviours", metavar="FILE",
                   help="JSON list of what the site's own scripts change before a reader sees "
                        "the page ({action, selector, value[, marker, script]})")
    p.add_argument("--output", "-o", metavar="FILE", help="write to FILE instead of stdout")


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog=PROG,
        description="Check colour contrast in built documentation sites.",
    )
    parser.add_argument("--version", action="version", version=f"%(prog)s {version()}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    sub.required = True

    check = sub.add_parser("check", help="check built pages and report findings",
                           description="Check built pages and report contrast findings.")
    _site_options(check)
    check.add_argument("--level", choices=("AA", "AAA"), default="AA",
                       type=str.upper, help="WCAG conformance level to check (default AA)")
    check.add_argument("--format", choices=tuple(report.FORMATS), default="text",
                       help="report format (default text)")
    check.add_argument("--fail-on", choices=FAIL_ON, default="error",
                       help="exit with status 1 when findings of this severity or worse exist "
                            "(default error)")
    check.add_argument("--group", choices=("cause", "page"), default="cause",
                       help="text report: problems grouped by cause (default) or findings by page")
    check.add_argument("--color", "--colour", dest="colour", default="auto",
                       choices=("auto", "always", "never"),
                       help="colour in the text report (default auto: NO_COLOR, FORCE_COLOR, tty)")
    check.add_argument("--config", metavar="FILE",
                       help="the site's mkdocs.yml: findings point at Markdown lines and fixes "
                            "at the site's own stylesheets (extra_css)")
    check.add_argument("--write-fixes", metavar="FILE",
                       help="write every verified fix into one stylesheet FILE and say how to "
                            "add it to mkdocs.yml")
    check.set_defaults(run=run_check)

    pairs = sub.add_parser("pairs", help="print every text sample as JSON Lines",
                           description="Print every rendered text (per scheme and state) with its "
                                       "colours and their provenance, one JSON object a line.")
    _site_options(pairs)
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
    rules_cmd.add_argument("rule", nargs="?", metavar="RULE", help="a rule code or slug, e.g. TC100")
    rules_cmd.set_defaults(run=run_rules)
    return parser


# -- commands ----------------------------------------------------------------------------------


def options_from(args) -> engine.Options:
    return engine.Options(
        level=getattr(args, "level", "AA"),
        viewport_width=args.viewport_width,
        states=not args.no_states,
        exclude=tuple(args.exclude),
        jobs=args.jobs,
        schemes=load_schemes(args.schemes) if getattr(args, "schemes", None) else None,
        site_url=getattr(args, "site_url", ""),
        behaviours=load_json_setting(args.behaviours, "behaviours")
        if getattr(args, "behaviours", None) else (),
    )


def load_schemes(path: str) -> list:
    """Schemes from a JSON file (the same structure as the plugin's `schemes` option)."""
    return load_json_setting(path, "schemes")


def load_json_setting(path: str, name: str):
    """A setting (``schemes`` or ``behaviours``) from a JSON file, validated like the plugin's
    option of the same name; UsageError naming the file and what is wrong."""
    from tinctura.extract import behaviours, schemes

    from_setting = {"schemes": schemes.from_setting, "behaviours": behaviours.from_setting}[name]
    try:
        with open(path, encoding="utf-8") as fh:
            data = json.load(fh)
        return from_setting(data)
    except OSError as exc:
        raise UsageError(f"{path}: cannot read: {exc.strerror}") from None
    except json.JSONDecodeError as exc:
        raise UsageError(f"{path}: not valid JSON: {exc}") from None
    except ValueError as exc:
        raise UsageError(f"{path}: {exc}") from None


def check_inputs(paths) -> None:
    for path in paths:
        if not os.path.exists(path):
            raise UsageError(f"{path}: no such file or directory")
        if os.path.isfile(path) and not path.lower().endswith((".html", ".htm")):
            raise UsageError(f"{path}: not an HTML file or a site directory")


@contextlib.contextmanager
def output(path: str | None, stdout):
    if not path:
        yield stdout
        return
    try:
        stream = open(path, "w", encoding="utf-8")
    except OSError as e:
        raise UsageError(f"{path}: cannot write: {e.strerror or e}") from None
    with stream:
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
    check_inputs(args.paths)
    options = options_from(args)
    options.keep_samples = False  # the report needs counts, findings and declaration uses
    bar = report.progress_for(args, options, stderr)  # on a terminal: pages done, time left
    # findings go to disk page by page and problems are built as they come: memory does not
    # grow with the number of findings
    store, collector = FindingStore(), problems.Collector()

    def keep(page, findings):
        store.add(page.page, findings)
        for f in findings:
            collector.add(f)
        bar.advance()

    project = load_project(args.config) if getattr(args, "config", None) else None
    result = engine.check_paths(list(args.paths), options, findings_to=keep)
    result.findings = store
    found = collector.problems(result.uses)
    aid = writer_aid(args.paths, project, options)
    if aid is not None and found:
        aid.plan_overrides(found, result.schemes, options, store.pages())
    header = report.Header(
        scope=report.scope_of(args.paths, options),
        version=version(),
        level=args.level,
        group=args.group,
        fail_on=args.fail_on,
        schemes=[getattr(s, "name", s) for s in result.schemes],
        locate=aid,
    )
    with output(args.output, stdout) as stream:
        report.render(stream, args.format, header, result.pages, result.findings, found,
                      result.diagnostics, colour_choice=args.colour)
    if getattr(args, "write_fixes", None):
        report_written_fixes(args.write_fixes, found, project, stderr)
    unreadable = input_errors(result, stderr)
    return exit_status(result.findings, args.fail_on, error=unreadable)


def load_project(path: str):
    """The MkDocs project of ``--config``. (A tinctura settings file given to ``--config``
    would be read elsewhere; only mkdocs.yml is understood here.)"""
    from tinctura import mkdocs_project

    if not os.path.isfile(path):
        raise UsageError(f"{path}: no such file")
    if not mkdocs_project.is_mkdocs_config(path):
        raise UsageError(f"{path}: not an MkDocs configuration (mkdocs.yml)")
    try:
        return mkdocs_project.load(path)
    except ValueError as exc:
        raise UsageError(str(exc)) from None


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
        count, how = write_fixes(path, found, project)
    except OSError as exc:
        raise UsageError(f"{path}: cannot write: {exc.strerror or exc}") from None
    skipped = sum(1 for p in found if getattr(p, "override", None) is not None
                  and not p.override.verified)
    none = sum(1 for p in found if getattr(p, "override", None) is None)
    stderr.write(f"{PROG}: wrote {m.plural(count, 'verified fix', 'verified fixes')} to {path}")
    if skipped or none:
        stderr.write(f" ({skipped} not verified and {none} without a fix left out: "
                     f"see the report)")
    stderr.write(f".\n{how}\n")


def run_pairs(args, stdout, stderr) -> int:
    from tinctura.report.json_report import sample_dict

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
    return exit_status(error=input_errors(result, stderr))


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
    return exit_status()


def describe_rule(rule, tw: TerminalWriter) -> None:
    def para(label: str, text: str) -> None:
        tw.line(f"  {label}", "bold")
        for line in textwrap.wrap(text, 84):
            tw.line(f"    {line}")

    criteria = ", ".join(f"SC {c.number} {c.name} ({c.level})" for c in rule.criteria)
    tw.line(f"{rule.code} {rule.slug}: {rule.title}", "bold")
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


def run_rules(args, stdout, stderr) -> int:
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
    return exit_status()


def run_trace(args, stdout, stderr) -> int:
    from .trace import format_trace, trace

    page = os.path.abspath(args.page)
    if not os.path.isfile(page):
        raise UsageError(f"{args.page}: no such file")
    root = os.path.abspath(args.site) if args.site else _site_root(page)
    rel = os.path.relpath(page, root).replace(os.sep, "/")
    try:
        result = trace(root, rel, args.target,
                       engine.Options(viewport_width=args.viewport_width))
    except LookupError as exc:
        raise UsageError(str(exc)) from None
    stdout.write(format_trace(result) + "\n")
    return exit_status()


def _site_root(page: str) -> str:
    root = os.path.dirname(page)
    parent = os.path.dirname(root)
    while parent != root and os.path.isfile(os.path.join(parent, "index.html")):
        root, parent = parent, os.path.dirname(parent)
    return root


# -- entry point -------------------------------------------------------------------------------


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
    except Exception:
        stderr.write(f"{PROG}: internal error (please report it with the traceback below)\n")
        traceback.print_exc(file=stderr)
    return exit_status(error=True)
