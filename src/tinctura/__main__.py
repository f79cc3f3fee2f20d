"""``python -m tinctura``: the same as the ``tinctura`` command."""
from tinctura.cli import command

if __name__ == "__main__":
    command()
