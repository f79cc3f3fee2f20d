"""Parse a built page into a tree shaped like a browser's.

lxml's HTML parser is 10-50x faster than the alternatives measured on documentation pages, but it
does not run the HTML5 tree-construction steps browsers run. The one that matters for styling
generated docs is the implied ``<tbody>``: selectors such as ``table>tbody>tr`` rely on it, so it
is inserted here. Pages of unknown or broken encoding are decoded with bs4's UnicodeDammit.
"""
from __future__ import annotations

import re

import lxml.etree

_META_CHARSET = re.compile(rb"<meta[^>]+charset=[\"']?([\w-]+)", re.I)
# lxml.etree's parser, not lxml.html's: the latter picks a Python element class for every
# element touched, which costs more than the parse itself on a large page
_PARSER = lxml.etree.HTMLParser(remove_comments=False, collect_ids=False, huge_tree=True)


def decode(data: bytes) -> str:
    """Decode page bytes: BOM, then the declared charset, then UTF-8, then bs4's guess."""
    if data.startswith(b"\xef\xbb\xbf"):
        return data[3:].decode("utf-8", "replace")
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
    root = lxml.etree.fromstring(text, parser=_PARSER)
    if root is None:
        raise ValueError("the page has no elements")
    _insert_tbody(root)
    return root


def parser_warnings() -> list:
    """Problems the last parse met that lose content: (line, message)."""
    return [(e.line, "elements nested deeper than the HTML parser keeps (about 2,000 levels) "
                     "were dropped with their text")
            for e in _PARSER.error_log if "Excessive depth" in e.message]


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
    parts = [el.text or ""]
    for child in el:
        parts.append(child.tail or "")
    return " ".join("".join(parts).split())

