"""Progress on a terminal: only on a TTY, never when quiet, ends with the time taken."""
import io

from tinctura import cli
from tinctura.report import progress


class FakeTTY(io.StringIO):
    def isatty(self):
        return True


class Clock:
    def __init__(self):
        self.now = 100.0

    def __call__(self):
        return self.now


def test_wanted_only_on_a_terminal_and_not_quiet():
    assert progress.wanted(FakeTTY())
    assert not progress.wanted(FakeTTY(), quiet=True)
    assert not progress.wanted(io.StringIO())


def test_lines_rate_time_left_and_time_taken():
    out, clock = FakeTTY(), Clock()
    bar = progress.Progress(out, total=40, clock=clock, interval=0)
    clock.now += 5
    bar.advance(10)
    assert out.getvalue() == "\rchecked 10 of 40 pages, 2.0 pages/s, about 15 s left"
    clock.now += 15
    bar.advance(30)  # the last page: the time taken replaces the line
    last = out.getvalue().split("\r")[-1]
    assert last.startswith("checked 40 pages in 20 s") and last.endswith("\n")
    bar.finish()  # nothing more
    assert out.getvalue().split("\r")[-1] == last


def test_disabled_writes_nothing():
    out = FakeTTY()
    bar = progress.Progress(out, total=3, enabled=False)
    bar.advance()
    bar.finish()
    assert out.getvalue() == ""


def test_durations():
    assert progress.duration(0.42) == "0.4 s"
    assert progress.duration(42) == "42 s"
    assert progress.duration(185) == "3 min 05 s"
    assert progress.duration(3720) == "1 h 02 min"


def test_check_shows_progress_on_a_terminal_only(tmp_path):
    page = ("<!doctype html><html lang=en><head><title>t</title></head>"
            "<body><p>Slack water at noon</p></body></html>")
    for name in ("a.html", "b.html"):
        (tmp_path / name).write_text(page)
    err = FakeTTY()
    assert cli.main(["check", str(tmp_path), "--jobs", "1"], io.StringIO(), err) == 0
    assert "\rchecked 1 of 2 pages, " in err.getvalue()
    assert err.getvalue().split("\r")[-1].startswith("checked 2 pages in ")
    plain = io.StringIO()
    out = io.StringIO()
    assert cli.main(["check", str(tmp_path), "--jobs", "1"], out, plain) == 0
    assert plain.getvalue() == "" and "checked 2" not in out.getvalue()
