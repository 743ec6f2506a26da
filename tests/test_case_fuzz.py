"""Fuzzing the case-file loader: mutated starting cases and unit strings, and only the loader's
documented error (:class:`CaseError`) may escape ``load_case``; nothing is written.

The mutations are those a careless or hostile input makes: a key dropped or duplicated, a
value of another type, random unit strings, random text (control characters, emoji, NUL) in
names and keys, deep nesting, other encodings and stray bytes. The number of examples is
``SOAKWISE_FUZZ_EXAMPLES`` (default 200, which keeps the test to some seconds; run 10,000
locally before changing the loader).
"""

from __future__ import annotations

import json
import math
import os
import sys
from pathlib import Path

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from advisor.casefile.case import CaseError, load_case
from advisor.casefile.starters import SCENARIOS, starter_text
from advisor.casefile.units import UnitError, quantity

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover - Python 3.10
    import tomli as tomllib

EXAMPLES = int(os.environ.get("SOAKWISE_FUZZ_EXAMPLES", "200"))
FUZZ = settings(
    max_examples=EXAMPLES,
    deadline=None,
    derandomize=EXAMPLES <= 200,  # the suite's run is repeatable; longer runs explore
    suppress_health_check=list(HealthCheck),
    database=None,
)
LONGEST_MESSAGE = 800  # characters: the file name, a line, a key path and ~80-character echoes
STARTERS = {name: tomllib.loads(starter_text(name)) for name in sorted(SCENARIOS)}


# --- a small TOML writer: every table inline, so any mutated data can be written back --------


def toml_value(value) -> str:
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        if math.isnan(value):
            return "nan"
        if math.isinf(value):
            return "inf" if value > 0 else "-inf"
        return repr(value)
    if isinstance(value, str):
        return json.dumps(value)  # a TOML basic string: \uXXXX escapes for controls
    if isinstance(value, list):
        return "[" + ", ".join(toml_value(v) for v in value) + "]"
    if isinstance(value, dict):
        return (
            "{" + ", ".join(f"{json.dumps(k)} = {toml_value(v)}" for k, v in value.items()) + "}"
        )
    return json.dumps(str(value))


def toml_text(data: dict) -> str:
    return "".join(f"{json.dumps(key)} = {toml_value(value)}\n" for key, value in data.items())


# --- mutations -------------------------------------------------------------------------------


def paths_of(data, prefix=()):
    """Every (path, value) below ``data``, containers included."""
    found = []
    items = data.items() if isinstance(data, dict) else enumerate(data)
    for key, value in items:
        found.append(((*prefix, key), value))
        if isinstance(value, dict | list):
            found += paths_of(value, (*prefix, key))
    return found


def parent_of(data, path):
    for key in path[:-1]:
        data = data[key]
    return data


UNIT_WORDS = ["mm", "m", "s", "min", "degC", "K", "W", "kg", "J", "(", ")", "**", "^", "/", "*"]
unit_strings = st.builds(
    lambda number, words, noise: f"{number} {''.join(words)}{noise}",
    st.one_of(st.integers(-5, 5000), st.floats(allow_nan=True, allow_infinity=True)),
    st.lists(st.sampled_from(UNIT_WORDS + ["0", "1", "2", " ", "-", "e"]), max_size=6),
    st.text(max_size=4),
)
names = st.text(min_size=0, max_size=12) | st.sampled_from(["\x00", "a\x00b", "\x1b[31m", "🔥"])
leaves = st.one_of(
    st.none(),  # stands for "drop the key"
    st.booleans(),
    st.integers(-(10**20), 10**20),
    st.floats(),
    names,
    unit_strings,
    st.text(min_size=100, max_size=3000),
    st.lists(st.integers(), max_size=5),
    st.dictionaries(names, st.integers(), max_size=3),
)


def nested(depth: int, table: bool):
    value: object = 1
    for _ in range(depth):
        value = {"x": value} if table else [value]
    return value


