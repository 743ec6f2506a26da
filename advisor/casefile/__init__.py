"""Case files: TOML tables read into a :class:`Case`, with key paths, lines and suggestions in
every error; quantities with units; the starting cases of ``soakwise new``."""

from .case import Case, CaseError, load_case

__all__ = ["Case", "CaseError", "load_case"]
