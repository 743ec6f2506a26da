"""Convection whose coefficient comes from a flow correlation: natural convection, forced flow
or an impinging jet, the fluid's properties at the film temperature, h following the surface
temperature as the run goes.

The correlation is evaluated once, over the surface temperatures the run can reach, into a
dense table h(T_s) (:func:`fem.flow_correlations.coefficient_table`); the run then treats it
as any coefficient curve of surface temperature (:class:`SurfaceTemperatureConvection`), so a
step costs a table look-up and dq/dT_s is the table's exact slope.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field

import numpy as np

from ..errors import ModelError
from ..flow_correlations import (
    CORRELATIONS,
    CoefficientTable,
    FlowGeometry,
    check_correlation,
    coefficient_table,
    geometry_notes,
)
from ..fluid_properties import FLUIDS
from ..temperatures import check_temperature
from .base import register, temperature_field
from .surface_convection import SurfaceTemperatureConvection
from .surface_curve import SurfaceCurve


@dataclass(frozen=True)
class TableFunction:
    """h(T_s) of a correlation's table as a function (the form reports plot as a line)."""

    curve: SurfaceCurve

    def __call__(self, surface):
        return self.curve.coefficient(surface, 0.0)


@register
@dataclass(frozen=True)
class CorrelationConvection(SurfaceTemperatureConvection):
    """Convection to a fluid with h from a flow correlation at the film temperature.

    Parameters
    ----------
    correlation : str
        A key of :data:`fem.flow_correlations.CORRELATIONS` (``"natural-horizontal-cylinder"``,
        ``"forced-cylinder"``, ``"jet-round-nozzle"`` ...).
    fluid : str
        A key of :data:`fem.fluid_properties.FLUIDS` (``"air"``, ``"water"`` ...).
    fluid_temperature : float
        T∞ in °C.
    length : float, optional
        The characteristic length in m (see :class:`fem.flow_correlations.FlowGeometry`);
        None until :func:`bind_correlations` derives it from the section.
    velocity, nozzle, nozzle_distance : float, optional
        Speed in m/s (forced flow, jets); nozzle diameter or slot width and its distance from
        the surface in m (jets).
    surface_range : (float, float), optional
        The lowest and highest surface temperature of the run, °C; the table covers it.
        None until :func:`bind_correlations` takes it from the initial temperatures.
    length_origin : str
        How the length was found, for the report ("" when given).

    Examples
    --------
    >>> bar = CorrelationConvection("natural-horizontal-cylinder", "air", 20.0, length=0.12,
    ...                             surface_range=(20.0, 400.0))
    >>> 5 < float(bar.coefficient(300.0)) < 15
    True
    """

    name = "correlation"
    label = "convection, h from a flow correlation"

    curve: object = field(init=False, default=None, repr=False)
    ambient: object = field(init=False, default=None)
    correlation: str = "natural-horizontal-cylinder"
    fluid: str = "air"
    fluid_temperature: float = 20.0
    length: float | None = None
    velocity: float | None = None
    nozzle: float | None = None
    nozzle_distance: float | None = None
    surface_range: tuple[float, float] | None = None
    length_origin: str = ""
    table: CoefficientTable | None = field(init=False, default=None, repr=False)
    table_curve: SurfaceCurve | None = field(init=False, default=None, repr=False)

    def __post_init__(self) -> None:
        if self.correlation not in CORRELATIONS:
            raise ModelError(
                f"unknown correlation {self.correlation!r}; known: {sorted(CORRELATIONS)}",
                argument="correlation",
            )
        if self.fluid not in FLUIDS:
            raise ModelError(
                f"unknown fluid {self.fluid!r}; known: {sorted(FLUIDS)}", argument="fluid"
            )
        check_temperature(self.fluid_temperature, "fluid_temperature", "fluid_temperature")
        placeholder = 1.0 if self.length is None else self.length  # derived later
        check_correlation(self.correlation, dataclasses.replace(self.geometry, length=placeholder))
        object.__setattr__(
            self,
            "ambient",
            temperature_field(self.fluid_temperature, "fluid_temperature", "fluid_temperature"),
        )
        if self.surface_range is not None:
            low, high = (float(v) for v in self.surface_range)
            for value in (low, high):
                check_temperature(value, "surface_range", "surface_range")
            object.__setattr__(self, "surface_range", (min(low, high), max(low, high)))
        if not self.bound:
            return
        table = coefficient_table(
            self.correlation,
            self.fluid,
            self.fluid_temperature,
            self.geometry,
            self.surface_range,
        )
        object.__setattr__(self, "table", table)
        curve = SurfaceCurve(table.surface_temperatures, table.coefficients)
        object.__setattr__(self, "table_curve", curve)
        object.__setattr__(self, "curve", ((0.0, TableFunction(curve)),))

    def is_constant(self) -> bool:
        return True  # one table and one fluid temperature for the whole run

    def breakpoints(self, end_time: float) -> set[float]:
        return set()

    @property
    def bound(self) -> bool:
        """True when the length and the surface range are known (the table is built)."""
        return self.length is not None and self.surface_range is not None

    @property
    def geometry(self) -> FlowGeometry:
        return FlowGeometry(self.length, self.velocity, self.nozzle, self.nozzle_distance)

    def with_section(
        self, length: float | None, origin: str, surface_range
    ) -> CorrelationConvection:
        """This condition with a length derived from the section (kept if given) and the
        run's surface range."""
        if self.length is not None:
            length, origin = self.length, self.length_origin
        return dataclasses.replace(
            self, length=length, length_origin=origin, surface_range=tuple(surface_range)
        )

    def curve_at(self, time: float):
        if not self.bound:
            raise ModelError(
                f"the {self.correlation} correlation needs its length and surface range before "
                "it gives a coefficient: give length= and surface_range=, or pass the "
                "boundaries through fem.bind_correlations(boundaries, section_mesh, initial)",
                argument="length",
            )
        return super().curve_at(time)

    def heat_flux(self, surface, time: float = 0.0):
        """q(T_s) leaving the surface, W/m², and its exact slope dq/dT_s in W/(m²·K)."""
        self.curve_at(time)
        return self.table_curve.outflow(surface, self.fluid_temperature)

    def coefficient(self, surface, time: float = 0.0):
        """h(T_s) from the table, W/(m²·K)."""
        self.curve_at(time)
        return self.table_curve.coefficient(surface, self.fluid_temperature)

    def rows(self, temperatures) -> np.ndarray:
        """(T_s °C, Re or Ra, Nu, h W/(m²·K)) at surface ``temperatures``."""
        self.curve_at(0.0)
        return self.table.at(temperatures)

    # -- descriptions -------------------------------------------------------------------------
    def describe(self, end_time: float) -> str:
        spec = CORRELATIONS[self.correlation]
        fluid = FLUIDS[self.fluid][1]
        words = (
            f"convection by {spec.words} ({spec.source}), {fluid} at {self.fluid_temperature:g} °C"
        )
        if self.velocity is not None:
            words += f", {self.velocity:g} m/s"
        if self.nozzle is not None:
            words += f", nozzle {self.nozzle * 1e3:g} mm at {self.nozzle_distance * 1e3:g} mm"
        if not self.bound:
            return words + " (length from the section when the model is built)"
        origin = f" ({self.length_origin})" if self.length_origin else ""
        words += f", length {self.length * 1e3:.4g} mm{origin}"
        low, high = self.surface_range
        h = self.table.coefficients
        return (
            f"{words}; h {min(h):.3g}-{max(h):.3g} W/(m²·K) over surface temperatures "
            f"{low:.4g}-{high:.4g} °C{self._outside_words()}"
        )

    def _outside_words(self) -> str:
        """A note when the table leaves the range of Re or Ra its source states."""
        low, high = CORRELATIONS[self.correlation].valid
        groups = np.asarray(self.table.groups)
        notes = geometry_notes(self.correlation, self.geometry)
        if not np.all((groups >= low) & (groups <= high)):
            notes.insert(
                0,
                f"{self.table.group} {groups.min():.3g}-{groups.max():.3g} "
                f"(stated {low:.3g}-{high:.3g})",
            )
        return f" (outside the correlation's stated range: {'; '.join(notes)})" if notes else ""

    def summary(self) -> dict:
        entry = {
            "kind": self.label,
            "correlation": self.correlation,
            "source": CORRELATIONS[self.correlation].source,
            "fluid": self.fluid,
            "fluid_temperature_degC": self.fluid_temperature,
            "length_m": self.length,
            "length_origin": self.length_origin or "given",
            "velocity_m_per_s": self.velocity,
            "nozzle_m": self.nozzle,
            "nozzle_distance_m": self.nozzle_distance,
        }
        if self.bound:
            table = self.table
            entry["table"] = {
                "surface_temperatures_degC": list(table.surface_temperatures),
                table.group: list(table.groups),
                "Nu": list(table.nusselt),
                "coefficient_W_per_m2_K": list(table.coefficients),
            }
        return entry
