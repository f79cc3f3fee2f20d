"""Browser tests: headless Debian Chromium is the reference engine for the cascade and painting.

Every test in this directory is marked ``browser``; the directory is skipped with a message when
Chromium or chromedriver is missing (install Debian's ``chromium`` and ``chromium-driver``).
"""
from __future__ import annotations

import importlib.util
import os
import sys
from pathlib import Path

import pytest

HERE = Path(__file__).resolve().parent
if str(HERE) not in sys.path:  # the harness is a script as well as a library
    sys.path.insert(0, str(HERE))

CHROMIUM = "/usr/bin/chromium"
CHROMEDRIVER = "/usr/bin/chromedriver"
MISSING = [p for p in (CHROMIUM, CHROMEDRIVER) if not os.access(p, os.X_OK)]
if importlib.util.find_spec("selenium") is None:
    MISSING.append("the selenium package")


def pytest_collection_modifyitems(config, items):
    for item in items:
        if HERE in Path(str(item.fspath)).resolve().parents:
            item.add_marker(pytest.mark.browser)
            if MISSING:
                item.add_marker(pytest.mark.skip(
                    reason=f"Chromium reference engine not installed: missing {', '.join(MISSING)} "
                           "(apt-get install chromium chromium-driver; pip install selenium)"))
