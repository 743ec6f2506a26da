"""Running a study: every case checked first, then run on the chosen engine, each stored as
it finishes; an interrupted study resumes from its store without running finished cases again.
"""

from __future__ import annotations

import shutil
import time
from collections.abc import Callable
from dataclasses import dataclass, replace
from pathlib import Path

from .cases import (
    CaseFile,
    geometry_key,
    load_all,
    overrides_digest,
    read_case_file,
)
from .engines import WORKER_FAILED, choose
from .spec import StudySpec, read_study_table
from .store import FILE_NAME, StudyError, StudyStore, check_replaceable
from .tables import CSV_NAME, PARQUET_NAME, to_dataframe, write_csv, write_parquet
from .worker import CaseTask

CASES_FOLDER = "cases"


@dataclass(frozen=True)
class StudyProgress:
    """How far a study has got: cases ``done`` and ``failed`` of ``total`` (those finished
    before a resume included), seconds elapsed in this run and an estimate of those left."""

    done: int
    failed: int
    total: int
    elapsed: float
    left: float | None


Progress = Callable[[StudyProgress], None]


@dataclass(frozen=True)
class PlannedStudy:
    """A study ready to run: its case file, specification and every case, all checked."""

    case_file: CaseFile
    spec: StudySpec
    overrides: list[dict]
    cases: list

    def description(self) -> dict[str, str]:
        return {
            "case_file_sha256": self.case_file.digest,
            "spec": self.spec.identity(),
            "cases": str(len(self.overrides)),
        }


def read_spec(
    case: str | Path, vary: list[str] = (), variations: dict | None = None, **settings
) -> tuple[CaseFile, StudySpec]:
    """The case file and its study: its ``[study]`` table, with ``vary`` strings
    ``KEY=SPEC`` and ``variations`` ``{key: spec}`` replacing or adding entries, and
    ``settings`` (``sampling``, ``samples``, ``seed``, ``workers``, ``cluster``) replacing the
    table's where they are not None. No case is loaded."""
    from .spec import parse_vary

    case_file = read_case_file(case)
    spec = read_study_table(case_file.data, case_file.context, list(vary))
    extra = [parse_vary(_vary_text(key, value)) for key, value in (variations or {}).items()]
    if extra:
        chosen = {v.key: v for v in spec.variations} | {v.key: v for v in extra}
        spec = replace(spec, variations=tuple(chosen.values()))
    spec = replace(spec, **{k: v for k, v in settings.items() if v is not None})
    if not spec.variations:
        raise StudyError(
            f"{case_file.path.name}: the study varies nothing; give [[study.vary]] entries in "
            "the case file or --vary KEY=SPEC"
        )
    return case_file, spec


def plan_study(case_file: CaseFile, spec: StudySpec) -> PlannedStudy:
    """Every case of the study, loaded (and so checked) before any runs."""
    overrides = spec.overrides()
    return PlannedStudy(case_file, spec, overrides, load_all(case_file, overrides))


def _vary_text(key: str, value) -> str:
    """A Python variation as the command line's ``KEY=SPEC`` (lists and dicts as TOML)."""
    if isinstance(value, str):
        return f"{key}={value}"
    if isinstance(value, list | tuple):
        items = ", ".join(_toml(v) for v in value)
        return f"{key}=[{items}]"
    if isinstance(value, dict):
        items = ", ".join(f"{k} = {_toml(v)}" for k, v in value.items())
        return f"{key}={{{items}}}"
    raise StudyError(f"variation of {key!r}: expected a list, a table or a SPEC, got {value!r}")


def _toml(value) -> str:
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int | float):
        return repr(value)
    return '"' + str(value).replace("\\", "\\\\").replace('"', '\\"') + '"'


def open_store(folder: Path | None, *, resume: bool, force: bool) -> StudyStore:
    """The study's store in ``folder`` (in memory for None): a new one, or the existing one
    to resume; an existing study is replaced only with ``force``."""
    if folder is None:
        return StudyStore(":memory:")
    folder = Path(folder)
    path = folder / FILE_NAME
    if path.exists() and not resume:
        if not force:
            raise StudyError(
                f"{folder} already holds a study; continue it with --resume, or replace it "
                "with --force"
            )
        check_replaceable(folder)
        for name in (FILE_NAME, FILE_NAME + "-wal", FILE_NAME + "-shm", CSV_NAME, PARQUET_NAME):
            (folder / name).unlink(missing_ok=True)
        shutil.rmtree(folder / CASES_FOLDER, ignore_errors=True)
    folder.mkdir(parents=True, exist_ok=True)
    return StudyStore(path)


def run_planned(
    planned: PlannedStudy,
    store: StudyStore,
    engine,
    *,
    progress: Progress | None = None,
    case_folders: Path | None = None,
) -> tuple[int, int]:
    """Run the cases the store does not hold yet, storing each as it finishes; return the
    numbers of cases done and failed, those stored before included.

    A case that failed is not run again, unless its worker failed (a process that died):
    those are run again when the study resumes."""
    store.describe(planned.description(), {"case_file": str(planned.case_file.path.resolve())})
    stored = store.finished(retry=WORKER_FAILED)
    tasks = []
    for case_id, (overrides, case) in enumerate(
        zip(planned.overrides, planned.cases, strict=True)
    ):
        if case_id in stored and stored[case_id][0] == overrides_digest(overrides):
            continue
        folder = None if case_folders is None else str(case_folders / f"case-{case_id:05d}")
        tasks.append(CaseTask(case_id, case, folder))
    # cases of one geometry together, so that each worker meshes it once
    tasks.sort(key=lambda t: (geometry_key(planned.overrides[t.case_id]), t.case_id))
    failed = sum(status == "failed" for _, status in stored.values())
    done = len(stored) - failed
    started = time.perf_counter()
    counted = 0
    for outcome in engine(tasks) if tasks else ():
        case_id = outcome["case_id"]
        overrides = planned.overrides[case_id]
        store.record(
            case_id,
            overrides_digest(overrides),
            overrides,
            answers=outcome["answers"],
            error=outcome["error"],
            wall_seconds=outcome["wall_seconds"],
        )
        counted += 1
        failed += outcome["error"] is not None
        done += outcome["error"] is None
        if progress is not None:
            elapsed = time.perf_counter() - started
            left = elapsed / counted * (len(tasks) - counted)
            progress(StudyProgress(done, failed, len(planned.overrides), elapsed, left))
    return done, failed


