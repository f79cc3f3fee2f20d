"""What an audit report says about how the run was made: what was checked, when, with what."""
from __future__ import annotations

import datetime
import os
from dataclasses import dataclass, field


@dataclass
class Scope:
    paths: list = field(default_factory=list)  # the site directories or pages given
    title: str = ""  # the <title> of the first site's home page, when it has one
    date: str = ""  # ISO 8601, UTC, to the minute
    viewport_width: int = 1280
    states: bool = True  # :hover / :focus / :focus-visible checked too
    exclude: list = field(default_factory=list)  # glob patterns
    excluded_pages: list = field(default_factory=list)  # pages the patterns left out
    rules: list = field(default_factory=list)  # rule codes run; empty: every rule
    # further (label, value) lines other options add (viewing profiles, configuration file...)
    extra: list = field(default_factory=list)


def now() -> str:
    return datetime.datetime.now(datetime.timezone.utc).strftime("%Y-%m-%d %H:%M UTC")


def scope_of(paths, options) -> Scope:
    """The scope of a run of the engine with ``options`` over ``paths``."""
    return Scope(
        paths=list(paths),
        title=site_title(paths),
        date=now(),
        viewport_width=options.viewport_width,
        states=options.states,
        exclude=list(options.exclude),
        excluded_pages=excluded_pages(paths, options),
        rules=list(options.rules),
        extra=settings(options),
    )


def settings(options) -> list:
    """(label, value) lines for the options of rules beyond WCAG 2, when this version has them."""
    out = []
    profiles = getattr(options, "profiles", None)
    if profiles:
        out.append(("Viewing profiles", ", ".join(profiles)))
    severity = getattr(options, "cvd_severity", None)
    if severity is not None:
        out.append(("Colour-vision deficiency severity", f"{severity:g} (0 to 1)"))
    return out


def excluded_pages(paths, options) -> list:
    """Pages of the site directories that ``options.exclude`` leaves out."""
    if not options.exclude:
        return []
    from tinctura import engine

    out = []
    for path in paths:
        if os.path.isdir(path):
            site = engine.Site(path, options)
            every = engine.Site(path, engine.Options()).pages()
            out.extend(p for p in every if site.excluded(p))
    return out


def site_title(paths) -> str:
    """The title of the first site directory's ``index.html`` (empty when there is none)."""
    from tinctura.extract.html import parse_html

    for path in paths:
        index = os.path.join(path, "index.html")
        if os.path.isdir(path) and os.path.isfile(index):
            try:
                with open(index, "rb") as fh:
                    root = parse_html(fh.read())
            except Exception:  # a title is a courtesy: never fail a report for it
                return ""
            title = root.find(".//title")
            text = "" if title is None else " ".join("".join(title.itertext()).split())
            return text[:200]
    return ""
