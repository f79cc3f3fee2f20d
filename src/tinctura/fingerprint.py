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
    path = _INDEX.sub("", sample.xpath or "")
    return f"{path} {' '.join((sample.text or '').split())}"


def parts(finding) -> tuple:
    from tinctura.report import messages as m  # (the reports import this module)

    s = finding.sample
    fg, bg = m.finding_colours(finding)
    return (s.page, finding.rule, s.scheme, s.state, locator(s), m.colour(fg), m.colour(bg))


def digest(fields) -> str:
    data = "\x1f".join(str(x) for x in fields).encode("utf-8", "surrogatepass")
    return hashlib.blake2b(data, digest_size=12).hexdigest()


def assign(findings) -> list:
    """Set ``fingerprint`` on each finding of one page (in document order) and return them."""
    seen: dict = {}
    for f in findings:
        base = parts(f)
        n = seen.get(base, 0)
        seen[base] = n + 1
        f.fingerprint = digest(base if n == 0 else base + (n,))
    return findings
