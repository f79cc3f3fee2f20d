"""tinctura: colour contrast and colour appearance checks for built documentation sites."""

__version__ = "0.1.0"
