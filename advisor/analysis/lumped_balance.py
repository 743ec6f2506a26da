"""The lumped heat balance integrated in time as an enthalpy balance.

    dE/dt = Σ q_i(T, t)·A_i + Σ q̇_r(t)·V_r,   E(T) = Σ V_r·H_r(T),   H(T) = ∫ ρ·c dT,

with the stored enthalpy E as the unknown and T found from E by inverting H. Latent heat
released between a solidus and a liquidus (or at one temperature) is part of H, so a phase
change is a steep stretch of E(T) that the inversion crosses, not a peak in c(T) that a
step would have to resolve: E always moves by the heat exchanged, and T follows.

Each condition enters through its own ``lumped_heat(T, t)``, so coefficients that follow the
surface temperature (a boiling curve), radiation and fluxes all take part. The integrator is
LSODA, which switches to a stiff (BDF) method where the balance is stiff — a coefficient that
rises tenfold within a few kelvin makes it so — and a target temperature is found as an event
of the integration, to the integrator's accuracy, rather than from sampled values.
"""

from __future__ import annotations

import warnings

import numpy as np

from fem import ThermalModel
from fem.materials import PropertyRangeWarning

from ..errors import AdvisorError

GRID_SPACING = 0.05  # K between tabulated enthalpies before refinement
GRID_POINTS = (2001, 100001)
INVERSION_TOLERANCE = 1e-6  # K: the tabulated inverse's largest error in temperature


class StoredEnthalpy:
    """E(T) = Σ V_r·(H_r(T) − H_r(T0)) of a model's regions and its inverse.

    Tabulated over ``low``..``high`` °C on an even grid finer than :data:`GRID_SPACING`,
    halved where linear interpolation misses E by more than the heat of
    :data:`INVERSION_TOLERANCE` kelvin (at the solidus and liquidus, where H has corners),
    inverted by linear interpolation (monotone: every H increases), and continued beyond the
    table with the end capacities.
    """

    def __init__(self, model: ThermalModel, reference: float, low: float, high: float):
        facts = model.section.facts
        parts = [(facts.region_volumes[r], m) for r, m in model.materials.items()]
        self.reference = float(reference)

        def stored(t):
            with warnings.catch_warnings():  # the margins may leave a property table's range
                warnings.simplefilter("ignore", PropertyRangeWarning)
                return sum(v * np.asarray(m.enthalpy(t, reference), float) for v, m in parts)

        points = int(np.clip((high - low) / GRID_SPACING, *GRID_POINTS))
        self.grid, self.energy_grid = _refined(stored, np.linspace(low, high, points))
        steps = np.diff(self.energy_grid)
        if np.any(steps <= 0):
            raise AdvisorError(
                "the materials' enthalpy does not increase with temperature, so the lumped "
                "balance cannot find a temperature from the stored heat"
            )
        spacing = self.grid[1] - self.grid[0]
        self.capacity_low = steps[0] / spacing
        self.capacity_high = steps[-1] / spacing

    def energy(self, temperature) -> np.ndarray:
        """Stored enthalpy relative to the reference, J (planar: J/m)."""
        t = np.asarray(temperature, dtype=float)
        inside = np.interp(t, self.grid, self.energy_grid)
        below = self.energy_grid[0] + self.capacity_low * (t - self.grid[0])
        above = self.energy_grid[-1] + self.capacity_high * (t - self.grid[-1])
        return np.where(t < self.grid[0], below, np.where(t > self.grid[-1], above, inside))

    def temperature(self, energy) -> np.ndarray:
        """The temperature, °C, holding ``energy`` J (planar: J/m)."""
        e = np.asarray(energy, dtype=float)
        inside = np.interp(e, self.energy_grid, self.grid)
        below = self.grid[0] + (e - self.energy_grid[0]) / self.capacity_low
        above = self.grid[-1] + (e - self.energy_grid[-1]) / self.capacity_high
        lowest, highest = self.energy_grid[0], self.energy_grid[-1]
        return np.where(e < lowest, below, np.where(e > highest, above, inside))


