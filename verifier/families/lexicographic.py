"""The compiled lexicographic searches behind :mod:`.triangulations`.

Two depth-first searches with explicit stacks and undo, compiled with numba (integers
only): :func:`surface_search` (closed surfaces) and :func:`manifold_search`
(combinatorial 3-manifolds).  The method, its cuts and why every manifold is reached
are explained in the docstring of :mod:`verifier.families.triangulations`; it follows T.
Sulanke and F. H. Lutz, "Isomorphism-free lexicographic enumeration of triangulated
surfaces and 3-manifolds", Eur. J. Combin. 30 (2009) 1965-1979.

State of the surface search on n vertices: ``cnt[u, v]`` triangles on the edge uv,
``opp[u, v, i]`` their third vertices, ``deg[x]`` neighbours of x, ``opened[x]`` edges
at x in one triangle only (x is *closed*, its link a full circle, when it has
neighbours and no such edge).  The 3-manifold search keeps the same one dimension up:
``c3[a, b, c]`` tetrahedra on the triangle abc (a < b < c), ``o3`` their fourth
vertices, ``etri[u, v]`` triangles on the edge uv, ``eopen[u, v]`` those in one
tetrahedron, and per vertex its degree, open triangles, triangles and tetrahedra.

The module imports numba at once; :mod:`.triangulations` imports it on first use.
"""

from __future__ import annotations

import numba
import numpy as np

__all__ = ["surface_search", "manifold_search"]


@numba.njit(cache=True)
def surface_path_end(x, p, cnt, opp):
    """Walk the path of the link of x that starts at its end p; return its other end
    and its number of vertices."""
    prev = p
    cur = opp[x, p, 0]
    length = 2
    while cnt[x, cur] == 2:
        nxt = opp[x, cur, 0]
        if nxt == prev:
            nxt = opp[x, cur, 1]
        prev = cur
        cur = nxt
        length += 1
    return cur, length


@numba.njit(cache=True)
def surface_link_ok(x, p, q, cnt, opp, deg):
    """May the link of x gain the edge p q?  Only if that does not close a cycle
    short of all of the link (a circle inside a circle is the whole circle)."""
    if cnt[x, p] == 1 and cnt[x, q] == 1:
        end, length = surface_path_end(x, p, cnt, opp)
        if end == q and length != deg[x]:
            return False
    return True


@numba.njit(cache=True)
def surface_add(a, b, c, cnt, opp, deg, opened):
    """Add the triangle abc (a < b < c) to the state."""
    for k in range(3):
        if k == 0:
            u, v, t = a, b, c
        elif k == 1:
            u, v, t = a, c, b
        else:
            u, v, t = b, c, a
        m = cnt[u, v]
        opp[u, v, m] = t
        opp[v, u, m] = t
        if m == 0:
            deg[u] += 1
            deg[v] += 1
            opened[u] += 1
            opened[v] += 1
        else:
            opened[u] -= 1
            opened[v] -= 1
        cnt[u, v] = m + 1
        cnt[v, u] = m + 1


@numba.njit(cache=True)
def surface_remove(a, b, c, cnt, deg, opened):
    """Remove the triangle abc, the last one added on each of its edges."""
    for k in range(3):
        if k == 0:
            u, v = a, b
        elif k == 1:
            u, v = a, c
        else:
            u, v = b, c
        m = cnt[u, v] - 1
        cnt[u, v] = m
        cnt[v, u] = m
        if m == 0:
            deg[u] -= 1
            deg[v] -= 1
            opened[u] -= 1
            opened[v] -= 1
        else:
            opened[u] += 1
            opened[v] += 1


