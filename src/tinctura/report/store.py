"""A run's findings, each situation once and each occurrence as a small record on disk.

``tinctura check`` meets every finding before it can write the report (problems come first in
it, and group findings from every page). A site with one bad accent colour has hundreds of
thousands of findings of a few hundred *situations* (``tinctura.situations``): rule, scheme,
state, colours, font, causes. The store keeps one template finding per situation in memory and,
per page, only each occurrence's situation number and place (XPath, line, text, the ancestor an
inherited colour comes from), pickled to a temporary file as the page is judged, so memory does
not grow with the number of findings. The counts a summary needs are kept aside. A page checked
again (``replace``, ``mkdocs serve``) leaves its earlier records unused in the file; the file is
compacted once unused bytes outweigh used ones (and 16 MB), so a session of a whole day does not
grow it without bound.

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
from tinctura.palette import report_page

from .outputs import add_situation_counts


COMPACT_AFTER_BYTES = 16 << 20  # unused bytes in a store's file before it is compacted


class FindingStore:
    """Sequence-like: ``len``, iteration in run order, ``by_page(name)``; plus ``counts``."""

    def __init__(self, keep_records: bool = True, hand_on: bool = True):
        self._file = tempfile.TemporaryFile()
        # False: no output reads packed pages' records back, only what was written of them
        # for a report as they were judged (``engine.Options.keep_records``): those records
        # are counted, not written to the file
        self.keep_records = keep_records
        # False: pages are never handed on packed (``page_findings``): their occurrences per
        # template are not kept (5 KB a page at 1,000 pages)
        self.hand_on = hand_on
        # page -> [(offset, length, template mapping or None, encoded length or None,
        # occurrences per template index in first-seen order)], in run order
        self._where = {}
        self._uids = {}  # page -> uids of the fragment entries its packed records name
        self._size = 0
        self._live = 0  # bytes of the file that pages still use (the rest: pages checked again)
        self._ids = {}  # situations.finding_key -> situation number
        # a template's name in a worker (situations._shipped) -> (number, its key object)
        self._by_name = {}
        self.situations = []  # situation number -> template Finding (its first occurrence)
        self.keys = []  # situation number -> its situations.finding_key
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
        for f in findings:  # site-level findings under the whole site, as a run stores them
            pages.setdefault(report_page(f), []).append(f)
        for page, items in pages.items():
            store.add(page, items)
        return store

    def situation(self, key, template) -> int:
        """The number of the situation ``key`` (``situations.finding_key``), first seen as
        ``template``."""
        sid = self._ids.get(key)
        if sid is None:
            sid = self._ids[key] = len(self.situations)
            self.situations.append(template)
            self.keys.append(key)
            self.occurrence_counts.append(0)
        return sid

    def add(self, page: str, findings) -> list:
        """Keep ``page``'s findings (a list, or ``situations.PageFindings``); returns their
        records ``(situation number,) + situations.place``, in order (None for packed
        findings, kept unread)."""
        if isinstance(findings, sit.PageFindings) and findings.packed() is not None:
            self.put_packed(page, findings, self.numbers(findings))
            return None
        records = self.records_of(findings)
        self.put(page, records)
        return records

    def records_of(self, findings) -> list:
        """The records of ``findings`` (numbering their new situations), not yet kept."""
        if not findings:
            return []
        if not isinstance(findings, sit.PageFindings):
            return [(self.situation(sit.finding_key(f), f),) + sit.place(f) for f in findings]
        # numbered in order of first occurrence, as a list of the same findings would be
        built = findings.built()  # findings already built may carry the gate's marks
        if built:
            local = [None] * len(findings.templates)
            records = []
            for n, r in enumerate(findings.records):
                sid = local[r[0]]
                if sid is None:
                    sid = local[r[0]] = self.situation(findings.keys[r[0]],
                                                       findings.templates[r[0]])
                records.append((sid,) + sit.place(built[n]))
            return records
        local = {}
        for r in findings.records:  # first occurrences in order: numbering as above
            if r[0] not in local:
                local[r[0]] = self.situation(findings.keys[r[0]], findings.templates[r[0]])
        if all(k == v for k, v in local.items()):  # a store's first page: numbers unchanged
            return list(findings.records)
        return [(local[r[0]],) + r[1:] for r in findings.records]

    def put(self, page: str, records: list) -> None:
        """Keep ``page``'s records (``records_of``), after what is kept already."""
        if records:
            data = pickle.dumps(records, protocol=pickle.HIGHEST_PROTOCOL)
            per_situation = Counter(r[0] for r in records)
            self._write(page, data, None, per_situation, len(records), None, per_situation)

    def numbers(self, findings) -> list:
        """Template index -> situation number for packed ``findings`` (``PageFindings.pack``),
        numbering new situations in their order of first occurrence, as ``records_of``."""
        data, counts, first = findings.packed()
        local = [None] * len(counts)
        names, by_name = findings.names, self._by_name
        for n in first:
            key = findings.keys[n]
            hit = by_name.get(names[n]) if names is not None else None
            # a name stands for the key object received with it; a later worker with an
            # earlier one's pid may name another situation so, and is looked up by key
            if hit is not None and hit[1] is key:
                local[n] = hit[0]
                continue
            local[n] = self.situation(key, findings.templates[n])
            if names is not None:
                by_name[names[n]] = (local[n], key)
        return local

    def put_packed(self, page: str, findings, numbers: list) -> Counter:
        """Keep packed ``findings`` as they came (their records are not read): ``numbers``
        (``numbers``) turns their template indexes into situation numbers when read back.
        Returns the occurrences per situation."""
        data, counts, first = findings.packed()
        per_situation = Counter()  # (two templates may name one situation: numbered twice
        for n in first:           # on a page whose situation ids were renewed meanwhile)
            per_situation[numbers[n]] += counts[n]
        encoded = findings.encoded.encode("utf-8") if findings.encoded is not None else None
        if data is None or not self.keep_records:
            # counted only (``PageFindings.pack``): no output reads them back; a report's
            # text written as they were judged is kept
            if encoded is None:
                self._where.setdefault(page, [])
                self._count(page, per_situation, sum(counts), 1)
                return per_situation
            data = b""
        uids = findings.entry_uids if data else ()
        if uids:  # (a page may be kept in several parts)
            self._uids[page] = self._uids.get(page, ()) + uids
        mapping = None if all(numbers[n] == n for n in first) else tuple(numbers)
        self._write(page, data, mapping, per_situation, sum(counts), encoded,
                    {n: counts[n] for n in first} if self.hand_on else None)
        return per_situation

    def _write(self, page: str, data: bytes, mapping, per_situation, size: int,
               encoded: bytes | None = None, per_template=None) -> None:
        """Keep ``data`` (pickled records) and, after it, ``encoded`` (``encoded``);
        ``per_template``: occurrences per template index of ``data``, in first-seen order."""
        self._file.seek(0, 2)
        self._where.setdefault(page, []).append(
            (self._file.tell(), len(data), mapping, None if encoded is None else len(encoded),
             per_template))
        self._file.write(data)
        self._live += len(data)
        if encoded is not None:
            self._file.write(encoded)
            self._live += len(encoded)
        self._count(page, per_situation, size, 1)

    def _count(self, page: str, per_situation, size: int, sign: int) -> None:
        counts = self.counts
        add_situation_counts(counts, page, per_situation, size, self.situations, sign)
        for sid, n in per_situation.items():
            self.occurrence_counts[sid] += sign * n
        self._size += sign * size
        for counter in counts.values():  # a page checked again may have lost its findings
            for name in [k for k, v in counter.items() if v <= 0]:
                del counter[name]

    def entry_uids(self) -> set:
        """The uids of the fragment entries that the pages kept name
        (``situations.keep_entries``)."""
        return set().union(*self._uids.values())

    def replace(self, page: str, findings) -> list:
        """``add`` for a page checked again (``mkdocs serve``): its earlier findings go."""
        self.discard(page)
        return self.add(page, findings)

    def discard(self, page: str) -> None:
        if page in self._where:
            records = self.occurrences(page)
            self._count(page, Counter(r[0] for r in records), len(records), -1)
            self._live -= sum(length + (size or 0) for _, length, _, size, _ in self._where[page])
            del self._where[page]
            self._uids.pop(page, None)
            self._file.seek(0, 2)
            if self._file.tell() - self._live > max(self._live, COMPACT_AFTER_BYTES):
                self._compact()

    def _compact(self) -> None:
        """Copy the bytes pages still use to a new file: a ``mkdocs serve`` session that
        checks pages again all day would otherwise grow its file by every page checked.
        Done when the unused bytes outweigh the used ones, so copying costs at most what
        was written."""
        new = tempfile.TemporaryFile()
        for page, entries in self._where.items():
            moved = []
            for offset, length, mapping, size, per_template in entries:
                self._file.seek(offset)
                moved.append((new.tell(), length, mapping, size, per_template))
                new.write(self._file.read(length + (size or 0)))
            self._where[page] = moved
        self._file.close()
        self._file = new

    def occurrences(self, page: str, met=None) -> list:
        """``(situation number, xpath, line, text, inherited_from[, layer xpaths])`` records of
        ``page``, in run order. ``met(block, count)`` for each replayed block kept as one (a
        packed page's: ``situations.expand``), ``block`` ``(the entries' uid, XPath of the
        place, situation numbers)`` and ``count`` its records: True leaves them out; a list
        gets them too."""
        out = []
        for offset, length, mapping, _, _ in self._where.get(page, ()):
            if not length:  # counted only, with a report's text (``put_packed``)
                continue
            self._file.seek(offset)
            records = sit.unpack(self._file.read(length), None, _met_mapped(met, mapping))
            if mapping is not None:  # kept as a worker packed them: its template indexes
                records = [(mapping[r[0]],) + r[1:] for r in records]
            out.extend(records)
        return out

    def encoded(self, page: str):
        """``(text, mapping)``: ``page``'s records as the worker that packed them wrote them
        for a report (``situations.PageFindings.encoded``), with the template index -> situation
        number ``mapping`` (None: unchanged); None when they were not written so (or the page
        was kept in several parts)."""
        entries = self._where.get(page, ())
        if len(entries) != 1 or entries[0][3] is None:
            return None
        offset, length, mapping, size, _ = entries[0]
        self._file.seek(offset + length)
        return self._file.read(size).decode("utf-8"), mapping

    def page_findings(self, page: str):
        """``page``'s findings as ``situations.PageFindings`` (built on use), to hand them
        on to another store: the MkDocs plugin keeps each page's findings here between
        ``mkdocs serve`` rebuilds and gates them into a new store for each build's reports.
        A page kept in one part is handed on packed, as a worker sends it: the other store
        can then keep and count its records without reading them (``put_packed``)."""
        entries = self._where.get(page, ())
        if len(entries) != 1 or not entries[0][4]:  # (no findings: nothing to hand on)
            return sit.PageFindings(page, self.situations, self.keys, self.occurrences(page))
        offset, length, mapping, size, per_template = entries[0]
        self._file.seek(offset)
        data = self._file.read(length)
        encoded = self._file.read(size).decode("utf-8") if size is not None else None
        templates, keys = self.situations, self.keys  # template index = situation number
        if mapping is not None:  # kept as a worker packed it: its own template indexes
            templates = [None if m is None else self.situations[m] for m in mapping]
            keys = [None if m is None else self.keys[m] for m in mapping]
        return sit.PageFindings(page, templates, keys, None,
                                sit.packed_form(data, per_template, len(templates)), encoded)

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


def _met_mapped(met, mapping):
    """``FindingStore.occurrences``' ``met`` for ``situations.expand``: a block named by a uid
    (not by its entries), with its numbers as the run's situation numbers; the records given
    to keep are renumbered as the page's are."""
    if met is None:
        return None

    def asked(named, base, numbers, entries):
        if type(named) is not tuple:
            return None
        got = met((named, base, tuple(numbers) if mapping is None
                   else tuple(mapping[n] for n in numbers)), len(entries))
        if got is True or got is None or mapping is None:
            return got
        return _Renumbered(got, mapping)
    return asked


class _Renumbered:
    """A list's ``extend`` through a worker's numbering (``_met_mapped``)."""

    __slots__ = ("into", "mapping")

    def __init__(self, into: list, mapping):
        self.into, self.mapping = into, mapping

    def extend(self, records) -> None:
        self.into.extend((self.mapping[r[0]],) + r[1:] for r in records)
