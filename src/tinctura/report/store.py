"""A run's findings, each situation once and each occurrence as a small record on disk.

``tinctura check`` meets every finding before it can write the report (problems come first in
it, and group findings from every page). A site with one bad accent colour has hundreds of
thousands of findings of a few hundred *situations* (``tinctura.situations``): rule, scheme,
state, colours, font, causes. The store keeps one template finding per situation in memory and,
per page, only each occurrence's situation number and place (XPath, line, text, the ancestor an
inherited colour comes from), pickled to a temporary file as the page is judged, so memory does
not grow with the number of findings. The counts a summary needs are kept aside.

Reading back:

- ``pages()`` and ``occurrences(page)``: ``(situation, place)`` records, for outputs that write
  situations once (the compact JSON report);
- ``situations`` (list, by situation number) of template findings;
- ``by_page(page)`` and iteration: full ``Finding`` records rebuilt one page at a time, for
  outputs that want every finding (the flat JSON list, the text report by page).
"""
from __future__ import annotations

import pickle
import tempfile
from collections import Counter

from tinctura import situations as sit


class FindingStore:
    """Sequence-like: ``len``, iteration in run order, ``by_page(name)``; plus ``counts``."""

    def __init__(self):
        self._file = tempfile.TemporaryFile()
        self._where = {}  # page -> [(offset, length)], in run order
        self._size = 0
        self._ids = {}  # situations.finding_key -> situation number
        self.situations = []  # situation number -> template Finding (its first occurrence)
        self.occurrence_counts = []  # situation number -> occurrences
        self.counts = {"severity": Counter(), "rule": Counter(), "page": Counter(),
                       "scheme": Counter()}

    @classmethod
    def of(cls, findings) -> "FindingStore":
        """A store holding ``findings`` (a list, in run order), or ``findings`` if it is one."""
        if isinstance(findings, cls):
            return findings
        store = cls()
        pages: dict = {}
        for f in findings:
            pages.setdefault(f.sample.page, []).append(f)
        for page, items in pages.items():
            store.add(page, items)
        return store

    def situation_of(self, finding) -> tuple:
        """(situation number, whether it is new) of ``finding``."""
        key = sit.finding_key(finding)
        sid = self._ids.get(key)
        if sid is not None:
            return sid, False
        sid = self._ids[key] = len(self.situations)
        self.situations.append(finding)
        self.occurrence_counts.append(0)
        return sid, True

    def add(self, page: str, findings: list) -> list:
        """Keep ``page``'s findings; returns their situation numbers, in order."""
        if not findings:
            return []
        sids, records = [], []
        per_situation: Counter = Counter()
        for f in findings:
            sid, _new = self.situation_of(f)
            sids.append(sid)
            records.append((sid,) + sit.place(f))
            per_situation[sid] += 1
        data = pickle.dumps(records, protocol=pickle.HIGHEST_PROTOCOL)
        self._file.seek(0, 2)
        self._where.setdefault(page, []).append((self._file.tell(), len(data)))
        self._file.write(data)
        self._size += len(findings)
        counts = self.counts
        for sid, n in per_situation.items():
            t = self.situations[sid]
            self.occurrence_counts[sid] += n
            counts["severity"][t.severity] += n
            counts["rule"][t.rule] += n
            counts["scheme"][t.sample.scheme] += n
        counts["page"][page] += len(findings)
        return sids

    def occurrences(self, page: str) -> list:
        """``(situation number, xpath, line, text, inherited_from[, layer xpaths])`` records of
        ``page``, in run order."""
        out = []
        for offset, length in self._where.get(page, ()):
            self._file.seek(offset)
            out.extend(pickle.loads(self._file.read(length)))
        return out

    def by_page(self, page: str) -> list:
        templates = self.situations
        return [sit.rebuild(templates[r[0]], r[1:], page) for r in self.occurrences(page)]

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
