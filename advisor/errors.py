"""Exceptions raised by the advisor package."""


class AdvisorError(ValueError):
    """An assessment or output request that cannot be met; the message names the bad value.

    ``argument`` names the offending argument (``"tolerance"``) when there is one, so a caller
    that took the value from elsewhere (a case file) can point at its own key.
    """

    def __init__(self, message: str, *, argument: str | None = None) -> None:
        super().__init__(message)
        self.argument = argument

    def __reduce__(self):  # keep ``argument`` when the error crosses to another process
        return (_rebuild, (type(self), str(self), self.argument))


def _rebuild(kind: type, message: str, argument: str | None) -> AdvisorError:
    return kind(message, argument=argument)


class ResultsFolderExistsError(AdvisorError):
    """The results folder exists and overwriting it was not asked for."""
