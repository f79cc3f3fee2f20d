"""Progress of a long check on a terminal: pages done, pages per second, time left.

Written to stderr only when stderr is an interactive terminal and the run is not quiet, so
pipes, files and CI logs never see it; one line redrawn in place (carriage return), at most a
few times a second, and replaced at the end by the time the check took.
"""
from __future__ import annotations

import os
import time

from .terminal import is_terminal


def wanted(stream, quiet: bool = False) -> bool:
    return not quiet and is_terminal(stream)


def duration(seconds: float) -> str:
    """``0.4 s``, ``12 s``, ``3 min 05 s``, ``1 h 02 min``."""
    if seconds < 10:
        return f"{seconds:.1f} s"
    s = int(round(seconds))
    if s < 60:
        return f"{s} s"
    if s < 3600:
        return f"{s // 60} min {s % 60:02d} s"
    return f"{s // 3600} h {s % 3600 // 60:02d} min"


def count_pages(paths, options) -> int:
    """How many pages a run over ``paths`` will check (the engine's own listing)."""
    from tinctura import engine

    total = 0
    for path in paths:
        if os.path.isdir(path):
            total += len(engine.Site(path, options).pages())
        elif os.path.isfile(path):
            total += 1
    return total


def progress_for(args, options, stream) -> "Progress":
    """The progress of ``tinctura check``: shown on ``stream`` when it is a terminal and the
    run is not quiet (``args.quiet``); a Progress that writes nothing otherwise."""
    show = wanted(stream, getattr(args, "quiet", False))
    return Progress(stream, count_pages(args.paths, options) if show else 0, enabled=show)


class Progress:
    """Call ``advance`` per page; the last page (or ``finish``) writes the time taken."""

    def __init__(self, stream, total: int, enabled: bool = True, clock=time.monotonic,
                 interval: float = 0.25):
        self.stream = stream
        self.total = total
        self.enabled = enabled
        self.clock = clock
        self.interval = interval
        self.done = 0
        self.start = clock()
        self._last = None  # when the line was last drawn
        self._width = 0  # characters drawn, to blank a shorter line
        self._finished = False

    def advance(self, pages: int = 1) -> None:
        self.done += pages
        if not self.enabled or self._finished:
            return
        if self.done >= self.total:
            self.finish()
            return
        now = self.clock()
        if self._last is None or now - self._last >= self.interval:
            self._last = now
            self._draw(self.line(now))

    def line(self, now: float) -> str:
        elapsed = max(now - self.start, 1e-9)
        rate = self.done / elapsed
        text = f"checked {self.done:,} of {self.total:,} pages, {rate:,.1f} pages/s"
        if self.done and self.total > self.done:
            text += f", about {duration((self.total - self.done) / rate)} left"
        return text

    def finish(self) -> None:
        if not self.enabled or self._finished:
            return
        self._finished = True
        elapsed = self.clock() - self.start
        self._draw(f"checked {self.done:,} pages in {duration(elapsed)}")
        self.stream.write("\n")

    def _draw(self, text: str) -> None:
        pad = max(self._width - len(text), 0)
        self.stream.write("\r" + text + " " * pad)
        self._width = len(text)
        flush = getattr(self.stream, "flush", None)
        if flush:
            flush()
