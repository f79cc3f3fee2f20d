"""Parsed stylesheets kept between runs, in the user's cache folder.

A theme's stylesheet is the same file on every site built with the same theme version, and
parsing it is most of what a check does before its first page (mkdocs-material's: about 90 ms
of a 0.9 s check of a small site; MkDocs' own Bootstrap theme 0.19 s; a 3 MB theme 2.4 s),
while loading it parsed takes a twentieth of that. So ``SheetLoader`` keeps each sheet it
parses here, pickled, and takes it back on a later run for the same bytes.

An entry is named by what its parse depends on: the sheet's bytes (SHA-1), its path in the
site (declarations carry it), the rule limit, the Python version, tinycss2's and cssselect2's
versions and tinctura's own source (every module's bytes: an edited parser never reads an
older parse). The cache only saves time: a missing, unreadable or foreign entry is parsed
again, and nothing here stops a run.

Bounds (hostile input): a sheet whose pickle would exceed ``MAX_ENTRY_BYTES`` is not kept; the
folder keeps the ``MAX_ENTRIES`` most recently used entries. Entries are pickles, loaded only
from a folder that belongs to the user and that no one else can write (else the cache is off
and ``refused`` says why); an entry is written whole under another name, then renamed, so a
run beside another never reads half of one.

The folder: ``$TINCTURA_CACHE_DIR``, else ``$XDG_CACHE_HOME/tinctura``, else
``~/.cache/tinctura`` (the XDG Base Directory convention); ``--no-cache`` (``cache: false``)
turns it off.
"""
from __future__ import annotations

import hashlib
import os
import pickle
import stat
import sys
import tempfile

MAX_ENTRIES = 64
MAX_ENTRY_BYTES = 32 * 1024 * 1024
_FORMAT = "1"  # bumped if the entries' layout changes

_CODE_DIGEST = None


def default_folder() -> str:
    """Where the cache lives when not told (see the module docstring)."""
    chosen = os.environ.get("TINCTURA_CACHE_DIR")
    if chosen:
        return chosen
    base = os.environ.get("XDG_CACHE_HOME") or os.path.join(os.path.expanduser("~"), ".cache")
    return os.path.join(base, "tinctura")


def folder_for(enabled: bool) -> str:
    """``Options.cache_dir`` for the ``cache`` setting: the default folder, or "" (none)."""
    return default_folder() if enabled else ""


def code_digest() -> str:
    """SHA-1 of tinctura's own modules (names and bytes) and of the parsing libraries'
    versions, worked out once per process (1.5 ms)."""
    global _CODE_DIGEST
    if _CODE_DIGEST is None:
        import cssselect2
        import tinycss2

        root = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
        h = hashlib.sha1(repr((_FORMAT, tinycss2.__version__, cssselect2.__version__)).encode())
        for folder, _, files in sorted(os.walk(root)):
            for name in sorted(files):
                if name.endswith(".py"):
                    with open(os.path.join(folder, name), "rb") as fh:
                        h.update(os.path.relpath(os.path.join(folder, name), root).encode())
                        h.update(fh.read())
        _CODE_DIGEST = h.hexdigest()
    return _CODE_DIGEST


class SheetCache:
    """Parsed sheets in ``folder``: ``get(key)``, ``put(key, value)``; ``key`` is a tuple
    of what the parse depends on besides tinctura's code and Python (the loader's)."""

    def __init__(self, folder: str):
        self.folder = os.path.abspath(folder)
        self.refused = _refusal(self.folder)  # "" when usable
        self.hits = self.misses = 0  # (tests)

    def __bool__(self) -> bool:
        return not self.refused

    def _path(self, key: tuple) -> str:
        named = repr((code_digest(), sys.version_info[:3], key))
        return os.path.join(self.folder, hashlib.sha1(named.encode()).hexdigest() + ".pickle")

    def get(self, key: tuple):
        """The value kept for ``key``, or None."""
        if self.refused:
            return None
        path = self._path(key)
        try:
            with open(path, "rb") as fh:
                value = pickle.load(fh)
            os.utime(path)  # recently used: kept by the pruning
        except Exception:  # noqa: BLE001 - absent, half-gone, or from an older layout
            self.misses += 1
            return None
        self.hits += 1
        return value

    def put(self, key: tuple, value) -> None:
        """Keep ``value`` for ``key`` (unless too large, or the folder cannot be written)."""
        if self.refused:
            return
        try:
            data = pickle.dumps(value, protocol=pickle.HIGHEST_PROTOCOL)
            if len(data) > MAX_ENTRY_BYTES:
                return
            handle, part = tempfile.mkstemp(dir=self.folder, suffix=".part")
            try:
                with os.fdopen(handle, "wb") as fh:
                    fh.write(data)
                os.replace(part, self._path(key))
            except BaseException:
                _remove(part)
                raise
            self._prune()
        except Exception:  # noqa: BLE001 - a full disk, a value that will not pickle: no cache
            return

    def _prune(self) -> None:
        entries = []
        for entry in os.scandir(self.folder):
            if entry.name.endswith((".pickle", ".part")):
                try:
                    entries.append((entry.stat().st_mtime, entry.path))
                except OSError:
                    continue
        entries.sort()
        for _, path in entries[:max(0, len(entries) - MAX_ENTRIES)]:
            _remove(path)


def _refusal(folder: str) -> str:
    """Why ``folder`` cannot hold the cache ("" when it can), made private if new."""
    try:
        os.makedirs(folder, mode=0o700, exist_ok=True)
        info = os.stat(folder)
    except OSError as exc:
        return f"{folder}: {exc.strerror or exc}"
    if not stat.S_ISDIR(info.st_mode):
        return f"{folder}: not a folder"
    if hasattr(os, "getuid") and info.st_uid != os.getuid():
        return f"{folder}: belongs to another user"
    if info.st_mode & (stat.S_IWGRP | stat.S_IWOTH):
        return f"{folder}: others can write to it"
    if not os.access(folder, os.W_OK | os.X_OK):
        return f"{folder}: cannot write to it"
    return ""


def _remove(path: str) -> None:
    try:
        os.unlink(path)
    except OSError:
        pass


def open_cache(folder: str | None) -> SheetCache | None:
    """A cache in ``folder`` (None or "": no cache)."""
    return SheetCache(folder) if folder else None
