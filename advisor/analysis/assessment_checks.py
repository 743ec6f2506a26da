"""The checks of an assessment's request: :func:`check_options` without a model (a case file
checks them before meshing), :func:`check_request` with it, before any solve."""

from __future__ import annotations

from collections.abc import Sequence

from fem import ThermalModel

from ..errors import AdvisorError
from .freezing import FreezingProduct
from .lumped import LumpedModel
from .process_readings import check_outputs, freezing_product
from .process_words import check_process
from .stages import Stage, check_stages
from .verdict import QUANTITIES


def check_request(
    model: ThermalModel,
    *,
    target: float | None = None,
    tolerance: float = 0.05,
    quantity: str = "slowest",
    cooling_rates: bool = False,
    times_to: Sequence[float] = (),
    cooling_range: Sequence[float] | None = None,
    freezing: FreezingProduct | None = None,
    freeze_to: float | None = None,
    process: str | None = None,
    end_time: float | None = None,
    stages: Sequence[Stage] = (),
) -> None:
    """Refuse, before any solve, an assessment that :func:`assess` would refuse; ``end_time``
    (s) says whose conditions give where the part is heading (default: those at t = 0)."""
    check_process(process)
    lumped = LumpedModel.of(model, horizon=0.0 if end_time is None else float(end_time))
    drive = lumped.initial_temperature - lumped.equilibrium
    check_arguments(lumped, drive, target, tolerance, quantity)
    check_outputs(drive, cooling_range, freezing, freeze_to)
    freezing_product(model, lumped, freezing, freeze_to)
    check_stages(stages, tuple(model.probes))


def check_options(
    *,
    target: float | None = None,
    tolerance: float = 0.05,
    quantity: str = "slowest",
    process: str | None = None,
) -> None:
    """Refuse what :func:`assess` refuses of its options without a model (a case file checks
    them before meshing); :func:`check_request` adds what needs the model."""
    check_process(process)
    if quantity not in QUANTITIES:
        raise AdvisorError(
            f"quantity must be one of {QUANTITIES}, got {quantity!r}", argument="quantity"
        )
    if not (isinstance(tolerance, int | float) and 0 < tolerance < 1):
        raise AdvisorError(
            f"tolerance must be a fraction in (0, 1), got {tolerance!r}", argument="tolerance"
        )
    if target is None and quantity == "time_to_target":
        raise AdvisorError(
            "quantity 'time_to_target' needs a target temperature", argument="target"
        )


def check_arguments(lumped, drive, target, tolerance, quantity) -> None:
    """Refuse options, a start at the lumped equilibrium or a target out of reach."""
    check_options(target=target, tolerance=tolerance, quantity=quantity)
    if abs(drive) <= 1e-9 * max(abs(lumped.initial_temperature), 1.0):
        raise AdvisorError(
            f"the initial temperature equals the lumped equilibrium ({lumped.equilibrium:.6g} "
            "degC): nothing heats or cools at the start, so there is nothing to assess"
        )
    if target is not None:
        low, high = sorted((lumped.initial_temperature, lumped.equilibrium))
        if not (isinstance(target, int | float) and low < target < high):
            raise AdvisorError(
                f"target must be a temperature strictly between the initial temperature and "
                f"where the part is heading, ({low:.6g}, {high:.6g}) degC, got {target!r}"
            )
