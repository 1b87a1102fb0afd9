"""The Green function of a small complex from vertex bitmasks, with its exact check.

A simplex on vertices ``0..62`` is held as the bitmask m = sum of 2^v over its vertices
(:meth:`verifier.complex.Complex.vertex_masks`).  Then

* x is a face of z  iff  ``m[x] & ~m[z] == 0``;
* x and y intersect  iff  ``m[x] & m[y] != 0`` (the connection matrix L of [FD]).

Knill's star formula [EN] gives the inverse of L:

    g(x, y) = omega(x) omega(y) sum over simplices z containing x and y of omega(z),

omega(z) = (-1)^dim z.  The candidate is never trusted: only the exact check L g = I
decides.

:func:`checked_green` (the path :func:`verifier.invariants.green` takes) works on the
face lists: the faces of each simplex z are the non-empty submasks of m[z], each found
by binary search among the masks (a submask that is not found means the list is not
closed under faces, and the answer is "not verified").  Then

1. g(x, y) += omega(x) omega(y) omega(z) for every simplex z and faces x, y of z;
2. the product L g is evaluated exactly, re-associated by the identity
   [x meets t] = sum over non-empty S contained in x and t of (-1)^(|S| + 1)
   (the binomial theorem: sum over k = 1..m of C(m, k) (-1)^(k + 1) = 1 for m >= 1,
   and 0 for m = 0):  (L g)(x, .) = sum over faces S of x of omega(S) Q(S, .), with
   Q(S, .) = sum over simplices t containing S of g(t, .).  Every S contained in x is a
   face of x, so the sum is over the checked face lists only; the work is about
   2 n (number of pairs face of simplex) instead of n times the nonzeros of L;
3. L g is compared with I entry by entry.

:func:`star_green` and :func:`is_connection_inverse` do the same from the definitions
alone (the faces found by testing all pairs, L g summed over the t meeting x); they are
the references the tests compare with.

Exactness of the int64 arithmetic (proved, not assumed): each entry of g is a sum of at
most n terms +-1 (one per simplex z), so |g(t, y)| <= n; |Q(S, y)| <= n * n; each entry
of L g is a sum over the at most n faces S of x of +-Q(S, y), so every partial sum is at
most n^3 in absolute value (and n^2 for :func:`is_connection_inverse`).  The callers use
these kernels only for n <= ``MAX_ORDER`` = 2^12, where n^3 <= 2^36 is far below 2^63:
no int64 operation can overflow.

Integer arrays in, integer arrays out; numba compiles the kernels on first use and
caches the machine code next to this file.

References
----------
.. [FD]  O. Knill, "On Fredholm determinants in topology", arXiv:1612.08229 (2016).
.. [EN]  O. Knill, "The energy of a simplicial complex", Linear Algebra Appl. 600 (2020)
         96-129, arXiv:1907.03369.
"""

from __future__ import annotations

import numpy as np
from numba import njit

__all__ = ["MAX_ORDER", "load", "checked_green", "is_connection_inverse_by_faces", "star_green",
           "is_connection_inverse"]

MAX_ORDER = 1 << 12     # complexes with at most this many simplices (see the bound above)
_LOADED = []


def load() -> None:
    """Compile (or load from the disk cache) :func:`checked_green` for the arrays the
    library passes (read-only int64 vertex masks), once per process: a first
    compilation takes seconds, which callers keep out of a case's time limit."""
    if not _LOADED:
        masks = np.array([1, 2, 3], dtype=np.int64)
        masks.flags.writeable = False
        checked_green(masks)
        _LOADED.append(True)


@njit(cache=True)
def _face_lists(masks):
    """(start, faces): the positions of the faces of simplex z (its non-empty submasks,
    itself included) are faces[start[z]:start[z + 1]]; start[0] = -1 when some submask
    is not among the masks (the list is not closed under faces)."""
    n = len(masks)
    order = np.argsort(masks)
    ordered = masks[order]
    start = np.zeros(n + 1, np.int64)
    total = 0
    for z in range(n):
        m = masks[z]
        size = 0
        while m:
            m &= m - 1
            size += 1
        total += (1 << size) - 1
        start[z + 1] = total
    faces = np.empty(total, np.int64)
    q = 0
    for z in range(n):
        m = masks[z]
        sub = m
        while sub:                          # every non-empty submask of m, once
            k = np.searchsorted(ordered, sub)
            if k == n or ordered[k] != sub:
                start[0] = -1
                return start, faces
            faces[q] = order[k]
            q += 1
            sub = (sub - 1) & m
    return start, faces


