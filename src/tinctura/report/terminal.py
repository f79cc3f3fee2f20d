"""The one place that decides whether terminal output is coloured, and writes it."""
from __future__ import annotations

import os

# SGR codes for the few styles the text report uses.
_STYLES = {
    "bold": "1",
    "dim": "2",
    "red": "31",
    "green": "32",
    "yellow": "33",
    "blue": "34",
    "magenta": "35",
    "cyan": "36",
}


def should_colour(stream, environ=None, choice: str = "auto") -> bool:
    """Colour or not, in this order: an explicit choice, NO_COLOR, FORCE_COLOR, TERM=dumb, tty.

    NO_COLOR and FORCE_COLOR count only when set to a non-empty value (no-color.org,
    force-color.org); without them, colour only on an interactive terminal that is not dumb.
    """
    if choice == "always":
        return True
    if choice == "never":
        return False
    env = os.environ if environ is None else environ
    if env.get("NO_COLOR"):
        return False
    if env.get("FORCE_COLOR"):
        return True
    if env.get("TERM") == "dumb":
        return False
    return is_terminal(stream)


def is_terminal(stream) -> bool:
    """True when ``stream`` is an interactive terminal (False for pipes, files, closed ones)."""
    isatty = getattr(stream, "isatty", None)
    try:
        return bool(isatty and isatty())
    except ValueError:  # closed stream
        return False


class TerminalWriter:
    """Writes lines to a stream, adding SGR colour codes only when colour was decided on."""

    def __init__(self, stream, colour: bool | None = None, environ=None, choice: str = "auto"):
        self.stream = stream
        self.colour = should_colour(stream, environ, choice) if colour is None else colour

    def markup(self, text: str, *styles: str) -> str:
        if not self.colour or not styles:
            return text
        codes = ";".join(_STYLES[s] for s in styles)
        return f"\x1b[{codes}m{text}\x1b[0m"

    def write(self, text: str, *styles: str) -> None:
        self.stream.write(self.markup(text, *styles))

    def line(self, text: str = "", *styles: str) -> None:
        self.stream.write(self.markup(text, *styles) + "\n")

    def flush(self) -> None:
        flush = getattr(self.stream, "flush", None)
        if flush:
            flush()
