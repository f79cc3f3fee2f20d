"""The exit status, decided in one place."""
from __future__ import annotations

CLEAN = 0
FINDINGS = 1
ERROR = 2  # usage, configuration or internal error

FAIL_ON = ("error", "warning", "info", "never")
_RANK = {"error": 0, "warning": 1, "info": 2}


def at_or_above(severity: str, threshold: str) -> bool:
    """True when ``severity`` is as severe as ``threshold`` or more ("never": always False)."""
    if threshold == "never":
        return False
    return _RANK.get(severity, len(_RANK)) <= _RANK[threshold]


def failing(findings, fail_on: str = "error") -> list:
    """The findings that make a run fail at threshold ``fail_on``."""
    if fail_on not in FAIL_ON:
        raise ValueError(f"unknown --fail-on value {fail_on!r}")
    return [f for f in findings if at_or_above(f.severity, fail_on)]


def exit_status(findings=(), fail_on: str = "error", error: bool = False,
                failed: bool = False) -> int:
    """0 clean, 1 findings at or above ``fail_on`` (or ``failed``: a verdict decided by the
    caller, e.g. one colour pair), 2 when the run itself failed (``error``)."""
    if error:
        return ERROR
    if failed:
        return FINDINGS
    counts = getattr(findings, "counts", None)  # a FindingStore: no need to read it back
    if counts is not None:
        if fail_on not in FAIL_ON:
            raise ValueError(f"unknown --fail-on value {fail_on!r}")
        hit = any(n and at_or_above(severity, fail_on)
                  for severity, n in counts["severity"].items())
        return FINDINGS if hit else CLEAN
    return FINDINGS if failing(findings, fail_on) else CLEAN
