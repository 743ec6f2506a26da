"""The hand method beside the field fit: a lumped exponential fitted to each thermocouple curve.

The practitioner's way: take T(t) = T∞ + (T₁ − T∞)·exp(−t/τ), fit τ and the amplitude to the
curve (a straight line through ln(T − T∞) against t does the same), and read the coefficient
from the lumped time constant, h = ρcV/(A·τ). When the Biot number is not small, the curve at
any point decays at the slowest mode's rate, not at the lumped rate hA/(ρcV): the core lags,
and the coefficient read this way is off. The bias is the lumped coefficient against the field
fit's, which sees the section as it is.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import AdvisorError


@dataclass(frozen=True)
class LumpedReading:
    """One thermocouple curve read the hand way.

    Attributes
    ----------
    probe : str
    time_constant : float
        τ of the fitted exponential, s.
    amplitude : float
        T₁ − T∞ of the fitted exponential, K.
    coefficient : float
        h = ρcV/(A·τ), W/(m²·K).
    rms_residual : float
        Of the exponential against the curve, K.
    field_coefficient : float
        The field fit's coefficient on the same surfaces (area- and time-averaged), W/(m²·K).
    bias : float
        coefficient / field_coefficient − 1 (−0.38: the lumped fit reads h 38 % low).
    biot : float
        field_coefficient·(V/A)/k: the Biot number on V/A the comparison is made at.
    """

    probe: str
    time_constant: float
    amplitude: float
    coefficient: float
    rms_residual: float
    field_coefficient: float
    bias: float
    biot: float

    def sentence(self) -> str:
        """'a lumped fit of the core thermocouple reads h 38 % low at Bi = 0.6'."""
        word = "low" if self.bias < 0 else "high"
        return (
            f"a lumped fit of the {self.probe} thermocouple reads h {abs(100 * self.bias):.0f} % "
            f"{word} at Bi = {self.biot:.2g} ({self.coefficient:.4g} against "
            f"{self.field_coefficient:.4g} W/(m²·K))"
        )


def exponential_fit(times, temperatures, ambient: float) -> tuple[float, float, float]:
    """Fit T = T∞ + a·exp(−t/τ) to one curve by least squares in temperature.

    Parameters
    ----------
    times : array
        s.
    temperatures : array
        °C.
    ambient : float
        T∞, °C (known: the fluid's temperature).

    Returns
    -------
    (time constant s, amplitude K, rms residual K)

    Raises
    ------
    AdvisorError
        If the curve does not approach the ambient (no exponential to fit).

    Examples
    --------
    >>> t = np.linspace(0.0, 600.0, 31)
    >>> tau, a, rms = exponential_fit(t, 20.0 + 500.0 * np.exp(-t / 240.0), 20.0)
    >>> round(tau, 6), round(a, 6)
    (240.0, 500.0)
    """
    from scipy.optimize import least_squares

    t = np.asarray(times, dtype=float)
    excess = np.asarray(temperatures, dtype=float) - ambient
    usable = excess * np.sign(excess[0]) > 0
    if usable.sum() < 3 or not abs(excess[usable][-1]) < abs(excess[usable][0]):
        raise AdvisorError(
            "the curve does not approach the ambient temperature "
            f"{ambient:g} °C: a lumped exponential cannot be fitted to it",
            argument="measured",
        )
    slope, intercept = np.polyfit(t[usable], np.log(np.abs(excess[usable])), 1)
    start = np.array([min(-1.0 / slope, 1e3 * t[-1]) if slope < 0 else t[-1], np.exp(intercept)])
    sign = np.sign(excess[0])

    def misfit(p):
        return sign * p[1] * np.exp(-t / p[0]) - excess

    found = least_squares(misfit, start, bounds=([1e-9 * t[-1], 0.0], [np.inf, np.inf]))
    tau, amplitude = found.x
    return float(tau), float(sign * amplitude), float(np.sqrt(np.mean(found.fun**2)))


def lumped_readings(problem, values) -> list[LumpedReading]:
    """Every measured curve of ``problem`` read the hand way, against the field fit at
    ``values`` (a curve that does not approach the ambient is left out).

    The lumped model's ρcV and A are the section's (all regions, the fitted edge groups'
    surfaces and every other group exchanging heat); the ambient is the fluid's of the first
    fitted group at t = 0; the field's coefficient is each exchanging condition's linearised
    coefficient at the section's mean temperature, averaged over the surfaces and over the
    readings' span.
    """
    model = problem.system.with_boundaries(
        problem.parameters.boundaries(values, problem.given)
    ).model
    solution = problem.solution(values)
    facts = model.section.facts
    groups = [g for g in model.exchange_groups if g in problem.system.edges]
    area = facts.surface_area(groups)
    capacity = sum(
        model.materials[r].volumetric_heat_capacity * facts.region_volumes[r]
        for r in facts.region_volumes
    )
    conductivity = (
        sum(
            model.materials[r].nominal_conductivity * facts.region_volumes[r]
            for r in facts.region_volumes
        )
        / facts.volume
    )
    first = problem.parameters.blocks[0].ambient
    ambient = float(first(0.0)) if callable(first) else float(first)
    field = _field_coefficient(model, solution, groups, problem.measured.times)
    biot = field * (facts.volume / area) / conductivity
    readings = []
    for name in problem.measured.probes:
        try:
            tau, amplitude, rms = exponential_fit(
                problem.measured.times, problem.measured.readings[name], ambient
            )
        except AdvisorError:  # a curve that does not approach the ambient has no reading
            continue
        coefficient = capacity / (area * tau)
        readings.append(
            LumpedReading(
                name, tau, amplitude, coefficient, rms, field, coefficient / field - 1.0, biot
            )
        )
    return readings


def _field_coefficient(model, solution, groups, times) -> float:
    """The surfaces' coefficient (W/(m²·K)) averaged over area and over the readings' span."""
    facts = model.section.facts
    mean = np.interp(times, solution.times, solution.mean)
    total = np.zeros_like(times, dtype=float)
    for group in groups:
        share = facts.surface_areas[group]
        for condition in model.boundaries[group]:
            if condition.exchanges:
                total += share * np.array(
                    [
                        condition.linearised(T, t).coefficient
                        for T, t in zip(mean, times, strict=True)
                    ]
                )
    total /= facts.surface_area(groups)
    if len(times) < 2:
        return float(total[0])
    return float(np.trapezoid(total, times) / (times[-1] - times[0]))
