"""Find and load the stylesheets a page uses, from the site directory only.

``<link rel=stylesheet>`` (relative URLs, ``?v=hash`` query strings, ``media``), ``<style>`` and
``@import`` are followed inside the site root. Nothing is fetched from the network: a remote
stylesheet is recorded as not loaded. A file whose real path (symbolic links resolved) lies
outside the site root is not read either (``bounds.read_inside``). Parsed sheets are cached per
site by path, mtime and size.
"""
from __future__ import annotations

import dataclasses
import hashlib
import os
import weakref
from collections import OrderedDict
from urllib.parse import unquote, urlsplit

from ..model import Diagnostic
from . import bounds
from . import overlay as overlay_mod
from .ruleset import RuleSet
from .sheet import StyleRule, parse_stylesheet

_UA = None


def user_agent_sheet():
    global _UA
    if _UA is None:
        path = os.path.join(os.path.dirname(os.path.dirname(__file__)), "data", "user-agent.css")
        with open(path, encoding="utf-8") as fh:
            css = fh.read()
        _UA = parse_stylesheet(css, "user-agent", origin="user-agent")
    return _UA

# Rule sets kept for later pages. A site's pages share a few; a site whose pages each have
# their own <style> block would otherwise keep one per page all run long (about 0.3 MB each,
# measured on pages of 150 rules), and the pages checked again with 12,000 overrides injected
# one of 2.8 MB each (``overrides.verify``). mkdocs-material's main stylesheet has about 1,000
# rules (1,032 measured in 9.x), so the bound on rules keeps dozens of such rule sets.
RULESETS_KEPT = 64
RULES_KEPT = 100_000
# Rule sets laid over another (a page's own <style> blocks, ``overlay``) are mostly that
# page's alone, and the pages checked again with the overrides injected each have one: a few
LAID_OVER_KEPT = 8


