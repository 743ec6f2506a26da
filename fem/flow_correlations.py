"""Heat-transfer coefficients of a surface in a moving or still fluid from published flow
correlations, and the table h(T_s) a run uses (``pip install soakwise[correlations]``).

The correlations come from the ``ht`` package (Caleb Bell) where it has them: Churchill & Chu
for horizontal cylinders and vertical plates, McAdams for horizontal plates, Churchill &
Bernstein for a cylinder in cross-flow, the laminar and turbulent flat plate. Two are coded
here because ``ht`` lacks them: the mixed laminar-turbulent plate and Martin's impinging jets.
Properties are taken at the film temperature (T_s + T∞)/2 (:mod:`fem.fluid_properties`).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from .errors import ModelError
from .fluid_properties import (
    EXTRA,
    FLUIDS,
    FluidProperties,
    check_fluid,
    fluid_property_rows,
    fluid_range,
)

GRAVITY = 9.80665  # m/s²
TRANSITION_REYNOLDS = 5e5  # a flat plate's critical Reynolds number (common practice)
SMALLEST_DIFFERENCE = 0.01  # K: a natural-convection h at T_s = T∞ is taken 0.01 K away


@dataclass(frozen=True)
class FlowGeometry:
    """The lengths and the speed a correlation takes, SI units.

    Attributes
    ----------
    length : float
        The characteristic length, m: a cylinder's diameter, a vertical plate's height, a
        horizontal plate's area/perimeter, a plate's length along the flow, and for a jet the
        radius (round nozzle) or half-width (slot) of the area the coefficient averages over.
    velocity : float or None
        The free-stream or nozzle-exit speed, m/s (forced flow and jets).
    nozzle : float or None
        A round nozzle's diameter or a slot's width, m (jets).
    nozzle_distance : float or None
        The distance from the nozzle exit to the surface, m (jets).
    """

    length: float
    velocity: float | None = None
    nozzle: float | None = None
    nozzle_distance: float | None = None


@dataclass(frozen=True)
class Correlation:
    """One correlation: Nu from the fluid at the film temperature, T_s − T∞ and the geometry.

    ``nusselt(fluid, difference, geometry)`` returns (Re or Ra, Nu); ``scale(geometry)`` the
    length Nu and Re are based on.
    """

    words: str
    source: str
    group: str  # "Ra" or "Re"
    needs: tuple[str, ...]
    nusselt: Callable[[FluidProperties, float, FlowGeometry], tuple[float, float]]
    valid: tuple[float, float]  # the range of Ra or Re the source states
    scale: Callable[[FlowGeometry], float] = lambda geometry: geometry.length


def _ht():
    try:
        import ht
    except ImportError:  # pragma: no cover - depends on the installation
        raise ModelError(
            f"flow correlations need the ht package: pip install soakwise[{EXTRA}]",
            argument="correlation",
        ) from None
    return ht


def _grashof(fluid: FluidProperties, difference: float, length: float) -> float:
    difference = max(abs(difference), SMALLEST_DIFFERENCE)
    return GRAVITY * abs(fluid.expansion) * difference * length**3 / fluid.kinematic_viscosity**2


def _reynolds(fluid: FluidProperties, velocity: float, length: float) -> float:
    return fluid.density * velocity * length / fluid.viscosity


def _cylinder_natural(fluid, difference, geometry):
    gr = _grashof(fluid, difference, geometry.length)
    return gr * fluid.prandtl, _ht().Nu_horizontal_cylinder_Churchill_Chu(fluid.prandtl, gr)


def _vertical_plate(fluid, difference, geometry):
    gr = _grashof(fluid, difference, geometry.length)
    return gr * fluid.prandtl, _ht().Nu_vertical_plate_Churchill(fluid.prandtl, gr)


def _horizontal_plate(facing_up: bool):
    def nusselt(fluid, difference, geometry):
        gr = _grashof(fluid, difference, geometry.length)
        # a hot face up or a cold face down drives a plume off the plate
        assisted = (difference > 0) == facing_up
        return gr * fluid.prandtl, _ht().Nu_horizontal_plate_McAdams(fluid.prandtl, gr, assisted)

    return nusselt


def _cylinder_forced(fluid, difference, geometry):
    re = _reynolds(fluid, geometry.velocity, geometry.length)
    return re, _ht().Nu_cylinder_Churchill_Bernstein(re, fluid.prandtl)


def _plate_forced(fluid, difference, geometry):
    """Laminar (Baehr, via ``ht``) up to the critical Reynolds number; beyond it a laminar
    leading part and a turbulent rest: Nu = (0.037 Re^0.8 − 871) Pr^(1/3) (Incropera et al.,
    Fundamentals of Heat and Mass Transfer, 6th ed., eq. 7.38, Re_c = 5·10⁵; from memory)."""
    re, pr = _reynolds(fluid, geometry.velocity, geometry.length), fluid.prandtl
    if re < TRANSITION_REYNOLDS:
        return re, _ht().Nu_horizontal_plate_laminar_Baehr(re, pr)
    return re, (0.037 * re**0.8 - 871.0) * pr ** (1.0 / 3.0)


def _plate_turbulent(fluid, difference, geometry):
    re = _reynolds(fluid, geometry.velocity, geometry.length)
    return re, _ht().Nu_horizontal_plate_turbulent_Schlichting(re, fluid.prandtl)


def _jet_round(fluid, difference, geometry):
    """Martin, H. (1977) Heat and mass transfer between impinging gas jets and solid surfaces,
    Advances in Heat Transfer 13, 1-60: a single round nozzle, the mean over a disc of radius
    r (from memory): Nu/Pr^0.42 = (D/r)(1 − 1.1 D/r)/(1 + 0.1 (H/D − 6) D/r) · F(Re),
    F = 2 Re^0.5 (1 + Re^0.55/200)^0.5, Nu and Re on the nozzle diameter D."""
    d, h, r = geometry.nozzle, geometry.nozzle_distance, geometry.length
    re = _reynolds(fluid, geometry.velocity, d)
    shape = (d / r) * (1 - 1.1 * d / r) / (1 + 0.1 * (h / d - 6) * d / r)
    return re, fluid.prandtl**0.42 * shape * 2 * re**0.5 * (1 + re**0.55 / 200) ** 0.5


def _jet_slot(fluid, difference, geometry):
    """Martin (1977), a single slot nozzle of width S, the mean over a strip of half-width x
    (from memory): Nu/Pr^0.42 = 1.53/(x/S + H/S + 1.39) · Re^m,
    m = 0.695 − 1/(x/S + (H/S)^1.33 + 3.06), Nu and Re on the hydraulic diameter 2S."""
    s, h, x = geometry.nozzle, geometry.nozzle_distance, geometry.length
    re = _reynolds(fluid, geometry.velocity, 2 * s)
    m = 0.695 - 1 / (x / s + (h / s) ** 1.33 + 3.06)
    return re, fluid.prandtl**0.42 * 1.53 / (x / s + h / s + 1.39) * re**m


_NATURAL = ()
_FORCED = ("velocity",)
_JET = ("velocity", "nozzle", "nozzle_distance")
_CHURCHILL_CHU = "Churchill & Chu (1975), Int. J. Heat Mass Transfer 18"
_MCADAMS = "McAdams, Heat Transmission, 3rd ed. (1954): 0.54/0.15 above, 0.27 Ra^1/4 below"

# The case file's names → the correlation.
CORRELATIONS: dict[str, Correlation] = {
    "natural-horizontal-cylinder": Correlation(
        "natural convection on a horizontal cylinder", _CHURCHILL_CHU + ", 1049",
        "Ra", _NATURAL, _cylinder_natural, (0.0, 1e12),
    ),
    "natural-vertical-plate": Correlation(
        "natural convection on a vertical plate", _CHURCHILL_CHU + ", 1323",
        "Ra", _NATURAL, _vertical_plate, (0.0, 1e13),
    ),
    "natural-plate-facing-up": Correlation(
        "natural convection on the upper face of a horizontal plate", _MCADAMS,
        "Ra", _NATURAL, _horizontal_plate(True), (1e4, 1e11),
    ),
    "natural-plate-facing-down": Correlation(
        "natural convection on the lower face of a horizontal plate", _MCADAMS,
        "Ra", _NATURAL, _horizontal_plate(False), (1e5, 1e10),
    ),
    "forced-cylinder": Correlation(
        "a cylinder in cross-flow",
        "Churchill & Bernstein (1977), J. Heat Transfer 99, 300", "Re", _FORCED,
        _cylinder_forced, (0.0, 1e7),
    ),
    "forced-plate": Correlation(
        "flow along a plate (laminar, then mixed laminar-turbulent)",
        "laminar: Baehr & Stephan, Heat and Mass Transfer; mixed: Incropera et al. eq. 7.38",
        "Re", _FORCED, _plate_forced, (0.0, 1e8),
    ),
    "forced-plate-turbulent": Correlation(
        "flow along a plate, turbulent from the leading edge",
        "Schlichting & Gersten, Boundary-Layer Theory", "Re", _FORCED, _plate_turbulent,
        (5e5, 1e8),
    ),
    "jet-round-nozzle": Correlation(
        "an impinging jet from a round nozzle", "Martin (1977), Adv. Heat Transfer 13",
        "Re", _JET, _jet_round, (2e3, 4e5), lambda geometry: geometry.nozzle,
    ),
    "jet-slot-nozzle": Correlation(
        "an impinging jet from a slot nozzle", "Martin (1977), Adv. Heat Transfer 13",
        "Re", _JET, _jet_slot, (3e3, 9e4), lambda geometry: 2 * geometry.nozzle,
    ),
}  # fmt: skip


def check_correlation(name: str, geometry: FlowGeometry) -> Correlation:
    """The correlation ``name``, with the geometry it needs checked."""
    if name not in CORRELATIONS:
        raise ModelError(
            f"unknown correlation {name!r}; known: {sorted(CORRELATIONS)}", argument="correlation"
        )
    correlation = CORRELATIONS[name]
    for key in ("length", *correlation.needs):
        value = getattr(geometry, key)
        words = key.replace("_", " ")
        if value is None:
            raise ModelError(f"the correlation {name!r} needs a {words}", argument=key)
        if not (isinstance(value, int | float) and math.isfinite(value) and value > 0):
            raise ModelError(
                f"the correlation {name!r} needs a {words} > 0, got {value!r}", argument=key
            )
    for key in set(_JET) - set(correlation.needs):
        if getattr(geometry, key) is not None and key != "velocity":
            raise ModelError(f"the correlation {name!r} takes no {key}", argument=key)
    if "velocity" not in correlation.needs and geometry.velocity is not None:
        raise ModelError(
            f"the correlation {name!r} is for still fluid and takes no velocity",
            argument="velocity",
        )
    return correlation


# Martin (1977)'s stated ranges of the jets' geometry (from memory): name → ((ratio, low,
# high), ...), the ratios of the averaging radius or half-width and of the nozzle's distance
# to the nozzle diameter or slot width.
JET_RANGES = {
    "jet-round-nozzle": (("r/D", 2.5, 7.5), ("H/D", 2.0, 12.0)),
    "jet-slot-nozzle": (("x/S", 2.0, 25.0), ("H/S", 2.0, 10.0)),
}


def geometry_notes(name: str, geometry: FlowGeometry) -> list[str]:
    """The jet's geometry ratios that lie outside the source's stated ranges, in words."""
    notes = []
    for (ratio, low, high), value in zip(
        JET_RANGES.get(name, ()),
        (geometry.length, geometry.nozzle_distance),
        strict=False,
    ):
        if geometry.nozzle and not low <= value / geometry.nozzle <= high:
            notes.append(f"{ratio} = {value / geometry.nozzle:.3g} (stated {low:g}-{high:g})")
    return notes


@dataclass(frozen=True)
class CoefficientTable:
    """A correlation evaluated over surface temperatures (tuples, so that it compares and
    pickles): T_s in °C, Re or Ra, Nu and h in W/(m²·K)."""

    group: str
    surface_temperatures: tuple[float, ...]
    groups: tuple[float, ...]
    nusselt: tuple[float, ...]
    coefficients: tuple[float, ...]

    def at(self, temperatures) -> np.ndarray:
        """Rows (T_s, Re or Ra, Nu, h) at ``temperatures`` °C, interpolated in the table."""
        t = np.atleast_1d(np.asarray(temperatures, dtype=float))
        columns = (self.groups, self.nusselt, self.coefficients)
        return np.column_stack([t, *(np.interp(t, self.surface_temperatures, c) for c in columns)])


def coefficient_table(
    name: str,
    fluid: str,
    fluid_temperature: float,
    geometry: FlowGeometry,
    surface_range: tuple[float, float],
    points: int = 161,
) -> CoefficientTable:
    """h(T_s) of correlation ``name`` for surface temperatures over ``surface_range`` °C, the
    fluid's properties at each film temperature (T_s + T∞)/2.

    Parameters
    ----------
    name : str
        A key of :data:`CORRELATIONS`.
    fluid : str
        A key of :data:`fem.fluid_properties.FLUIDS`.
    fluid_temperature : float
        T∞ in °C.
    geometry : FlowGeometry
        Lengths in m and speed in m/s.
    surface_range : (float, float)
        The lowest and highest surface temperature the run can reach, °C.
    points : int
        Table points, spread evenly, with more beside T∞ (where natural convection's h
        changes fastest).

    Examples
    --------
    >>> table = coefficient_table(
    ...     "natural-horizontal-cylinder", "air", 20.0, FlowGeometry(0.1), (20.0, 300.0))
    >>> 5 < table.coefficients[-1] < 12
    True
    """
    correlation = check_correlation(name, geometry)
    check_fluid(fluid)
    low, high = float(min(surface_range)), float(max(surface_range))
    _check_liquid_surface(fluid, high)
    span = max(high - low, 1.0)
    near = fluid_temperature + span * np.geomspace(1e-4, 0.05, 12)
    grid = np.concatenate(
        [np.linspace(low, high, points), near, 2 * fluid_temperature - near, [fluid_temperature]]
    )
    temperatures = np.unique(grid[(grid >= low - 1e-9) & (grid <= high + 1e-9)])
    rows = []
    scale = correlation.scale(geometry)
    films = fluid_property_rows(fluid, 0.5 * (temperatures + fluid_temperature))
    for surface, film in zip(temperatures, films, strict=True):
        group, nusselt = correlation.nusselt(film, surface - fluid_temperature, geometry)
        rows.append((group, nusselt, nusselt * film.conductivity / scale))
    groups, nusselts, coefficients = (
        tuple(float(v) for v in column) for column in zip(*rows, strict=True)
    )
    if not all(math.isfinite(h) and h > 0 for h in coefficients):
        raise ModelError(
            f"the correlation {name!r} gave no positive coefficient over {low:g}-{high:g} degC",
            argument="correlation",
        )
    return CoefficientTable(
        correlation.group, tuple(temperatures.tolist()), groups, nusselts, coefficients
    )


def _check_liquid_surface(fluid: str, highest: float) -> None:
    """A liquid's single-phase correlation holds only while the surface stays below the
    liquid's boiling point (the top of its property range at atmospheric pressure)."""
    if fluid == "air":
        return
    limit = fluid_range(fluid)[1]
    if highest > limit:
        raise ModelError(
            f"the surface reaches {highest:.4g} degC, above the {limit:.4g} degC where "
            f"{FLUIDS[fluid][1]} boils or leaves its property range at atmospheric pressure: "
            "a single-phase correlation does not hold there; use a boiling curve (convection "
            "with a coefficient table of surface temperature)",
            argument="fluid",
        )
