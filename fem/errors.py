"""Exceptions raised by the solver package."""


class ModelError(ValueError):
    """A thermal model or solver request with an invalid value; the message names it."""


class SolverError(RuntimeError):
    """The solver could not complete a step (Newton's method did not converge, the step fell
    below its minimum); the message gives the time, the step and the residual."""
