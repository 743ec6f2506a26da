"""The result of a transient run: histories every step, fields at the output times, cost
counters and the run's own checks."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .events import StopWhen
from .fields import FieldSeries
from .model import ThermalModel


@dataclass(frozen=True)
class SolverStats:
    """What the run cost.

    Attributes
    ----------
    method : str
        Time integration scheme.
    adaptive : bool
        Whether the step was controlled by the local error estimate.
    steps : int
        Accepted time steps, start-up half-steps included.
    rejected_steps : int
        Steps redone with a smaller step because the error estimate was too large.
    startup_steps : int
        Backward-Euler half-steps at the start (Crank–Nicolson) or first-order steps (BDF2).
    time_step : float
        The (last) full step in s; fixed-step runs use it throughout.
    smallest_step, largest_step : float
        Range of accepted steps in s.
    factorisations : int
        LU factorisations of a step matrix.
    newton_iterations : int
        Newton iterations over the run (one per step for linear problems).
    max_newton_iterations : int
        Most iterations any step needed.
    unknowns : int
        Degrees of freedom.
    assembly_seconds, factorisation_seconds, stepping_seconds : float
        Wall-clock time of each phase in s.
    solves : int
        Triangular solves with a factorised matrix (one per linear step or Newton iteration;
        one per basis vector, plus one per step, for exponential steps).
    krylov_dimension : int
        Exponential steps: the largest Krylov basis a step used (0 for the other methods).
    error_estimate : float
        Exponential steps: the largest error estimate in K at any node and record time (0
        for the other methods, whose local errors are controlled per step).
    retried_steps : int
        Steps whose Newton iterations failed and that were retried at half the size (each
        halving counts once).
    subdivided_steps : int
        Fixed-step runs: steps that were taken as smaller substeps after Newton's method
        failed on them (the substeps count in ``steps``).
    damped_iterations : int
        Newton updates the line search shortened because the full update did not lower the
        residual.
    """

    method: str
    adaptive: bool
    steps: int
    rejected_steps: int
    startup_steps: int
    time_step: float
    smallest_step: float
    largest_step: float
    factorisations: int
    newton_iterations: int
    max_newton_iterations: int
    unknowns: int
    assembly_seconds: float
    factorisation_seconds: float
    stepping_seconds: float
    solves: int = 0
    krylov_dimension: int = 0
    error_estimate: float = 0.0
    retried_steps: int = 0
    subdivided_steps: int = 0
    damped_iterations: int = 0


@dataclass(frozen=True)
class RunChecks:
    """Checks every run makes on itself; a failed check adds a line to ``warnings``.

    Attributes
    ----------
    energy_balance_error : float
        Largest |stored energy change − heat absorbed| over the run, divided by the larger of
        the largest stored energy change and the energy of moving the whole part across the
        temperature span: round-off for linear problems unless the assembly is wrong, the
        Newton tolerance's share for nonlinear ones.
    temperature_excursion : float
        How far in K any nodal temperature went outside the range of the initial and boundary
        temperatures (0 when it stayed inside, or when sources and fluxes make the check moot).
    step_to_surface_diffusion : float
        Smallest step divided by the diffusion time ℓ²/α of the smallest element edge on a
        heat-exchanging boundary. Large values are fine for smooth fields but can make
        Crank–Nicolson ring without start-up steps.
    warnings : tuple of str
        Plain-language descriptions of failed checks: the run's own accuracy is in doubt.
    notes : tuple of str
        What the run says of its inputs without doubting its accuracy (a library material's
        data left behind its valid range), once per run.
    """

    energy_balance_error: float
    temperature_excursion: float
    step_to_surface_diffusion: float
    warnings: tuple[str, ...]
    notes: tuple[str, ...] = ()


@dataclass(frozen=True)
class Solution:
    """Temperature histories and fields of a run (planar: per metre of depth).

    Attributes
    ----------
    model : ThermalModel
        The model that was solved.
    times : ndarray
        Time in s of every recorded state, starting at 0.
    mean, minimum, maximum : ndarray
        Volume-weighted mean, lowest and highest nodal temperature in °C at each time.
    minimum_location, maximum_location : ndarray, shape (n, 2)
        Where the extremes are, in m.
    probes : dict of str to ndarray
        Temperature in °C at each probe.
    heat_flow : dict of str to ndarray
        Heat flow into the part through each edge group that exchanges heat or has a fixed
        temperature, W (planar: W per metre of depth). Fixed-temperature groups report the
        step-averaged reaction.
    generated : ndarray
        Heat generated inside the part, W.
    stored_energy : ndarray
        Energy stored relative to the initial state, J (planar: J/m).
    absorbed_heat : ndarray
        Heat taken in through the edges and generated since the start, J (planar: J/m),
        integrated the way the time scheme integrates it.
    output_times : ndarray
        Times in s of the stored fields.
    fields : FieldSeries
        Temperature in °C at the mesh vertices at each output time.
    final_state : ndarray
        The last field at every degree of freedom, to start a following stage from.
    stop_time : float or None
        When the stop condition was met (interpolated within the step), if one was given and
        met.
    stats : SolverStats
    checks : RunChecks
    interface_jump : dict of str to ndarray
        For each contact interface, T(first region) − T(second region) at the interface node
        where it is largest in size, K, at each time.
    interface_heat_flow : dict of str to ndarray
        For each contact interface, the heat crossing it from the first region to the second,
        W (planar: W per metre of depth), at each time.
    stop_reason : str
        Why the run ended, in plain words (:func:`fem.events.stop_reason`).
    stop : StopWhen or None
        The run's stop condition, for words of its own about the ending.
    peak_field, peak_field_time : ndarray and float, or None
        The vertex temperatures (°C) at the recorded step of the largest internal difference,
        and that step's time (s): a fast event may fall between output times.
    """

    model: ThermalModel
    times: np.ndarray
    mean: np.ndarray
    minimum: np.ndarray
    maximum: np.ndarray
    minimum_location: np.ndarray
    maximum_location: np.ndarray
    probes: dict[str, np.ndarray]
    heat_flow: dict[str, np.ndarray]
    generated: np.ndarray
    stored_energy: np.ndarray
    absorbed_heat: np.ndarray
    output_times: np.ndarray
    fields: FieldSeries
    final_state: np.ndarray
    stop_time: float | None
    stats: SolverStats
    checks: RunChecks
    interface_jump: dict[str, np.ndarray] = field(default_factory=dict)
    interface_heat_flow: dict[str, np.ndarray] = field(default_factory=dict)
    stop_reason: str = ""
    stop: StopWhen | None = None
    peak_field: np.ndarray | None = None
    peak_field_time: float | None = None

    @property
    def internal_difference(self) -> np.ndarray:
        """Highest minus lowest temperature in the section, K, at each time."""
        return self.maximum - self.minimum
