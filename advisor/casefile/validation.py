"""Validation in one place: the case file builds the library's own objects and lets them check
their values; their errors become :class:`CaseError`\\ s naming the key path and line.

The library speaks to Python callers: its messages name the class and argument (``Convection
heat_transfer_coefficient must be a finite value > 0 ...``). Here the key path already names the
field, and a case file's numbers are always finite (:mod:`.units` refuses others), so the
wording is trimmed to what a case file's reader needs; a choice gets a suggestion.
"""

from __future__ import annotations

import re
from collections.abc import Callable, Mapping
from typing import NoReturn

from fem import ModelError
from geometries import GeometryError

from ..errors import AdvisorError
from ..time_words import duration_text
from .reader import CaseError, Table, suggest
from .units import registry, shown_in, unit_of

LIBRARY_ERRORS = (ModelError, GeometryError)

# The library's wording → the case file's (applied in order).
_WORDING = (
    # "must be a finite value > 0 W/(m*K)" → "must be > 0 W/(m*K)"
    (re.compile(r"\ba finite (?:value|time|number) (?=[<>])"), ""),
    (re.compile(r"\bfinite "), ""),
    (
        re.compile(r"must be (?:a temperature )?above (-\d+(?:\.\d+)? degC)"),
        r"is at or below absolute zero (\1)",
    ),
    (re.compile(r"use Insulated\(\)"), "use insulated = true"),
)
_CHOICE = re.compile(r"one of [\[(](?P<choices>[^\])]*)[\])], got '(?P<given>[^']*)'")


def build(
    table: Table,
    constructor: Callable,
    *args,
    keys: Mapping[str, str] | None = None,
    default: str | None = None,
    **kwargs,
):
    """``constructor(*args, **kwargs)``, its library errors raised as a :class:`CaseError`.

    Parameters
    ----------
    table : Table
        The table the values came from.
    constructor : callable
        A library class or function that checks its arguments.
    keys : mapping of str to str, optional
        The library's argument names → this table's key names (the schema's rows); an
        argument named alike needs no entry.
    default : str, optional
        The key to point at when the error names no argument of ``keys``; by default the
        table itself.
    """
    try:
        return constructor(*args, **kwargs)
    except CaseError:  # already at its key (a CaseError is an AdvisorError too)
        raise
    except (*LIBRARY_ERRORS, AdvisorError) as error:  # the analysis checks its options too
        raise_at(table, error, keys or {}, default, getattr(constructor, "__name__", ""))


def raise_at(
    table: Table,
    error: Exception,
    keys: Mapping[str, str],
    default: str | None,
    owner: str = "",
) -> NoReturn:
    """Raise ``error`` of the library as a :class:`CaseError` at the key it concerns."""
    message = str(error)
    known = {*keys, *table.data}
    argument = getattr(error, "argument", None) or _named_argument(message, known, owner)
    key = keys.get(argument, argument) if argument in known else default
    named = argument in keys or (key is not None and key.split(".")[-1] == argument)
    message = _trimmed(message, owner, argument if named else None, key)
    raw = table.data.get(key.split(".")[-1]) if key and "." not in key else None
    message = in_case_units(message, raw)
    if key is None:
        table.context.fail(table.path, message)
    table.fail(key, message)


_SI_VALUE = re.compile(r"(?<![\w.])(-?\d+(?:\.\d*)?(?:e[+-]?\d+)?) (m|s|degC)\b")
_DIMENSIONS = {"[length]": "m", "[time]": "s", "[temperature]": "degC"}


def in_case_units(message: str, raw) -> str:
    """``message`` with the library's SI values (m, s, °C) of the offending key's kind written
    as the case wrote that key: lengths in its unit ("-0.03 m" → "-30 mm"), times as a person
    reads them ("600 s" → "10 min"), temperatures in its unit with the degree sign. A value
    given as a bare number (SI already) or of another kind leaves the message as it is."""
    unit = unit_of(raw)
    if unit is None:
        return message
    try:
        ureg = registry()
        parsed = ureg.parse_units(unit.replace("^", "**"))
        symbol = _DIMENSIONS.get(str(parsed.dimensionality))
    except Exception:  # noqa: BLE001 - pint fails in many ways; the message stays as it was
        return message
    if symbol is None:
        return message

    def rewritten(found: re.Match) -> str:
        if found[2] != symbol:
            return found[0]
        value = float(found[1])
        if symbol == "s":
            return duration_text(value)
        return shown_in(value, "temperature" if symbol == "degC" else "length", unit, 6)

    return _SI_VALUE.sub(rewritten, message)


def _named_argument(message: str, known: set[str], owner: str) -> str | None:
    """The argument a library message starts by naming (``Radiation emissivity must ...``),
    when it is a known one: not all the library's errors carry ``argument``."""
    words = message.split(maxsplit=3)[:3]
    if words and words[0] == owner:
        words = words[1:]
    return next((w for w in words[:2] if w in known), None)


def _trimmed(message: str, owner: str, argument: str | None, key: str | None) -> str:
    """``message`` without the subject the key path already names (the class, and the argument
    when it is this key's), in a case file's words, with a suggestion for a choice."""
    last = key.split(".")[-1] if key else None
    spoken = [k.replace(".", " ").replace("_", " ") for k in (key, last) if k]  # "mesh size"
    for name in (owner, argument, argument and last, *spoken):
        if name and message.startswith(name + " "):
            message = message[len(name) + 1 :]
    for pattern, replacement in _WORDING:
        message = pattern.sub(replacement, message)
    choice = _CHOICE.search(message)
    if choice:
        choices = re.findall(r"'([^']*)'", choice["choices"])
        message += suggest(choice["given"], choices)
    return message
