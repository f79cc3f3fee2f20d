"""A tiny built site of the invented Kestrow bell foundry's handbook, and the CLI runner.

Imported by the tests, fixture included: a conftest.py in this folder would shadow the other
folders' conftest modules that tests import by name."""
import io

import pytest

from tinctura import cli

# #949494 on white: 3.03:1 by the WCAG 2.2 contrast ratio formula (example_site/README.md
# lists the same pair), below AA's 4.5:1; #1a1a1a on white passes by far.
STYLE = "body{background:#ffffff;color:#1a1a1a}.faint{color:#949494}"


def page(body: str, title: str = "Kestrow handbook") -> str:
    return (f'<!doctype html><html lang="en"><head><meta charset="utf-8"><title>{title}</title>'
            f"<style>{STYLE}</style></head><body><main>{body}</main></body></html>")


CASTING = ('<h1>Casting the tenor bell</h1>\n'
           '<p class="faint">Let the mould cool for three days.</p>\n'
           '<p>Lift the bell with the overhead crane.</p>\n')
TUNING = ('<h1>Tuning</h1>\n'
          '<p>Turn the bell on the lathe.</p>\n'
          '<p class="faint">Strike note within two cents.</p>\n')


def call(*argv):
    out, err = io.StringIO(), io.StringIO()
    status = cli.main([str(a) for a in argv], stdout=out, stderr=err)
    return status, out.getvalue(), err.getvalue()


@pytest.fixture
def site(tmp_path, monkeypatch):
    """A site folder with two pages (one fault each); ``write(name, body)`` changes a page.
    The working directory is the project folder above it, with no configuration file."""
    root = tmp_path / "site"
    (root / "tuning").mkdir(parents=True)

    def write(name: str, body: str) -> None:
        (root / name).write_text(page(body), encoding="utf-8")

    write("index.html", CASTING)
    write("tuning/index.html", TUNING)
    monkeypatch.chdir(tmp_path)
    return Site(root, write)


class Site:
    def __init__(self, root, write):
        self.root, self.write = root, write

    def __str__(self) -> str:
        return str(self.root)
