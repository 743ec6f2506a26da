"""Exceptions raised by the advisor package."""


class AdvisorError(ValueError):
    """An assessment or output request that cannot be met; the message names the bad value."""


class ResultsFolderExistsError(AdvisorError):
    """The results folder exists and overwriting it was not asked for."""
