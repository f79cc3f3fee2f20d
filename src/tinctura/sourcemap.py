"""Where a finding's text is written: the Markdown page and line, or the theme's template.

The built HTML says little about its source, so the text itself is looked up: the finding's
excerpt is searched in the page's Markdown with markup and spacing ignored. A match of the whole
excerpt gives its line; a match of its first words gives a line marked ``near``. Text outside the
page's content (navigation, header, footer, tabs, table of contents) comes from the theme: the
template is named instead.
"""
from __future__ import annotations

import os
import re
from dataclasses import dataclass
from typing import Optional

_MARKUP = re.compile(r"<[^>]*>|\{[:#.][^}]*\}|[*_`~#>|\[\]()!=\\]+")
_WORD = re.compile(r"[^\W_]+", re.UNICODE)
EXCERPT_WORDS = 8  # words of the text searched for an exact match
NEAR_WORDS = 3  # words searched when the whole excerpt is not found

# Parts of a page a theme renders, by class or tag, with the template that renders them
# (mkdocs-material's names where the theme is material; a plain description otherwise).
_AREAS = (
    ("md-header", "partials/header.html", "the site header"),
    ("md-tabs", "partials/tabs.html", "the navigation tabs"),
    ("md-nav--secondary", "partials/toc.html", "the table of contents"),
    ("md-nav", "partials/nav.html", "the navigation"),
    ("md-sidebar", "partials/nav.html", "the navigation"),
    ("md-footer", "partials/footer.html", "the footer"),
    ("md-banner", "main.html", "the announcement banner"),
    # MkDocs' own theme (Bootstrap): its navigation bar, menus included, and its sidebar
    ("navbar", "base.html", "the navigation bar"),
    ("bs-sidebar", "toc.html", "the table of contents"),
)
_TAGS = {"header": "the site header", "nav": "the navigation", "footer": "the footer",
         "aside": "a sidebar"}
_CONTENT = ("md-content", "rst-content", "content")


@dataclass(frozen=True)
class Source:
    file: Optional[str]  # Markdown source (as the writer sees it) or None
    line: int = 0
    near: bool = False  # the line is approximate
    template: Optional[str] = None  # theme template when the text is not the page's

    def where(self) -> str:
        if self.template:
            return f"theme template {self.template}"
        if not self.file:
            return ""
        if not self.line:
            return self.file
        return f"near {self.file}:{self.line}" if self.near else f"{self.file}:{self.line}"


def theme_area(landmarks, theme: str = "") -> Optional[tuple]:
    """``(template, description)`` when the element is in a part the theme renders, None when
    it is in the page's content. ``landmarks``: (tag, classes, id) innermost first."""
    for tag, classes, _ in landmarks:  # a theme's own class names say the most
        if tag == "article" or any(c in _CONTENT for c in classes):
            return None
        for cls, template, description in _AREAS:
            if cls in classes:
                return (template if theme == "material" else None), description
    for tag, classes, _ in landmarks:  # else the nearest landmark element
        if tag in _TAGS:
            return None, _TAGS[tag]
    return None


def words(text: str) -> list:
    return [w.lower() for w in _WORD.findall(_MARKUP.sub(" ", text or ""))]


class SourceMap:
    """Finds findings' texts in the Markdown of a project (``mkdocs_project.Project``)."""

    def __init__(self, project):
        self.project = project
        self._docs: dict = {}  # source -> (words, line of each word)

    def _indexed(self, src: str):
        if src not in self._docs:
            path = os.path.join(self.project.docs_dir, src)
            found, lines = [], []
            try:
                with open(path, encoding="utf-8-sig", errors="replace") as fh:
                    for number, line in enumerate(fh, 1):
                        for w in words(line):
                            found.append(w)
                            lines.append(number)
            except OSError:
                pass
            self._docs[src] = (found, lines)
        return self._docs[src]

    def locate(self, page: str, text: str, landmarks=(), fallback_text: str = "") -> Source:
        area = theme_area(landmarks, self.project.theme) if landmarks else None
        src = self.project.source_of(page)
        if area is not None:
            template, description = area
            return Source(None, template=template or f"{description} ({self.project.theme or 'theme'})")
        if src is None:
            return Source(None)
        shown = self.project.docs_path(src)
        for candidate, near in ((text, False), (fallback_text, True)):
            wanted = words(candidate)
            if len(wanted) < 2:  # "3." or "Caution:" would match anywhere: try the element's
                continue
            line = self._find(src, wanted[:EXCERPT_WORDS])
            if line:
                return Source(shown, line, near)
            line = self._find(src, wanted[:NEAR_WORDS])
            if line:
                return Source(shown, line, True)
        for candidate in (text, fallback_text):  # a one-word text: its first long word, near
            long = [w for w in words(candidate) if len(w) >= 4]
            line = self._find(src, long[:1]) if long else 0
            if line:
                return Source(shown, line, True)
        return Source(shown, 0, True)

    def _find(self, src: str, wanted: list) -> int:
        found, lines = self._indexed(src)
        n = len(wanted)
        first = wanted[0]
        for i, w in enumerate(found):
            if w == first and found[i:i + n] == wanted:
                return lines[i]
        return 0
