"""Every setting of tinctura, defined once as data, and where settings come from.

One table (``SETTINGS``) gives each setting its name, its check (the value as TOML or YAML
gives it -> the value used, or ``ValueError`` with a short reason), its default and its help.
Three readers use it:

- the MkDocs plugin's options (``plugin/config.py`` builds its config class from the table);
- the configuration file: ``[tool.tinctura]`` in ``pyproject.toml``, or a ``tinctura.toml``
  (top-level keys), found from the working directory upwards, or named by ``--config``
  (an ``mkdocs.yml`` named there gives the plugin's options from it, see ``read_mkdocs``);
- the command line (``cli.py`` adds one flag per setting that has ``flag``); flags override
  the file.

Adding a setting is one ``Setting(...)`` line in ``SETTINGS`` (plus its use in the engine or a
report). Unknown keys, wrong types and impossible values raise ``ConfigError`` naming the file
and the key: the command line prints it as one line and exits with status 2.
"""
from __future__ import annotations

import fnmatch
import json
import os
from dataclasses import dataclass, field
from typing import Callable

try:
    import tomllib
except ModuleNotFoundError:  # Python 3.10
    import tomli as tomllib

ALL = frozenset({"file", "plugin", "cli"})  # where a setting can be given
FILE_AND_CLI = frozenset({"file", "cli"})


class ConfigError(ValueError):
    """A setting that cannot be used; ``str()`` is one line naming the file and the key."""


# -- checks: a value as TOML/YAML gives it -> the value used, or ValueError(reason) ------------


def _type_name(value) -> str:
    return {bool: "true/false", int: "a whole number", float: "a number", str: "a string",
            list: "a list", dict: "a table"}.get(type(value), type(value).__name__)


def choice(*values, fold=None) -> Callable:
    def check(value):
        folded = fold(value) if fold and isinstance(value, str) else value
        if folded not in values:
            raise ValueError(f"expected one of {', '.join(values)}, got {value!r}")
        return folded
    return check


def boolean(value):
    if not isinstance(value, bool):
        raise ValueError(f"expected true or false, got {_type_name(value)} {value!r}")
    return value


def whole(minimum: int = 1, maximum: int | None = None) -> Callable:
    def check(value):
        if isinstance(value, bool) or not isinstance(value, int):
            raise ValueError(f"expected a whole number, got {_type_name(value)} {value!r}")
        if value < minimum or (maximum is not None and value > maximum):
            upper = f" and at most {maximum}" if maximum is not None else ""
            raise ValueError(f"expected a number of at least {minimum}{upper}, got {value}")
        return value
    return check


def optional(check: Callable) -> Callable:
    def optional_check(value):
        return None if value is None else check(value)
    return optional_check


def text(value):
    if not isinstance(value, str) or not value.strip():
        raise ValueError(f"expected a non-empty string, got {_type_name(value)} {value!r}")
    return value


def optional_text(value):
    """A string that may be empty (None: empty)."""
    return "" if value in (None, "") else text(value)


def strings(value):
    if not isinstance(value, (list, tuple)) or not all(isinstance(v, str) for v in value):
        raise ValueError(f"expected a list of strings, got {_type_name(value)} {value!r}")
    return list(value)


def rule_code(name) -> str:
    from tinctura import rules

    try:
        return rules.get(name).code
    except (KeyError, AttributeError):
        known = ", ".join(f"{r.code} ({r.slug})" for r in rules.RULES)
        raise ValueError(f"unknown rule {name!r}; known rules: {known}") from None


def rule_names(value):
    """A list of rule codes or slugs -> their codes."""
    return [rule_code(name) for name in strings(value)]


SEVERITIES = ("error", "warning", "info")


def severities(value):
    """``{rule: severity}`` (codes or slugs) -> ``{code: severity}``."""
    if not isinstance(value, dict):
        raise ValueError(f"expected a table of rule = severity, got {_type_name(value)} "
                         f"{value!r}")
    out = {}
    for name, severity in value.items():
        code = rule_code(name)
        if severity not in SEVERITIES:
            raise ValueError(f"{name}: expected one of {', '.join(SEVERITIES)}, "
                             f"got {severity!r}")
        out[code] = severity
    return out


def output_specs(value):
    """A list of ``FORMAT`` or ``FORMAT:FILE`` -> ``[(format, file or None)]``."""
    return [split_output(spec) for spec in strings(value)]


