"""A corpus of malformed pages and stylesheets, run end to end through ``tinctura check``:
each finishes with the expected exit status, without a traceback, and still finds the fault
planted beside the breakage (grey #999 text on white, 2.85:1, below 4.5:1: WCAG 2 formula)."""
import io

import pytest

from tinctura import cli

FAULT = '<p style="color:#999">Pump P-2 is on standby</p>'


def page(body, head=""):
    return f"<!doctype html><html><head>{head}</head><body>{body}{FAULT}</body></html>"


LINK = '<link rel="stylesheet" href="s.css">'
DEEP_PARENS = "p { color: rgb(" + "(" * 3000 + "0" + ")" * 3000 + "); }\n"
# (name, files, exit status): 1 = the planted fault found; 2 = also a page that could not be
# checked (an error, so the run fails); every case must name what went wrong without a traceback
CORPUS = [
    ("truncated html", {"index.html": page("<div><p>Valve<span>open").replace(
        "</body></html>", "<p><a href='x")}, 1),
    ("misnested html", {"index.html": page("<b><i>Tide</b></i><table><p>x</td></tr>")}, 1),
    ("invalid utf-8", {"index.html": page("<p>Salinit\xe9</p>").encode("latin-1")}, 1),
    ("utf-8 bom", {"index.html": b"\xef\xbb\xbf" + page("<p>Buoy</p>").encode()}, 1),
    ("utf-16 page", {"index.html": page("<p>Gauge</p>").encode("utf-16")}, 1),
    ("nul bytes", {"index.html": page("<p>Sea\x00wall</p>").encode()}, 1),
    ("empty page", {"index.html": b"", "ok.html": page("")}, 2),
    ("binary page", {"index.html": bytes(range(256)) * 40, "ok.html": page("")}, 2),
    ("unterminated block", {"index.html": page("", LINK), "s.css": "p { color: red"}, 1),
    ("unterminated string", {"index.html": page("", LINK),
                             "s.css": 'p::before { content: "abc\n}\np { color: #000 }'}, 1),
    ("unterminated comment", {"index.html": page("", LINK), "s.css": "p{} /* never closed"}, 1),
    ("invalid selectors", {"index.html": page("", LINK),
                           "s.css": "p:::x, ..a, [=], :nth-child(n+), p >> q { color: red }\n"
                                    "#a:has( { color: red }"}, 1),
    ("unknown at-rules", {"index.html": page("", LINK),
                          "s.css": "@frobnicate x { p { color: red } }\n@tide;\n@media {}"}, 1),
    ("var cycle", {"index.html": page('<p class="c">Cycle</p>', LINK),
                   "s.css": ":root{--a:var(--b);--b:var(--a)} .c{color:var(--a)}"}, 1),
    ("var bomb", {"index.html": page('<p class="c">Bomb</p>', LINK),
                  "s.css": ":root{--a0:#000;" + "".join(
                      f"--a{i}:var(--a{i-1}) var(--a{i-1}) var(--a{i-1}) var(--a{i-1});"
                      for i in range(1, 40)) + "} .c{color:var(--a39)}"}, 1),
    ("absurd numbers", {"index.html": page('<p class="n">Numbers</p>', LINK),
                        "s.css": ".n { font-size: 1e999px; opacity: -1e999; "
                                 "color: rgb(1e999 -1e999 NaN); font-weight: 1e999 }\n"
                                 "p { font-size: NaNpx; width: -0px; height: 1e-999px }"}, 1),
    ("out-of-gamut colours", {"index.html": page('<p class="g">Gamut</p>', LINK),
                              "s.css": ".g { color: color(display-p3 2 -1 0.5); "
                                       "background: oklch(2 5 1e999) }"}, 1),
    ("deeply nested parentheses", {"index.html": page("", LINK), "s.css": DEEP_PARENS}, 1),
    ("deeply nested at-rules", {"index.html": page("", LINK),
                                "s.css": "@media all {" * 2000 + "p{color:red}" + "}" * 2000},
     1),
    ("remote stylesheet", {"index.html": page("", '<link rel="stylesheet" '
                                                 'href="https://cdn.example.invalid/x.css">')},
     1),
    ("import cycle", {"index.html": page("", LINK), "s.css": '@import "s.css"; p{}'}, 1),
    ("stylesheet not utf-8", {"index.html": page("", LINK),
                              "s.css": b"p::before { content: '\xff\xfe' }"}, 1),
    ("deep nesting", {"index.html": page("<div>" * 6000 + "Deep" + "</div>" * 6000)}, 1),
]


@pytest.mark.parametrize("name, files, expected", CORPUS, ids=[c[0] for c in CORPUS])
def test_corpus_end_to_end(tmp_path, name, files, expected):
    for rel, data in files.items():
        path = tmp_path / rel
        if isinstance(data, bytes):
            path.write_bytes(data)
        else:
            path.write_text(data, encoding="utf-8")
    out, err = io.StringIO(), io.StringIO()
    status = cli.main(["check", str(tmp_path), "--group", "page", "--color", "never"],
                      stdout=out, stderr=err)
    text = out.getvalue() + err.getvalue()
    assert "Traceback" not in text and "internal error" not in text
    assert status == expected, text
    assert "Pump P-2 is on standby" in text  # the real fault is still found
