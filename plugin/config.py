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


class LcLevels(c.BaseConfigOption[dict]):
    """APCA Lc per text tier for TC200/TC400: {body, content, headline, any} -> number."""

    def run_validation(self, value: object) -> dict | None:
        if value is None:
            return None
        if not isinstance(value, dict):
            raise base.ValidationError(f"Expected a mapping of text tier to Lc, got {value!r}")
        from tinctura.rules.appearance import check_lc_levels

        try:
            return check_lc_levels(value)
        except (TypeError, ValueError) as exc:
            raise base.ValidationError(str(exc)) from None


class Severity(c.BaseConfigOption[float]):
    """A colour-vision deficiency severity, 0 to 1."""

    def __init__(self, default: float = 1.0) -> None:
        super().__init__()
        self.default = default

    def run_validation(self, value: object) -> float:
        if isinstance(value, bool) or not isinstance(value, (int, float)) or not 0 <= value <= 1:
            raise base.ValidationError(f"Expected a number from 0 to 1, got {value!r}")
        return float(value)


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
    # colour-appearance rules (TC200, TC400, TC500)
    lc_levels = LcLevels()  # None: APCA's published levels (body 75, content 60, headline 45, any 30)
    cvd_severity = Severity(default=1.0)
    profiles = c.ListOfItems(c.Choice(("office", "dim", "daylight")), default=["daylight"])
    behaviours = Behaviours()  # the site's own script behaviours, besides the themes' table
    theme_behaviours = c.Type(bool, default=True)  # apply the themes' script behaviours
