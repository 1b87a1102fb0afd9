"""The canonical form of a complex on at most 10 vertices, compiled.

:meth:`verifier.complex.Complex.canonical_form` is the least relabelled facet list over
the leaves of an individualisation-refinement search (B. D. McKay, "Practical graph
isomorphism", Congressus Numerantium 30 (1981) 45-87; B. D. McKay and A. Piperno,
J. Symbolic Comput. 60 (2014) 94-112, for the method in general).  This module runs
the *same* search as the plain-Python :func:`verifier.complex._canonical_form_reference`
-- same initial cells, same refinement passes, same target cell, same pruning -- on
integer arrays, so that it gives the same form (and so the same content hash), only
faster.  Only the order in which leaves are visited differs (an explicit stack instead
of recursion), and the least form over a set of leaves does not depend on that order.

Encodings.  A vertex set is a bitmask.  A sorted tuple (a_1, ..., a_k) of integers in
0..b-2 (k <= L) is encoded as the integer sum of (a_i + 1) b^(L - i): comparing codes is
comparing the tuples lexicographically, a proper prefix first (its missing digits are
0, below every digit a + 1 >= 1).  With n <= 10 vertices, b = n + 1 and L = n the codes
stay below 11^10 < 2^35.  A signature (a sorted tuple of codes) is a row padded with -1
after its end, which again makes a proper prefix come first.

* Initial cells: vertices grouped by the sorted tuple of the sizes of the facets that
  contain them, the groups in increasing order of that tuple, vertices increasing.
* A refinement pass: each facet gets the code of the sorted tuple of the cells of its
  vertices (cells as at the start of the pass); each vertex of a non-singleton cell
  gets the sorted tuple of the codes of its facets; a cell is split by a stable sort on
  these signatures, the new cells in increasing order of signature.  Passes repeat until
  one splits nothing.
* Search: refine; at a discrete partition read the form (the facets relabelled by
  position, each a sorted tuple, the list sorted); otherwise branch on the vertices of
  the first non-singleton cell, skipping a vertex v when the transposition (u v) with
  an earlier branch vertex u maps every facet through u or v to a facet.
"""

from __future__ import annotations

import numpy as np
from numba import njit

__all__ = ["MAX_VERTICES", "load", "canonical_rows", "popcount"]

MAX_VERTICES = 10
_LOADED = []


def load() -> None:
    """Compile (or load from the disk cache) :func:`canonical_rows` for the arrays the
    library passes (read-only int64 vertex masks), once per process: a first
    compilation takes seconds, which callers keep out of a case's time limit."""
    if not _LOADED:
        masks = np.array([1, 2, 3], dtype=np.int64)
        masks.flags.writeable = False
        canonical_rows(2, masks)
        _LOADED.append(True)


@njit(cache=True)
def popcount(m):
    """The number of set bits of m (Kernighan's loop)."""
    count = 0
    while m:
        m &= m - 1
        count += 1
    return count


@njit(cache=True)
def _less(a, b):
    """-1, 0 or 1 as row a is below, equal to or above row b (lexicographically)."""
    for i in range(len(a)):
        if a[i] != b[i]:
            return -1 if a[i] < b[i] else 1
    return 0


@njit(cache=True)
def _sort_small(values, count):
    """Sort values[:count] in place (insertion sort; short rows)."""
    for i in range(1, count):
        x = values[i]
        j = i - 1
        while j >= 0 and values[j] > x:
            values[j + 1] = values[j]
            j -= 1
        values[j + 1] = x


@njit(cache=True)
def _split_cells(order, start, ncells, signature, new_order, new_start):
    """One splitting of every non-singleton cell by a stable sort on ``signature``
    (a row per vertex); returns the new number of cells."""
    out = 0
    new_start[0] = 0
    for c in range(ncells):
        s, e = start[c], start[c + 1]
        for p in range(s, e):
            new_order[p] = order[p]
        if e - s > 1:
            for i in range(s + 1, e):          # stable insertion sort by signature
                v = new_order[i]
                j = i - 1
                while j >= s and _less(signature[new_order[j]], signature[v]) > 0:
                    new_order[j + 1] = new_order[j]
                    j -= 1
                new_order[j + 1] = v
            for p in range(s + 1, e):
                if _less(signature[new_order[p - 1]], signature[new_order[p]]) != 0:
                    out += 1
                    new_start[out] = p
        out += 1
        new_start[out] = e
    return out


@njit(cache=True)
def _refine(order, start, ncells, facets, incident, n_incident, n, signature,
            new_order, new_start, cell_mask, code):
    """Refine (order, start, ncells) in place until a pass splits nothing; returns ncells
    (``cell_mask`` and ``code`` are work space of n and len(facets) entries)."""
    base = n + 1
    nf = len(facets)
    while True:
        if ncells == n:
            return ncells
        for c in range(ncells):
            mask = 0
            for p in range(start[c], start[c + 1]):
                mask |= 1 << order[p]
            cell_mask[c] = mask
        for i in range(nf):
            value = 0
            digits = 0
            for c in range(ncells):
                for _ in range(popcount(facets[i] & cell_mask[c])):
                    value = value * base + (c + 1)
                    digits += 1
            for _ in range(n - digits):
                value = value * base
            code[i] = value
        for c in range(ncells):
            if start[c + 1] - start[c] > 1:
                for p in range(start[c], start[c + 1]):
                    v = order[p]
                    row = signature[v]
                    k = n_incident[v]
                    for q in range(k):
                        row[q] = code[incident[v, q]]
                    _sort_small(row, k)
                    for q in range(k, len(row)):
                        row[q] = -1
        count = _split_cells(order, start, ncells, signature, new_order, new_start)
        if count == ncells:
            return ncells
        for p in range(n):
            order[p] = new_order[p]
        for c in range(count + 1):
            start[c] = new_start[c]
        ncells = count