@njit(cache=True)
def checked_green(masks):
    """(g, ok): the star-formula candidate for the simplices with bitmasks ``masks`` (in
    any order, omega read off the masks as (-1)^(|x| - 1)), and whether L g = I holds
    exactly (steps 1-3 of the module docstring).

    >>> g, ok = checked_green(np.array([1, 2, 3]))
    >>> ok, g.tolist()
    (True, [[0, -1, 1], [-1, 0, 1], [1, 1, -1]])
    """
    n = len(masks)
    g = np.zeros((n, n), np.int64)
    start, faces = _face_lists(masks)
    if start[0] < 0:
        return g, False
    omega = _omega(masks)
    for z in range(n):
        wz = omega[z]
        for a in range(start[z], start[z + 1]):
            x = faces[a]
            wxz = omega[x] * wz
            for b in range(start[z], start[z + 1]):
                y = faces[b]
                g[x, y] += wxz * omega[y]
    return g, _verify_by_faces(g, start, faces, omega)


@njit(cache=True)
def _omega(masks):
    """omega(x) = (-1)^dim(x) for the simplices with these vertex bitmasks."""
    omega = np.empty(len(masks), np.int64)
    for z in range(len(masks)):
        m = masks[z]
        size = 0
        while m:
            m &= m - 1
            size += 1
        omega[z] = 1 if size % 2 == 1 else -1
    return omega


@njit(cache=True)
def _verify_by_faces(g, start, faces, omega):
    """True iff L g = I, with L g summed by faces (step 2 of the module docstring)."""
    n = len(omega)
    q = np.zeros((n, n), np.int64)          # Q(S, .) = sum of the rows g(t, .), t >= S
    for t in range(n):
        for a in range(start[t], start[t + 1]):
            s = faces[a]
            for y in range(n):
                q[s, y] += g[t, y]
    row = np.empty(n, np.int64)
    for x in range(n):                      # (L g)(x, .) = sum of omega(S) Q(S, .), S <= x
        row[:] = 0
        for a in range(start[x], start[x + 1]):
            s = faces[a]
            ws = omega[s]
            for y in range(n):
                row[y] += ws * q[s, y]
        for y in range(n):
            if row[y] != (1 if x == y else 0):
                return False
    return True


@njit(cache=True)
def is_connection_inverse_by_faces(masks, g):
    """True iff L g = I, decided as :func:`checked_green` decides it (for testing that
    check on candidates other than its own); False when the masks are not closed under
    faces or g has the wrong shape.

    >>> is_connection_inverse_by_faces(np.array([1, 2, 3]), checked_green(np.array([1, 2, 3]))[0])
    True
    """
    n = len(masks)
    if g.shape[0] != n or g.shape[1] != n:
        return False
    start, faces = _face_lists(masks)
    if start[0] < 0:
        return False
    omega = _omega(masks)
    return _verify_by_faces(g, start, faces, omega)


@njit(cache=True)
def star_green(masks, omega):
    """The star-formula candidate g (n x n int64) for the simplices with bitmasks
    ``masks`` (in simplex order, faces before cofaces) and signs ``omega``.

    >>> star_green(np.array([1, 2, 3]), np.array([1, 1, -1])).tolist()   # an edge 01
    [[0, -1, 1], [-1, 0, 1], [1, 1, -1]]
    """
    n = len(masks)
    g = np.zeros((n, n), np.int64)
    faces = np.empty(n, np.int64)
    for z in range(n):
        mz = masks[z]
        k = 0
        for x in range(z + 1):            # a face of z comes no later than z
            if masks[x] & ~mz == 0:
                faces[k] = x
                k += 1
        wz = omega[z]
        for a in range(k):
            x = faces[a]
            wxz = omega[x] * wz
            for b in range(k):
                y = faces[b]
                g[x, y] += wxz * omega[y]
    return g


@njit(cache=True)
def is_connection_inverse(masks, g):
    """True iff L g = I exactly, L(x, y) = [m_x & m_y != 0] the connection matrix.

    Row x of L g is the sum of the rows t of g with t meeting x; the nonzeros of g are
    gathered first, so the work is sum over t of |row t of g| times the number of
    simplices meeting t.

    >>> edge = np.array([1, 2, 3])
    >>> is_connection_inverse(edge, star_green(edge, np.array([1, 1, -1])))
    True
    """
    n = len(masks)
    if g.shape[0] != n or g.shape[1] != n:
        return False
    start = np.zeros(n + 1, np.int64)
    for t in range(n):
        count = 0
        for y in range(n):
            if g[t, y] != 0:
                count += 1
        start[t + 1] = start[t] + count
    column = np.empty(start[n], np.int64)
    value = np.empty(start[n], np.int64)
    for t in range(n):
        q = start[t]
        for y in range(n):
            if g[t, y] != 0:
                column[q] = y
                value[q] = g[t, y]
                q += 1
    row = np.zeros(n, np.int64)
    for x in range(n):
        mx = masks[x]
        for y in range(n):
            row[y] = 0
        for t in range(n):
            if mx & masks[t] != 0:
                for q in range(start[t], start[t + 1]):
                    row[column[q]] += value[q]
        for y in range(n):
            if row[y] != (1 if x == y else 0):
                return False
    return True
