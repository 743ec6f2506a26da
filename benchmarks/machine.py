"""What the machine can do and what a process used: memory bandwidth, peak memory, load, and
the LU factors a run made (counted, timed and sized by wrapping ``scipy.sparse.linalg.splu``)."""

from __future__ import annotations

import contextlib
import os
import platform
import subprocess
import time

import numpy as np

THREAD_VARIABLES = (
    "OPENBLAS_NUM_THREADS",
    "OPENBLAS_CORETYPE",
    "OPENBLAS_L2_SIZE",
    "OMP_NUM_THREADS",
    "MKL_NUM_THREADS",
)
INDEX_BYTES = 4  # int32 row indices and pointers of the CSC factors
VALUE_BYTES = 8


def peak_rss() -> int:
    """This process's peak resident memory in bytes (VmHWM; ru_maxrss where /proc is absent)."""
    try:
        with open("/proc/self/status") as status:
            for line in status:
                if line.startswith("VmHWM:"):
                    return int(line.split()[1]) * 1024
    except OSError:
        pass
    import resource

    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024


def load_average() -> float:
    try:
        return float(os.getloadavg()[0])
    except OSError:
        return float("nan")


def read_bandwidth(gigabytes: float = 1.0, repeats: int = 7) -> dict[str, float]:
    """Single-core memory bandwidth in bytes/s: best of ``repeats`` passes of ``np.sum`` over
    an array of ``gigabytes`` GB (read only) and of ``np.copyto`` between two such arrays
    (counted as read + write). numpy runs both on one thread."""
    n = int(gigabytes * 1e9 / 8)
    source = np.ones(n)
    target = np.empty_like(source)
    target.fill(0.0)  # touch every page before timing
    read, copy = [], []
    for _ in range(repeats):
        started = time.perf_counter()
        source.sum()
        read.append(time.perf_counter() - started)
        started = time.perf_counter()
        np.copyto(target, source)
        copy.append(time.perf_counter() - started)
    return {
        "array_bytes": float(source.nbytes),
        "read_bytes_per_s": source.nbytes / min(read),
        "copy_bytes_per_s": 2 * source.nbytes / min(copy),
        "read_seconds_best": min(read),
        "read_seconds_worst": max(read),
    }


def factor_size(lu) -> dict[str, float]:
    """Bytes a triangular solve must read at the least: (nnz(L) + nnz(U))·(8 + 4) for values and
    row indices, plus the column pointers of L and U and the two permutations."""
    L, U = lu.L, lu.U
    n = lu.shape[0]
    index = L.indices.dtype.itemsize
    nnz = int(L.nnz + U.nnz)
    data = nnz * (VALUE_BYTES + index)
    indices = (L.indptr.size + U.indptr.size) * L.indptr.dtype.itemsize + 2 * n * INDEX_BYTES
    return {
        "n": n,
        "nnz_L": int(L.nnz),
        "nnz_U": int(U.nnz),
        "superlu_nnz": int(lu.nnz),
        "factor_bytes": float(data + indices),
    }


def time_solves(lu, repeats: int = 10) -> float:
    """Best time in s of ``lu.solve`` on one right-hand side."""
    rhs = np.random.default_rng(1).random(lu.shape[0])
    best = float("inf")
    for _ in range(repeats):
        started = time.perf_counter()
        lu.solve(rhs)
        best = min(best, time.perf_counter() - started)
    return best


class TimedFactor:
    """A factor whose ``solve`` calls are counted and timed; everything else passes."""

    def __init__(self, lu, spy: FactorSpy):
        self._lu = lu
        self._spy = spy

    def solve(self, *args, **kwargs):
        started = time.perf_counter()
        result = self._lu.solve(*args, **kwargs)
        self._spy.solve_seconds += time.perf_counter() - started
        self._spy.solves += 1
        return result

    def __getattr__(self, name):
        return getattr(self._lu, name)