@numba.njit(cache=True)
def surface_root_is_least(n, d, cnt, opp, deg, first, cycle):
    """Is the root of this closed surface (vertex 0, its link read 1, 2, ..., d) least
    among all roots (a vertex v of degree d, its link read from any start in either
    direction) in the order of the degree sequences read along the link?  The order
    does not depend on labels, so every class keeps the labellings of its least roots
    (all of them reached by the search); the others are dropped before canonical forms
    are computed."""
    for i in range(d):
        first[i] = deg[i + 1]
    for v in range(n):
        if deg[v] != d:
            continue
        s = -1
        for u in range(n):
            if cnt[v, u] > 0:
                s = u
                break
        cycle[0] = s
        prev = s
        cur = opp[v, s, 0]
        k = 1
        while cur != s:
            cycle[k] = cur
            k += 1
            nxt = opp[v, cur, 0]
            if nxt == prev:
                nxt = opp[v, cur, 1]
            prev = cur
            cur = nxt
        for start in range(d):
            for direction in range(2):
                for i in range(d):
                    j = (start + i) % d if direction == 0 else (start + d - i) % d
                    x = deg[cycle[j]]
                    if x < first[i]:
                        return False
                    if x > first[i]:
                        break
    return True


@numba.njit(cache=True)
def _open_edge(cnt, n):
    """The lexicographically smallest edge in exactly one triangle, or (-1, -1)."""
    for a in range(n):
        for b in range(a + 1, n):
            if cnt[a, b] == 1:
                return a, b
    return -1, -1


@numba.njit(cache=True)
def _open_triangle(c3, etri, eopen, n):
    """The lexicographically smallest triangle in exactly one tetrahedron, or (-1, -1, -1)
    (only edges that lie on an open triangle are searched)."""
    for u in range(n):
        for v in range(u + 1, n):
            if etri[u, v] == 0 or eopen[u, v] == 0:
                continue
            for z in range(v + 1, n):
                if c3[u, v, z] == 1:
                    return u, v, z
    return -1, -1, -1


@numba.njit(cache=True)
def surface_search(n, d):
    """All labelled closed surfaces on n vertices reached with vertex 0 of degree d,
    one row of triangles each (padded with -1)."""
    width = n * (n - 1) // 3 + 1        # triangles of a surface: f2 = 2 f1 / 3
    cnt = np.zeros((n, n), dtype=np.int64)
    opp = np.zeros((n, n, 2), dtype=np.int64)
    deg = np.zeros(n, dtype=np.int64)
    opened = np.zeros(n, dtype=np.int64)
    tris = np.zeros((width + 1, 3), dtype=np.int64)
    first = np.zeros(n, dtype=np.int64)
    cycle = np.zeros(n, dtype=np.int64)
    out = np.full((64, width, 3), -1, dtype=np.int64)
    found = 0
    if d + 1 > n or d < 3:
        return out[:0]
    ntri = 0
    for i in range(1, d + 1):
        j = i + 1 if i < d else 1
        a, b = (i, j) if i < j else (j, i)
        surface_add(0, a, b, cnt, opp, deg, opened)
        tris[ntri, 0] = 0
        tris[ntri, 1] = a
        tris[ntri, 2] = b
        ntri += 1
    used = d + 1
    ea = np.zeros(width + 1, dtype=np.int64)
    eb = np.zeros(width + 1, dtype=np.int64)
    nxt = np.zeros(width + 1, dtype=np.int64)
    isnew = np.zeros(width + 1, dtype=np.bool_)
    a0, b0 = _open_edge(cnt, n)
    level = 0
    ea[0] = a0
    eb[0] = b0
    nxt[0] = 0
    while level >= 0:
        a = ea[level]
        b = eb[level]
        w = nxt[level]
        t = opp[a, b, 0]
        placed = False
        while w <= used:
            if w == used and used >= n:
                break
            if w != a and w != b and w != t and cnt[a, w] < 2 and cnt[b, w] < 2 \
                    and not (deg[w] > 0 and opened[w] == 0):
                na = 1 if cnt[a, w] == 0 else 0
                nb = 1 if cnt[b, w] == 0 else 0
                if deg[a] + na <= d and deg[b] + nb <= d and deg[w] + na + nb <= d:
                    if surface_link_ok(a, b, w, cnt, opp, deg) and \
                            surface_link_ok(b, a, w, cnt, opp, deg) and \
                            surface_link_ok(w, a, b, cnt, opp, deg):
                        placed = True
                        break
            w += 1
        if not placed:
            level -= 1
            if level >= 0:
                ntri -= 1
                surface_remove(tris[ntri, 0], tris[ntri, 1], tris[ntri, 2],
                               cnt, deg, opened)
                if isnew[level]:
                    used -= 1
            continue
        nxt[level] = w + 1
        isnew[level] = w == used
        if w == used:
            used += 1
        x, y, z = a, b, w
        if z < y:
            y, z = z, y
            if y < x:
                x, y = y, x
        surface_add(x, y, z, cnt, opp, deg, opened)
        tris[ntri, 0] = x
        tris[ntri, 1] = y
        tris[ntri, 2] = z
        ntri += 1
        a2, b2 = _open_edge(cnt, n)
        if a2 < 0:
            if used == n and surface_root_is_least(n, d, cnt, opp, deg, first, cycle):
                if found == out.shape[0]:
                    bigger = np.full((2 * found, width, 3), -1, dtype=np.int64)
                    bigger[:found] = out
                    out = bigger
                out[found, :ntri] = tris[:ntri]
                found += 1
            ntri -= 1
            surface_remove(x, y, z, cnt, deg, opened)
            if isnew[level]:
                used -= 1
            continue
        level += 1
        ea[level] = a2
        eb[level] = b2
        nxt[level] = 0
    return out[:found]

