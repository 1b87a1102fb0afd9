"""The Green function of a small complex from vertex bitmasks, with its exact check.

A simplex on vertices ``0..62`` is held as the bitmask m = sum of 2^v over its vertices
(:meth:`verifier.complex.Complex.vertex_masks`).  Then

* x is a face of z  iff  ``m[x] & ~m[z] == 0``;
* x and y intersect  iff  ``m[x] & m[y] != 0`` (the connection matrix L of [FD]).

Knill's star formula [EN] gives the inverse of L:

    g(x, y) = omega(x) omega(y) sum over simplices z containing x and y of omega(z),

omega(z) = (-1)^dim z.  :func:`star_green` evaluates it by adding, for every simplex z,
the term omega(x) omega(y) omega(z) to g(x, y) for every pair of faces x, y of z; the work
is sum over z of (2^|z| - 1)^2.  :func:`is_connection_inverse` then decides L g = I
exactly: the candidate is never trusted, only the check decides.

Exactness of the int64 arithmetic (proved, not assumed): each entry of g is a sum of at
most n terms +-1 (one per simplex z), so |g(t, y)| <= n; each entry of L g is a sum of at
most n products L(x, t) g(t, y) with L(x, t) in {0, 1}, so every partial sum is at most
n^2 in absolute value.  The callers use these kernels only for n <= ``MAX_ORDER``
= 2^12, where n^2 <= 2^24 is far below 2^63: no int64 operation can overflow.

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

__all__ = ["MAX_ORDER", "star_green", "is_connection_inverse", "checked_green"]

MAX_ORDER = 1 << 12     # complexes with at most this many simplices (see the bound above)


@njit(cache=True)
def checked_green(masks):
    """(g, ok): the star-formula candidate for the simplices with bitmasks ``masks`` (in
    simplex order), omega read off the masks as (-1)^(|x| - 1), and whether L g = I
    holds exactly (:func:`star_green` then :func:`is_connection_inverse`, in one call).

    >>> g, ok = checked_green(np.array([1, 2, 3]))
    >>> ok, int(g.sum())
    (True, 1)
    """
    n = len(masks)
    omega = np.empty(n, np.int64)
    for x in range(n):
        m = masks[x]
        size = 0
        while m:
            m &= m - 1
            size += 1
        omega[x] = 1 if size % 2 == 1 else -1
    g = star_green(masks, omega)
    return g, is_connection_inverse(masks, g)


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

    >>> is_connection_inverse(np.array([1, 2, 3]), star_green(np.array([1, 2, 3]), np.array([1, 1, -1])))
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
