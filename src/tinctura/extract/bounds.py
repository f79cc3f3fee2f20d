"""What tinctura agrees to read: files inside the site, of bounded size, that really are text.

Sites are written by other people and checked unattended in CI, so every file read (pages,
stylesheets, ``@import``) goes through ``read_inside``: its real path (symbolic links resolved)
must lie inside the site directory, it must be a regular file (a FIFO would block the run) and
not larger than the configured limit. ``not_text`` tells a binary file from a broken page.
"""
from __future__ import annotations

import os
import stat

# Defaults far above any real documentation site (the largest pages and stylesheets measured
# in real themes and generated API references are a few megabytes); each is configurable.
MAX_FILE_BYTES = 64 * 1024 * 1024
MAX_ELEMENTS = 500_000
MAX_RULES = 500_000

# Signatures of common binary formats that end up in a site directory (images, fonts,
# archives, documents, executables), first bytes as the formats define them.
_MAGIC = (
    (b"\x89PNG\r\n\x1a\n", "a PNG image"), (b"\xff\xd8\xff", "a JPEG image"),
    (b"GIF87a", "a GIF image"), (b"GIF89a", "a GIF image"), (b"RIFF", "a RIFF file (WebP, WAV)"),
    (b"%PDF-", "a PDF document"), (b"PK\x03\x04", "a ZIP archive"),
    (b"\x1f\x8b", "gzip-compressed data"), (b"BZh", "bzip2-compressed data"),
    (b"\xfd7zXZ\x00", "xz-compressed data"), (b"(\xb5/\xfd", "zstd-compressed data"),
    (b"\x7fELF", "an executable"), (b"wOFF", "a WOFF font"), (b"wOF2", "a WOFF2 font"),
    (b"\x00\x01\x00\x00", "a TrueType font"), (b"OTTO", "an OpenType font"),
    (b"\x00\x00\x01\x00", "an icon"),
)
_TEXT_BOMS = (b"\xef\xbb\xbf", b"\xff\xfe", b"\xfe\xff")
# control bytes that never occur in text (tab, newlines, form feed and escape are allowed)
_CONTROL = bytes(b for b in range(32) if b not in (9, 10, 12, 13, 27))


class Refused(Exception):
    """A file that is not read; the message says why, for a diagnostic. ``outside``: the
    file is not part of the site (a link out), which is a warning rather than an error."""

    def __init__(self, message: str, outside: bool = False):
        super().__init__(message)
        self.outside = outside


def real_root(root: str) -> str:
    return os.path.realpath(root)


def inside(path: str, root_real: str) -> bool:
    """True when ``path``, symbolic links resolved, lies inside ``root_real``."""
    real = os.path.realpath(path)
    return real == root_real or real.startswith(root_real.rstrip(os.sep) + os.sep)


def read_inside(path: str, root_real: str, max_bytes: int = MAX_FILE_BYTES) -> bytes:
    """The bytes of a site file, or ``Refused`` (outside the site, not a file, too large).

    ``OSError`` passes through for files that exist but cannot be read."""
    real = os.path.realpath(path)
    if not (real == root_real or real.startswith(root_real.rstrip(os.sep) + os.sep)):
        raise Refused("a symbolic link leading outside the site directory; not read",
                      outside=True)
    info = os.stat(real)
    if not stat.S_ISREG(info.st_mode):
        raise Refused("not a regular file; not read")
    if info.st_size > max_bytes:
        raise Refused(too_large(info.st_size, max_bytes))
    with open(real, "rb") as fh:
        # as large as the file (asking for max_bytes would allocate that much each time)
        data = fh.read(info.st_size + 1)
        if len(data) > info.st_size:  # it has grown since: on, up to the limit
            data += fh.read(max_bytes + 1 - len(data))
    if len(data) > max_bytes:
        raise Refused(too_large(len(data), max_bytes))
    return data


def too_large(size: int, limit: int) -> str:
    return (f"file of {size:,} bytes is larger than the limit of {limit:,} bytes "
            "(--max-file-size); not read")


def not_text(data: bytes) -> str | None:
    """Why ``data`` is not a text file (an image or archive named .html), or None.

    A page with a stray NUL or a bad byte is a broken page, still checked; a file whose first
    64 KiB are more than 5 % control bytes, or that starts with a binary signature, is not."""
    for magic, what in _MAGIC:
        if data.startswith(magic):
            return f"not HTML: the file is {what}"
    head = data[:65536]
    if not head or head.startswith(_TEXT_BOMS):  # UTF-16 text has many NULs
        return None
    control = len(head) - len(head.translate(None, _CONTROL))
    if control > 0.05 * len(head):
        return (f"not HTML: {control:,} of the first {len(head):,} bytes are control "
                "characters (a binary file?)")
    return None