# ---------------------------------------------------------------- dimension 3


@numba.njit(cache=True)
def key3(a, b, c):
    """The triangle {a, b, c} as sorted indices."""
    if a > b:
        a, b = b, a
    if b > c:
        b, c = c, b
    if a > b:
        a, b = b, a
    return a, b, c


@numba.njit(cache=True)
def edge_link_ok(u, v, x, y, c3, o3, etri):
    """May the link of the edge uv gain the edge x y?  Only if that does not close
    a cycle short of all of the link."""
    a, b, c = key3(u, v, x)
    if c3[a, b, c] != 1:
        return True
    a, b, c = key3(u, v, y)
    if c3[a, b, c] != 1:
        return True
    prev = x
    a, b, c = key3(u, v, x)
    cur = o3[a, b, c, 0]
    length = 2
    while True:
        a, b, c = key3(u, v, cur)
        if c3[a, b, c] != 2:
            break
        nxt = o3[a, b, c, 0]
        if nxt == prev:
            nxt = o3[a, b, c, 1]
        prev = cur
        cur = nxt
        length += 1
    if cur == y and length != etri[u, v]:
        return False
    return True


@numba.njit(cache=True)
def _face_without(q, omit):
    """The triangle of the tetrahedron q (sorted) opposite its vertex q[omit], sorted."""
    a = -1
    b = -1
    c = -1
    for i in range(4):
        if i != omit:
            if a < 0:
                a = q[i]
            elif b < 0:
                b = q[i]
            else:
                c = q[i]
    return a, b, c


@numba.njit(cache=True)
def tet_add(q, c3, o3, etri, eopen, deg, vopen, vtri, vtet):
    """Add the tetrahedron q (sorted) to the state."""
    for i in range(4):
        vtet[q[i]] += 1
    for omit in range(4):
        a, b, c = _face_without(q, omit)     # its fourth vertex is q[omit]
        m = c3[a, b, c]
        o3[a, b, c, m] = q[omit]
        c3[a, b, c] = m + 1
        tri = (a, b, c)
        for k in range(3):
            u = tri[k]
            if m == 0:
                vtri[u] += 1
                vopen[u] += 1
            else:
                vopen[u] -= 1
        for k in range(3):
            u = tri[k]
            v = tri[(k + 1) % 3]
            if m == 0:
                if etri[u, v] == 0:
                    deg[u] += 1
                    deg[v] += 1
                etri[u, v] += 1
                etri[v, u] += 1
                eopen[u, v] += 1
                eopen[v, u] += 1
            else:
                eopen[u, v] -= 1
                eopen[v, u] -= 1


