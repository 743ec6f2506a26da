"""The installed soakwise version, as the written files record it."""

from __future__ import annotations

from importlib.metadata import PackageNotFoundError, version


def soakwise_version(unknown: str = "unknown") -> str:
    """The installed package's version, or ``unknown`` when it is not installed (a source
    checkout run in place)."""
    try:
        return version("soakwise")
    except PackageNotFoundError:
        return unknown
