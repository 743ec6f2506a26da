"""A study's cases: the case file with each case's overrides applied, every one loaded (and so
checked) before the first one runs.

Overrides are ``{key path: value}`` in the case file's own key paths; ``[i]`` picks an entry of
an array of tables (``section.shape[0].width``), which must exist.
"""

from __future__ import annotations

import copy
import hashlib
import json
import re
import sys
from dataclasses import dataclass
from pathlib import Path

from ..casefile.case import Case, case_from_data
from ..casefile.reader import CaseError, Context

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover - Python 3.10
    import tomli as tomllib

_PART = re.compile(r"^([^\[\]]+)(?:\[(\d+)\])?$")
GEOMETRY_PREFIX = "section."


@dataclass(frozen=True)
class CaseFile:
    """The study's case file: its tables, lines and the digest of its text.

    Attributes
    ----------
    path : Path
    data : dict
        The tables as ``tomllib`` gives them.
    lines : tuple of str
    digest : str
        SHA-256 of the text, to refuse resuming a study whose case file has changed.
    """

    path: Path
    data: dict
    lines: tuple[str, ...]
    digest: str

    @property
    def context(self) -> Context:
        return Context(self.path.name, self.lines, self.path.parent)


def read_case_file(path: str | Path) -> CaseFile:
    """Read a case file's tables (nothing is checked but the TOML)."""
    path = Path(path)
    if not path.is_file():
        raise CaseError(f"case file {str(path)!r} does not exist")
    text = path.read_text(encoding="utf-8")
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as error:
        raise CaseError(f"{path.name}: not valid TOML: {error}") from None
    digest = hashlib.sha256(text.encode("utf-8")).hexdigest()
    return CaseFile(path, data, tuple(text.splitlines()), digest)


def apply_overrides(data: dict, overrides: dict) -> dict:
    """A copy of ``data`` with each ``{key path: value}`` set; tables on the way are made,
    entries of arrays of tables must exist."""
    data = copy.deepcopy(data)
    for dotted, value in overrides.items():
        target = data
        *parents, last = dotted.split(".")
        for part in parents:
            target = _step(target, part, dotted)
        name, index = _parse(last, dotted)
        if index is None:
            target[name] = value
        else:
            _step(target, name, dotted)  # checks the array exists
            target[name][index] = value
    return data


def _step(target: dict, part: str, dotted: str):
    name, index = _parse(part, dotted)
    if index is None:
        return target.setdefault(name, {})
    entries = target.get(name)
    if isinstance(entries, dict):
        entries = [entries]
    if not isinstance(entries, list) or index >= len(entries):
        count = len(entries) if isinstance(entries, list) else 0
        raise CaseError(f"{dotted}: there is no {name}[{index}]; the case has {count} of them")
    target[name] = entries
    return entries[index]


def _parse(part: str, dotted: str) -> tuple[str, int | None]:
    match = _PART.match(part)
    if match is None:
        raise CaseError(f"{dotted}: {part!r} is not a key or key[index]")
    return match.group(1), None if match.group(2) is None else int(match.group(2))


def load_study_case(case_file: CaseFile, overrides: dict) -> Case:
    """The case with ``overrides`` applied, checked by the case loader."""
    data = apply_overrides(case_file.data, overrides)
    data.pop("study", None)
    return case_from_data(data, case_file.path, None, case_file.lines)


def load_all(case_file: CaseFile, cases: list[dict]) -> list[Case]:
    """Every case loaded before any runs; the first that fails is named with its overrides."""
    loaded = []
    for number, overrides in enumerate(cases):
        try:
            loaded.append(load_study_case(case_file, overrides))
        except CaseError as error:
            given = ", ".join(f"{k} = {v!r}" for k, v in overrides.items())
            raise CaseError(f"study case {number} ({given}): {error}") from None
    return loaded


def overrides_digest(overrides: dict) -> str:
    """SHA-256 of the overrides as sorted JSON: a case's identity in the store."""
    text = json.dumps(overrides, sort_keys=True, separators=(",", ":"))
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def geometry_key(overrides: dict) -> str:
    """The overrides that change the mesh (``section.*``) as JSON: cases with the same key
    share a mesh, so they are sent to the workers together."""
    shared = {k: v for k, v in overrides.items() if k.startswith(GEOMETRY_PREFIX)}
    return json.dumps(shared, sort_keys=True)
