"""The study's store: an SQLite database (standard library) that is also its record for
resuming.

Tables:

- ``study (name, value)``: what the study is — the case file's path and SHA-256, the
  specification's identity (JSON), the number of cases, the layout version;
- ``cases (id, overrides_hash, overrides, status, error, wall_seconds, finished)``: one row per
  finished case; ``id`` is the case's place in the study (from 0), ``overrides`` its
  ``{key path: case-file value}`` as JSON, ``status`` ``done`` or ``failed`` (with ``error``),
  ``wall_seconds`` the time the worker spent on it (loading, meshing, solving, assessing);
- ``answers (case_id, ...)``: the scalar answers of each done case, columns as in
  :data:`advisor.studies.answers.ANSWER_COLUMNS`.

Only the parent process writes, one transaction per finished case, in WAL mode, so a study
killed at any moment leaves every finished case stored and nothing half-written.
"""

from __future__ import annotations

import json
import sqlite3
import time
from pathlib import Path

from ..errors import AdvisorError
from .answers import ANSWER_COLUMNS

LAYOUT = "1"
FILE_NAME = "study.sqlite"


class StudyError(AdvisorError):
    """A study that cannot start or resume as asked; the message says why and what to do."""


def check_replaceable(folder: Path) -> None:
    """Refuse to replace the study in ``folder`` (``--force``) unless its
    :data:`FILE_NAME` is a study store this program wrote: an SQLite database whose ``study``
    table records the layout. A file of that name holding anything else is left alone.

    Raises
    ------
    StudyError
        With the reason; nothing is changed.
    """
    path = Path(folder) / FILE_NAME
    reason = None
    if path.is_symlink() or not path.is_file():
        reason = "it is not a file"
    else:
        try:
            connection = sqlite3.connect(f"{path.resolve().as_uri()}?mode=ro", uri=True)
            try:
                row = connection.execute(
                    "SELECT value FROM study WHERE name = 'layout'"
                ).fetchone()
            finally:
                connection.close()
            if row is None:
                reason = "it records no study layout"
        except sqlite3.Error as error:
            reason = f"it is not a study store ({error})"
    if reason is not None:
        raise StudyError(
            f"{str(path)!r} is not replaced with --force: {reason}; only a study store "
            "soakwise wrote is replaced; choose another folder"
        )


class StudyStore:
    """The database of one study.

    Parameters
    ----------
    path : str or Path
        The database file, or ``":memory:"``.
    """

    def __init__(self, path: str | Path):
        self.path = path
        self.connection = sqlite3.connect(str(path))
        if str(path) != ":memory:":
            self.connection.execute("PRAGMA journal_mode=WAL")
        self.connection.execute("PRAGMA synchronous=NORMAL")
        self._create()

    def _create(self) -> None:
        answers = ", ".join(f'"{name}" {kind}' for name, (kind, _) in ANSWER_COLUMNS.items())
        with self.connection:
            self.connection.execute(
                "CREATE TABLE IF NOT EXISTS study (name TEXT PRIMARY KEY, value TEXT NOT NULL)"
            )
            self.connection.execute(
                "CREATE TABLE IF NOT EXISTS cases (id INTEGER PRIMARY KEY, "
                "overrides_hash TEXT NOT NULL, overrides TEXT NOT NULL, "
                "status TEXT NOT NULL CHECK (status IN ('done', 'failed')), error TEXT, "
                "wall_seconds REAL, finished REAL)"
            )
            self.connection.execute(
                "CREATE TABLE IF NOT EXISTS answers (case_id INTEGER PRIMARY KEY "
                f"REFERENCES cases (id), {answers})"
            )

    def description(self) -> dict[str, str]:
        """The ``study`` table as a dict (empty for a new store)."""
        return dict(self.connection.execute("SELECT name, value FROM study"))

    def describe(self, description: dict[str, str], notes: dict[str, str] | None = None) -> None:
        """Record what the study is (a new store), or refuse one whose ``description``
        differs; ``notes`` are recorded but not compared."""
        stored = self.description()
        if not stored:
            rows = [("layout", LAYOUT), *description.items(), *(notes or {}).items()]
            with self.connection:
                self.connection.executemany("INSERT INTO study VALUES (?, ?)", rows)
            return
        for name, value in description.items():
            if stored.get(name) != value:
                raise StudyError(
                    f"the study in {self.path} was made with a different "
                    f"{_LABELS.get(name, name)}"
                    f" ({_short(stored.get(name))} then, {_short(value)} now); resume only the "
                    "same study, or start again with --force"
                )

    def finished(self, *, retry: str | None = None) -> dict[int, tuple[str, str]]:
        """case id → (overrides hash, status) of every stored case; with ``retry``, cases
        whose error starts with it are removed first (to be run again)."""
        if retry is not None:
            with self.connection:
                self.connection.execute(
                    "DELETE FROM cases WHERE status = 'failed' AND error LIKE ? || '%'", (retry,)
                )
        rows = self.connection.execute("SELECT id, overrides_hash, status FROM cases")
        return {case_id: (digest, status) for case_id, digest, status in rows}

    def record(
        self,
        case_id: int,
        overrides_hash: str,
        overrides: dict,
        *,
        answers: dict | None,
        error: str | None,
        wall_seconds: float,
    ) -> None:
        """Store one finished case (and its answers when done) in one transaction."""
        status = "failed" if error is not None else "done"
        with self.connection:
            self.connection.execute(
                "INSERT INTO cases VALUES (?, ?, ?, ?, ?, ?, ?)",
                (
                    case_id,
                    overrides_hash,
                    json.dumps(overrides, sort_keys=True),
                    status,
                    error,
                    wall_seconds,
                    time.time(),
                ),
            )
            if answers is not None:
                names = list(ANSWER_COLUMNS)
                columns = ", ".join(f'"{n}"' for n in names)
                self.connection.execute(
                    f"INSERT INTO answers (case_id, {columns}) VALUES "
                    f"(?, {', '.join('?' * len(names))})",
                    [case_id, *(answers.get(n) for n in names)],
                )

    def rows(self) -> tuple[list[str], list[tuple]]:
        """Every stored case joined with its answers, by id: (column names, rows)."""
        names = list(ANSWER_COLUMNS)
        query = (
            "SELECT c.id, c.status, c.error, c.wall_seconds, c.overrides, "
            + ", ".join(f'a."{n}"' for n in names)
            + " FROM cases c LEFT JOIN answers a ON a.case_id = c.id ORDER BY c.id"
        )
        columns = ["case", "status", "error", "wall_seconds", "overrides", *names]
        return columns, list(self.connection.execute(query))

    def close(self) -> None:
        self.connection.close()

    def __enter__(self) -> StudyStore:
        return self

    def __exit__(self, *_) -> None:
        self.close()


_LABELS = {
    "case_file_sha256": "case file (its text has changed)",
    "spec": "spec (varied keys, values or draws)",
    "cases": "number of cases",
    "layout": "store layout",
}


def _short(value) -> str:
    text = "nothing" if value is None else str(value)
    return text if len(text) <= 120 else text[:117] + "..."