def _refined(stored, grid: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Halve the cells of ``grid`` where E's linear interpolation is off by more than the
    tolerance (measured at the cell's midpoint), up to 40 times."""
    energy = stored(grid)
    smallest = float(np.min(np.diff(energy) / np.diff(grid)))  # J/K: the lowest capacity
    allowed = max(smallest, 0.0) * INVERSION_TOLERANCE
    for _ in range(40):
        middle = 0.5 * (grid[1:] + grid[:-1])
        at_middle = stored(middle)
        coarse = np.abs(at_middle - 0.5 * (energy[1:] + energy[:-1])) > allowed
        if not coarse.any():
            break
        grid = np.concatenate([grid, middle[coarse]])
        energy = np.concatenate([energy, at_middle[coarse]])
        order = np.argsort(grid, kind="stable")
        grid, energy = grid[order], energy[order]
    return grid, energy


def temperature_span(model: ThermalModel, initial: float, end_time: float) -> tuple[float, float]:
    """The temperatures the lumped part can visit, °C: the initial and driving temperatures
    with a margin of a tenth of their span (sources and fluxes may carry it beyond)."""
    low, high = model.driving_temperatures(end_time)
    low, high = min(low, initial), max(high, initial)
    margin = 0.1 * (high - low) + 1.0
    return low - margin, high + margin


def integrate_balance(
    model: ThermalModel,
    initial: float,
    times: np.ndarray,
    *,
    scale: float = 1.0,
    target: float | None = None,
) -> tuple[np.ndarray, float | None]:
    """Integrate the lumped enthalpy balance from ``initial`` °C at t = 0.

    Parameters
    ----------
    model : fem.ThermalModel
        Materials, conditions and sources of the part.
    initial : float
        T0 in °C.
    times : ndarray
        Times in s (≥ 0) at which the temperature is wanted; the last is the horizon.
    scale : float
        Factor on every surface exchange coefficient (the corrected lumped model).
    target : float, optional
        A temperature in °C whose first crossing is found as an event.

    Returns
    -------
    temperatures : ndarray
        T in °C at ``times``.
    crossing : float or None
        When ``target`` is first reached, s (None if not within the horizon or not asked).
    """
    times = np.asarray(times, dtype=float)
    end = float(times.max(initial=0.0))
    if end <= 0:
        return np.full(times.shape, float(initial)), None
    stored = StoredEnthalpy(model, initial, *temperature_span(model, initial, end))
    capacity = float(stored.capacity_low + stored.capacity_high) / 2  # J/K: scales E to K
    rate = _heat_rate(model, scale)

    def balance(t, y):
        return [rate(float(stored.temperature(y[0] * capacity)), t) / capacity]

    events = None
    if target is not None:
        reached = float(stored.energy(target)) / capacity

        def arrival(t, y):
            return y[0] - reached

        arrival.terminal = False
        events = arrival
    from scipy.integrate import solve_ivp  # 0.15 s to import: only when integrated

    starts = [0.0, *[p for p in model.breakpoints(end) if 0.0 < p < end], end]
    values = np.full(times.shape, float(initial))
    state, crossing = 0.0, None
    for start, stop in zip(starts[:-1], starts[1:], strict=True):  # restart at every jump
        inside = (times > start) & (times <= stop)
        wanted = np.union1d(times[inside], [stop])  # sorted; the last is the segment's end
        result = solve_ivp(
            balance, (start, stop), [state], method="LSODA", t_eval=wanted,
            rtol=1e-9, atol=1e-9, max_step=end / 400, events=events,
        )  # fmt: skip
        if not result.success:
            raise AdvisorError(f"the lumped balance could not be integrated: {result.message}")
        found = stored.temperature(result.y[0] * capacity)
        values[inside] = np.interp(times[inside], wanted, found)  # exact: times are in wanted
        if crossing is None and events is not None and len(result.t_events[0]):
            crossing = float(result.t_events[0][0])
        state = float(result.y[0, -1])
    return values, crossing


def _heat_rate(model: ThermalModel, scale: float):
    """Heat into the part at one temperature and time, W (planar: W/m)."""
    facts = model.section.facts
    surfaces = facts.surface_areas
    flowing = [(surfaces[name], c) for name, c in model.conditions() if c.flows]
    sources = [(facts.region_volumes[r], q) for r, q in model.heat_sources.items()]

    def rate(temperature: float, time: float) -> float:
        heat = sum(area * c.lumped_heat(temperature, time, scale) for area, c in flowing)
        return float(heat + sum(volume * q(time) for volume, q in sources))

    return rate