def split_output(spec) -> tuple:
    from tinctura import report

    if isinstance(spec, tuple):  # already split (defaults, the plugin's own values)
        return spec
    name, sep, path = spec.partition(":")
    if name not in report.FORMATS:
        raise ValueError(f"unknown format {name!r} in {spec!r}; formats: "
                         f"{', '.join(report.FORMATS)}")
    if sep and not path:
        raise ValueError(f"{spec!r}: no file after ':'")
    return (name, path or None)


ALLOW_KEYS = {"pages", "rules", "selector", "reason"}


def allow_entries(value):
    """Configuration-level suppressions: tables of pages (glob), rules, selector and reason."""
    if not isinstance(value, list):
        raise ValueError(f"expected a list of tables, got {_type_name(value)} {value!r}")
    out = []
    for n, entry in enumerate(value, 1):
        if not isinstance(entry, dict):
            raise ValueError(f"entry {n}: expected a table, got {_type_name(entry)}")
        unknown = sorted(set(entry) - ALLOW_KEYS)
        if unknown:
            raise ValueError(f"entry {n}: unknown keys {', '.join(unknown)} "
                             f"(known: {', '.join(sorted(ALLOW_KEYS))})")
        if not isinstance(entry.get("reason"), str) or not entry["reason"].strip():
            raise ValueError(f"entry {n}: a reason is required")
        if not set(entry) & {"pages", "rules", "selector"}:
            raise ValueError(f"entry {n}: name pages, rules or a selector")
        pages = entry.get("pages", [])
        pages = [pages] if isinstance(pages, str) else strings(pages)
        selector = entry.get("selector")
        if selector is not None:
            try:
                _check_selector(text(selector))
            except ValueError as exc:
                raise ValueError(f"entry {n}: {exc}") from None
        out.append({"pages": pages, "rules": rule_names(entry.get("rules", [])),
                    "selector": selector, "reason": entry["reason"].strip()})
    return out


def _check_selector(selector: str) -> None:
    import cssselect2

    try:
        cssselect2.compile_selector_list(selector)
    except Exception as exc:  # cssselect2 raises its own SelectorError and ValueError
        reason = exc.args[-1] if exc.args else exc
        raise ValueError(f"selector {selector!r} cannot be used: {reason}") from None


def schemes(value):
    if value is None:
        return None
    from tinctura.extract.schemes import from_setting

    return from_setting(value)


def behaviours(value):
    if value is None or value == ():
        return ()
    from tinctura.extract.behaviours import from_setting

    return from_setting(value)


def lc_levels(value):
    """APCA Lc per text tier (TC200, TC400): ``{body, content, headline, any} -> number``."""
    if not isinstance(value, dict):
        raise ValueError(f"expected a table of tier = Lc, got {_type_name(value)} {value!r}")
    if not all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in value.values()):
        raise ValueError(f"expected numbers, got {value!r}")
    from tinctura.rules.perception import check_lc_levels

    return check_lc_levels(value)


def fraction(value):
    """A number from 0 to 1 (a colour-vision deficiency's severity)."""
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not 0 <= value <= 1:
        raise ValueError(f"expected a number from 0 to 1, got {value!r}")
    return float(value)


def profiles(value):
    """Viewing profiles (TC500): a list of names of ``tinctura.colour.viewing.PROFILES``."""
    from tinctura.colour import viewing

    return tuple(viewing.get(name).name for name in strings(value))
def palette(value):
    """``{name: CSS colour or --custom-property}`` (tinctura.palette), checked; kept as given."""
    if not isinstance(value, dict):
        raise ValueError(f"expected a table of name = colour, got {_type_name(value)} {value!r}")
    from tinctura.palette import palette_setting

    palette_setting(value)  # ValueError naming the entry
    return {str(name): str(colour) for name, colour in value.items()}


def exemption_ids(value):
    """Exemption ids (extract/exempt.py) -> the list; unknown ids are an error."""
    from tinctura.extract import exempt

    names = strings(value)
    exempt.enabled_set(names)  # ValueError naming the unknown ones
    return names


def logotype_selectors(value):
    from tinctura.extract import exempt

    selectors = strings(value)
    exempt.compile_logotypes(selectors)  # ValueError naming the selector
    return selectors


