"""Fill-reducing orderings for the step matrices: geometric nested dissection.

A 2-D finite-element matrix is the graph of its mesh. Cutting the node set in two at the
median of its longer extent, taking the nodes of one half that touch the other as the
separator, and numbering the halves first and the separator last (recursively) confines the
fill of the factor to the separators (George, "Nested dissection of a regular finite element
mesh", SIAM J. Numer. Anal. 10 (1973) 345–363; from memory). Against SuperLU's minimum degree
on AᵀA + A this measured, for the benchmark square (symmetric mode, same matrix): at 97k
unknowns 7.9M factor entries instead of 10.5M, factorisation 0.27 s instead of 0.76 s, solve
16 ms instead of 17 ms; at 992k unknowns 106M instead of 161M entries, 5.7 s instead of 20.6 s,
192 ms instead of 231 ms. Against CHOLMOD's own nested dissection (METIS separators, the
order cholespy's Cholesky uses), counted exactly by CHOLMOD's symbolic analysis: 52.2M entries
in L instead of 51.9M on that square at 992k unknowns (3.93M instead of 3.84M at 97k), 50.7M
instead of 45.9M on the benchmark angle at 986k, made in 2.5 s instead of 7.0 s.

Every level of the dissection works on arrays of the live nodes kept sorted by part and, within
a part, by coordinate (children listed left halves first), so no level sorts, and drops edges
by gathers from a byte per node: at 992k unknowns the same order in 7.7 s instead of 15.9 s
(one process, load average 7.4 on two cores).
"""

from __future__ import annotations

import numpy as np
import scipy.sparse as sp

LEAF = 16  # parts this small are numbered as they come (measured best of 8-512 at 100k-1M)


def nested_dissection(graph: sp.csr_matrix, points: np.ndarray, leaf: int = LEAF) -> np.ndarray:
    """The order in which to number the nodes (``order[k]`` is the node numbered k).

    Every part larger than ``leaf`` is cut in two halves at the median of x and at the median
    of y, whichever cut has the smaller separator; all parts of one level are cut at once.

    Parameters
    ----------
    graph : scipy.sparse.csr_matrix
        Square matrix whose pattern is the (symmetric) node graph.
    points : ndarray
        Node coordinates, shape (2, n), m.
    leaf : int
        Parts of at most this many nodes are not cut further.

    Examples
    --------
    >>> import numpy as np, scipy.sparse as sp
    >>> path = sp.diags([1, 2, 1], [-1, 0, 1], shape=(5, 5), format="csr")
    >>> order = nested_dissection(path, np.vstack([np.arange(5.0), np.zeros(5)]), leaf=1)
    >>> sorted(order.tolist()) == [0, 1, 2, 3, 4]
    True
    """
    coo = sp.coo_matrix(graph)
    n = graph.shape[0]
    once = coo.row < coo.col  # each edge once (the pattern is symmetric)
    rows, cols = coo.row[once].astype(np.int32), coo.col[once].astype(np.int32)
    order = np.empty(n, dtype=np.int64)
    part = np.zeros(n, dtype=np.int32)  # the part each node is in; -1 once numbered
    first = np.zeros(1, dtype=np.int64)  # each part's first number
    # the live nodes by part and, within a part, by coordinate, with their coordinates: kept
    # so through the levels (children listed left halves first, in their parents' order)
    along = [np.argsort(points[axis], kind="stable") for axis in (0, 1)]
    values = [points[axis][along[axis]] for axis in (0, 1)]
    while True:
        live = np.flatnonzero(part >= 0)
        if live.size == 0:
            return order
        sizes = np.bincount(part[live], minlength=first.size)
        small = sizes[part[live]] <= leaf
        _number(order, live[small], part, first, sizes)
        part[live[small]] = -1
        live = live[~small]
        if live.size == 0:
            continue
        # Edges inside a part that is being cut. No edge joins two live parts (every node of
        # a right half next to the left half is in the separator), so an edge goes when an end
        # is numbered: gathers from a byte per node, which stay in cache.
        alive = part >= 0
        edge = alive[rows] & alive[cols]
        rows, cols = rows[edge], cols[edge]
        _keep(along, values, alive)
        left, separator = _cut(along, values, part, sizes, leaf, (rows, cols))
        # numbers: left half from the part's first, the rest after it, the separator last
        left_counts = np.bincount(part[left & alive], minlength=first.size)
        separator_counts = np.bincount(part[separator], minlength=first.size)
        members = np.flatnonzero(separator)
        _number(order, members, part, first + sizes - separator_counts, separator_counts)
        children_first = np.concatenate([first, first + left_counts])
        part[members] = -1
        rest = live[~separator[live]]
        part[rest] = np.where(left[rest], part[rest], part[rest] + first.size)
        first = children_first
        _keep(along, values, part >= 0, left)