class SheetLoader:
    """Per-site cache of parsed stylesheets and of rule sets by list of sheets."""

    def __init__(self, root: str, prefix: str = "", max_file_bytes: int = bounds.MAX_FILE_BYTES,
                 max_rules: int = bounds.MAX_RULES):
        self.root = os.path.abspath(root)
        self.real_root = bounds.real_root(self.root)
        self.max_file_bytes = max_file_bytes
        self.max_rules = max_rules
        # the path the site is served under ("/project/" for https://host/project/): absolute
        # links start with it
        self.prefix = "/" + prefix.strip("/") + "/" if prefix.strip("/") else ""
        self._sheets = {}  # path -> ((mtime, size), ParsedSheet, diagnostics, SHA-1)
        # the page's sheets -> (RuleSet, the files it was built from, its number of rules),
        # least recently used first: pages with their own <style> blocks each get a rule set,
        # which is let go (``_keep``)
        self._rulesets = OrderedDict()
        self._kept_rules = 0
        self._laid_over = OrderedDict()  # the same, of rule sets laid over another (``overlay``)
        # a rule set -> its style caches (``engine.Site._walker``), let go with it: whoever
        # checks pages on this loader (the fixes verified after the check) finds them warm
        self.style_caches = weakref.WeakKeyDictionary()
        self.generation = 0  # bumped when a stylesheet changed on disk
        # the text of a <style> block that is one sheet wherever it appears -> its name (the
        # overrides ``overrides.verify`` injects in every page it checks again): parsed once
        self.shared_styles = {}
        self._shared_parsed = {}  # (text, line, column) -> its ParsedSheet
        self._shared_laid = None  # (its ParsedSheet, the base, overlay.SharedBlock)
        self.missing = 0  # stylesheets linked or imported that were not there or not read
        # sheets parsed ahead in another process (``prepared.Prepared``), or None
        self.prepared = None
        self.cache = None  # parsed sheets kept between runs (``sheet_cache.SheetCache``)

    def rel(self, path: str) -> str:
        return os.path.relpath(path, self.root).replace(os.sep, "/")

    def resolve(self, href: str, base_dir: str):
        """A site file for ``href`` seen from ``base_dir``; (path, None) or (None, reason)."""
        parts = urlsplit(href.strip())
        if parts.scheme in ("http", "https") or href.strip().startswith("//"):
            return None, "remote stylesheet not loaded (tinctura never fetches from the network)"
        if parts.scheme and parts.scheme not in ("file",):
            return None, f"stylesheet URL scheme '{parts.scheme}:' not supported"
        path = unquote(parts.path)
        if not path:
            return None, "empty stylesheet URL"
        if self.prefix and path.startswith(self.prefix):
            candidate = os.path.normpath(os.path.join(self.root, path[len(self.prefix):]))
        elif path.startswith("/"):
            candidate = os.path.normpath(os.path.join(self.root, path.lstrip("/")))
            if not os.path.isfile(candidate):
                # a site served below a path prefix: try dropping leading segments
                segments = path.lstrip("/").split("/")
                for k in range(1, len(segments)):
                    alt = os.path.normpath(os.path.join(self.root, *segments[k:]))
                    if os.path.isfile(alt):
                        candidate = alt
                        break
        else:
            candidate = os.path.normpath(os.path.join(base_dir, path))
        if not (candidate + os.sep).startswith(self.root + os.sep) and candidate != self.root:
            return None, "stylesheet outside the site directory not loaded"
        if not os.path.isfile(candidate):
            self.missing += 1
            return None, "stylesheet file not found"
        if not bounds.inside(candidate, self.real_root):
            return None, ("stylesheet is a symbolic link leading outside the site directory; "
                          "not loaded")
        return candidate, None

    def sheet(self, path: str):
        """(ParsedSheet or None, diagnostics) for a file, cached by mtime and size."""
        try:
            st = os.stat(path)
        except OSError as exc:
            self.missing += 1
            return None, [Diagnostic(self.rel(path), f"cannot read stylesheet: {exc.strerror}",
                                     severity="error")]
        cached = self._sheets.get(path)
        if cached and cached[0] == (st.st_mtime_ns, st.st_size):
            return cached[1], cached[2]
        diags, stamp = [], (st.st_mtime_ns, st.st_size)
        try:
            data = bounds.read_inside(path, self.real_root, self.max_file_bytes)
            digest = hashlib.sha1(data).digest()
            # the size of the bytes read, not the stat's: a file read while it was rewritten
            # (truncated, then written within one tick of the clock that stamps mtimes) keeps
            # its mtime and is told by its size
            stamp = (st.st_mtime_ns, len(data))
            if cached and cached[3] == digest:  # copied again, same content (a fresh build)
                self._sheets[path] = (stamp,) + cached[1:]
                return cached[1], cached[2]
            if cached:
                self.generation += 1
                self._rulesets.clear()
                self._laid_over.clear()
            ready = self.prepared.take(path, digest) if self.prepared is not None else None
            if ready is None:
                handed, data = [data], None  # a large sheet: not kept twice while parsed
                ready = self.parse_data(handed, path, digest)
            parsed, diags = ready
        except bounds.Refused as exc:
            parsed, digest = None, None
            diags.append(Diagnostic(self.rel(path), f"stylesheet not loaded: {exc}",
                                    severity="error"))
        except OSError as exc:
            parsed, digest = None, None
            self.missing += 1
            diags.append(Diagnostic(self.rel(path), f"cannot read stylesheet: {exc.strerror}",
                                    severity="error"))
        except Exception as exc:  # a broken sheet must not stop the site
            parsed, digest = None, None
            diags.append(Diagnostic(self.rel(path), f"cannot parse stylesheet: {exc}",
                                    severity="error"))
        if parsed is not None and parsed.truncated:
            diags.append(_truncated(parsed, self.rel(path)))
        if parsed is not None:
            for line, message in parsed.errors[:20]:
                diags.append(Diagnostic(self.rel(path), f"CSS: {message}", line=line))
        self._sheets[path] = (stamp, parsed, diags, digest)
        return parsed, diags

    def parse_data(self, handed: list, path: str, digest: bytes) -> tuple:
        """``(ParsedSheet, diagnostics)`` of the bytes of the site file ``path`` (SHA-1
        ``digest``), handed over as ``[bytes]`` (let go of once decoded): from the cache of
        earlier runs when it holds them, else parsed (and kept there)."""
        key = (digest, self.rel(path), self.max_rules)
        found = self.cache.get(key) if self.cache else None
        if found is not None:
            return found
        css, diags = self.decoded(handed.pop(), path)
        parsed = self.parsed(css, path)
        if self.cache:
            self.cache.put(key, (parsed, diags))
        return parsed, diags

    def decoded(self, data: bytes, path: str) -> tuple:
        """``(text, diagnostics)`` of a stylesheet's bytes read from ``path``."""
        css = data.decode("utf-8-sig", errors="replace")
        if "\ufffd" in css and b"\xef\xbf\xbd" not in data:
            return css, [Diagnostic(self.rel(path), "not valid UTF-8; undecodable bytes "
                                    "replaced")]
        return css, []

    def parsed(self, css: str, path: str):
        """The ParsedSheet of the text of the site file ``path``."""
        return parse_stylesheet(css, self.rel(path), max_rules=self.max_rules)

    def changed(self) -> bool:
        """True when the content of any loaded stylesheet changed since it was parsed.

        Content, not mtime: a normal MkDocs build copies every static file again.
        """
        for path, (stamp, _, _, digest) in list(self._sheets.items()):
            try:
                st = os.stat(path)
                if (st.st_mtime_ns, st.st_size) == stamp:
                    continue
                data = bounds.read_inside(path, self.real_root, self.max_file_bytes)
                if hashlib.sha1(data).digest() != digest:
                    return True
            except (OSError, bounds.Refused):
                return True
        return False

    # -- per page ---------------------------------------------------------------------------
    def ruleset_for(self, root_el, page_path: str, source: str | None = None):
        """The RuleSet for a page's tree, and diagnostics about its stylesheets. ``source``:
        the page's HTML as parsed, for the columns of a ``<style>`` block's first line."""
        base_dir = os.path.dirname(page_path)
        entries, diags = [], []
        for el in root_el.iter("link", "style"):
            if el.tag == "link":
                rel = (el.get("rel") or "").lower().split()
                if "stylesheet" not in rel or "alternate" in rel or el.get("disabled") is not None:
                    continue
                href = el.get("href") or ""
                path, problem = self.resolve(href, base_dir)
                if problem:
                    diags.append(Diagnostic(self.rel(page_path), f"{href}: {problem}",
                                            line=el.sourceline or 0,
                                            severity="warning"))
                    continue
                entries.append(("file", path, (el.get("media") or "").strip()))
            else:
                media = (el.get("media") or "").strip()
                entries.append(("style", el.text or "", media, el.sourceline or 0, el))
        key = _key(entries)
        cached = self._kept(key)
        if cached is not None:
            ruleset, found = cached
            for e in entries:  # refresh sheet diagnostics once per page for reporting
                if e[0] == "file":
                    diags.extend(found[e[1]])
            return ruleset, _dedupe(diags)
        laid = self._laid_over_build(entries, page_path, source, diags)
        if laid is not None:
            # (mostly a page's own: the few most recent are kept, their base stays above; a
            # page verified with the fixes' overrides injected is checked once a round)
            if not any(e[0] == "style" and e[1] in self.shared_styles for e in entries):
                self._laid_over[key] = laid
                if len(self._laid_over) > LAID_OVER_KEPT:
                    self._laid_over.popitem(last=False)
            return laid[0], _dedupe(diags)
        ruleset, read, count = self._build(entries, page_path, source, diags)
        self._keep(key, (ruleset, tuple(read), count))
        return ruleset, _dedupe(diags)

    def _kept(self, key):
        """``(rule set, each of its files' diagnostics)`` kept for ``key``, its files unchanged
        since; or None."""
        for kept in (self._rulesets, self._laid_over):
            cached = kept.get(key)
            if cached is not None:
                found = self._restamped(cached[1])
                if found is None:
                    return None
                kept.move_to_end(key)
                return cached[0], found
        return None

    def _laid_over_build(self, entries, page_path, source, diags):
        """``(rule set, files read, number of rules)`` of a page whose trailing ``<style>``
        blocks can be laid over the rule set of the stylesheets before them (``overlay``),
        made of that rule set and the blocks' own rules; None where they cannot."""
        trailing = _trailing_styles(entries)
        if trailing is None:
            return None
        last = entries[-1]
        block = last if last[0] == "style" and last[1] in self.shared_styles and not last[2] \
            else None
        found, own, layers = [], [], []
        n_style = sum(e[0] == "style" for e in entries[:trailing])
        for e in entries[trailing:len(entries) - (block is not None)]:
            n_style += 1
            parsed = self._style_block(e, f"{self.rel(page_path)} <style> #{n_style}",
                                       source, found)
            if parsed is not None:
                self._expand(parsed, (e[2],) if e[2] else (), (), own, layers, set(), found,
                             base=os.path.dirname(page_path))
        marked_by = overlay_mod.marking(own) if not layers else None
        if marked_by is None:
            return None
        base, read, count = self._base(entries[:trailing], page_path, source, diags)
        shared = None
        if block is not None:
            parsed = self._style_block(block, block[1], source, found)
            shared = self._shared_block(parsed, base) if parsed is not None else None
            if shared is None:
                return None
        diags.extend(found)
        sheets = frozenset(self.shared_styles.values())
        return overlay_mod.LaidOver(base, own, marked_by, sheets, shared), read, \
            count + len(own) + (len(shared.rules) if shared is not None else 0)

    def _shared_block(self, parsed, base):
        """The ``SharedBlock`` of a block every page verified carries (``shared_styles``),
        laid over ``base``: made once for the pages of a round; None where it cannot be laid
        over (an import, layers, ``:has()``: it is then part of no page's rule set)."""
        kept = self._shared_laid
        if kept is not None and kept[0] is parsed and kept[1] is base:
            return kept[2]
        if not all(isinstance(r, StyleRule) for r in parsed.rules) or parsed.layer_names:
            return None
        rules = [dataclasses.replace(r) for r in parsed.rules]  # (numbered for this base)
        marking = overlay_mod.marking(rules)
        if marking is None:
            return None
        block = overlay_mod.SharedBlock(base, rules, marking)
        self._shared_laid = (parsed, base, block)  # (one: the overrides of one round)
        return block

    def _base(self, entries, page_path, source, diags):
        """``(rule set, files read, number of rules)`` of a page's stylesheets before its own
        trailing ``<style>`` blocks: the one the pages without such blocks get (``overlay``);
        their diagnostics added to ``diags``."""
        key = _key(entries)
        cached = self._kept(key)
        if cached is not None:
            ruleset, found = cached
            for e in entries:
                if e[0] == "file":
                    diags.extend(found[e[1]])
            entry = self._rulesets[key]
            return ruleset, entry[1], entry[2]
        ruleset, read, count = self._build(entries, page_path, source, diags)
        self._keep(key, (ruleset, tuple(read), count))
        return ruleset, tuple(read), count

    def _build(self, entries, page_path, source, diags) -> tuple:
        """``(RuleSet, files read, number of rules)`` of a page's ``entries``."""
        base_dir = os.path.dirname(page_path)
        rules, layers, read = [], [], []
        self._expand(user_agent_sheet(), (), (), rules, layers, set(), diags)
        n_style = 0
        for e in entries:
            if e[0] == "file":
                parsed, d = self.sheet(e[1])
                diags.extend(d)
                read.append(e[1])
                if parsed is None:
                    continue
                self._expand(parsed, (e[2],) if e[2] else (), (), rules, layers, {e[1]}, diags,
                             base=os.path.dirname(e[1]), read=read)
            else:
                n_style += 1
                parsed = self._style_block(e, f"{self.rel(page_path)} <style> #{n_style}",
                                           source, diags)
                if parsed is not None:
                    self._expand(parsed, (e[2],) if e[2] else (), (), rules, layers, set(),
                                 diags, base=base_dir)
        return RuleSet(rules, layers), read, len(rules)

    def _keep(self, key, entry) -> None:
        """Keep a rule set for later pages; let go of the least recently used beyond
        ``RULESETS_KEPT`` rule sets or ``RULES_KEPT`` rules in all (the newest stays)."""
        rulesets = self._rulesets
        if not rulesets:
            self._kept_rules = 0
        rulesets[key] = entry
        self._kept_rules += entry[2]
        while len(rulesets) > 1 and (len(rulesets) > RULESETS_KEPT
                                     or self._kept_rules > RULES_KEPT):
            self._kept_rules -= rulesets.popitem(last=False)[1][2]

    def _style_block(self, entry, name: str, source, diags):
        """A page's ``<style>`` block ``entry`` parsed as sheet ``name`` (None when it cannot
        be); a block named in ``shared_styles`` is parsed once for every page."""
        text, line, column = entry[1], entry[3], _column_before(entry[4], source)
        shared = self.shared_styles.get(text)
        key = (text, line, column) if shared is not None else None
        if key is not None and key in self._shared_parsed:
            return self._shared_parsed[key]
        name = shared or name
        try:
            parsed = parse_stylesheet(text, name, max_rules=self.max_rules)
        except Exception as exc:
            diags.append(Diagnostic(name, f"cannot parse: {exc}", line=line, severity="error"))
            return None
        if parsed.truncated:
            diags.append(_truncated(parsed, name, line))
        # (the key leaves the column out: where a minified page's title moves its
        # <style>, the pages still share one rule set, whose sheet names this page)
        parsed = _shift_lines(parsed, line, column)
        if key is not None:
            self._shared_parsed = {key: parsed}  # (one: the overrides of one round)
        return parsed

    def _restamped(self, paths):
        """The diagnostics of each file a rule set was built from (path -> list), each one's
        stamp compared and a changed one read again; None when one had changed. MkDocs copies
        the stylesheets again while the plugin's worker checks pages ahead: a rule set built
        from a sheet read half written must not serve the next page once the sheet is whole."""
        before = self.generation
        found = {path: self.sheet(path)[1] for path in paths}
        return found if self.generation == before else None

    def _expand(self, parsed, media, layer, out, layers, seen, diags, base=None, read=None):
        for path in parsed.layer_names:
            layers.append(layer + path)
        for rule in parsed.rules:
            if isinstance(rule, StyleRule):
                out.append(dataclasses.replace(rule, media=media + rule.media,
                                               layer=layer + rule.layer))
                continue
            _, url, imp_media, imp_layer, line = rule
            path, problem = self.resolve(url, base or self.root)
            if problem:
                diags.append(Diagnostic(parsed.name, f"@import {url}: {problem}", line=line))
                continue
            if path in seen:
                continue  # an import cycle
            child, d = self.sheet(path)
            diags.extend(d)
            if read is not None:
                read.append(path)
            if child is not None:
                self._expand(child, media + imp_media, layer + imp_layer, out, layers,
                             seen | {path}, diags, base=os.path.dirname(path), read=read)


