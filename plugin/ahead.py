"""Pages checked ahead: rendered and checked in the plugin's worker while MkDocs still
converts the Markdown of later pages.

MkDocs converts every page's Markdown before it renders the first: a third to three fifths of
a build, on one core, while the worker's core idles. A page rendered with MkDocs' own context
and the theme's template right after its conversion is, on a site whose navigation names its
pages, the page MkDocs writes later (199-200 of 200 pages of the benchmark's shapes, HISTORY
2026-12-04 23:26); without ``nav:``, MkDocs names a page by its first heading, known once the
page is converted, so the worker first reads every page's Markdown (``_read_sources``). So
each converted page goes to the worker, which renders it (``render``), checks it and keeps the
answer under the HTML's digest; when MkDocs has written the page and hands it
over, the answer for the same HTML is given at once (``engine.PagePool.ahead``). Nothing is
reused on trust: the HTML must be the same characters, the stylesheets the same bytes (put in
place ahead from the sources MkDocs copies later, ``copy_sheets``; the worker compares them
once MkDocs has copied them), and an answer whose check missed a stylesheet is not kept. Other
plugins' ``on_env``, ``on_page_context`` and ``on_post_page`` are not run here: a page they
change has another digest, and is checked as before.
"""
from __future__ import annotations

import os
import shutil

# MkDocs' config, files and navigation, set in MkDocs' process before the worker is forked
# (``begin``); the worker renders with its copy
_STATE: dict = {}


def begin(config, files, nav) -> None:
    _STATE.update(config=config, files=files, nav=nav, env=None)


def payload(page, content: str) -> tuple:
    """What MkDocs' conversion of ``page`` made that its rendering reads (``content``: its
    HTML as the last ``on_page_content`` hook returns it)."""
    return (page.file.src_uri, content, page.toc, page.meta, page._title_from_render)


def render(src_uri: str, content: str, toc, meta: dict, title) -> str:
    """In the worker: the page as MkDocs' ``_build_page`` renders it, without the plugins'
    ``on_page_context`` and ``on_post_page``."""
    from mkdocs.commands.build import get_context

    config, files, nav = _STATE["config"], _STATE["files"], _STATE["nav"]
    if _STATE["env"] is None:
        _STATE["env"] = config.theme.get_env()
        _read_sources(config, files)
    page = files.get_file_from_path(src_uri).page
    if page.markdown is None:  # (read in MkDocs' process: the title comes from the render)
        page.markdown = ""
    page.content, page.toc, page.meta, page._title_from_render = content, toc, meta, title
    config._current_page = page
    page.active = True
    try:
        context = get_context(nav, files, config, page)
        template = _STATE["env"].get_template(page.meta.get("template", "main.html"))
        return template.render(context)
    finally:
        config._current_page = None
        page.active = False


def _read_sources(config, files) -> None:
    """Every page's Markdown read now, as MkDocs reads it before converting it: a page not
    converted yet is then named in the navigation by its metadata's title or its first
    heading, as MkDocs names it once converted (where the heading reads the same rendered;
    where not, the digest differs and the page is checked when written)."""
    for f in files.documentation_pages():
        page = f.page
        if page is not None and page.markdown is None:
            try:
                page.read_source(config)
            except Exception:  # (MkDocs reports it when it reads the page itself)
                pass


def stylesheet_files(files) -> list:
    """The stylesheets among MkDocs' ``files`` that it copies from a source on disk (a file a
    plugin generates has none), in MkDocs' order."""
    return [f for f in files if f.dest_uri.lower().endswith(".css") and f.abs_src_path
            and os.path.isfile(f.abs_src_path)]


def copy_sheets(files, site_dir: str) -> None:
    """The site's stylesheets, where MkDocs will copy them from their sources after the
    conversion, put there now (those already there are left): pages checked ahead read them.
    MkDocs copies them again; the worker then compares their bytes (``engine._checked_ahead``)."""
    for f in stylesheet_files(files):
        dest = os.path.join(site_dir, f.dest_uri)
        if not os.path.exists(dest):
            os.makedirs(os.path.dirname(dest), exist_ok=True)
            shutil.copyfile(f.abs_src_path, dest)