def export(store: StudyStore, folder: Path) -> list[Path]:
    """Write study.csv and (with pandas and pyarrow) study.parquet beside the store."""
    written = [write_csv(store, Path(folder) / CSV_NAME)]
    parquet = write_parquet(store, Path(folder) / PARQUET_NAME)
    return written + ([parquet] if parquet is not None else [])


def sweep(
    case: str | Path,
    variations: dict | None = None,
    *,
    workers: int | None = None,
    map=None,  # noqa: A002 - the name users know from map()
    store: str | Path | None = None,
    resume: bool = False,
    force: bool = False,
    sampling: str | None = None,
    samples: int | None = None,
    seed: int | None = None,
    progress: Progress | None = None,
    case_folders: bool = False,
):
    """Run a study of a case file and return its table as a pandas DataFrame.

    Parameters
    ----------
    case : path
        The case file; its ``[study]`` table, if any, is the starting point.
    variations : dict, optional
        ``{key path: spec}``: a list of values (``["200 W/(m^2*K)", "400 W/(m^2*K)"]``), a
        table (``{"start": "1 mm", "stop": "4 mm", "count": 4, "spacing": "log"}``,
        ``{"distribution": "uniform", "low": ..., "high": ...}``) or a SPEC string as on the
        command line (``"uniform(300 W/(m^2*K), 500 W/(m^2*K))"``); replaces the file's
        entry for the same key. See :mod:`advisor.studies.spec`.
    workers : int, optional
        Local worker processes (default: the ``[study]`` table's, else one per core).
    map : optional
        Where cases run instead: ``"serial"``, ``"processes"``, a dask ``Client`` or a
        scheduler address, a ``concurrent.futures.Executor``, or a ``map``-like function.
        Default: the table's ``cluster`` if any, else local processes.
    store : path, optional
        The study's folder (study.sqlite, study.csv, study.parquet); None keeps the store in
        memory.
    resume, force : bool
        Continue the study stored in ``store``; replace it.
    sampling, samples, seed : optional
        Replace the table's settings for distributions.
    progress : callable, optional
        Called with a :class:`StudyProgress` after every case.
    case_folders : bool
        Write each case's results folder under ``store``/cases/.

    Returns
    -------
    pandas.DataFrame
        One row per case, columns as in :mod:`advisor.studies.tables`.

    Raises
    ------
    CaseError
        If any case of the study is invalid (naming the case and its key), before any runs.
    StudyError
        If ``store`` holds another study (or the same one changed) and ``force`` is not set.

    Examples
    --------
    >>> import tempfile
    >>> from advisor.casefile.starters import starter_text
    >>> path = Path(tempfile.mkdtemp()) / "bar.toml"
    >>> _ = path.write_text(starter_text("quench-bar"), encoding="utf-8")
    >>> table = sweep(path, {"boundaries.quenched.convection.coefficient": [
    ...     "200 W/(m^2*K)", "400 W/(m^2*K)"], "section.mesh_size": ["5 mm"],
    ...     "run.end_time": ["5 min"]}, map="serial")
    >>> list(table["status"]), bool(table["biot_volume_to_surface"].is_monotonic_increasing)
    (['done', 'done'], True)
    """
    case_file, spec = read_spec(
        case, (), variations, sampling=sampling, samples=samples, seed=seed, workers=workers
    )
    folder = None if store is None else Path(store)
    return run_study(
        case_file,
        spec,
        folder,
        map=map,
        resume=resume,
        force=force,
        progress=progress,
        case_folders=case_folders,
    ).table()


@dataclass(frozen=True)
class StudyRun:
    """What :func:`run_study` did: cases done and failed (stored before included), the files
    written, and the store (closed) to read the table from."""

    planned: PlannedStudy
    done: int
    failed: int
    files: list[Path]
    table: Callable


def run_study(
    case_file: CaseFile,
    spec: StudySpec,
    folder: Path | None,
    *,
    map=None,  # noqa: A002
    resume: bool = False,
    force: bool = False,
    progress: Progress | None = None,
    case_folders: bool = False,
) -> StudyRun:
    """Start the engine (local workers warm up meanwhile), check every case, run those the
    store lacks, and export the table; the store is in ``folder`` or in memory for None."""
    engine = choose(map, workers=spec.workers, cluster=spec.cluster)
    start, close = getattr(engine, "start", None), getattr(engine, "close", None)
    store = None
    try:
        if start is not None:
            start()
        planned = plan_study(case_file, spec)
        store = open_store(folder, resume=resume, force=force)
        cases = folder / CASES_FOLDER if case_folders and folder is not None else None
        done, failed = run_planned(planned, store, engine, progress=progress, case_folders=cases)
        files = export(store, folder) if folder is not None else []
        frame = to_dataframe(store) if folder is None else None
    finally:
        if close is not None:
            close()
        if store is not None:
            store.close()

    def table():
        from .tables import read_study

        return frame if frame is not None else read_study(folder)

    return StudyRun(planned, done, failed, files, table)
