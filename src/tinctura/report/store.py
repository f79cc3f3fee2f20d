"""A run's findings kept on disk, page by page, for the report written at the end.

``tinctura check`` meets every finding before it can write the report (problems come first in
it, and group findings from every page). Held in memory, findings would make a large site's
check grow with its number of pages; here each page's findings are pickled to a temporary file
as the page is judged, with the counts a summary needs kept aside, and read back one page at a
time while the report is written.
"""
from __future__ import annotations

import pickle
import tempfile
from collections import Counter


class FindingStore:
    """Sequence-like: ``len``, iteration in run order, ``by_page(name)``; plus ``counts``."""

    def __init__(self):
        self._file = tempfile.TemporaryFile()
        self._where = {}  # page -> [(offset, length)], in run order
        self._size = 0
        self.counts = {"severity": Counter(), "rule": Counter(), "page": Counter(),
                       "scheme": Counter()}

    def add(self, page: str, findings: list) -> None:
        if not findings:
            return
        data = pickle.dumps(findings, protocol=pickle.HIGHEST_PROTOCOL)
        self._file.seek(0, 2)
        self._where.setdefault(page, []).append((self._file.tell(), len(data)))
        self._file.write(data)
        self._size += len(findings)
        for f in findings:
            self.counts["severity"][f.severity] += 1
            self.counts["rule"][f.rule] += 1
            self.counts["page"][f.sample.page] += 1
            self.counts["scheme"][f.sample.scheme] += 1

    def by_page(self, page: str) -> list:
        out = []
        for offset, length in self._where.get(page, ()):
            self._file.seek(offset)
            out.extend(pickle.loads(self._file.read(length)))
        return out

    def pages(self) -> list:
        return list(self._where)

    def __len__(self) -> int:
        return self._size

    def __bool__(self) -> bool:
        return self._size > 0

    def __iter__(self):
        for page in self._where:
            yield from self.by_page(page)

    def close(self) -> None:
        self._file.close()