@numba.njit(cache=True)
def tet_remove(q, c3, etri, eopen, deg, vopen, vtri, vtet):
    """Remove the tetrahedron q, the last one added on each of its triangles."""
    for i in range(4):
        vtet[q[i]] -= 1
    for omit in range(3, -1, -1):
        a, b, c = _face_without(q, omit)
        m = c3[a, b, c] - 1
        c3[a, b, c] = m
        tri = (a, b, c)
        for k in range(3):
            u = tri[k]
            if m == 0:
                vtri[u] -= 1
                vopen[u] -= 1
            else:
                vopen[u] += 1
        for k in range(3):
            u = tri[k]
            v = tri[(k + 1) % 3]
            if m == 0:
                etri[u, v] -= 1
                etri[v, u] -= 1
                eopen[u, v] -= 1
                eopen[v, u] -= 1
                if etri[u, v] == 0:
                    deg[u] -= 1
                    deg[v] -= 1
            else:
                eopen[u, v] += 1
                eopen[v, u] += 1


@numba.njit(cache=True)
def vertex_link_sphere(x, n, c3, etri, deg, vtri, vtet, seen):
    """Is the (closed) link of x a 2-sphere: Euler characteristic 2 and connected."""
    if deg[x] - vtri[x] + vtet[x] != 2:
        return False
    start = -1
    for y in range(n):
        seen[y] = False
        if y != x and etri[x, y] > 0 and start < 0:
            start = y
    stack = np.empty(n, dtype=np.int64)
    top = 0
    stack[top] = start
    top += 1
    seen[start] = True
    reached = 1
    while top > 0:
        top -= 1
        y = stack[top]
        for z in range(n):
            if z != x and z != y and not seen[z] and etri[x, z] > 0:
                a, b, c = key3(x, y, z)
                if c3[a, b, c] > 0:
                    seen[z] = True
                    reached += 1
                    stack[top] = z
                    top += 1
    return reached == deg[x]


