"""The contract between the driver and its time-stepping methods.

The driver (:func:`fem.solve`) checks the arguments, assembles the system, records the
initial state and hands a :class:`RunContext` to the method registered under the requested
name (:mod:`fem.methods`). The method marches to the end (or the stop), recording into the
context's recorder as it goes, and returns a :class:`March`: what the run did, for the
statistics and the run's checks.
"""

from __future__ import annotations

from abc import ABC, abstractmethod
from collections.abc import Callable
from dataclasses import asdict, dataclass
from functools import cached_property
from typing import TYPE_CHECKING, ClassVar

import numpy as np

from .events import StopWhen
from .linalg import Cost, LinearAlgebra
from .recorder import HistoryRecorder
from .system import ConductionSystem, inner

if TYPE_CHECKING:
    from .model import ThermalModel

Checkpoint = Callable[[float, int, Callable[[], dict]], None]
"""``checkpoint(time, steps, snapshot)``, offered after every step of a resumable method:
``snapshot()`` returns the run's state (nested dicts of numbers, None, strings and arrays), to
be kept and handed back to :func:`fem.solve` as ``resume`` to continue the run exactly."""


@dataclass(frozen=True)
class RunControls:
    """Everything a run needs to know about how to step, in s and K."""

    end_time: float
    method: str
    adaptive: bool
    step: float
    tolerance: float
    min_step: float
    max_step: float
    output_times: tuple[float, ...]
    startup_steps: int
    stop: StopWhen | None
    newton_tolerance: float
    max_newton_iterations: int


@dataclass
class RunContext:
    """What a method needs to march.

    Attributes
    ----------
    system : ConductionSystem
    controls : RunControls
    algebra : LinearAlgebra
        Factorisations and their cache; counts into ``cost``.
    recorder : HistoryRecorder
        Holds the initial state already.
    cost : Cost
    initial : ndarray
        The field at t = 0, fixed temperatures imposed, °C.
    breakpoints : tuple of float
        Times in (0, end_time) where a schedule jumps or kinks, merged within round-off, s.
    surface_diffusion_time : float
        ℓ²/α of the smallest surface element, s.
    progress : callable or None
        ``progress(time, end_time, steps)`` after each step.
    checkpoint : callable or None
        Offered the run's state after each step (see :data:`Checkpoint`).
    resume : dict or None
        A state a checkpoint was given: the recorder and the cost are restored from it here,
        the method restores its own part (``resume["march"]``).
    """

    system: ConductionSystem
    controls: RunControls
    algebra: LinearAlgebra
    recorder: HistoryRecorder
    cost: Cost
    initial: np.ndarray
    breakpoints: tuple[float, ...]
    surface_diffusion_time: float
    progress: Callable[[float, float, int], None] | None = None
    checkpoint: Checkpoint | None = None
    resume: dict | None = None

    def __post_init__(self) -> None:
        if self.resume is not None:
            self.recorder.restore(self.resume["recorder"])
            for name, value in self.resume["cost"].items():
                setattr(self.cost, name, value)

    def offer_checkpoint(self, time: float, steps: int, march_state: Callable[[], dict]) -> None:
        """Offer the checkpoint callback, if any, the state after a step (built on demand)."""
        if self.checkpoint is None:
            return

        def snapshot() -> dict:
            return {
                "march": march_state(),
                "recorder": self.recorder.state(),
                "cost": asdict(self.cost),
            }

        self.checkpoint(time, steps, snapshot)

    @cached_property
    def fixed(self) -> np.ndarray:
        """Every fixed-temperature degree of freedom, group after group."""
        dofs = [d for group in self.system.fixed_dofs.values() for d in group]
        return np.array(dofs, dtype=np.int64)

    @cached_property
    def capacity_columns(self) -> np.ndarray:
        """1ᵀM, J/K: the stored energy of a field of constant ρc is ``capacity_columns @ T``."""
        return np.asarray(self.system.capacity.sum(axis=0)).ravel()

    def quantity(self, field: np.ndarray, name: str) -> float:
        """A stop quantity of ``field``: mean, minimum, maximum or a probe's value, °C."""
        if name == "mean":
            return inner(self.system.volume_weights, field)
        if name == "minimum":
            return float(field.min())
        if name == "maximum":
            return float(field.max())
        k = list(self.system.model.probes).index(name)
        return float((self.system.probe_matrix @ field)[k])

    def report(self, time: float, steps: int) -> None:
        """Tell the caller's progress callback, if any."""
        if self.progress is not None:
            self.progress(time, self.controls.end_time, steps)


@dataclass(frozen=True)
class March:
    """What a method's march did (the step counts and sizes of SolverStats; times in s)."""

    steps: int
    rejected_steps: int
    startup_steps: int
    time_step: float
    smallest_step: float
    largest_step: float
    final_state: np.ndarray
    stop_time: float | None
    recent_startup_steps: int = 0  # start-up steps since the last restart (the ringing check)
    krylov_dimension: int = 0
    error_estimate: float = 0.0
    retried_steps: int = 0  # steps retried smaller after Newton's method failed
    subdivided_steps: int = 0  # fixed steps taken as substeps


class Stepper(ABC):
    """A time-stepping method registered by name, with the traits the argument check and the
    run's checks ask about."""

    name: ClassVar[str]
    title: ClassVar[str]  # how messages name it
    adapts: ClassVar[bool] = True  # whether a local error estimate can control its step
    default_startup_steps: ClassVar[int] = 1
    min_startup_steps: ClassVar[int] = 0
    default_steps: ClassVar[int] = 500  # fixed steps (or records) over a run by default
    exact_in_time: ClassVar[bool] = False  # error set by a tolerance, not by a step
    rings_without_startup: ClassVar[bool] = False  # may oscillate after a jump without start-up
    resumable: ClassVar[bool] = False  # offers checkpoints and continues from their state

    def check_model(self, model: ThermalModel) -> None:  # noqa: B027 - most methods take any
        """Raise ModelError unless the method can solve ``model``."""

    @abstractmethod
    def march(self, run: RunContext) -> March:
        """March from t = 0 to the end or the stop, recording into ``run.recorder``."""
