"""Media queries evaluated for a 1280 x 900 screen (W3C Media Queries Level 4: media types,
`not`/`only`, `and`/`or`, min-/max- prefixes, range syntax, em = the initial font size 16px)."""
import pytest

from tinctura.extract.media import Environment

LIGHT = Environment(1280)
DARK = Environment(1280, scheme_media=(("prefers-color-scheme", "dark"),))


@pytest.mark.parametrize("query, light, dark", [
    ("", True, True),
    ("screen", True, True),
    ("print", False, False),
    ("not print", True, True),
    ("only screen and (min-width: 60em)", True, True),        # 60em = 960px
    ("screen and (max-width: 76.1875em)", False, False),       # 1219px
    ("(prefers-color-scheme: dark)", False, True),
    ("screen and (prefers-color-scheme: light), print", True, False),
    ("(width >= 600px)", True, True),
    ("(400px <= width < 700px)", False, False),
    ("(min-width: 30em) and (max-width: 89.9375em)", True, True),
    ("(hover) and (pointer: fine)", True, True),
    ("not all and (min-resolution: 2dppx)", True, True),
    ("(-webkit-min-device-pixel-ratio: 2)", False, False),
    ("(unknown-feature: 1)", False, False),
    ("((min-width: 2000px) or (orientation: landscape))", True, True),
])
def test_media_queries(query, light, dark):
    assert (LIGHT.matches(query), DARK.matches(query)) == (light, dark)
