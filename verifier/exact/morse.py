"""Discrete Morse reduction of a based chain complex over Z.

A *based chain complex* here is given by its cells 0..n-1 and, for each cell, the list of
its codimension-one faces with incidence numbers +-1 (the boundary of a simplex).  An
*acyclic matching* pairs some cells a with a coface b (dim b = dim a + 1, [d b : a] = +-1)
so that no gradient path closes up; the unmatched cells are *critical*.  The *Morse
complex* has the critical cells as basis and the boundary

    D(s) = the chain of critical cells reached from d(s) along gradient paths,

computed by the flow: in the chain d(s), a non-critical cell a that is the lower cell of
a pair (a, b) is replaced, a <- a - [d b : a] d(b), and an upper cell of a pair is dropped,
until only critical cells remain.  The Morse complex is chain-homotopy equivalent to the
original one over Z [F], so it has the same integer homology, and tensored with Z/p the
same homology over Z/p; it is usually tiny (for a closed 3-manifold, a handful of cells).

The matching is built by *coreductions* [MB]: a cell with exactly one remaining face is
matched with that face and both are removed; when none is left, the remaining cell of
least dimension (all of whose faces are gone) is declared critical and removed.  Every
cell is removed once, so the matching takes time linear in the number of incidences, and
it is acyclic: along a gradient path the removal times strictly decrease (the other faces
of b were removed before a).  The flow uses that order too (a heap by removal time), so
each cell is substituted at most once per critical cell.

The kernels (:mod:`verifier.exact.morse_kernels`) are compiled with numba (integer
arithmetic only, overflow-checked: a coefficient that would leave int64 sends that cell
to an exact Python big-integer flow).

>>> faces = [[], [], [], [1, 0], [2, 0], [2, 1], [5, 4, 3]]   # a filled triangle
>>> signs = [[], [], [], [1, -1], [1, -1], [1, -1], [1, -1, 1]]
>>> R = reduce_chain_complex(dims=[0, 0, 0, 1, 1, 1, 2], faces=faces, signs=signs)
>>> R.critical, R.boundaries
([0], {})

References
----------
.. [F]  R. Forman, "Morse theory for cell complexes", Adv. Math. 134 (1998) 90-145.
.. [MB] M. Mrozek and B. Batko, "Coreduction homology algorithm", Discrete Comput. Geom.
        42 (2009) 577-598.
.. [BL] B. Benedetti and F. H. Lutz, "Random discrete Morse theory and a new library of
        triangulations", Exp. Math. 23 (2014) 66-94.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["MorseReduction", "reduce_chain_complex", "reduce_face_table"]


@dataclass(frozen=True)
class MorseReduction:
    """The result of a discrete Morse reduction.

    ``mate[x]`` is the cell matched with x (-1 for a critical cell); ``time[x]`` the
    order in which x was removed; ``critical`` the critical cells in ascending order;
    ``boundaries[k]`` the Morse boundary D_k as a dict {(i, j): value} with i indexing
    the critical (k-1)-cells and j the critical k-cells (each in ascending order).
    """
    dims: np.ndarray
    mate: np.ndarray
    time: np.ndarray
    critical: list
    boundaries: dict

    def critical_of_dim(self, k: int) -> list[int]:
        """The critical cells of dimension k, ascending."""
        return [c for c in self.critical if self.dims[c] == k]

    def pairs(self) -> np.ndarray:
        """The matched pairs as rows (lower cell, upper cell), ordered by the lower cell."""
        lower = np.nonzero((self.mate >= 0) & (self.dims[np.maximum(self.mate, 0)] > self.dims))[0]
        return np.stack([lower, self.mate[lower]], axis=1) if len(lower) else \
            np.zeros((0, 2), dtype=np.int64)


# ------------------------------------------------------------------ compiled kernels
def _kernels():
    """The two compiled kernels of :mod:`verifier.exact.morse_kernels`, imported lazily so
    that code which never reduces a chain complex does not pay for loading numba."""
    from .morse_kernels import coreduce, flow
    return coreduce, flow


# ------------------------------------------------------------------------ the API
def reduce_face_table(n: int, dims: np.ndarray, face_ptr: np.ndarray, face_idx: np.ndarray,
                      face_sgn: np.ndarray) -> MorseReduction:
    """Discrete Morse reduction of the chain complex given in compressed form: the faces
    of cell x are ``face_idx[face_ptr[x]:face_ptr[x+1]]`` with incidence numbers
    ``face_sgn`` (+-1).  Cells must be listed so that every cell comes after its faces
    and cells of one dimension are contiguous and ordered by dimension (as simplices are
    in a Complex).  See the module docstring for the method."""
    coreduce, flow = _kernels()
    dims = np.asarray(dims, dtype=np.int64)
    face_ptr = np.asarray(face_ptr, dtype=np.int64)
    face_idx = np.asarray(face_idx, dtype=np.int64)
    face_sgn = np.asarray(face_sgn, dtype=np.int64)
    order = np.argsort(face_idx, kind="stable")
    owner = np.repeat(np.arange(n, dtype=np.int64), np.diff(face_ptr))
    cof_idx = owner[order]
    cof_ptr = np.zeros(n + 1, dtype=np.int64)
    np.cumsum(np.bincount(face_idx, minlength=n), out=cof_ptr[1:])
    mate, time = coreduce(n, face_ptr, face_idx, cof_ptr, cof_idx)
    critical = np.nonzero(mate < 0)[0]
    critical_index = np.full(n, -1, dtype=np.int64)
    boundaries: dict[int, dict] = {}
    top = int(dims.max()) if n else -1
    for k in range(top + 1):
        of_k = critical[dims[critical] == k]
        critical_index[of_k] = np.arange(len(of_k))
    for k in range(1, top + 1):
        cells = critical[dims[critical] == k]
        if len(cells) == 0:
            continue
        rows, cols, values, overflowed = flow(cells, face_ptr, face_idx, face_sgn, mate, time,
                                              dims, critical_index)
        entries = {(int(i), int(j)): int(v) for i, j, v in zip(rows, cols, values)}
        for j in overflowed:
            for i, v in _flow_exact(int(cells[j]), face_ptr, face_idx, face_sgn, mate, time,
                                    dims, critical_index).items():
                entries[(i, int(j))] = v
        if entries:
            boundaries[k] = entries
    return MorseReduction(dims=dims, mate=mate, time=time,
                          critical=[int(c) for c in critical], boundaries=boundaries)


def _flow_exact(s, face_ptr, face_idx, face_sgn, mate, time, dims, critical_index) -> dict:
    """The flow of one critical cell with Python integers (the overflow fallback)."""
    import heapq

    def faces(x):
        return zip(face_idx[face_ptr[x]:face_ptr[x + 1]].tolist(),
                   face_sgn[face_ptr[x]:face_ptr[x + 1]].tolist())

    chain: dict[int, int] = {}
    heap: list[tuple[int, int]] = []
    for a, sign in faces(s):
        if a not in chain:
            heapq.heappush(heap, (-int(time[a]), a))
        chain[a] = chain.get(a, 0) + sign
    result: dict[int, int] = {}
    while heap:
        _, a = heapq.heappop(heap)
        c = chain.pop(a)
        if c == 0:
            continue
        if critical_index[a] >= 0:
            result[int(critical_index[a])] = c
            continue
        b = int(mate[a])
        if dims[b] < dims[a]:
            continue
        boundary = dict(faces(b))
        e = boundary[a]
        for a2, sign in boundary.items():
            if a2 == a:
                continue
            if a2 not in chain:
                heapq.heappush(heap, (-int(time[a2]), a2))
            chain[a2] = chain.get(a2, 0) - c * e * sign
    return result


def reduce_chain_complex(dims, faces, signs) -> MorseReduction:
    """The same reduction for a chain complex given as Python lists: ``faces[x]`` the
    faces of cell x and ``signs[x]`` their incidence numbers (small inputs, examples)."""
    n = len(dims)
    face_ptr = np.zeros(n + 1, dtype=np.int64)
    np.cumsum([len(f) for f in faces], out=face_ptr[1:])
    face_idx = np.array([a for f in faces for a in f], dtype=np.int64)
    face_sgn = np.array([e for s in signs for e in s], dtype=np.int64)
    return reduce_face_table(n, np.asarray(dims), face_ptr, face_idx, face_sgn)
