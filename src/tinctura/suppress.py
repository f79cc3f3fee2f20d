"""Reviewed exceptions written next to the content, and in the configuration.

In Markdown (HTML comments pass through to the built page), before the element they cover::

    <!-- tinctura: allow TC100 reason="the legend repeats the printed panel" -->
    Legend text...

The comment covers the next element (and its descendants). Rules are codes or slugs,
separated by commas or spaces; the reason is required. With attribute lists, on the element::

    Legend text...
    {: data-tinctura-allow="TC100: the legend repeats the printed panel" }

In the configuration, ``allow`` entries cover pages (globs), rules and a CSS selector.
A suppression that matches no finding of the rules run is reported, so stale ones are noticed.

This is a filter after the rules: it reads the built page again only when the page carries a
directive (or a configuration entry with a selector applies to it), and maps each directive to
the XPath of the element it covers; findings are matched by XPath prefix.
"""
from __future__ import annotations

import re
from dataclasses import dataclass, field

from tinctura import config, rules
from tinctura.model import Diagnostic

ATTRIBUTE = "data-tinctura-allow"
MARKER = re.compile(rb"<!--\s*tinctura\s*:|data-tinctura-allow")
_DIRECTIVE = re.compile(r"^\s*tinctura\s*:\s*(?P<body>.*?)\s*$", re.S)
_ALLOW = re.compile(r"^allow\s+(?P<rules>[^=]*?)\s+reason\s*=\s*(?P<q>[\"'])(?P<reason>.*)"
                    r"(?P=q)$", re.S)
SYNTAX = '<!-- tinctura: allow TC100 reason="why this is acceptable" -->'


@dataclass
class Mark:
    """One suppression on a page: the element it covers (XPath), rules and reason."""

    xpath: str
    rules: frozenset  # codes
    reason: str
    line: int
    origin: str  # "comment" or "attribute"
    used: bool = False

    def covers(self, finding) -> bool:
        return finding.rule in self.rules and under(finding.sample.xpath, self.xpath)


def under(xpath: str, prefix: str) -> bool:
    """True when ``xpath`` is the element ``prefix`` or inside it (descendants, pseudo-elements)."""
    return xpath == prefix or xpath.startswith(prefix + "/") or xpath.startswith(prefix + "::")


@dataclass
class PageMarks:
    marks: list = field(default_factory=list)
    diagnostics: list = field(default_factory=list)  # malformed directives


def has_marks(data: bytes) -> bool:
    return b"tinctura" in data and bool(MARKER.search(data))  # the plain search is much faster


def scan(root, page: str) -> PageMarks:
    """The suppressions of one parsed page (``extract.html.parse_html``)."""
    import lxml.etree

    out = PageMarks()
    tree = root.getroottree()
    for comment in root.iter(lxml.etree.Comment):
        match = _DIRECTIVE.match(comment.text or "")
        if not match:
            continue
        line = comment.sourceline or 0
        target = _next_element(comment)
        try:
            codes, reason = parse_allow(match.group("body"))
            if target is None:
                raise ValueError("no element follows it in the page")
        except ValueError as exc:
            out.diagnostics.append(Diagnostic(page, f"suppression not used: {exc}", line=line))
            continue
        out.marks.append(Mark(tree.getpath(target), codes, reason, line, "comment"))
    for el in root.iter():
        value = el.get(ATTRIBUTE) if isinstance(el.tag, str) else None
        if value is None:
            continue
        line = el.sourceline or 0
        names, sep, reason = value.partition(":")
        try:
            if not sep or not reason.strip():
                raise ValueError(f'{ATTRIBUTE}="{value}" has no reason; write '
                                 f'{ATTRIBUTE}="TC100: why this is acceptable"')
            codes = _codes(names)
        except ValueError as exc:
            out.diagnostics.append(Diagnostic(page, f"suppression not used: {exc}", line=line))
            continue
        out.marks.append(Mark(tree.getpath(el), codes, reason.strip(), line, "attribute"))
    return out


def parse_allow(body: str) -> tuple:
    """``allow RULES reason="..."`` -> (codes, reason); ValueError saying what is wrong."""
    match = _ALLOW.match(body)
    if not match or not match.group("reason").strip():
        raise ValueError(f"cannot read 'tinctura: {' '.join(body.split())[:80]}'; "
                         f"write {SYNTAX} (a reason is required)")
    return _codes(match.group("rules")), " ".join(match.group("reason").split())


def _codes(names: str) -> frozenset:
    parts = [p for p in re.split(r"[\s,]+", names) if p]
    if not parts:
        raise ValueError("no rule named")
    codes = set()
    for name in parts:
        try:
            codes.add(rules.get(name).code)
        except KeyError:
            raise ValueError(f"unknown rule {name!r}") from None
    return frozenset(codes)


def _next_element(node):
    nxt = node.getnext()
    while nxt is not None and not isinstance(nxt.tag, str):  # comments, processing instructions
        nxt = nxt.getnext()
    return nxt


class ConfigAllow:
    """The configuration's ``allow`` entries: pages (globs), rules, a selector, a reason."""

    def __init__(self, entries, source: str = "configuration"):
        self.entries = list(entries or ())
        self.source = source
        self.used = [False] * len(self.entries)
        self._compiled = {}

    def applies(self, page: str) -> bool:
        """True when some entry may hold findings of ``page``."""
        return any(self._on_page(e, page) for e in self.entries)

    def wants_tree(self, page: str) -> bool:
        return any(e["selector"] and self._on_page(e, page) for e in self.entries)

    @staticmethod
    def _on_page(entry, page: str) -> bool:
        return not entry["pages"] or config.page_matches(page, entry["pages"])

    def matcher(self, page: str, root):
        """A function finding -> reason or None, for one page (``root``: its tree or None)."""
        active = []
        for n, e in enumerate(self.entries):
            if not self._on_page(e, page):
                continue
            prefixes = None
            if e["selector"]:
                prefixes = self._select(e["selector"], root) if root is not None else []
            active.append((n, e, prefixes))

        def match(finding):
            for n, e, prefixes in active:
                if e["rules"] and finding.rule not in e["rules"]:
                    continue
                if prefixes is not None and not any(under(finding.sample.xpath, p)
                                                    for p in prefixes):
                    continue
                self.used[n] = True
                return e["reason"]
            return None
        return match

    def _select(self, selector: str, root) -> list:
        import cssselect2

        compiled = self._compiled.get(selector)
        if compiled is None:
            compiled = self._compiled[selector] = cssselect2.compile_selector_list(selector)
        tree = root.getroottree()
        wrapper = cssselect2.ElementWrapper.from_html_root(root)
        return [tree.getpath(w.etree_element) for w in wrapper.iter_subtree()
                if any(sel.test(w) for sel in compiled)]

    def unused(self, rules_run) -> list:
        out = []
        for n, (e, used) in enumerate(zip(self.entries, self.used), 1):
            if used or (e["rules"] and not set(e["rules"]) & set(rules_run)):
                continue
            out.append(Diagnostic(self.source, f"allow entry {n} ({e['reason']}) matches no "
                                               f"finding; remove it if the fault is fixed"))
        return out