def exemptions_kept(no_exempt) -> tuple | None:
    """``Options.exemptions`` from the ``no_exempt`` setting: None (all) when it is empty."""
    from tinctura.extract import exempt

    if not no_exempt:
        return None
    return tuple(i for i in exempt.IDS if i not in set(no_exempt))


# -- command-line text -> a value the check accepts -------------------------------------------


def int_text(text: str):
    try:
        return int(text)
    except ValueError:
        raise ValueError(f"expected a whole number, got {text!r}") from None


def comma_list(text: str) -> list:
    return [part.strip() for part in text.split(",") if part.strip()]


def severity_text(text: str) -> dict:
    out = {}
    for part in comma_list(text):
        name, sep, severity = part.partition("=")
        if not sep:
            raise ValueError(f"expected RULE=SEVERITY, got {part!r}")
        out[name.strip()] = severity.strip()
    return out


def lc_levels_text(text: str) -> dict:
    """``body=75,content=60`` -> ``{"body": 75.0, "content": 60.0}``."""
    out = {}
    for part in comma_list(text):
        name, _, value = part.partition("=")
        try:
            out[name.strip()] = float(value)
        except ValueError:
            raise ValueError(f"expected TIER=LC[,...] (e.g. body=75), got {text!r}") from None
    return out


def float_text(text: str) -> float:
    try:
        return float(text)
    except ValueError:
        raise ValueError(f"expected a number, got {text!r}") from None
def palette_text(text: str) -> dict:
    name, sep, colour = text.partition("=")
    if not sep or not name.strip() or not colour.strip():
        raise ValueError(f"expected NAME=COLOUR or NAME=--property, got {text!r}")
    return {name.strip(): colour.strip()}


def json_file(path: str):
    try:
        with open(path, encoding="utf-8") as fh:
            return json.load(fh)
    except OSError as exc:
        raise ValueError(f"{path}: cannot read: {exc.strerror}") from None
    except json.JSONDecodeError as exc:
        raise ValueError(f"{path}: not valid JSON: {exc}") from None


# -- paths in a file are relative to the file ---------------------------------------------------


def rebase_path(value, base: str):
    return value if value is None or os.path.isabs(value) else os.path.join(base, value)


def rebase_outputs(value, base: str):
    return [(name, rebase_path(path, base)) for name, path in value]


# -- the table ---------------------------------------------------------------------------------


@dataclass(frozen=True)
class Setting:
    name: str  # key in the file and in the plugin's options (snake_case)
    check: Callable  # value -> value used; ValueError(reason) when it cannot be used
    default: object
    help: str
    flag: str | None = None  # command-line flag; None: not on the command line
    metavar: str | None = None
    parse: Callable | None = None  # flag text -> a value for ``check`` (default: the text)
    many: bool = False  # flag repeatable; each gives a list (``parse``) and they add up
    where: frozenset = ALL
    commands: tuple = ("check",)  # subcommands with the flag
    rebase: Callable | None = None  # (value, folder of the file) -> value, for paths
    choices: tuple = field(default=())  # shown in --help


