"""CSS system colours (CSS Color 4, section 6.2) for a light and a dark used colour scheme.

Neither CSS Color 4 nor HTML fixes most of these values; a page's look depends on the
browser. Where the HTML Living Standard's rendering section suggests a value (its default
stylesheet: ``:link`` #0000EE, ``:visited`` #551A8B, active links #FF0000, ``mark`` yellow
on black), the light table uses it. All other values, and the whole dark table, are common
browser practice: what headless Chromium 156 on Linux computed for ``color: <keyword>`` under
``color-scheme: light`` and ``color-scheme: dark`` (measured for this project; other
browsers and platforms differ, notably for Highlight, AccentColor and ButtonFace).
"""
from __future__ import annotations


def _rgb(r, g, b, a=1.0):
    return (r / 255, g / 255, b / 255, a)


LIGHT = {
    "canvas": _rgb(255, 255, 255),
    "canvastext": _rgb(0, 0, 0),
    "linktext": _rgb(0, 0, 238),  # HTML rendering: :link #0000EE
    "visitedtext": _rgb(85, 26, 139),  # HTML rendering: :visited #551A8B
    "activetext": _rgb(255, 0, 0),  # HTML rendering: active links #FF0000
    "buttonface": _rgb(239, 239, 239),
    "buttontext": _rgb(0, 0, 0),
    "buttonborder": _rgb(0, 0, 0),
    "field": _rgb(255, 255, 255),
    "fieldtext": _rgb(0, 0, 0),
    "mark": _rgb(255, 255, 0),  # HTML rendering: mark { background: yellow }
    "marktext": _rgb(0, 0, 0),  # HTML rendering: mark { color: black }
    "graytext": _rgb(128, 128, 128),
    "highlight": _rgb(0, 65, 198, 0.8),
    "highlighttext": _rgb(255, 255, 255),
    "selecteditem": _rgb(25, 103, 210),
    "selecteditemtext": _rgb(255, 255, 255),
    "accentcolor": _rgb(0, 117, 255),
    "accentcolortext": _rgb(255, 255, 255),
}

DARK = {
    "canvas": _rgb(18, 18, 18),
    "canvastext": _rgb(255, 255, 255),
    "linktext": _rgb(158, 158, 255),
    "visitedtext": _rgb(208, 173, 240),
    "activetext": _rgb(255, 0, 0),
    "buttonface": _rgb(107, 107, 107),
    "buttontext": _rgb(255, 255, 255),
    "buttonborder": _rgb(255, 255, 255),
    "field": _rgb(59, 59, 59),
    "fieldtext": _rgb(255, 255, 255),
    "mark": _rgb(255, 255, 0),
    "marktext": _rgb(0, 0, 0),
    "graytext": _rgb(128, 128, 128),
    "highlight": _rgb(0, 65, 198, 0.8),
    "highlighttext": _rgb(255, 255, 255),
    "selecteditem": _rgb(153, 200, 255),
    "selecteditemtext": _rgb(59, 59, 59),
    "accentcolor": _rgb(0, 117, 255),
    "accentcolortext": _rgb(255, 255, 255),
}

# Deprecated system colours and the current keyword each behaves as (CSS Color 4, section
# 6.3; mapping recalled from memory, and headless Chromium 156 maps all 23 the same way in
# both schemes, measured for this project).
DEPRECATED = {
    "activeborder": "buttonborder",
    "activecaption": "canvas",
    "appworkspace": "canvas",
    "background": "canvas",
    "buttonhighlight": "buttonface",
    "buttonshadow": "buttonface",
    "captiontext": "canvastext",
    "inactiveborder": "buttonborder",
    "inactivecaption": "canvas",
    "inactivecaptiontext": "graytext",
    "infobackground": "canvas",
    "infotext": "canvastext",
    "menu": "canvas",
    "menutext": "canvastext",
    "scrollbar": "canvas",
    "threeddarkshadow": "buttonborder",
    "threedface": "buttonface",
    "threedhighlight": "buttonborder",
    "threedlightshadow": "buttonborder",
    "threedshadow": "buttonborder",
    "window": "canvas",
    "windowframe": "buttonborder",
    "windowtext": "canvastext",
}

TABLES = {"light": LIGHT, "dark": DARK}


def system_colour(name: str, scheme: str = "light"):
    """(r, g, b, a) for a system colour keyword (any case), or None if it is not one."""
    key = name.lower()
    key = DEPRECATED.get(key, key)
    return TABLES.get(scheme, LIGHT).get(key)
