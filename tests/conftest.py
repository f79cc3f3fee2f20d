import sys
from pathlib import Path

# shared test helpers (wcag_reference) importable from every test folder
sys.path.insert(0, str(Path(__file__).resolve().parent))

import os  # noqa: E402
import tempfile  # noqa: E402

# the command line and the plugin keep parsed stylesheets between runs in the user's cache
# folder (extract/sheet_cache.py): the tests keep theirs in a folder of their own (child
# processes inherit it), never in the home folder of whoever runs them
if not os.environ.get("TINCTURA_CACHE_DIR"):
    os.environ["TINCTURA_CACHE_DIR"] = tempfile.mkdtemp(prefix="tinctura-test-cache-")
