"""What an MkDocs project says about its built site: which pages come from which Markdown file,
which stylesheets the writer owns, which theme renders the rest.

The plugin builds a ``Project`` from the configuration MkDocs hands it; the command line reads
``mkdocs.yml`` with MkDocs' own loader when ``--config`` names one (``config.py`` tells it
from tinctura's own settings files).
"""
from __future__ import annotations

import os
import re
from dataclasses import dataclass, field

_HASHED = re.compile(r"\.[0-9a-f]{6,}(\.min)?\.css$", re.I)
# asset folders of the themes MkDocs ships or commonly installs (mkdocs, readthedocs, material)
_THEME_FOLDERS = ("assets/stylesheets/", "assets/javascripts/", "css/theme", "css/base.css",
                  "css/bootstrap", "css/fontawesome", "css/brands", "css/solid", "css/v4-",
                  # Sphinx: its own files, the folder furo, pydata and the book theme write
                  # theirs to, sphinx_rtd_theme's two (names recalled from Sphinx 7-9 builds;
                  # furo's checked on tests/data/sphinx_site)
                  "_static/styles/", "_static/css/theme.css", "_static/css/badge_only.css",
                  "_static/basic.css", "_static/pygments.css", "_static/skeleton.css",
                  "_static/debug.css", "_static/copybutton.css", "_static/graphviz.css")
SPHINX_STATIC = "_static/"  # where Sphinx copies its, its theme's and the writer's files
# Sphinx's built-in themes write _static/<theme>.css
_SPHINX_THEMES = frozenset("""alabaster classic default nature sphinxdoc pyramid haiku scrolls
    agogo bizstyle traditional epub nonav""".split())


@dataclass
class Project:
    config_file: str = ""  # absolute path of mkdocs.yml ("" when unknown)
    docs_dir: str = ""  # absolute
    site_dir: str = ""  # absolute
    extra_css: list = field(default_factory=list)  # site-relative paths, in mkdocs.yml order
    theme: str = ""  # theme name
    theme_dirs: list = field(default_factory=list)  # template folders, most specific first
    pages: dict = field(default_factory=dict)  # built page (site-relative) -> Markdown source
    static: set = field(default_factory=set)  # site-relative paths of files copied from docs

    def source_of(self, page: str) -> str | None:
        """The Markdown file (relative to docs_dir) a built page comes from."""
        return self.pages.get(page)

    def docs_path(self, rel: str) -> str:
        """A docs-relative path as the writer sees it: relative to mkdocs.yml's folder."""
        if not self.docs_dir:
            return rel
        base = os.path.dirname(self.config_file) if self.config_file else os.getcwd()
        return os.path.relpath(os.path.join(self.docs_dir, rel), base).replace(os.sep, "/")


def owned(sheet: str, project: Project | None = None) -> bool:
    """True when a stylesheet (site-relative path) belongs to the writer, not to the theme.

    With a project: the files listed in ``extra_css`` and the files copied from ``docs_dir``.
    Without one: neither hashed, nor minified, nor in a theme's asset folders, nor a page's
    ``<style>`` block, a style attribute or the browser's defaults.
    """
    if not sheet or "<style>" in sheet or sheet in ("style attribute", "user-agent"):
        return False
    if project is not None and (project.extra_css or project.static):
        return sheet in project.extra_css or sheet in project.static
    name = sheet.lower()
    if _HASHED.search(name) or name.endswith(".min.css"):
        return False
    if sphinx_sheet(name) and name[len(SPHINX_STATIC):].removesuffix(".css") in _SPHINX_THEMES:
        return False
    return not any(name.startswith(folder) for folder in _THEME_FOLDERS)


def sphinx_sheet(sheet: str) -> bool:
    """Whether a stylesheet (site-relative) lies where Sphinx puts a site's static files."""
    return sheet.startswith(SPHINX_STATIC)


def from_mkdocs_config(config) -> Project:
    """A Project from a loaded MkDocs configuration (the plugin's ``config``)."""
    from mkdocs.structure.files import get_files

    return from_files(config, get_files(config))


def from_files(config, files) -> Project:
    """A Project from a configuration and its MkDocs ``Files`` (theme files among them are
    not the writer's: only files under docs_dir are)."""
    docs = os.path.abspath(config.docs_dir) + os.sep
    pages = {f.dest_uri: f.src_uri for f in files.documentation_pages()}
    static = {f.dest_uri for f in files if f.dest_uri not in pages
              and os.path.abspath(f.abs_src_path or "").startswith(docs)}
    return from_parts(config, pages, static)


def from_parts(config, pages: dict, static: set) -> Project:
    theme = config.theme
    extra = [str(getattr(e, "path", e)) for e in (config.extra_css or [])]
    return Project(
        config_file=os.path.abspath(config.config_file_path or ""),
        docs_dir=os.path.abspath(config.docs_dir),
        site_dir=os.path.abspath(config.site_dir),
        extra_css=[e.lstrip("/") for e in extra if "://" not in e],
        theme=getattr(theme, "name", None) or "",
        theme_dirs=list(getattr(theme, "dirs", []) or []),
        pages=pages,
        static=static,
    )


def load(path: str) -> Project:
    """Read ``mkdocs.yml`` with MkDocs' own loader. Raises ValueError with a clear message."""
    import logging

    try:
        from mkdocs.config import load_config
    except ImportError:
        raise ValueError(f"{path}: reading mkdocs.yml needs MkDocs installed") from None
    quiet = logging.getLogger("mkdocs")
    level = quiet.level
    quiet.setLevel(logging.ERROR)  # its warnings about the config are for `mkdocs build`
    try:
        config = load_config(config_file=path)
        return from_mkdocs_config(config)
    except Exception as exc:  # MkDocs' ConfigurationError, YAML errors, a missing theme
        raise ValueError(f"{path}: cannot read the MkDocs configuration: {exc}") from None
    finally:
        quiet.setLevel(level)