SETTINGS = (
    Setting("level", choice("AA", "AAA", fold=str.upper), "AA",
            "WCAG conformance level to check", flag="--level", choices=("AA", "AAA")),
    Setting("fail_on", choice("error", "warning", "info", "never"), "error",
            "fail (exit 1, or the MkDocs build) on findings of this severity or worse",
            flag="--fail-on", choices=("error", "warning", "info", "never")),
    Setting("exclude", strings, [], "skip pages matching these globs (the plugin: source paths; "
            "the command line: site-relative built paths)", flag="--exclude", metavar="GLOB",
            parse=lambda t: [t], many=True, commands=("check", "pairs")),
    Setting("viewport_width", whole(1), 1280, "viewport width in CSS pixels for media queries",
            flag="--viewport-width", metavar="N", parse=int_text, commands=("check", "pairs")),
    Setting("states", boolean, True, "also check :hover, :focus and :focus-visible, and the "
            "table-of-contents entry a theme's scroll spy marks",
            flag="--states", commands=("check", "pairs")),
    Setting("schemes", optional(schemes), None, "colour schemes replacing discovery: a list of "
            "{name, media, attributes} (the command line: a JSON file of that list)",
            flag="--schemes", metavar="FILE", parse=json_file, commands=("check", "pairs")),
    Setting("jobs", optional(whole(1)), None, "processes checking pages (default: the cores)",
            flag="--jobs", metavar="N", parse=int_text, commands=("check", "pairs")),
    Setting("cache", boolean, True, "keep parsed stylesheets between runs in the user's "
            "cache folder ($TINCTURA_CACHE_DIR, else $XDG_CACHE_HOME/tinctura or "
            "~/.cache/tinctura)", flag="--cache", commands=("check", "pairs")),
    Setting("behaviours", behaviours, (), "what the site's own scripts change before a reader "
            "sees a page: a list of {action, selector, value[, marker, script, within]} (the "
            "command line: a JSON file of that list)", flag="--behaviours", metavar="FILE",
            parse=json_file, commands=("check", "pairs")),
    Setting("theme_behaviours", boolean, True, "apply the themes' script behaviours",
            where=frozenset({"file", "plugin"})),
    Setting("site_url", optional_text, "", "the site's public URL (mkdocs.yml site_url; the "
            "plugin reads it there): absolute links under its path resolve inside the site",
            flag="--site-url", metavar="URL", where=FILE_AND_CLI, commands=("check", "pairs")),
    Setting("log_every", boolean, False, "one log line per occurrence, not per problem",
            where=frozenset({"plugin"})),
    Setting("log_detail", boolean, False, "log each problem's rule, measures and the "
            "declarations behind its colours too (they are always in the reports)",
            where=frozenset({"plugin"})),
    Setting("select", rule_names, [], "run only these rules (codes or slugs; default: all)",
            flag="--select", metavar="RULES", parse=comma_list, many=True),
    Setting("ignore", rule_names, [], "do not run these rules (codes or slugs)",
            flag="--ignore", metavar="RULES", parse=comma_list, many=True),
    Setting("severity", severities, {}, "severity per rule (in a file a table such as "
            "{TC100 = \"warning\"}; as a flag TC100=warning)",
            flag="--severity", metavar="RULE=SEVERITY", parse=severity_text, many=True),
    Setting("allow", allow_entries, [], "reviewed exceptions: tables of pages (globs), rules, "
            "selector (CSS) and a required reason"),
    Setting("baseline", optional(text), None, "a baseline file: fail only on findings not in it",
            flag="--baseline", metavar="FILE", rebase=rebase_path),
    Setting("report", output_specs, [], "reports to write, FORMAT or FORMAT:FILE",
            flag="--format", metavar="FORMAT[:FILE]", parse=lambda t: [t], many=True,
            rebase=rebase_outputs),
    Setting("fingerprints", boolean, False, "write each finding's fingerprint into the JSON "
            "report (SARIF, JUnit and baselines always carry them)", flag="--fingerprints",
            commands=("check",)),
    Setting("site_dir", optional(text), None, "the built site `tinctura check` reads when no "
            "path is given", where=FILE_AND_CLI, rebase=rebase_path),
    Setting("group", choice("cause", "page"), "cause", "text report: problems grouped by cause "
            "or findings by page", flag="--group", where=FILE_AND_CLI, choices=("cause", "page")),
    Setting("lc_levels", optional(lc_levels), None, "APCA Lc per text tier for TC200 and TC400 "
            "(tiers body, content, headline, any; default body=75, content=60, headline=45, "
            "any=30)", flag="--lc-levels", metavar="TIER=LC,...", parse=lc_levels_text),
    Setting("cvd_severity", fraction, 1.0, "colour-vision deficiency severity for TC400, 0 to 1",
            flag="--cvd-severity", metavar="S", parse=float_text),
    Setting("profiles", profiles, ("daylight",), "viewing profiles for TC500: office, dim, "
            "daylight", flag="--profiles", metavar="NAMES", parse=comma_list),
    Setting("palette", palette, {}, "colours that carry a meaning, for the appearance rules "
            "(TC300, TC310): name = CSS colour or custom property (--name); as a flag "
            "NAME=COLOUR, repeatable; default: discovered", flag="--palette",
            metavar="NAME=COLOUR", parse=palette_text, many=True),
    Setting("no_exempt", exemption_ids, [], "judge what these exemptions leave out of the "
            "contrast rules (ids in `tinctura rules exemptions`; default: WCAG's scope applies)",
            flag="--no-exempt", metavar="ID", parse=lambda t: [t], many=True,
            commands=("check", "pairs")),
    Setting("logotypes", logotype_selectors, [], "CSS selectors of logos and brand names set as "
            "text: exempt from the contrast ratio (WCAG SC 1.4.3 \"Logotypes\")",
            flag="--logotype", metavar="SELECTOR", parse=lambda t: [t], many=True,
            commands=("check", "pairs")),
)

