"""``python -m tinctura``: the same as the ``tinctura`` command."""
from tinctura.cli import main

if __name__ == "__main__":
    raise SystemExit(main())
