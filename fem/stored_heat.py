"""The enthalpy of one material at a region's quadrature points, into buffers kept for the run.

A freezing residual takes H(T) − H(reference) at every quadrature point (57k at 10k P1 nodes)
once or twice an iteration. Written as array expressions it allocates a fresh array of the
points for every intermediate, and an array of half a megabyte taken while another is alive
costs the page faults of a fresh mapping (measured 130 µs each, beside 10 µs for the
arithmetic). Here the sensible part (a constant ρc, or a few-point table of c as a sum of
ramps, :func:`fem.table_integrals.clamped_integral`) and the latent part ρ·L·S(T)
(:func:`fem.enthalpy.smooth_fraction`) are evaluated pass by pass into two buffers kept on the
evaluator and the gathered temperatures themselves. Other materials (an enthalpy table, a
table of many points) take :meth:`fem.materials.Material.enthalpy`.
"""

from __future__ import annotations

import numpy as np

from .materials import Material, PropertyTable
from .table_integrals import table_arrays


class PointEnthalpy:
    """H(T) − H(``reference``) of ``material`` at ``size`` points, J/m³.

    Parameters
    ----------
    material : Material
    reference : float
        Temperature where H is zero, °C.
    size : int
        Number of points every call evaluates.
    """

    def __init__(self, material: Material, reference: float, size: int):
        self.material, self.reference = material, float(reference)
        heat = material.specific_heat
        if isinstance(heat, PropertyTable):
            tt, vv, _, _, _, ramps = table_arrays(heat)
            self._sensible = None if ramps is None else (float(tt[0]), float(vv[0]), ramps)
        else:
            self._sensible = (self.reference, float(heat), ())
        self.fast = material.specific_enthalpy is None and self._sensible is not None
        if self.fast:  # H(reference) by the same passes, so that it cancels exactly
            at = np.array([self.reference])
            self._offset = float(self._specific(at, np.empty(1), np.empty(1))[0])
            self._total, self._part = np.empty(size), np.empty(size)

    def __call__(self, temperature: np.ndarray) -> np.ndarray:
        """H at the points' ``temperature`` (°C), which is overwritten: the result lives in a
        buffer of the evaluator until its next call."""
        if not self.fast or temperature.shape != self._total.shape:
            return self.material.enthalpy(temperature, self.reference)
        total = self._specific(temperature, self._total, self._part)
        total -= self._offset
        total *= self.material.density
        return total

    def _specific(self, temperature, total: np.ndarray, part: np.ndarray) -> np.ndarray:
        """∫ c dT from the table's start (or the reference) plus L·S(T), J/kg, into
        ``total``; ``part`` and ``temperature`` are overwritten."""
        material = self.material
        start, value, ramps = self._sensible
        np.subtract(temperature, start, out=total)
        total *= value
        for knot, change in ramps:
            np.subtract(temperature, knot, out=part)
            np.maximum(part, 0.0, out=part)
            part *= part
            part *= 0.5 * change
            total += part
        if material.latent_heat:  # L·(3x² − 2x³), x the clamped position in the range
            solidus, liquidus = material.solidus, material.liquidus
            x = np.subtract(temperature, solidus, out=part)
            x *= 1.0 / (liquidus - solidus)
            np.maximum(x, 0.0, out=x)
            np.minimum(x, 1.0, out=x)
            weight = np.multiply(x, -2.0, out=temperature)  # 3 − 2x, in the temperature's place
            weight += 3.0
            x *= x
            x *= weight
            x *= material.latent_heat
            total += x
        return total