def _keep(along, values, alive, left=None) -> None:
    """Drop the numbered nodes from the sorted lists; with ``left``, list each part's left
    half before its right half (the children's order)."""
    for axis in (0, 1):
        keep = alive[along[axis]]
        nodes, coordinates = along[axis][keep], values[axis][keep]
        if left is not None:
            on_left = left[nodes]
            nodes = np.concatenate([nodes[on_left], nodes[~on_left]])
            coordinates = np.concatenate([coordinates[on_left], coordinates[~on_left]])
        along[axis], values[axis] = nodes, coordinates


def _cut(along, values, part, sizes, leaf, edges):
    """Cut every part larger than ``leaf`` across x or across y, whichever separator is
    smaller: the left halves and the separators, as masks over the nodes."""
    ids = np.flatnonzero(sizes > leaf)
    cut = sizes[ids]  # the parts in ``along``, in order
    starts = np.cumsum(cut) - cut
    rank = np.arange(int(cut.sum())) - np.repeat(starts, cut)
    lefts, touching = [], []
    for axis in (0, 1):
        left, touches = _halves(along[axis], values[axis], rank, starts, cut, part.size, edges)
        lefts.append(left)
        touching.append(touches)
    separator_sizes = [np.bincount(part[t], minlength=sizes.size) for t in touching]
    across_y = separator_sizes[1] < separator_sizes[0]
    choose = across_y[part]
    left = np.where(choose, lefts[1], lefts[0])
    separator = np.where(choose, touching[1], touching[0]) & (part >= 0)
    return left, separator


def _halves(along, values, rank, starts, cut, n, edges):
    """Each part's lower half along one axis, and the nodes outside it that touch it.

    ``along`` holds the live nodes grouped by part (sizes ``cut``, from ``starts``), each
    part's sorted by coordinate (``values``). A part is cut at the median value, so that
    nodes on one grid line stay together; by rank alone where that leaves a half empty.
    """
    half = cut // 2
    below = rank < np.repeat(half, cut)
    by_value = values < np.repeat(values[starts + half], cut)
    empty = np.add.reduceat(by_value.astype(np.int64), starts) == 0
    rows, cols = edges
    left = np.zeros(n, dtype=bool)
    left[along[np.where(np.repeat(empty, cut), below, by_value)]] = True
    touches = np.zeros(n, dtype=bool)
    row_left, col_left = left[rows], left[cols]
    touches[rows[~row_left & col_left]] = True
    touches[cols[row_left & ~col_left]] = True
    return left, touches


def _number(order, nodes, part, first, sizes) -> None:
    """Give ``nodes`` the numbers first[p], first[p] + 1, ... within each part p, in node
    order."""
    if nodes.size == 0:
        return
    groups = part[nodes]
    ranked = nodes[np.argsort(groups, kind="stable")]
    groups = part[ranked]
    starts = np.searchsorted(groups, groups, side="left")
    order[first[groups] + np.arange(ranked.size) - starts] = ranked


class PermutedFactor:
    """A factor of P·A·Pᵀ used as a solver of A: x = Pᵀ·solve(P·b)."""

    def __init__(self, factor, order: np.ndarray):
        self.factor = factor
        self.order = order

    def solve(self, rhs: np.ndarray) -> np.ndarray:
        x = np.empty_like(rhs)
        x[self.order] = self.factor.solve(rhs[self.order])
        return x
