"""Parse a built page into a tree shaped like a browser's.

lxml's HTML parser is 10-50x faster than the alternatives measured on documentation pages, but it
does not run the HTML5 tree-construction steps browsers run. The one that matters for styling
generated docs is the implied ``<tbody>``: selectors such as ``table>tbody>tr`` rely on it, so it
is inserted here. Pages of unknown or broken encoding are decoded with bs4's UnicodeDammit.

libxml2 stops building the tree below 256 levels of nesting (2,048 with its huge-tree option)
and drops what follows; browsers keep everything. A page past 256 levels is parsed again by
``_DeepTreeBuilder``,
an iterative builder over the standard library's HTML tokenizer with the tree-construction
rules that matter for styling (void elements, implied end tags of ``p``, ``li``, cells and
rows, ``head`` and ``body``), so its text is checked rather than lost.
"""
from __future__ import annotations

import re
from html.parser import HTMLParser

import lxml.etree

_META_CHARSET = re.compile(rb"<meta[^>]+charset=[\"']?([\w-]+)", re.I)
# lxml.etree's parser, not lxml.html's: the latter picks a Python element class for every
# element touched, which costs more than the parse itself on a large page
_PARSER = lxml.etree.HTMLParser(remove_comments=False, collect_ids=False, huge_tree=True)
# First try: libxml2's default limits (256 levels, 10 MB text nodes). A page past them is parsed
# again: past the depth, by _DeepTreeBuilder (pages that deep cost time and memory in the square
# of their depth, XPaths above all, so they get the depth cap browsers apply); past the text
# size, by the huge-tree parser.
_LIMITED = lxml.etree.HTMLParser(remove_comments=False, collect_ids=False, huge_tree=False)
# Blink attaches elements nested deeper than 512 at that depth (recalled from memory: its HTML
# tree builder's maximum DOM depth); the text is kept
MAX_DEPTH = 512


def unrendered(value: str) -> bool:
    """Whether ``value`` (a link's address) still holds template syntax (``{{ pathto(...) }}``,
    ``{% ... %}``): a theme's template copied into the site as it is, not a rendered page."""
    return "{{" in value or "{%" in value


def decode(data: bytes) -> str:
    """Decode page bytes: BOM (UTF-8 or UTF-16), then the declared charset, then UTF-8, then
    bs4's guess."""
    if data.startswith(b"\xef\xbb\xbf"):
        return data[3:].decode("utf-8", "replace")
    if data.startswith((b"\xff\xfe", b"\xfe\xff")):  # a BOM wins, as in browsers (HTML, 13.2.3)
        return data.decode("utf-16", "replace")
    match = _META_CHARSET.search(data[:4096])
    declared = match.group(1).decode("ascii", "ignore") if match else "utf-8"
    try:
        return data.decode(declared)
    except (LookupError, UnicodeDecodeError):
        pass
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError:
        from bs4.dammit import UnicodeDammit  # only for pages that are not valid UTF-8

        return UnicodeDammit(data, ["utf-8", "windows-1252"]).unicode_markup or data.decode(
            "latin-1"
        )


def parse_html(text: str | bytes):
    """Return the root ``<html>`` element of a page, with implied ``<tbody>`` inserted."""
    if isinstance(text, bytes):
        text = decode(text)
    if not text.strip():
        raise ValueError("the page is empty")
    # lxml refuses str input that carries an XML encoding declaration
    text = re.sub(r"^\s*<\?xml[^>]*>", "", text)
    global _DEEP
    root = lxml.etree.fromstring(text, parser=_LIMITED)
    _DEEP = too_deep(_LIMITED)
    if not _DEEP and any("XML_PARSE_HUGE" in e.message for e in _LIMITED.error_log):
        root = lxml.etree.fromstring(text, parser=_PARSER)
        _DEEP = too_deep(_PARSER)
    if _DEEP:
        root = _DeepTreeBuilder().build(text)
    if root is None:
        raise ValueError("the page has no elements")
    _insert_tbody(root)
    return root


_DEEP = False  # the last page parsed needed the deep-nesting builder


def too_deep(parser) -> bool:
    return any("Excessive depth" in e.message for e in parser.error_log)


def parser_warnings() -> list:
    """What the last parse did that a reader should know: (line, message)."""
    if _DEEP:
        return [(0, "elements nested more than 256 levels deep: the page was parsed with "
                    "tinctura's slower deep-nesting parser, which keeps all the text; as in "
                    f"browsers, elements deeper than {MAX_DEPTH} levels are placed at that depth")]
    return []


_VOID = frozenset("area base br col embed hr img input link meta param source track wbr "
                  "basefont bgsound frame keygen".split())
_HEAD = frozenset("base link meta noscript script style template title".split())
# start tags that close an open <p> (HTML, 13.2.6.4.7 "in body")
_CLOSES_P = frozenset("address article aside blockquote details dialog div dl fieldset "
                      "figcaption figure footer form h1 h2 h3 h4 h5 h6 header hgroup hr main "
                      "menu nav ol p pre section summary table ul".split())
