"""The ``baseline`` output: the current findings (suppressed ones aside) as a baseline file.

``--format baseline:FILE`` (or the plugin's ``report: [baseline:FILE]``) writes what
``tinctura check --write-baseline FILE`` writes; with ``--baseline`` in the same run it
gives the updated baseline (unchanged and new findings; gone ones dropped).
"""
from __future__ import annotations

from tinctura import baseline

from .base import Formatter


class BaselineFormatter(Formatter):
    wants_fingerprints = True
    marked = True

    def __init__(self, stream, header):
        super().__init__(stream, header)
        self.findings: list = []

    def page(self, page, findings) -> None:
        self.findings.extend(f for f in findings if not f.suppressed)

    def stop(self, summary) -> None:
        self.stream.write(baseline.dumps(self.findings, self.header.version))
