"""Products of the step's sparse matrices with a field, and a numbering that makes them fast.

A step's explicit product reads the whole matrix from memory and gathers the field at each
entry's column. Two things decide its speed on a large mesh: how many cores read at once, and
how far apart in memory the nodes of one row lie. The mesher numbers the nodes in the order it
made them, so neighbours can be far apart (on the 992k-node benchmark square the mean distance
|i − j| over the matrix's entries is 240k); numbered by reverse Cuthill–McKee (Cuthill &
McKee 1969, George 1971; from memory) neighbours sit close and a row's gathers stay in cache:
the product took 16.4 ms on one thread in the mesher's numbering, 9.8 ms after renumbering,
and 3.2-4.0 ms on two threads after renumbering (8.1-16.8 ms before: the gathers, not the
entries, set the pace), and CHOLMOD's factorisation 14.3 s instead of 17.9 s of CPU time.
"""

from __future__ import annotations

import functools
import os
import threading

import numpy as np
import scipy.sparse as sp

# Threads for the explicit product of a step; None: two where two cores are free to this
# process and the matrix has PARALLEL_FROM entries or more (below that a thread's hand-over,
# ~0.1 ms, costs more than half a product saves).
PRODUCT_THREADS: int | None = None
PARALLEL_FROM = 1_000_000
# Steps are made in a numbering of their own from this many unknowns, when it brings the nodes
# of a row at least LOCALITY_GAIN times closer together in memory than the mesh's numbering.
LOCAL_NUMBERING_FROM = 200_000
LOCALITY_GAIN = 4.0


def local_numbering(matrix: sp.spmatrix) -> np.ndarray | None:
    """The unknowns in reverse Cuthill–McKee order (``order[k]`` is the unknown numbered k),
    or None when the matrix is small or already numbered about as well.

    Examples
    --------
    >>> import numpy as np, scipy.sparse as sp
    >>> ring = sp.diags([1, 1], [-1, 1], shape=(6, 6), format="csr")
    >>> local_numbering(ring) is None  # 6 unknowns: below LOCAL_NUMBERING_FROM
    True
    """
    if matrix.shape[0] < LOCAL_NUMBERING_FROM:
        return None
    from scipy.sparse.csgraph import reverse_cuthill_mckee

    matrix = sp.csr_matrix(matrix)
    order = reverse_cuthill_mckee(matrix, symmetric_mode=True).astype(np.int64)
    rank = np.empty_like(order)
    rank[order] = np.arange(order.size)
    # mean |i − j| over 100k entries spread evenly through the matrix (all of them took 0.5 s
    # at 7M entries; the ratio only has to be told from LOCALITY_GAIN)
    entries = np.unique(np.linspace(0, matrix.nnz - 1, min(matrix.nnz, 100_000)).astype(int))
    rows = np.searchsorted(matrix.indptr, entries, side="right") - 1
    columns = matrix.indices[entries]
    before = np.abs(rows - columns).mean()
    after = np.abs(rank[rows] - rank[columns]).mean()
    return order if after * LOCALITY_GAIN <= before else None


class RowBlockProduct:
    """x ↦ E·x (or c + E·x, into c) for a sparse matrix E, its rows cut into blocks of equal
    entries multiplied at once on as many threads (scipy's kernel lets go of the interpreter
    lock).

    Each row is summed as ``E @ x`` sums it, starting from ``c``.
    """

    def __init__(self, matrix: sp.spmatrix, threads: int | None = None):
        self.matrix = matrix = sp.csr_matrix(matrix)
        self.shape = matrix.shape
        threads = threads or PRODUCT_THREADS or _product_threads(matrix.nnz)
        wanted = np.linspace(0, matrix.nnz, threads + 1)
        self.cuts = np.unique(np.searchsorted(matrix.indptr, wanted).clip(0, self.shape[0]))
        self.cuts[[0, -1]] = 0, self.shape[0]
        self._kernel = _csr_kernel() if self.cuts.size > 2 else None

    def __call__(self, x: np.ndarray) -> np.ndarray:
        """E·x, a new array."""
        return self.add_to(x, np.zeros(self.shape[0]))

    def add_to(self, x: np.ndarray, out: np.ndarray) -> np.ndarray:
        """out + E·x, summed into ``out`` (a float64 array of E's rows), which is returned."""
        x = np.ascontiguousarray(x, dtype=np.float64)
        if self._kernel is None or self.matrix.dtype != np.float64:
            out += self.matrix @ x
            return out
        blocks = list(zip(self.cuts[:-1], self.cuts[1:], strict=True))
        pending = [_thread_pool().submit(self._block, lo, hi, x, out) for lo, hi in blocks[1:]]
        self._block(*blocks[0], x, out)
        for job in pending:
            job.result()
        return out

    def _block(self, lo: int, hi: int, x: np.ndarray, out: np.ndarray) -> None:
        """out[lo:hi] += E[lo:hi]·x (the row pointers of a block index the whole arrays)."""
        m = self.matrix
        self._kernel(hi - lo, m.shape[1], m.indptr[lo : hi + 1], m.indices, m.data, x, out[lo:hi])


def _product_threads(entries: int) -> int:
    """Two threads for products of PARALLEL_FROM entries or more where two cores are free."""
    try:
        cores = len(os.sched_getaffinity(0))
    except AttributeError:  # not on Linux
        cores = os.cpu_count() or 1
    return 2 if cores >= 2 and entries >= PARALLEL_FROM else 1


@functools.cache
def _csr_kernel():
    """scipy's row-by-row product y += A·x on CSR arrays, or None where it is not found (the
    products are then made by ``@`` on one thread)."""
    try:
        from scipy.sparse._sparsetools import csr_matvec
    except ImportError:
        return None
    return csr_matvec


_pools: dict[int, object] = {}
_pools_lock = threading.Lock()


def _thread_pool():
    """One worker thread per process (a forked child makes its own: threads do not fork)."""
    from concurrent.futures import ThreadPoolExecutor

    with _pools_lock:
        pool = _pools.get(os.getpid())
        if pool is None:
            pool = _pools[os.getpid()] = ThreadPoolExecutor(1, thread_name_prefix="fem-product")
        return pool
