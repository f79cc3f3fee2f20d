"""A finding's stable identity: the same fault gets the same fingerprint in the next build.

Built from the page, the rule, the colour scheme, the state, a structural locator and the two
colours judged. The locator is the element's tag path with sibling indexes removed
(``/html/body/div/main/article/p``) and its text with whitespace collapsed: adding a paragraph,
a table or a page elsewhere changes no locator, and neither do line numbers. Equal findings on
one page (same path, text and colours) are told apart by their order among themselves.
Pure: findings in, strings out.
"""
from __future__ import annotations

import hashlib
import re

VERSION = "v1"  # part of the SARIF partialFingerprints key; change when the recipe changes
_INDEX = re.compile(r"\[\d+\]")


def locator(sample) -> str:
    """Tag path without sibling indexes, then the text with whitespace collapsed."""
    return _locator(sample.xpath, sample.text)


def _locator(xpath, text) -> str:
    path = _INDEX.sub("", xpath or "")
    return f"{path} {' '.join((text or '').split())}"


def situation_parts(finding) -> tuple:
    """What every occurrence of ``finding``'s situation shares: rule, scheme, state, colours."""
    from tinctura.report import messages as m  # (the reports import this module)

    s = finding.sample
    fg, bg = m.finding_colours(finding)
    return (finding.rule, s.scheme, s.state, m.colour(fg), m.colour(bg))


def parts(finding) -> tuple:
    return _parts(finding.sample.page, situation_parts(finding), finding.sample.xpath,
                  finding.sample.text)


def _parts(page, shared, xpath, text) -> tuple:
    rule, scheme, state, fg, bg = shared
    return (page, rule, scheme, state, _locator(xpath, text), fg, bg)


def digest(fields) -> str:
    data = "\x1f".join(str(x) for x in fields).encode("utf-8", "surrogatepass")
    return hashlib.blake2b(data, digest_size=12).hexdigest()


def assign(findings) -> list:
    """Set ``fingerprint`` on each finding of one page (in document order) and return them."""
    for f, value in zip(findings, _numbered(parts(f) for f in findings)):
        f.fingerprint = value
    return findings


def of_records(page: str, records, templates) -> list:
    """The fingerprints of one page's store records ``(situation, xpath, line, text, ...)``
    (``templates``: situation -> template finding), without building the findings: what
    ``assign`` gives the same findings."""
    shared: dict = {}

    def fields(r):
        common = shared.get(r[0])
        if common is None:
            common = shared[r[0]] = situation_parts(templates[r[0]])
        return _parts(page, common, r[1], r[3])

    return _numbered(fields(r) for r in records)


def _numbered(bases) -> list:
    """Digests of ``bases``; equal ones on a page are told apart by their order."""
    seen: dict = {}
    out = []
    for base in bases:
        n = seen.get(base, 0)
        seen[base] = n + 1
        out.append(digest(base if n == 0 else base + (n,)))
    return out