@njit(cache=True)
def _swappable(u, v, facets, is_facet):
    bu = 1 << u
    bv = 1 << v
    for i in range(len(facets)):
        f = facets[i]
        if f & (bu | bv):
            image = f & ~(bu | bv)
            if f & bu:
                image |= bv
            if f & bv:
                image |= bu
            if not is_facet[image]:
                return False
    return True


@njit(cache=True)
def canonical_rows(n, masks):
    """The canonical form of the complex on vertices 0..n-1 (n <= 10) whose simplices
    have the bitmasks ``masks``, as ``(vertices, ends)``: the relabelled facets, each
    with its vertices in increasing order, the facets in increasing (lexicographic)
    order, written one after the other in ``vertices``; facet i is
    ``vertices[ends[i - 1]:ends[i]]`` (with ends[-1] read as 0).

    >>> [a.tolist() for a in canonical_rows(3, np.array([1, 2, 4, 3]))]  # edge and point
    [[0, 1, 2], [1, 3]]
    """
    if n == 0:
        return np.zeros(0, np.int64), np.zeros(0, np.int64)
    base = n + 1
    is_simplex = np.zeros(1 << n, np.bool_)
    for m in masks:
        is_simplex[m] = True
    is_facet = np.zeros(1 << n, np.bool_)
    count = 0
    for m in masks:
        top = True
        for w in range(n):
            if not (m >> w) & 1 and is_simplex[m | (1 << w)]:
                top = False
                break
        if top and not is_facet[m]:
            is_facet[m] = True
            count += 1
    facets = np.empty(count, np.int64)
    k = 0
    for m in range(1 << n):
        if is_facet[m]:
            facets[k] = m
            k += 1
    nf = count
    n_incident = np.zeros(n, np.int64)
    incident = np.empty((n, nf), np.int64)
    for i in range(nf):
        for v in range(n):
            if (facets[i] >> v) & 1:
                incident[v, n_incident[v]] = i
                n_incident[v] += 1
    width = max(nf, 1)
    signature = np.full((n, width), -1, np.int64)
    new_order = np.empty(n, np.int64)
    new_start = np.empty(n + 1, np.int64)

    # initial cells: by the sorted tuple of the sizes of the facets through the vertex
    order = np.arange(n)
    start = np.empty(n + 1, np.int64)
    start[0] = 0
    start[1] = n
    for v in range(n):
        row = signature[v]
        for q in range(n_incident[v]):
            row[q] = popcount(facets[incident[v, q]])
        _sort_small(row, n_incident[v])
    ncells = _split_cells(order, start, 1, signature, new_order, new_start)
    order[:] = new_order
    start[:ncells + 1] = new_start[:ncells + 1]

    capacity = n * n + 1
    stack_order = np.empty((capacity, n), np.int64)
    stack_start = np.empty((capacity, n + 1), np.int64)
    stack_cells = np.empty(capacity, np.int64)
    stack_order[0] = order
    stack_start[0] = start
    stack_cells[0] = ncells
    depth = 1
    best = np.empty(nf, np.int64)
    have_best = False
    form = np.empty(nf, np.int64)
    position = np.empty(n, np.int64)
    representatives = np.empty(n, np.int64)
    cell_mask = np.empty(n, np.int64)
    code = np.empty(nf, np.int64)
    digits = np.empty(n, np.int64)
    while depth > 0:
        depth -= 1
        order[:] = stack_order[depth]
        start[:] = stack_start[depth]
        ncells = _refine(order, start, stack_cells[depth], facets, incident, n_incident,
                         n, signature, new_order, new_start, cell_mask, code)
        if ncells == n:
            for p in range(n):
                position[order[p]] = p
            for i in range(nf):
                size = 0
                for v in range(n):
                    if (facets[i] >> v) & 1:
                        digits[size] = position[v]
                        size += 1
                _sort_small(digits, size)
                value = 0
                for q in range(size):
                    value = value * base + (digits[q] + 1)
                for q in range(size, n):
                    value = value * base
                form[i] = value
            form.sort()
            if not have_best or _less(form, best) < 0:
                best[:] = form
                have_best = True
            continue
        target = 0
        while start[target + 1] - start[target] == 1:
            target += 1
        s, e = start[target], start[target + 1]
        chosen = 0
        for p in range(s, e):
            v = order[p]
            fresh = True
            for r in range(chosen):
                if _swappable(representatives[r], v, facets, is_facet):
                    fresh = False
                    break
            if fresh:
                representatives[chosen] = v
                chosen += 1
        for r in range(chosen - 1, -1, -1):     # pushed in reverse: visited in order
            v = representatives[r]
            child = stack_order[depth]
            child[:] = order
            child[s] = v
            p = s + 1
            for q in range(s, e):
                if order[q] != v:
                    child[p] = order[q]
                    p += 1
            child_start = stack_start[depth]
            child_start[:target + 1] = start[:target + 1]
            child_start[target + 1] = s + 1
            child_start[target + 2:ncells + 2] = start[target + 1:ncells + 1]
            stack_cells[depth] = ncells + 1
            depth += 1
    vertices = np.empty(nf * n, np.int64)
    ends = np.empty(nf, np.int64)
    k = 0
    for i in range(nf):
        value = best[i]
        for q in range(n - 1, -1, -1):
            digits[q] = value % base
            value //= base
        for q in range(n):
            if digits[q] == 0:
                break
            vertices[k] = digits[q] - 1
            k += 1
        ends[i] = k
    return vertices[:k], ends