def _key(entries) -> tuple:
    """A page's stylesheets as the kept rule sets know them: a <style> block by its text's
    hash, media and line."""
    return tuple(e if e[0] == "file" else ("style", hash(e[1]), e[2], e[3]) for e in entries)


def _trailing_styles(entries):
    """Where a page's run of <style> blocks after its last stylesheet file starts (None when
    there is no such run, or no file before it)."""
    files = [n for n, e in enumerate(entries) if e[0] == "file"]
    if not files or files[-1] == len(entries) - 1:
        return None
    return files[-1] + 1


def _truncated(parsed, name, line=0):
    return Diagnostic(name, f"more than {parsed.max_rules:,} style rules (one per selector): "
                            "the rest were not read (--max-rules)", line=line, severity="error")


def _shift_lines(parsed, offset, column=0):
    """<style> blocks: make declaration lines count from the page's first line, and the
    columns of the block's first line from the start of that line (``column``: the characters
    before the CSS on it)."""
    if offset <= 1 and not column:
        return parsed
    for rule in parsed.rules:
        if isinstance(rule, StyleRule):
            for d in rule.decls + rule.cue_decls:  # (cue_decls: extract/links.py)
                if not getattr(d, "_shifted", False):
                    if d.line == 1:
                        d.column += column
                    d.line += max(offset, 1) - 1
                    d._shifted = True
    return parsed


def _column_before(el, source: str | None) -> int:
    """The characters before the text of ``el`` (a ``<style>``) on its start tag's line of
    ``source``, or 0 when its text starts on a new line or cannot be found there."""
    text = el.text
    if not source or not text or text[0] in "\r\n":
        return 0
    line = el.sourceline or 1
    at = source.find(text)
    while at >= 0:
        found = source.count("\n", 0, at) + 1
        if found == line:
            return at - source.rfind("\n", 0, at) - 1
        if found > line:
            break
        at = source.find(text, at + 1)
    return 0


def _dedupe(diags):
    seen, out = set(), []
    for d in diags:
        if d not in seen:
            seen.add(d)
            out.append(d)
    return out

