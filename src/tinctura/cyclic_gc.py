"""Pausing Python's cyclic garbage collector around work that makes no reference cycles.

A collection scans every container object allocated since the last one. Parsing a stylesheet
and checking a page keep tens of thousands of them alive until they end and make no cycles, so
a collection in the middle scans them all and frees nothing (on a 20 MB stylesheet that made
parsing quadratic; on pages, four or five collections a process on 200 pages, 10-30 ms each).
"""
from __future__ import annotations

import gc
from contextlib import contextmanager


@contextmanager
def no_collections():
    """No cyclic garbage collection inside; the collector as it was after (a caller's
    disabled collector stays so)."""
    enabled = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if enabled:
            gc.enable()
