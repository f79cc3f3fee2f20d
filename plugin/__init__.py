"""The tinctura MkDocs plugin (entry point ``tinctura``)."""
from .config import TincturaConfig
from .plugin import TincturaPlugin

__all__ = ["TincturaConfig", "TincturaPlugin"]
