"""Exceptions raised by the geometry package."""


class GeometryError(ValueError):
    """A section or mesh request that cannot be built; the message names the bad value.

    Attributes
    ----------
    argument : str or None
        The name of the offending argument (``"size"``, ``"order"``), so a caller that took
        the value from elsewhere (a case file) can point at its own key.
    """

    def __init__(self, message: str, *, argument: str | None = None) -> None:
        super().__init__(message)
        self.argument = argument

    def __reduce__(self):  # keep ``argument`` when the error crosses to another process
        return (_rebuild, (type(self), str(self), self.argument))


def _rebuild(kind: type, message: str, argument: str | None) -> GeometryError:
    return kind(message, argument=argument)
