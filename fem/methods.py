"""The time-stepping methods, registered by name (the ``method`` of :func:`fem.solve`)."""

from __future__ import annotations

from .exponential_run import Exponential
from .multistep import BDF2, BackwardEuler, CrankNicolson
from .stepper import Stepper

METHODS: dict[str, Stepper] = {
    stepper.name: stepper for stepper in (CrankNicolson(), BDF2(), BackwardEuler(), Exponential())
}


def stepper_for(method: str) -> Stepper:
    """The stepper registered as ``method``."""
    return METHODS[method]