# an element whose start closes the nearest open one of the same kinds (and what is open
# inside it), unless a boundary comes first
_IMPLIED = {"li": ({"li"}, {"ul", "ol", "menu"}), "dt": ({"dt", "dd"}, {"dl"}),
            "dd": ({"dt", "dd"}, {"dl"}), "tr": ({"tr"}, {"table", "tbody", "thead", "tfoot"}),
            "td": ({"td", "th"}, {"tr", "table"}), "th": ({"td", "th"}, {"tr", "table"}),
            "option": ({"option"}, {"select", "datalist", "optgroup"})}


class _DeepTreeBuilder(HTMLParser):
    """An iterative HTML tree builder (no depth limit) producing lxml elements."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.root = lxml.etree.Element("html")
        self.root.sourceline = 1
        self.head = self.body = None
        self.stack = [self.root]

    def build(self, text: str):
        self.feed(text)
        self.close()
        if self.head is None:
            self.head = lxml.etree.Element("head")
            self.root.insert(0, self.head)
        if self.body is None:
            self._open_body()
        return self.root

    def _open_body(self):
        del self.stack[1:]
        self.body = lxml.etree.SubElement(self.root, "body")
        self.body.sourceline = self.getpos()[0]
        self.stack.append(self.body)

    def _add(self, parent, tag, attrs):
        try:
            el = lxml.etree.SubElement(parent, tag)
        except ValueError:  # not a name lxml accepts
            return None
        for name, value in attrs:
            try:
                if el.get(name) is None:
                    el.set(name, value if value is not None else "")
            except ValueError:
                pass
        el.sourceline = self.getpos()[0]
        return el

    def handle_starttag(self, tag, attrs):
        if tag == "html":
            for name, value in attrs:
                if self.root.get(name) is None:
                    self.root.set(name, value or "")
            return
        if self.body is None:
            if tag in _HEAD or tag == "head":
                if self.head is None:
                    self.head = self._add(self.root, "head", [])
                if tag == "head":
                    return
                el = self._add(self.head, tag, attrs)
                if el is not None and tag not in _VOID:
                    self.stack[1:] = [self.head, el]
                return
            self._open_body()
            if tag == "body":
                for name, value in attrs:
                    self.body.set(name, value or "")
                return
        elif tag in ("head", "body"):
            return
        self._implied_ends(tag)
        if len(self.stack) > MAX_DEPTH:  # as browsers do: a sibling, not a deeper child
            self.stack.pop()
        el = self._add(self.stack[-1], tag, attrs)
        if el is not None and tag not in _VOID:
            self.stack.append(el)

    def handle_startendtag(self, tag, attrs):
        self.handle_starttag(tag, attrs)
        if tag not in _VOID and len(self.stack) > 2 and self.stack[-1].tag == tag:
            self.stack.pop()  # <div/> in HTML opens a div, but a self-closed SVG child closes

    def _implied_ends(self, tag):
        if tag in _CLOSES_P and self.stack[-1].tag == "p":
            self.stack.pop()
        closes = _IMPLIED.get(tag)
        if closes is None:
            return
        same, boundary = closes
        for i in range(len(self.stack) - 1, 1, -1):
            name = self.stack[i].tag
            if name in same:
                del self.stack[i:]
                return
            if name in boundary:
                return

    def handle_endtag(self, tag):
        if tag in ("html", "body", "head"):
            return
        for i in range(len(self.stack) - 1, 0, -1):
            if self.stack[i].tag == tag:
                del self.stack[i:]
                return

    def handle_data(self, data):
        if self.body is None and len(self.stack) < 3:  # not inside <title>, <style>...
            if not data.strip():
                return
            self._open_body()
        top = self.stack[-1]
        if len(top):
            last = top[-1]
            last.tail = (last.tail or "") + data
        else:
            top.text = (top.text or "") + data


def _insert_tbody(root) -> None:
    for table in root.iter("table"):
        run = []
        for child in list(table):
            if child.tag == "tr":
                run.append(child)
                continue
            _wrap(table, run)
            run = []
        _wrap(table, run)


def _wrap(table, rows) -> None:
    if not rows:
        return
    body = lxml.etree.Element("tbody")
    body.sourceline = rows[0].sourceline
    table.insert(table.index(rows[0]), body)
    for row in rows:
        body.append(row)  # moves the row (and keeps its tail with it)


def own_text(el) -> str:
    """The element's own text (direct text nodes only), whitespace collapsed."""
    if not len(el):  # a leaf (most elements with text): no tails to gather
        text = el.text
        return " ".join(text.split()) if text else ""
    parts = [el.text or ""]
    for child in el:
        parts.append(child.tail or "")
    return " ".join("".join(parts).split())

