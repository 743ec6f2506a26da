"""Exceptions raised by the solver package."""


class ModelError(ValueError):
    """A thermal model or solver request with an invalid value; the message names it."""