def insert_key(data: dict, draw) -> None:
    """Add a key the starters leave out, with a value that may or may not be valid."""
    region = draw(st.sampled_from(["bar", "block", "product", "core"]) | names)
    where = draw(st.sampled_from(["sources", "initial", "stop", "checkpoint_every"]))
    if where == "sources" and isinstance(data.setdefault("sources", {}), dict):
        data["sources"][region] = draw(unit_strings | leaves.filter(bool))
    elif where == "initial":
        data["initial"] = {"temperature": {region: draw(unit_strings)}}
    elif where == "stop" and isinstance(data.get("run"), dict):
        quantity = draw(st.sampled_from(["mean", "minimum", "maximum", "core"]) | names)
        data["run"]["stop"] = {"quantity": quantity, "target": draw(unit_strings)}
    elif where == "checkpoint_every" and isinstance(data.get("run"), dict):
        data["run"]["checkpoint_every"] = draw(leaves.filter(lambda v: v is not None))


@st.composite
def mutated_data(draw):
    data = json.loads(json.dumps(STARTERS[draw(st.sampled_from(sorted(STARTERS)))]))
    for _ in range(draw(st.integers(1, 3))):
        paths = paths_of(data)
        if not paths:
            break
        path, _ = draw(st.sampled_from(paths))
        parent = parent_of(data, path)
        kind = draw(st.sampled_from(["leaf", "rename", "nest", "unit", "insert"]))
        if kind == "insert":  # keys the starters leave out: regions, a stop, checkpoints
            insert_key(data, draw)
            continue
        if kind == "rename" and isinstance(parent, dict):
            parent[draw(names)] = parent.pop(path[-1])
            continue
        if kind == "nest":
            value = nested(draw(st.integers(10, 200)), draw(st.booleans()))
        elif kind == "unit":
            value = draw(unit_strings)
        else:
            value = draw(leaves)
        if value is None:
            del parent[path[-1]]
        else:
            parent[path[-1]] = value
    return data


@st.composite
def mutated_bytes(draw):
    """The text of a mutated case, then perhaps damaged as bytes."""
    text = toml_text(draw(mutated_data())) if draw(st.booleans()) else starter_text("quench-bar")
    lines = text.splitlines(keepends=True)
    how = draw(st.sampled_from(["as is", "duplicate", "encoding", "bytes", "cut", "nest"]))
    if how == "duplicate" and lines:
        i = draw(st.integers(0, len(lines) - 1))
        lines.insert(i, lines[i])
    if how == "nest":
        depth = draw(st.integers(50, 5000))
        opening, closing = draw(st.sampled_from([("[", "]"), ("{x = ", "}")]))
        lines.append(f"deep = {opening * depth}1{closing * depth}\n")
    data = "".join(lines).encode("utf-8")
    if how == "encoding":
        data = "".join(lines).encode(
            draw(st.sampled_from(["utf-16", "utf-32", "latin-1"])), "replace"
        )
    elif how == "bytes":
        at = draw(st.integers(0, len(data)))
        data = data[:at] + draw(st.binary(min_size=1, max_size=8)) + data[at:]
    elif how == "cut":
        data = data[: draw(st.integers(0, len(data)))]
    return data


def load_only_case_error(path: Path) -> None:
    """``load_case(path)`` returns a case or raises CaseError with a bounded message."""
    try:
        load_case(path)
    except CaseError as error:
        assert len(str(error)) <= LONGEST_MESSAGE, str(error)[:300]


# --- the tests -------------------------------------------------------------------------------


@FUZZ
@given(data=mutated_data())
def test_mutated_starting_cases_raise_only_case_error(data, tmp_path_factory):
    folder = tmp_path_factory.mktemp("fuzz")
    path = folder / "case.toml"
    path.write_text(toml_text(data), encoding="utf-8")
    load_only_case_error(path)
    assert [p.name for p in folder.iterdir()] == ["case.toml"]  # nothing written


@FUZZ
@given(data=mutated_bytes())
def test_damaged_case_files_raise_only_case_error(data, tmp_path_factory):
    folder = tmp_path_factory.mktemp("fuzz")
    path = folder / "case.toml"
    path.write_bytes(data)
    load_only_case_error(path)
    assert [p.name for p in folder.iterdir()] == ["case.toml"]


@FUZZ
@given(
    text=unit_strings | st.text(max_size=20),
    kind=st.sampled_from(
        [
            "length",
            "time",
            "temperature",
            "temperature_difference",
            "heat_transfer_coefficient",
            "number",
        ]
    ),
)
def test_unit_strings_raise_only_unit_error(text, kind):
    try:
        value = quantity(text, kind)
    except UnitError as error:
        assert len(str(error)) <= LONGEST_MESSAGE
    else:
        assert math.isfinite(value)