@numba.njit(cache=True)
def manifold_search(n, d, link):
    """All labelled combinatorial 3-manifolds on n vertices reached with vertex 0 of
    degree d whose star is the cone over the triangles ``link`` (on 1..d)."""
    width = n * (n - 1) // 2 - n + 1        # tetrahedra: f3 = f1 - n
    c3 = np.zeros((n, n, n), dtype=np.int64)
    o3 = np.zeros((n, n, n, 2), dtype=np.int64)
    etri = np.zeros((n, n), dtype=np.int64)
    eopen = np.zeros((n, n), dtype=np.int64)
    deg = np.zeros(n, dtype=np.int64)
    vopen = np.zeros(n, dtype=np.int64)
    vtri = np.zeros(n, dtype=np.int64)
    vtet = np.zeros(n, dtype=np.int64)
    seen = np.zeros(n, dtype=np.bool_)
    tets = np.zeros((width + 1, 4), dtype=np.int64)
    out = np.full((64, width, 4), -1, dtype=np.int64)
    found = 0
    if d + 1 > n:
        return out[:0]
    q = np.zeros(4, dtype=np.int64)
    nt = 0
    for i in range(link.shape[0]):
        q[0] = 0
        q[1] = link[i, 0]
        q[2] = link[i, 1]
        q[3] = link[i, 2]
        tet_add(q, c3, o3, etri, eopen, deg, vopen, vtri, vtet)
        tets[nt] = q
        nt += 1
    used = d + 1
    fa = np.zeros(width + 1, dtype=np.int64)
    fb = np.zeros(width + 1, dtype=np.int64)
    fc = np.zeros(width + 1, dtype=np.int64)
    nxt = np.zeros(width + 1, dtype=np.int64)
    isnew = np.zeros(width + 1, dtype=np.bool_)
    level = 0
    fa[0], fb[0], fc[0] = _open_triangle(c3, etri, eopen, n)   # the link's are open
    nxt[0] = 0
    while level >= 0:
        a = fa[level]
        b = fb[level]
        c = fc[level]
        t = o3[a, b, c, 0]
        w = nxt[level]
        placed = False
        while w <= used:
            if w == used and used >= n:
                break
            ok = w != a and w != b and w != c and w != t
            if ok and deg[w] > 0 and vopen[w] == 0:
                ok = False                          # the link of w has closed
            if ok:
                for k in range(3):
                    u = a if k == 0 else (b if k == 1 else c)
                    if etri[u, w] > 0 and eopen[u, w] == 0:
                        ok = False                  # the link of u w has closed
            if ok:
                x1, y1, z1 = key3(a, b, w)
                x2, y2, z2 = key3(a, c, w)
                x3, y3, z3 = key3(b, c, w)
                if c3[x1, y1, z1] > 1 or c3[x2, y2, z2] > 1 or c3[x3, y3, z3] > 1:
                    ok = False
            if ok:
                na = 1 if etri[a, w] == 0 else 0
                nb = 1 if etri[b, w] == 0 else 0
                nc = 1 if etri[c, w] == 0 else 0
                if deg[a] + na > d or deg[b] + nb > d or deg[c] + nc > d or \
                        deg[w] + na + nb + nc > d:
                    ok = False
            if ok:
                ok = (edge_link_ok(a, b, c, w, c3, o3, etri)
                      and edge_link_ok(a, c, b, w, c3, o3, etri)
                      and edge_link_ok(b, c, a, w, c3, o3, etri)
                      and edge_link_ok(a, w, b, c, c3, o3, etri)
                      and edge_link_ok(b, w, a, c, c3, o3, etri)
                      and edge_link_ok(c, w, a, b, c3, o3, etri))
            if ok:
                # sorted tetrahedron
                q[0] = a
                q[1] = b
                q[2] = c
                q[3] = w
                for i in range(3, 0, -1):
                    if q[i] < q[i - 1]:
                        s = q[i]
                        q[i] = q[i - 1]
                        q[i - 1] = s
                tet_add(q, c3, o3, etri, eopen, deg, vopen, vtri, vtet)
                for i in range(4):
                    x = q[i]
                    if vopen[x] == 0 and not vertex_link_sphere(
                            x, n, c3, etri, deg, vtri, vtet, seen):
                        ok = False
                if ok:
                    placed = True
                    break
                tet_remove(q, c3, etri, eopen, deg, vopen, vtri, vtet)
            w += 1
        if not placed:
            level -= 1
            if level >= 0:
                nt -= 1
                tet_remove(tets[nt], c3, etri, eopen, deg, vopen, vtri, vtet)
                if isnew[level]:
                    used -= 1
            continue
        nxt[level] = w + 1
        isnew[level] = w == used
        if w == used:
            used += 1
        tets[nt] = q
        nt += 1
        a2, b2, c2 = _open_triangle(c3, etri, eopen, n)
        if a2 < 0:
            if used == n:
                if found == out.shape[0]:
                    bigger = np.full((2 * found, width, 4), -1, dtype=np.int64)
                    bigger[:found] = out
                    out = bigger
                out[found, :nt] = tets[:nt]
                found += 1
            nt -= 1
            tet_remove(tets[nt], c3, etri, eopen, deg, vopen, vtri, vtet)
            if isnew[level]:
                used -= 1
            continue
        level += 1
        fa[level] = a2
        fb[level] = b2
        fc[level] = c2
        nxt[level] = 0
    return out[:found]
