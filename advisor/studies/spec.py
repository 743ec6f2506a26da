"""A study's specification: which case keys vary and how, from the case file's ``[study]``
table or the command line's ``--vary KEY=SPEC``, and the list of overrides it makes.

In a case file::

    [study]
    sampling = "latin-hypercube"   # or "random" (for the distributions below)
    samples = 64
    seed = 1
    workers = 2                    # local worker processes
    # cluster = "tcp://10.0.0.5:8786"   # a dask.distributed scheduler instead

    [[study.vary]]                 # a list of values
    key = "boundaries.quenched.convection.coefficient"
    values = ["200 W/(m^2*K)", "400 W/(m^2*K)", "800 W/(m^2*K)"]

    [[study.vary]]                 # a range: count values, spacing "linear" or "log"
    key = "section.mesh_size"
    start = "1 mm"
    stop = "4 mm"
    count = 4
    spacing = "log"

    [[study.vary]]                 # a distribution (uncertainty)
    key = "material.conductivity"
    distribution = "normal"
    mean = "40 W/(m*K)"
    deviation = "2 W/(m*K)"

``key`` is any case key by its path, with ``[i]`` for an array of tables
(``section.shape[0].width``). Lists and ranges make a full grid (the first key varies
slowest); distributions are sampled ``samples`` times (see :mod:`.sampling`) and every grid
point takes every sample. On the command line a SPEC is a TOML value (``[...]`` or
``{start = "1 mm", stop = "4 mm", count = 4}``), a call ``linear(1 mm, 4 mm, 4)``,
``log(100, 1000, 5)``, ``uniform(a, b)``, ``normal(mean, deviation)``,
``lognormal(median, log_deviation)``, ``triangular(low, mode, high)``, or values separated by
commas; a ``--vary`` replaces the file's entry for the same key.
"""

from __future__ import annotations

import itertools
import json
import re
import sys
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from ..casefile.reader import CaseError, Context, Table
from .sampling import DISTRIBUTIONS, SAMPLINGS, Distribution, check_parameters, unit_cube
from .values import in_unit, split_quantity, with_unit

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover - Python 3.10
    import tomli as tomllib

_KEY = re.compile(r"^[A-Za-z_][\w-]*(\[\d+\])?(\.[A-Za-z_][\w-]*(\[\d+\])?)*$")
_CALL = re.compile(r"^\s*(\w+)\s*\((.*)\)\s*$", re.DOTALL)
SPACINGS = ("linear", "log")


@dataclass(frozen=True)
class Variation:
    """One varied key: a list of values (lists and ranges) or a distribution."""

    key: str
    values: tuple = ()
    distribution: Distribution | None = None

    def describe(self) -> dict:
        """Plain data that identifies the variation (stored with the study)."""
        if self.distribution is None:
            return {"key": self.key, "values": list(self.values)}
        d = self.distribution
        return {
            "key": self.key,
            "distribution": d.kind,
            "parameters": d.parameters,
            "unit": d.unit,
        }


@dataclass(frozen=True)
class StudySpec:
    """What a study runs: the variations, how distributions are sampled, and where.

    Attributes
    ----------
    variations : tuple of Variation
    sampling : str
        ``"random"`` or ``"latin-hypercube"``.
    samples : int
        Draws of the distributions (ignored without any).
    seed : int
        Seed of the draws, so a study can be resumed and repeated.
    workers : int or None
        Local worker processes (None: one per core).
    cluster : str or None
        Address of a dask.distributed scheduler.
    """

    variations: tuple[Variation, ...] = ()
    sampling: str = "latin-hypercube"
    samples: int = 32
    seed: int = 1
    workers: int | None = None
    cluster: str | None = None

    def identity(self) -> str:
        """JSON of what decides the cases (not where they run), to refuse a changed resume."""
        sampled = any(v.distribution is not None for v in self.variations)
        data = {
            "vary": [v.describe() for v in self.variations],
            **(
                {"sampling": self.sampling, "samples": self.samples, "seed": self.seed}
                if sampled
                else {}
            ),
        }
        return json.dumps(data, sort_keys=True)

    def overrides(self) -> list[dict]:
        """The study's cases as overrides ``{key path: case-file value}``, in order."""
        grid = [v for v in self.variations if v.distribution is None]
        sampled = [v for v in self.variations if v.distribution is not None]
        points = list(itertools.product(*(v.values for v in grid)))
        draws: list[tuple] = [()]
        if sampled:
            cube = unit_cube(self.sampling, self.samples, len(sampled), self.seed)
            columns = [
                [with_unit(x, v.distribution.unit) for x in v.distribution.quantile(cube[:, i])]
                for i, v in enumerate(sampled)
            ]
            draws = list(zip(*columns, strict=True))
        keys = [v.key for v in grid] + [v.key for v in sampled]
        return [dict(zip(keys, point + draw, strict=True)) for point in points for draw in draws]