class FactorSpy:
    """While active, wrap ``scipy.sparse.linalg.splu`` and ``fem.linalg.CholeskyFactor``:
    count and time factorisations and triangular solves, keep the last factor (and, for a
    Cholesky factor, its matrix and the numbering the steps took, if any), and optionally
    choose the symmetric solver.

    ``symmetric_solver`` (``"cholesky"`` or ``"superlu"``) sets ``fem.linalg.SYMMETRIC_SOLVER``
    for the run: ``"superlu"`` is the what-if of the path used before Cholesky was the default.
    """

    def __init__(self, symmetric_solver: str | None = None):
        self.symmetric_solver = symmetric_solver
        self.factorisations = 0
        self.factor_seconds = 0.0
        self.first_factor_seconds = 0.0
        self.solves = 0
        self.solve_seconds = 0.0
        self.last = None
        self.last_matrix = None  # the matrix of the last Cholesky factor
        self.numbering = None  # the steps' own numbering of the unknowns, if they took one
        self.kinds: dict[str, int] = {}
        self.calls: list[dict] = []

    def _factored(self, kind: str, seconds: float, factor, call: dict):
        self.factor_seconds += seconds
        if not self.factorisations:
            self.first_factor_seconds = seconds
        self.factorisations += 1
        self.kinds[kind] = self.kinds.get(kind, 0) + 1
        if len(self.calls) < 3:
            self.calls.append(call)
        self.last = factor
        return TimedFactor(factor, self)

    @contextlib.contextmanager
    def active(self):
        import scipy.sparse.linalg as spla

        import fem.linalg

        original, cholesky = spla.splu, fem.linalg.CholeskyFactor
        numbering = fem.linalg.local_numbering
        chosen = fem.linalg.SYMMETRIC_SOLVER
        spy = self

        def splu(matrix, *args, **kwargs):
            started = time.perf_counter()
            lu = original(matrix, *args, **kwargs)
            call = {k: repr(v) for k, v in kwargs.items()} | {"positional": repr(args)}
            return spy._factored("superlu", time.perf_counter() - started, lu, call)

        def timed_cholesky(matrix):
            started = time.perf_counter()
            factor = cholesky(matrix)
            spy.last_matrix = matrix
            return spy._factored(
                "cholesky", time.perf_counter() - started, factor, {"cholesky": "cholespy"}
            )

        def recorded_numbering(matrix):
            spy.numbering = numbering(matrix)
            return spy.numbering

        spla.splu = splu
        fem.linalg.CholeskyFactor = timed_cholesky
        fem.linalg.local_numbering = recorded_numbering
        if self.symmetric_solver is not None:
            fem.linalg.SYMMETRIC_SOLVER = self.symmetric_solver
        try:
            yield self
        finally:
            spla.splu = original
            fem.linalg.CholeskyFactor = cholesky
            fem.linalg.local_numbering = numbering
            fem.linalg.SYMMETRIC_SOLVER = chosen

    def summary(self) -> dict:
        return {
            "factorisations": self.factorisations,
            "factor_seconds": self.factor_seconds,
            "first_factor_seconds": self.first_factor_seconds,
            "solves": self.solves,
            "solve_seconds": self.solve_seconds,
            "kinds": dict(self.kinds),
            "splu_calls": self.calls,
        }


def cholesky_size(matrix, points) -> dict[str, float]:
    """Bytes of a Cholesky factor L of ``matrix`` that a solve must read, estimated.

    CHOLMOD (through cholespy) does not show its factor, so nnz(L) is taken from SuperLU's
    symmetric-mode LU of the same matrix under soakwise's nested dissection (no pivoting:
    the pattern of L is that of Uᵀ, each with the diagonal). CHOLMOD orders by METIS, whose
    fill on these meshes is at or below it, so the estimate is an upper bound: values and row
    indices (8 + 4 bytes an entry), column pointers and the permutation.
    """
    import scipy.sparse.linalg as spla

    from fem.ordering import nested_dissection

    order = nested_dissection(matrix.tocsr(), points)
    lu = spla.splu(
        matrix.tocsr()[order][:, order].tocsc(),
        permc_spec="NATURAL",
        diag_pivot_thresh=0.0,
        options={"SymmetricMode": True},
    )
    n = matrix.shape[0]
    nnz = int(lu.U.nnz)
    return {
        "n": n,
        "nnz_L": nnz,
        "nnz_U": 0,
        "factor_bytes": float(nnz * (VALUE_BYTES + INDEX_BYTES) + (n + 1 + n) * INDEX_BYTES),
        "estimated": True,
    }


def describe_machine() -> dict:
    info = {
        "python": platform.python_version(),
        "platform": platform.platform(),
        "cpus": os.cpu_count(),
        "thread_variables": {v: os.environ.get(v) for v in THREAD_VARIABLES},
        "load_average_1min": load_average(),
    }
    try:
        import gmsh
        import numpy
        import scipy
        import skfem

        info["versions"] = {
            "numpy": numpy.__version__,
            "scipy": scipy.__version__,
            "scikit-fem": skfem.__version__,
            "gmsh": gmsh.__version__,
        }
    except ImportError:
        pass
    with contextlib.suppress(OSError, subprocess.SubprocessError):
        info["cpu_model"] = next(
            line.split(":", 1)[1].strip()
            for line in open("/proc/cpuinfo")
            if line.startswith("model name")
        )
    return info


def source_state(root) -> dict:
    """The commit and the uncommitted files of the code being measured."""
    state = {}
    with contextlib.suppress(OSError, subprocess.SubprocessError):
        state["commit"] = subprocess.run(
            ["git", "rev-parse", "HEAD"], cwd=root, capture_output=True, text=True, timeout=10
        ).stdout.strip()
        changed = subprocess.run(
            ["git", "status", "--porcelain", "--", "fem", "geometries", "advisor"],
            cwd=root,
            capture_output=True,
            text=True,
            timeout=10,
        ).stdout.splitlines()
        state["uncommitted"] = [line[3:] for line in changed]
    return state
