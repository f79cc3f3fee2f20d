import os

import pytest


@pytest.fixture(scope="session")
def colour_science():
    """colour-science, imported only by the tests that compare with it (it costs ~0.5 s)."""
    os.environ.setdefault("COLOUR_SCIENCE__FILTER_USAGE_WARNINGS", "True")
    import colour

    return colour
