import sys
from pathlib import Path

# shared test helpers (wcag_reference) importable from every test folder
sys.path.insert(0, str(Path(__file__).resolve().parent))
