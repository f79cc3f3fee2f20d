import pytest

from tinctura.colour.convert import to_hex
from tinctura.engine import Options, Site


@pytest.fixture
def render(tmp_path):
    """Check one inline document; returns {(scheme, state, text): sample}."""

    def run(body: str, css: str = "", head: str = "", files: dict | None = None, **options):
        for name, content in (files or {}).items():
            target = tmp_path / name
            target.parent.mkdir(parents=True, exist_ok=True)
            target.write_text(content)
        html = (f"<!doctype html><html><head><style>{css}</style>{head}</head>"
                f"<body>{body}</body></html>")
        (tmp_path / "index.html").write_text(html)
        options.setdefault("states", False)
        result = Site(str(tmp_path), Options(**options)).check_page("index.html")
        run.result = result
        return {(s.scheme, s.state, s.text): s for s in result.samples}

    return run


def hexes(sample):
    return to_hex(sample.fg), to_hex(sample.bg)
