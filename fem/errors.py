"""Exceptions raised by the solver package."""


class ModelError(ValueError):
    """A thermal model or solver request with an invalid value; the message names it.

    Attributes
    ----------
    argument : str or None
        The name of the offending argument or field (``"end_time"``, ``"emissivity"``), so a
        caller that took the value from elsewhere (a case file) can point at its own key.
    """

    def __init__(self, message: str, *, argument: str | None = None) -> None:
        super().__init__(message)
        self.argument = argument

    def __reduce__(self):  # keep ``argument`` when the error crosses to another process
        return (_rebuild_model_error, (type(self), str(self), self.argument))


def _rebuild_model_error(kind: type, message: str, argument: str | None) -> ModelError:
    return kind(message, argument=argument)


def shown(value, unit: str = "") -> str:
    """``value`` as messages show it: a real number with its unit, anything else as its
    repr."""
    import numbers

    if isinstance(value, numbers.Integral) and not isinstance(value, bool):
        return f"{int(value)} {unit}".rstrip()
    if isinstance(value, numbers.Real):
        return f"{float(value)!r} {unit}".rstrip()
    return repr(value)


class SolverError(RuntimeError):
    """The solver could not complete a step (Newton's method did not converge, the step fell
    below its minimum); the message gives the time, the step and the residual."""
