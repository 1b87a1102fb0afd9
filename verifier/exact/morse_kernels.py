"""The compiled kernels of the discrete Morse reduction (:mod:`verifier.exact.morse`).

Integer arrays in, integer arrays out; numba compiles them on first use and caches the
machine code next to this file.  ``coreduce`` builds the acyclic matching by
coreductions; ``flow`` follows the gradient paths of the critical cells of one dimension,
substituting the lower cell of each pair by the latest removal time first (a max-heap on
the removal times), with every coefficient checked against 2^62.
"""

from __future__ import annotations

import numpy as np
from numba import njit

__all__ = ["coreduce", "flow"]

LIMIT = np.int64(1) << np.int64(62)


@njit(cache=True)
def _remove(x, t, alive, time, count, cof_ptr, cof_idx, queue, tail):
    """Remove cell x at time t; cofaces left with exactly one face are queued."""
    alive[x] = False
    time[x] = t
    for q in range(cof_ptr[x], cof_ptr[x + 1]):
        z = cof_idx[q]
        if alive[z]:
            count[z] -= 1
            if count[z] == 1:
                queue[tail] = z
                tail += 1
    return tail


@njit(cache=True)
def coreduce(n, face_ptr, face_idx, cof_ptr, cof_idx):
    """(mate, time): the coreduction matching of the cells 0..n-1 and the removal order."""
    alive = np.ones(n, np.bool_)
    count = np.empty(n, np.int64)
    for x in range(n):
        count[x] = face_ptr[x + 1] - face_ptr[x]
    mate = np.full(n, -1, np.int64)
    time = np.full(n, -1, np.int64)
    queue = np.empty(n + 1, np.int64)
    head = 0
    tail = 0
    t = 0
    seed = 0
    while True:
        while head < tail:
            y = queue[head]
            head += 1
            if not alive[y] or count[y] != 1:
                continue
            a = -1
            for q in range(face_ptr[y], face_ptr[y + 1]):
                if alive[face_idx[q]]:
                    a = face_idx[q]
                    break
            mate[a] = y
            mate[y] = a
            tail = _remove(a, t, alive, time, count, cof_ptr, cof_idx, queue, tail)
            tail = _remove(y, t + 1, alive, time, count, cof_ptr, cof_idx, queue, tail)
            t += 2
        while seed < n and not alive[seed]:
            seed += 1
        if seed == n:
            break
        # the alive cell of least dimension: all its faces are gone, it is critical
        tail = _remove(seed, t, alive, time, count, cof_ptr, cof_idx, queue, tail)
        t += 1
    return mate, time


@njit(cache=True)
def _push(heap, size, time, x):
    """Push x onto the max-heap on time[...] of ``size`` elements; the new size."""
    i = size
    while i > 0:
        parent = (i - 1) // 2
        if time[heap[parent]] >= time[x]:
            break
        heap[i] = heap[parent]
        i = parent
    heap[i] = x
    return size + 1


@njit(cache=True)
def _pop(heap, size, time):
    """(the element of largest time, the new size) of a non-empty max-heap."""
    top = heap[0]
    size -= 1
    last = heap[size]
    i = 0
    while True:
        child = 2 * i + 1
        if child >= size:
            break
        if child + 1 < size and time[heap[child + 1]] > time[heap[child]]:
            child += 1
        if time[heap[child]] <= time[last]:
            break
        heap[i] = heap[child]
        i = child
    if size > 0:
        heap[i] = last
    return top, size


@njit(cache=True)
def flow(cells, face_ptr, face_idx, face_sgn, mate, time, dims, critical_index):
    """Morse boundaries of the given critical cells (all of one dimension k).

    Returns (rows, cols, values, overflowed): rows are critical_index of the critical
    (k-1)-cells, cols positions in ``cells``; ``overflowed`` lists the positions in
    ``cells`` whose coefficients would have left the safe range (recomputed exactly in
    Python by the caller)."""
    n = len(mate)
    coef = np.zeros(n, np.int64)
    queued = np.zeros(n, np.bool_)
    heap = np.empty(n + 1, np.int64)
    rows = []
    cols = []
    values = []
    overflowed = []
    for j in range(len(cells)):
        s = cells[j]
        size = 0
        bad = False
        for q in range(face_ptr[s], face_ptr[s + 1]):
            a = face_idx[q]
            coef[a] += face_sgn[q]
            if not queued[a]:
                queued[a] = True
                size = _push(heap, size, time, a)
        while size > 0:
            a, size = _pop(heap, size, time)
            queued[a] = False
            c = coef[a]
            coef[a] = 0
            if c == 0 or bad:
                continue
            if critical_index[a] >= 0:
                rows.append(critical_index[a])
                cols.append(j)
                values.append(c)
                continue
            b = mate[a]
            if dims[b] < dims[a]:          # a is the upper cell of its pair: dropped
                continue
            e = 0
            for q in range(face_ptr[b], face_ptr[b + 1]):
                if face_idx[q] == a:
                    e = face_sgn[q]
            for q in range(face_ptr[b], face_ptr[b + 1]):
                a2 = face_idx[q]
                if a2 == a:
                    continue
                delta = -c * e * face_sgn[q]
                if abs(c) >= LIMIT or abs(coef[a2]) >= LIMIT - abs(delta):
                    bad = True
                    break
                coef[a2] += delta
                if not queued[a2]:
                    queued[a2] = True
                    size = _push(heap, size, time, a2)
        if bad:
            overflowed.append(j)
            k = len(cols) - 1                  # discard this cell's partial result
            while k >= 0 and cols[k] == j:
                rows.pop()
                cols.pop()
                values.pop()
                k -= 1
            for q in range(n):
                coef[q] = 0
                queued[q] = False
    return rows, cols, values, overflowed
