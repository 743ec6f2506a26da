"""Exceptions raised by the geometry package."""


class GeometryError(ValueError):
    """A section or mesh request that cannot be built; the message names the bad value."""