BY_NAME = {s.name: s for s in SETTINGS}


def defaults(where: str = "cli") -> dict:
    return {s.name: _copy(s.default) for s in SETTINGS if where in s.where}


def _copy(value):
    return value.copy() if hasattr(value, "copy") else value


def check_table(table: dict, where: str, source: str, base: str | None = None) -> dict:
    """Validate a table of settings read from ``source``; paths rebased on ``base``."""
    out = {}
    for key, value in table.items():
        setting = BY_NAME.get(key)
        if setting is None or where not in setting.where:
            raise ConfigError(f"{source}: {key}: unknown setting" + _did_you_mean(key, where))
        try:
            value = setting.check(value)
        except ValueError as exc:
            raise ConfigError(f"{source}: {key}: {exc}") from None
        if base is not None and setting.rebase is not None:
            value = setting.rebase(value, base)
        out[key] = value
    return out


def _did_you_mean(key: str, where: str) -> str:
    import difflib

    names = [s.name for s in SETTINGS if where in s.where]
    close = difflib.get_close_matches(str(key), names, n=1)
    return f" (did you mean {close[0]}?)" if close else f" (known: {', '.join(names)})"


# -- files -------------------------------------------------------------------------------------

PYPROJECT = "pyproject.toml"
OWN_FILE = "tinctura.toml"


@dataclass
class Loaded:
    """Settings from a file (empty when there is none) and the file they came from."""

    values: dict = field(default_factory=dict)
    path: str | None = None
    mkdocs_config: str | None = None  # an mkdocs.yml given to --config (Markdown sources)


def discover(start: str | None = None) -> str | None:
    """The configuration file for ``start`` (default: the working directory): in each folder
    upwards, ``tinctura.toml``, else a ``pyproject.toml`` with a ``[tool.tinctura]`` table."""
    folder = os.path.abspath(start or os.getcwd())
    while True:
        own = os.path.join(folder, OWN_FILE)
        if os.path.isfile(own):
            return own
        project = os.path.join(folder, PYPROJECT)
        if os.path.isfile(project) and _has_table(project):
            return project
        parent = os.path.dirname(folder)
        if parent == folder:
            return None
        folder = parent


def _has_table(path: str) -> bool:
    try:
        return "tinctura" in _read_toml(path).get("tool", {})
    except ConfigError:
        return True  # a broken pyproject.toml is reported when it is read


def _read_toml(path: str) -> dict:
    try:
        with open(path, "rb") as fh:
            return tomllib.load(fh)
    except OSError as exc:
        raise ConfigError(f"{path}: cannot read: {exc.strerror or exc}") from None
    except tomllib.TOMLDecodeError as exc:
        raise ConfigError(f"{path}: not valid TOML: {exc}") from None


def is_mkdocs_config(path: str) -> bool:
    return path.lower().endswith((".yml", ".yaml"))


def load(path: str | None = None, search_from: str | None = None) -> Loaded:
    """Settings from ``path`` (``--config``), else from the discovered file, else none."""
    if path is None:
        path = discover(search_from)
        if path is None:
            return Loaded()
    elif not os.path.isfile(path):
        raise ConfigError(f"{path}: no such configuration file")
    if is_mkdocs_config(path):
        return read_mkdocs(path)
    data = _read_toml(path)
    base = os.path.dirname(os.path.abspath(path))
    if os.path.basename(path) == PYPROJECT:
        table = data.get("tool", {}).get("tinctura", {})
        source = f"{path}: [tool.tinctura]"
        if not isinstance(table, dict):
            raise ConfigError(f"{source}: expected a table")
    else:
        table, source = data, path
    return Loaded(check_table(table, "file", source, base), path)


