"""One function decides the exit status: 0 clean, 1 findings at or above --fail-on, 2 errors."""
import pytest

from tinctura.engine import Options
from tinctura.report.status import exit_status, failing
from tinctura.rules import run
from tinctura.rules.examples import make_sample


def findings(*severities):
    out = []
    for severity in severities:
        (f,) = run([make_sample("#999", "white")], Options())
        f.severity = severity
        out.append(f)
    return out


@pytest.mark.parametrize("severities, fail_on, status", [
    ((), "error", 0),
    (("error",), "error", 1),
    (("warning",), "error", 0),
    (("warning",), "warning", 1),
    (("error",), "warning", 1),
    (("info",), "warning", 0),
    (("info",), "info", 1),
    (("error", "warning", "info"), "never", 0),
])
def test_exit_status(severities, fail_on, status):
    assert exit_status(findings(*severities), fail_on) == status


def test_errors_win():
    assert exit_status(findings("error"), "error", error=True) == 2
    assert exit_status(error=True) == 2


def test_unknown_threshold_is_refused():
    with pytest.raises(ValueError):
        failing([], "fatal")
