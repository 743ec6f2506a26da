"""A quick check that needs no field solve: Biot numbers, the lumped and corrected curves,
their times to target, the slowest mode and the expected direction of the lumped error — in
well under a second on a coarse mesh, so it fits a design loop."""

from __future__ import annotations

import math
from dataclasses import dataclass

from fem import ThermalModel

from .assessment import check_request, correction
from .biot import COMMON_LIMIT, BiotNumber, biot_numbers
from .lumped import LumpedModel
from .modes import SlowestMode, slowest_mode


@dataclass(frozen=True)
class QuickCheck:
    """What can be said about the lumped estimate before solving the field.

    Attributes
    ----------
    biot : tuple of BiotNumber
    lumped, corrected : LumpedModel
    mode : SlowestMode
    time_to_target : dict of str to float or None
        ``classical`` and ``corrected`` lumped times, and ``slowest (modal estimate)``: the
        late-stage slowest point, ln(core_to_mean·θ0/θ)/λ₁, in s.
    expected_direction : str
        Which way the lumped estimate will be wrong.
    """

    biot: tuple[BiotNumber, ...]
    lumped: LumpedModel
    corrected: LumpedModel
    mode: SlowestMode
    target: float | None
    time_to_target: dict[str, float | None]
    expected_direction: str


def quick_check(model: ThermalModel, *, target: float | None = None) -> QuickCheck:
    """Judge the lumped estimate from the model alone (no time stepping).

    Use a coarse mesh: the Biot numbers and the slowest mode converge fast with the mesh.

    Examples
    --------
    >>> from geometries import Rectangle
    >>> from fem import Convection, Material, ThermalModel
    >>> oil = Convection(heat_transfer_coefficient=400.0, ambient=60.0)
    >>> bar = ThermalModel(Rectangle(0.06, 0.04).mesh(size=0.005), Material(40.0, 7850.0, 520.0),
    ...     {s: oil for s in ("left", "right", "top", "bottom")}, initial_temperature=850.0)
    >>> check = quick_check(bar, target=200.0)
    >>> check.time_to_target["classical"] < check.time_to_target["slowest (modal estimate)"]
    True
    """
    check_request(model, target=target)
    lumped = LumpedModel.of(model)
    drive = lumped.initial_temperature - lumped.equilibrium
    # the surface passes between the initial and the driving temperatures: a coefficient
    # that follows it (radiation, a boiling curve) is sampled over that range
    biot = biot_numbers(model, temperature_range=model.driving_temperatures(0.0))
    _, scale, _ = correction(model, biot)
    corrected = LumpedModel.of(model, scale=scale, name="corrected")
    mode = slowest_mode(model)

    times: dict[str, float | None] = {}
    if target is not None:
        horizon = 20 * lumped.time_constant
        times["classical"] = lumped.time_to(target, horizon)
        times["corrected"] = corrected.time_to(target, horizon)
        ratio = mode.core_to_mean * drive / (target - lumped.equilibrium)
        times["slowest (modal estimate)"] = math.log(ratio) / mode.rate if ratio > 1 else None

    heating = drive < 0
    bi = biot[0]
    if bi.high < COMMON_LIMIT / 10:
        direction = (
            f"Bi = {bi.value:.3g}: the part is close to uniform; the lumped estimate "
            "should be good"
        )
    else:
        direction = (
            "the lumped estimate will run ahead of the slowest point: it will say the "
            "part is "
            + ("heated through" if heating else "cooled")
            + " too early — "
            + (
                "non-conservative for a soak or hold time"
                if heating
                else "non-conservative for the end of a quench or a safe-to-handle time"
            )
        )
    return QuickCheck(biot, lumped, corrected, mode, target, times, direction)