def read_mkdocs(path: str) -> Loaded:
    """The tinctura plugin's options from an ``mkdocs.yml``, its site_dir, and the file itself
    (kept as ``mkdocs_config``: the hook for mapping built pages to Markdown sources)."""
    from mkdocs.utils.yaml import yaml_load

    try:
        with open(path, encoding="utf-8") as fh:
            data = yaml_load(fh) or {}
    except OSError as exc:
        raise ConfigError(f"{path}: cannot read: {exc.strerror or exc}") from None
    except Exception as exc:  # yaml errors, unset !ENV variables...
        raise ConfigError(f"{path}: cannot read as an MkDocs configuration: "
                          f"{' '.join(str(exc).split())}") from None
    base = os.path.dirname(os.path.abspath(path))
    options = {}
    for entry in data.get("plugins") or []:
        if isinstance(entry, dict) and "tinctura" in entry:
            options = dict(entry["tinctura"] or {})
    options.pop("enabled", None)  # MkDocs' own
    values = check_table(options, "plugin", f"{path}: plugins.tinctura", base)
    values["site_dir"] = rebase_path(data.get("site_dir") or "site", base)
    values["site_url"] = data.get("site_url") or ""
    return Loaded(values, path, mkdocs_config=path)


def page_matches(page: str, patterns) -> bool:
    return any(fnmatch.fnmatchcase(page, pattern) for pattern in patterns)


# -- the command line --------------------------------------------------------------------------


def _default_shown(value) -> str:
    """A default as a user would type it: on/off, a comma list; "" for none (left out)."""
    if isinstance(value, bool):
        return "on" if value else "off"
    if isinstance(value, (list, tuple)):
        return ",".join(map(str, value))
    return "" if value is None or value == {} else str(value)


def add_flags(parser, command: str) -> None:
    """One flag per setting that has one on ``command``; absent flags leave no attribute."""
    import argparse

    for s in SETTINGS:
        if s.flag is None or "cli" not in s.where or command not in s.commands:
            continue
        shown = _default_shown(s.default)
        help_text = s.help + (f" (default {shown})" if shown else "")
        if s.name == "report":
            from tinctura import report

            help_text += f"; formats: {', '.join(report.FORMATS)}"
        if s.many:
            help_text += " (repeatable)"
        kw = {"dest": s.name, "default": argparse.SUPPRESS, "help": help_text}
        if s.check is boolean:
            kw["action"] = argparse.BooleanOptionalAction
        else:
            kw["type"] = _flag_type(s)
            if s.many:
                kw["action"] = "append"
            if s.metavar:
                kw["metavar"] = s.metavar
            if s.choices:
                kw["choices"] = s.choices
        parser.add_argument(s.flag, **kw)
    parser.add_argument("--config", metavar="FILE", default=None,
                        help="settings file: a tinctura.toml, a pyproject.toml with "
                             "[tool.tinctura], or an mkdocs.yml (its tinctura plugin options; "
                             "default: found from the working directory upwards)")
    parser.add_argument("--no-config", action="store_true",
                        help="ignore configuration files")


def _flag_type(s: Setting) -> Callable:
    import argparse

    def convert(text: str):
        try:
            value = s.parse(text) if s.parse else text
        except ValueError as exc:
            raise argparse.ArgumentTypeError(str(exc)) from None
        try:
            return value if s.many else s.check(value)
        except ValueError as exc:  # a file's content: name the file
            where = f"{text}: " if s.parse is json_file else ""
            raise argparse.ArgumentTypeError(f"{where}{exc}") from None
    convert.__name__ = s.name  # argparse names the type in some messages
    return convert


def apply(args, command: str) -> Loaded:
    """Settings for ``command``: defaults, then the configuration file, then the flags given;
    set as attributes of ``args``. Returns what was read from the file."""
    loaded = Loaded() if getattr(args, "no_config", False) else load(getattr(args, "config", None))
    values = {**defaults("file"), **defaults("cli")}  # file-only ones reach the engine too
    values.update({k: v for k, v in loaded.values.items() if k in values})
    for s in SETTINGS:
        if s.flag is None or not hasattr(args, s.name) or command not in s.commands:
            continue
        value = getattr(args, s.name)
        if s.many:
            value = _join(value)
            try:
                value = s.check(value)
            except ValueError as exc:
                raise ConfigError(f"command line: {s.flag}: {exc}") from None
        values[s.name] = value
    for name, value in values.items():
        setattr(args, name, value)
    args.config_path = loaded.path
    args.mkdocs_config = loaded.mkdocs_config
    return loaded


def _join(parts: list):
    if parts and all(isinstance(p, dict) for p in parts):
        out = {}
        for p in parts:
            out.update(p)
        return out
    return [item for p in parts for item in p]