def read_study_table(data: dict, context, overrides_cli: list[str] = ()) -> StudySpec:
    """The study of a case file's tables (``data``, as ``tomllib`` gives them), with the
    command line's ``--vary`` entries replacing or adding to the file's.

    Parameters
    ----------
    data : dict
        The case file's tables.
    context : advisor.casefile.reader.Context
        The file, for messages with lines.
    overrides_cli : list of str
        ``KEY=SPEC`` strings.
    """
    root = Table(data, "", context)
    table = root.table("study", None) or Table({}, "study", context)
    sampling = table.text("sampling", "latin-hypercube", choices=SAMPLINGS)
    samples = _count(table, "samples", 32)
    seed = table.raw("seed", 1)
    if isinstance(seed, bool) or not isinstance(seed, int) or seed < 0:
        table.fail("seed", f"expected a whole number >= 0, got {seed!r}")
    workers = table.raw("workers", None)
    if workers is not None and (
        isinstance(workers, bool) or not isinstance(workers, int) or workers < 1
    ):
        table.fail("workers", f"expected a whole number >= 1, got {workers!r}")
    cluster = table.text("cluster", None)
    variations = {}
    for entry in table.tables("vary"):
        variation = read_variation(entry)
        if variation.key in variations:
            entry.fail("key", f"{variation.key!r} is varied twice; give it once")
        variations[variation.key] = variation
    table.done()
    for text in overrides_cli:
        variation = parse_vary(text)
        variations[variation.key] = variation
    return StudySpec(tuple(variations.values()), sampling, samples, seed, workers, cluster)


def parse_vary(text: str) -> Variation:
    """A variation from the command line's ``KEY=SPEC`` (see the module's description)."""
    key, sep, spec = text.partition("=")
    key, spec = key.strip(), spec.strip()
    where = f"--vary {key}"
    if not sep or not key or not spec:
        raise CaseError(f"--vary {text!r}: expected KEY=SPEC, e.g. section.mesh_size=1 mm,2 mm")
    try:
        value = tomllib.loads(f"v = {spec}")["v"]
    except tomllib.TOMLDecodeError:
        value = None
    if isinstance(value, list):
        entry = {"values": value}
    elif isinstance(value, dict):
        entry = dict(value)
    else:
        entry = _shorthand(spec, where)
    context = Context("command line", (), Path("."))
    return read_variation(Table({"key": key, **entry}, where, context))


def _shorthand(spec: str, where: str) -> dict:
    call = _CALL.match(spec)
    if call is None:
        return {"values": [_scalar(part) for part in spec.split(",")]}
    name, arguments = call.group(1), [_scalar(a) for a in call.group(2).split(",")]
    if name in SPACINGS:
        if len(arguments) != 3:
            raise CaseError(f"{where}: {name}(start, stop, count) takes 3 values")
        start, stop, count = arguments
        return {"start": start, "stop": stop, "count": count, "spacing": name}
    if name in DISTRIBUTIONS:
        names = DISTRIBUTIONS[name][0]
        if len(arguments) != len(names):
            raise CaseError(f"{where}: {name}({', '.join(names)}) takes {len(names)} values")
        return {"distribution": name, **dict(zip(names, arguments, strict=True))}
    raise CaseError(
        f"{where}: unknown {name}(...); use one of {list(SPACINGS) + list(DISTRIBUTIONS)}"
    )


def _scalar(text: str):
    """A value written on the command line: a number if it is one, else the text."""
    text = text.strip()
    try:
        number = float(text)
    except ValueError:
        return text
    return (
        int(number)
        if number.is_integer() and "." not in text and "e" not in text.lower()
        else number
    )


def read_variation(entry: Table) -> Variation:
    """One ``[[study.vary]]`` entry: ``key`` and either ``values``, a range or a
    distribution."""
    key = entry.text("key")
    if not _KEY.match(key) or key.startswith("study"):
        entry.fail("key", f"expected a case key path such as 'section.mesh_size', got {key!r}")
    if entry.has("values"):
        values = entry.raw("values")
        if not isinstance(values, list) or not values:
            entry.fail("values", f"expected a list of one value or more, got {values!r}")
        entry.done()
        return Variation(key, tuple(values))
    if entry.has("distribution"):
        return _read_distribution(entry, key)
    if entry.has("start"):
        return _read_range(entry, key)
    entry.fail("key", "give values = [...], a range (start, stop, count) or a distribution")


def _read_range(entry: Table, key: str) -> Variation:
    start, unit = split_quantity(entry.raw("start"), entry.key("start"))
    stop = in_unit(entry.raw("stop"), unit, entry.key("stop"))
    count = _count(entry, "count", MISSING_COUNT)
    spacing = entry.text("spacing", "linear", choices=SPACINGS)
    entry.done()
    if spacing == "log":
        if not (start > 0 and stop > 0):
            entry.fail("start", f"a log range needs start and stop > 0, got {start:g}, {stop:g}")
        magnitudes = np.geomspace(start, stop, count)
    else:
        magnitudes = np.linspace(start, stop, count)
    return Variation(key, tuple(with_unit(x, unit) for x in magnitudes))


def _read_distribution(entry: Table, key: str) -> Variation:
    kind = entry.text("distribution", choices=tuple(DISTRIBUTIONS))
    names, spreads = DISTRIBUTIONS[kind]
    _, unit = split_quantity(entry.raw(names[0]), entry.key(names[0]))
    parameters = []
    for name in names:
        value = entry.raw(name)
        if name == "log_deviation":
            parameters.append(split_quantity(value, entry.key(name))[0])
        else:
            parameters.append(in_unit(value, unit, entry.key(name), difference=name in spreads))
    entry.done()
    check_parameters(kind, tuple(parameters), entry.key("distribution"))
    return Variation(key, distribution=Distribution(kind, tuple(parameters), unit))


MISSING_COUNT = object()


def _count(table: Table, name: str, default) -> int:
    value = table.raw(name) if default is MISSING_COUNT else table.raw(name, default)
    if isinstance(value, bool) or not isinstance(value, int) or value < 1:
        table.fail(name, f"expected a whole number >= 1, got {value!r}")
    return value
