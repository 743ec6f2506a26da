"""``[run]``, ``[advisor]`` and ``[outputs]``: the keyword arguments of :func:`fem.solve` and
:func:`advisor.assess`, and which optional files to write.

The run options are checked by the solver's own rules before anything is meshed, through
:func:`fem.check_run_options`.
"""

from __future__ import annotations

import re

import fem
from fem import StopWhen
from fem.model import check_element_order

from ..analysis.assessment import check_options
from ..analysis.stages import Stage, check_stages
from ..checkpoint import DEFAULT_EVERY, CheckpointEvery
from ..errors import AdvisorError
from .conditions import temperature
from .reader import Table, echo
from .schema import OUTPUTS, RUN_KEYS, RUN_QUANTITIES
from .validation import LIBRARY_ERRORS, build, raise_at


def read_run(root: Table, parts: dict) -> tuple[float, dict, int, CheckpointEvery | None]:
    """``[run]``: the end time in s, the keyword arguments of :func:`fem.solve`, the element
    order and how often to keep a checkpoint. ``parts`` holds the model's materials,
    boundaries, heat sources and probes, which the run options are checked against."""
    run = root.table("run")
    end_time = run.get("end_time", "time")
    options: dict = {"method": run.text("method", "crank-nicolson")}
    for key, kind in RUN_QUANTITIES.items():
        value = run.get(key, kind, None)
        if value is not None:
            options[key] = value
    iterations = run.raw("max_newton_iterations", None)
    if iterations is not None:  # a whole number: the library's check says so if it is not
        options["max_newton_iterations"] = iterations
    stop = run.table("stop", None)
    if stop is not None:
        options["stop"] = StopWhen(stop.text("quantity"), temperature(stop, "target"))
        stop.done()
    try:
        fem.check_run_options(end_time, probes=tuple(parts["probes"]), **options)
    except LIBRARY_ERRORS as error:
        raise_at(run, error, RUN_KEYS, None)
    if options["method"] == "exponential":
        try:
            fem.check_exponential_parts(parts["materials"], parts["boundaries"], parts["sources"])
        except LIBRARY_ERRORS as error:
            run.fail("method", str(error))
    element_order = run.get("element_order", "number", 1)
    build(run, check_element_order, element_order, default="element_order")
    checkpoint_every = read_checkpoint_every(run)
    run.done()
    return end_time, options, int(element_order), checkpoint_every


def read_checkpoint_every(run: Table) -> CheckpointEvery | None:
    """``[run] checkpoint_every``: a wall-clock time ("60 s"), a whole number of steps, or
    false (no checkpoints); default every 30 s of wall-clock time."""
    value = run.raw("checkpoint_every", True)
    if value is True:
        return DEFAULT_EVERY
    if value is False:
        return None
    if isinstance(value, int):
        if value < 1:
            run.fail("checkpoint_every", f"a number of steps must be 1 or more, got {value}")
        return CheckpointEvery(steps=value)
    if not isinstance(value, str):
        run.fail(
            "checkpoint_every",
            f'expected a wall-clock time ("60 s"), a number of steps or false, got {echo(value)}',
        )
    seconds = run.quantity("checkpoint_every", value, "time")
    if not seconds > 0:
        run.fail("checkpoint_every", f"a wall-clock time must be above 0 s, got {echo(value)}")
    return CheckpointEvery(seconds=seconds)


def read_advisor(root: Table) -> dict:
    """``[advisor]``: the keyword arguments of :func:`advisor.assess`."""
    advisor = root.table("advisor", None)
    if advisor is None:
        return {}
    options: dict = {}
    target = temperature(advisor, "target", None)
    if target is not None:
        options["target"] = target
    options["tolerance"] = advisor.get("tolerance", "number", 0.05)
    options["quantity"] = advisor.text("quantity", "slowest")
    if advisor.has("process"):
        options["process"] = advisor.text("process")
    build(advisor, check_options, **options, default="tolerance")
    options.update(read_quench_keys(advisor))
    probes = root.data.get("probes")
    stages = read_stages(advisor, tuple(probes) if isinstance(probes, dict) else ())
    if advisor.has("error_estimate"):
        options["error_estimate"] = advisor.flag("error_estimate", False)
    if stages:
        options["stages"] = stages
    advisor.done()
    return options


def read_stages(advisor: Table, probes: tuple[str, ...] = ()) -> tuple[Stage, ...]:
    """``[[advisor.stages]]``: ``reach = "21 degC"``, one deadline (``by = "2 h"`` from the
    start of the run, or ``within = "4 h"`` from the stage before) and ``at = "slowest"``
    (``"mean"`` or the name of one of ``probes``, the case's ``[probes]``)."""
    stages = []
    for table in advisor.tables("stages"):
        stage = Stage(
            temperature(table, "reach"),
            table.get("by", "time", None),
            table.get("within", "time", None),
            table.text("at", "slowest"),
        )
        table.done()
        try:
            check_stages([*stages, stage], probes)
        except AdvisorError as error:  # the message names the stage by its place in the list
            key = (error.argument or "").rpartition(".")[2]
            table.fail(key if key in ("by", "within", "at") else "reach", _stage_words(error))
        stages.append(stage)
    return tuple(stages)


def read_outputs(root: Table) -> dict[str, bool]:
    """``[outputs]``: which optional files to write (the switches of ``schema.OUTPUTS``)."""
    table = root.table("outputs", None)
    if table is None:
        return {}
    outputs = {key: table.flag(key, True) for key in OUTPUTS if table.has(key)}
    table.done()
    return outputs


def read_quench_keys(advisor: Table) -> dict:
    """``[advisor]`` quench and freezing outputs: ``cooling_rates = true``, ``times_to =
    ["500 degC", ...]``, ``cooling_range = ["800 degC", "500 degC"]`` (from, to) and
    ``freeze_to = "-10 degC"`` (Plank's and Pham's times from the material's latent heat)."""
    options: dict = {}
    freeze_to = temperature(advisor, "freeze_to", None)
    if freeze_to is not None:
        options["freeze_to"] = freeze_to
    if advisor.has("cooling_rates"):
        options["cooling_rates"] = advisor.flag("cooling_rates", False)
    for key in ("times_to", "cooling_range"):
        values = advisor.raw(key, None)
        if values is None:
            continue
        pair = key == "cooling_range"
        if not isinstance(values, list) or not values or (pair and len(values) != 2):
            wanted = "[from, to], two temperatures" if pair else "a list of temperatures"
            advisor.fail(key, f"expected {wanted}, got {values!r}")
        options[key] = tuple(advisor.quantity(key, v, "temperature") for v in values)
    return options


def _stage_words(error: AdvisorError) -> str:
    """The library's message without the ``stages[i].key`` the key path already names."""
    return re.sub(r"^stages\[\d+\]\.? ?", "", str(error))
