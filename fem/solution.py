"""The result of a transient run: histories every step, fields at the output times, cost
counters and the run's own checks."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .model import ThermalModel


@dataclass(frozen=True)
class SolverStats:
    """What the run cost.

    Attributes
    ----------
    method : str
        Time integration scheme.
    steps : int
        Time steps taken, start-up half-steps included.
    startup_steps : int
        Backward-Euler half-steps at the start.
    time_step : float
        Full step in s.
    factorisations : int
        LU factorisations of the step matrix.
    unknowns : int
        Degrees of freedom.
    assembly_seconds, factorisation_seconds, stepping_seconds : float
        Wall-clock time of each phase in s.
    """

    method: str
    steps: int
    startup_steps: int
    time_step: float
    factorisations: int
    unknowns: int
    assembly_seconds: float
    factorisation_seconds: float
    stepping_seconds: float


@dataclass(frozen=True)
class RunChecks:
    """Checks every run makes on itself; a failed check adds a line to ``warnings``.

    Attributes
    ----------
    energy_balance_error : float
        |stored energy change − heat taken in through the edges| divided by the largest stored
        energy change; the scheme conserves energy, so this is round-off unless the assembly
        is wrong.
    temperature_excursion : float
        How far in K any nodal temperature went outside the range of the initial and ambient
        temperatures (0 when it stayed inside).
    step_to_surface_diffusion : float
        Time step divided by the diffusion time ℓ²/α of the smallest element edge on a
        heat-exchanging boundary. Large values are fine for smooth fields but can make
        Crank–Nicolson ring without start-up steps.
    warnings : tuple of str
        Plain-language descriptions of failed checks.
    """

    energy_balance_error: float
    temperature_excursion: float
    step_to_surface_diffusion: float
    warnings: tuple[str, ...]


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
        Area-weighted mean, lowest and highest nodal temperature in °C at each time.
    minimum_location, maximum_location : ndarray, shape (n, 2)
        Where the extremes are, in m.
    probes : dict of str to ndarray
        Temperature in °C at each probe.
    heat_flow : dict of str to ndarray
        Heat flow into the part through each convective edge group, W per metre of depth.
    stored_energy : ndarray
        Energy stored relative to the initial state, J per metre of depth.
    absorbed_heat : ndarray
        Heat taken in through all edges since the start, J per metre of depth, accumulated
        the way the time scheme integrates it.
    output_times : ndarray
        Times in s of the stored fields.
    fields : ndarray, shape (len(output_times), n_vertices)
        Temperature in °C at the mesh vertices at each output time.
    stats : SolverStats
    checks : RunChecks
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
    stored_energy: np.ndarray
    absorbed_heat: np.ndarray
    output_times: np.ndarray
    fields: np.ndarray
    stats: SolverStats
    checks: RunChecks

    @property
    def internal_difference(self) -> np.ndarray:
        """Highest minus lowest temperature in the section, K, at each time."""
        return self.maximum - self.minimum
