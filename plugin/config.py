"""The plugin's options: every setting of ``tinctura.config.SETTINGS`` that the plugin takes,
validated by the same checks as the configuration file and the command line (MkDocs' message
names the option; ours says what is wrong)."""
from __future__ import annotations

from mkdocs.config import base
from mkdocs.config import config_options as c

from tinctura import config as settings


class FromTable(c.BaseConfigOption):
    """One option of the table: its check, its default."""

    def __init__(self, setting: settings.Setting) -> None:
        super().__init__()
        self.setting = setting
        self.default = setting.default

    def run_validation(self, value: object):
        try:
            return self.setting.check(value)
        except ValueError as exc:
            raise base.ValidationError(str(exc)) from None


# `enabled` is deliberately absent: MkDocs 1.6 provides it for every plugin.
TableConfig = type("TableConfig", (base.Config,), {
    s.name: FromTable(s) for s in settings.SETTINGS if "plugin" in s.where})


class TincturaConfig(TableConfig):
    """Options of the table (inherited); an option only the plugin has may be added here."""
