"""The plugin's options, validated by MkDocs (its messages name the option and the problem)."""
from __future__ import annotations

from mkdocs.config import base
from mkdocs.config import config_options as c


class PositiveInt(c.BaseConfigOption[int]):
    """A whole number of at least 1 (``true`` is not a number here, though Python says so)."""

    def __init__(self, default: int | None = None) -> None:
        super().__init__()
        self.default = default

    def run_validation(self, value: object) -> int:
        if isinstance(value, bool) or not isinstance(value, int):
            raise base.ValidationError(f"Expected a whole number, got {value!r}")
        if value < 1:
            raise base.ValidationError(f"Expected a number of at least 1, got {value}")
        return value


class Schemes(c.BaseConfigOption[list]):
    """Colour schemes that replace discovery: a list of {name, media, attributes}."""

    def run_validation(self, value: object) -> list:
        if value is None:
            return None
        from tinctura.extract.schemes import from_setting

        try:
            return from_setting(value)
        except ValueError as exc:
            raise base.ValidationError(str(exc)) from None


class Behaviours(c.BaseConfigOption[tuple]):
    """What the site's own scripts change before a reader sees a page: a list of
    {action, selector, value[, marker, script]} (tinctura.extract.behaviours)."""

    def run_validation(self, value: object) -> tuple:
        if value is None:
            return ()
        from tinctura.extract.behaviours import from_setting

        try:
            return from_setting(value)
        except ValueError as exc:
            raise base.ValidationError(str(exc)) from None


class TincturaConfig(base.Config):
    # `enabled` is deliberately absent: MkDocs 1.6 provides it for every plugin.
    level = c.Choice(("AA", "AAA"), default="AA")
    fail_on = c.Choice(("error", "warning", "never"), default="error")
    exclude = c.ListOfItems(c.Type(str), default=[])  # globs on the page's source path
    viewport_width = PositiveInt(default=1280)
    states = c.Type(bool, default=True)  # also check :hover / :focus / :focus-visible
    log_every = c.Type(bool, default=False)  # one log line per occurrence, not per problem
    schemes = Schemes()  # None: discover the schemes from each page
    jobs = c.Optional(PositiveInt())  # processes; unset: the number of cores
    behaviours = Behaviours()  # the site's own script behaviours, besides the themes' table
    theme_behaviours = c.Type(bool, default=True)  # apply the themes' script behaviours
