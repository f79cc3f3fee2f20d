"""Stylesheets parsed ahead, in another process, while MkDocs is still converting Markdown.

MkDocs converts every page's Markdown before it renders the first one, on one core; the
plugin's first page then waits for the theme's stylesheets to be parsed (0.1 s for
mkdocs-material's, 0.19 s for MkDocs' own Bootstrap theme). Their sources are known before
the Markdown starts (``files``: each static file's source and destination), so a forked
process parses them meanwhile on an idle core and leaves each result pickled in a private
folder. The loader takes one only for the same bytes (SHA-1 of the file in the site, compared
with that of the source read): a stylesheet that a plugin rewrote on its way to the site, or
one the process has not reached, is parsed as before. Loading a pickle takes a twentieth of
parsing (measured: 5 ms against 96 ms for mkdocs-material's three sheets).
"""
from __future__ import annotations

import hashlib
import os
import pickle
import shutil
import tempfile


class Prepared:
    """The parsing process and its folder. ``take(path, digest)`` gives ``(parsed sheet,
    diagnostics)`` for a site file, or None; ``close()`` ends the process and removes the
    folder."""

    def __init__(self, process, folder: str, names: dict):
        self.process = process
        self.folder = folder
        self.names = names  # site path -> file name in the folder
        self.taken = 0  # sheets the loader did not parse (tests)

    def take(self, path: str, digest: bytes):
        """Only a sheet written already: the loader never waits. Handing a sheet over costs
        from a tenth of parsing it (mkdocs-material's: 8 ms to pickle, 5 ms to unpickle, 96 ms
        to parse) to a half (a 3 MB theme: 0.64 s, 0.60 s and 2.4 s), so waiting for one the
        process has not finished can cost more than parsing it here (that theme and 30 pages:
        a build of 4.2 s against 3.8 s when the loader waited). Other bytes leave it for a
        later read: the file read while MkDocs rewrote it, half written."""
        key = os.path.normpath(path)
        name = self.names.get(key)
        if name is None:
            return None
        try:
            with open(os.path.join(self.folder, name), "rb") as fh:
                written = pickle.load(fh)
        except Exception:  # not written (yet), or unreadable: parse it here
            written = None
        if written is not None and written[0] != digest:
            return None
        del self.names[key]
        if written is None:  # not parsed there
            return None
        self.taken += 1
        return written[1], written[2]

    def close(self) -> None:
        """End the process (it may still be parsing sheets no page has asked for) and remove
        the folder."""
        if self.process.is_alive():
            self.process.terminate()
        self.process.join()
        shutil.rmtree(self.folder, ignore_errors=True)


def start(loader, sources) -> Prepared | None:
    """Parse ``sources`` (``(path in the site, path of the source)`` pairs) in a forked process
    as ``loader`` would parse the site files; None where processes cannot be forked."""
    import multiprocessing

    from ..engine import can_fork  # (the engine imports this package: not at module level)

    if not can_fork():
        return None
    pairs = [(os.path.normpath(site), source) for site, source in sources]
    names = {site: f"{n}.pickle" for n, (site, _) in enumerate(pairs)}
    folder = tempfile.mkdtemp(prefix="tinctura-sheets-")  # private (mode 0700)
    process = multiprocessing.get_context("fork").Process(
        target=_parse_all, args=(loader, pairs, names, folder), daemon=True)
    try:
        process.start()
    except OSError:
        shutil.rmtree(folder, ignore_errors=True)
        return None
    return Prepared(process, folder, names)


def _parse_all(loader, pairs, names, folder) -> None:
    """Each sheet's ``(SHA-1 of the source, parsed sheet, diagnostics)``, or None when it was
    not parsed (too large: the loader refuses it with its own diagnostic; unreadable)."""
    for site, source in pairs:
        result = None
        try:
            with open(source, "rb") as fh:
                data = fh.read(loader.max_file_bytes + 1)
            if len(data) <= loader.max_file_bytes:
                digest = hashlib.sha1(data).digest()
                handed, data = [data], None
                result = (digest,) + loader.parse_data(handed, site, digest)
        except Exception:  # noqa: BLE001 - the loader parses it itself
            result = None
        try:
            _write(os.path.join(folder, names[site]), result)
        except Exception:  # noqa: BLE001 - (a sheet pickle cannot write, say): not this one
            _write(os.path.join(folder, names[site]), None)


def _write(path: str, value) -> None:
    """Written whole under another name, then renamed: ``take`` never reads half a file."""
    part = path + ".part"
    with open(part, "wb") as fh:
        pickle.dump(value, fh, protocol=pickle.HIGHEST_PROTOCOL)
    os.replace(part, path)
