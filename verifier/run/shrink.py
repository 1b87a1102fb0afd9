"""Shrinking a failing case to a minimal counterexample.

Starting from a complex on which the claim fails, try in a fixed order: removing one
vertex (with every simplex containing it), removing one facet, contracting one edge; take
the first smaller complex on which the claim still fails (inside its ``where`` domain),
and repeat.  The result is minimal in the sense of the issue: no move makes a smaller
complex on which the claim still fails -- in particular removing any one vertex or any
one facet makes the claim hold, leaves its domain, or makes it undefined.  For claims
over several complexes each variable is shrunk in turn, the others held fixed.

Contractions come in two kinds.  An edge ab whose endpoints satisfy the link condition
Lk(a) ∩ Lk(b) = Lk(ab) is contracted first: for a triangulated manifold of dimension
<= 3 the result is homeomorphic to the complex [1], so a claim about a topological type
keeps failing along these moves.  The other contractions follow and may change the type.
Last, on a 2-complex no edge of which satisfies the link condition (for a surface: an
irreducible triangulation), one move crosses to a smaller triangulation: flip an edge ab
of two triangles abc, abd (cd not an edge) to cd -- a bistellar move, a homeomorphism
[2] -- then contract an edge that satisfies the link condition in the flipped complex.
The 7-vertex irreducible projective plane reaches the 6-vertex one this way.

Every evaluation obeys the run's limits; a candidate that runs into the time limit ends
the shrinking (the result is then marked not minimal), so a slow claim cannot keep the
client busy for one time limit per candidate.

References
[1] T. K. Dey, H. Edelsbrunner, S. Guha, D. V. Nekhayev, "Topology preserving edge
    contraction", Publ. Inst. Math. (Beograd) 66 (80) (1999), 23-45.
[2] U. Pachner, "P.L. homeomorphic manifolds are equivalent by elementary shellings",
    European J. Combin. 12 (1991), 129-145.

Deterministic: candidates are tried in the order of the complex's canonical vertex and
simplex order, so the same failure always shrinks to the same counterexample.
"""

from __future__ import annotations

import time
from dataclasses import dataclass, field

from ..claims.evaluate import Limits
from ..complex import Complex
from .cases import _judge

__all__ = ["shrink", "Shrunk", "candidates", "satisfies_link_condition"]


@dataclass
class Shrunk:
    env: dict
    steps: list[str] = field(default_factory=list)
    evaluations: int = 0
    complete: bool = True      # False if the budget ran out before minimality was shown
    stopped: str | None = None  # why shrinking stopped early, if it did


def _without_vertex(K: Complex, v: int) -> Complex | None:
    keep = [s for s in K.facets if v not in s]
    if not keep:
        return None
    others = [u for u in range(K.n_vertices) if u != v]
    facets = [K.label_of(s) for s in keep] + [[K.labels[u]] for u in others]
    return Complex.from_facets(facets)


def _without_facet(K: Complex, f: tuple[int, ...]) -> Complex | None:
    if len(K.facets) == 1 and len(f) == 1:
        return None
    rest = [s for s in K.simplices if s != f]
    if not rest:
        return None
    return Complex(K.labels, tuple(rest)) if len(f) > 1 else _without_vertex(K, f[0])


def _contract(K: Complex, u: int, v: int) -> Complex:
    image = [[K.labels[u] if w == v else K.labels[w] for w in s] for s in K.facets]
    return Complex.from_facets([list(dict.fromkeys(s)) for s in image])


def _stars(K: Complex) -> dict[int, list[tuple[int, ...]]]:
    """Vertex index -> the simplices of dimension >= 1 that contain it."""
    stars: dict[int, list[tuple[int, ...]]] = {v: [] for v in range(K.n_vertices)}
    for s in K.simplices:
        if len(s) > 1:
            for v in s:
                stars[v].append(s)
    return stars


def _link_condition(stars, a: int, b: int) -> bool:
    link_a = {tuple(v for v in s if v != a) for s in stars[a]}
    link_b = {tuple(v for v in s if v != b) for s in stars[b]}
    link_ab = {tuple(v for v in s if v != a and v != b) for s in stars[a] if b in s}
    link_ab.discard(())
    return link_a & link_b == link_ab


def satisfies_link_condition(K: Complex, a: int, b: int) -> bool:
    """Whether the edge ab (vertex indices) satisfies Lk(a) ∩ Lk(b) = Lk(ab) [1]."""
    return _link_condition(_stars(K), a, b)


def _flips(K: Complex):
    """Edges ab in exactly two simplices above them, triangles abc and abd, with cd not an
    edge; yields (edge, (c, d), flipped complex) in the canonical simplex order."""
    simplices, stars = set(K.simplices), _stars(K)
    for s in K.simplices:
        if len(s) != 2:
            continue
        a, b = s
        above = [t for t in stars[a] if len(t) > 2 and b in t]
        if len(above) != 2 or any(len(t) != 3 for t in above):
            continue
        c, d = sorted(next(v for v in t if v not in s) for t in above)
        if (c, d) in simplices:
            continue
        rest = [K.label_of(t) for t in K.simplices if t != s and t not in above]
        new = [(K.labels[c], K.labels[d]), (K.labels[a], K.labels[c], K.labels[d]),
               (K.labels[b], K.labels[c], K.labels[d])]
        yield s, (c, d), Complex.from_simplices(rest + new)


def candidates(K: Complex):
    """Smaller complexes, in the fixed order (description, complex)."""
    for v in range(K.n_vertices):
        smaller = _without_vertex(K, v)
        if smaller is not None:
            yield f"removed vertex {K.labels[v]!r}", smaller
    for f in K.facets:
        smaller = _without_facet(K, f)
        if smaller is not None:
            yield f"removed facet {list(K.label_of(f))}", smaller
    edges = [s for s in K.simplices if len(s) == 2]
    stars = _stars(K) if K.dim >= 2 else None
    others = []
    for s in edges:
        if stars is not None and _link_condition(stars, *s):
            yield (f"contracted edge {list(K.label_of(s))} (link condition)",
                   _contract(K, s[0], s[1]))
        else:
            others.append(s)
    for s in others:
        yield f"contracted edge {list(K.label_of(s))}", _contract(K, s[0], s[1])
    if K.dim != 2 or len(others) < len(edges):
        return      # flips only on a 2-complex no edge of which satisfies the link condition
    for edge, new, flipped in _flips(K):
        flipped_stars = _stars(flipped)
        for s in flipped.simplices:
            if len(s) == 2 and _link_condition(flipped_stars, *s):
                yield (f"flipped edge {list(K.label_of(edge))} to "
                       f"{[K.labels[new[0]], K.labels[new[1]]]}, then contracted edge "
                       f"{list(flipped.label_of(s))} (link condition)",
                       _contract(flipped, s[0], s[1]))


def shrink(claim, env: dict, limits: Limits, max_evaluations: int = 5000,
           max_seconds: float = 300.0) -> Shrunk:
    """Shrink a failing environment (variable -> Complex) to a minimal one."""
    result = Shrunk(dict(env))
    deadline = time.monotonic() + max_seconds
    progress = True
    while progress:
        progress = False
        for variable in claim.variables:
            for description, smaller in candidates(result.env[variable]):
                if result.evaluations >= max_evaluations or time.monotonic() > deadline:
                    result.complete = False
                    return result
                trial = dict(result.env)
                trial[variable] = smaller
                result.evaluations += 1
                judged = _judge(claim, trial, limits)
                if judged["outcome"] == "limit" and judged.get("message", "").startswith(
                        "seconds"):
                    # a smaller case that needs the whole time limit: every further try
                    # would cost as much, so the shrinker stops here (not minimal)
                    result.complete = False
                    result.stopped = f"a candidate reached the time limit ({description})"
                    return result
                if judged["outcome"] == "fails":
                    prefix = f"{variable}: " if len(claim.variables) > 1 else ""
                    result.steps.append(prefix + description)
                    result.env = trial
                    progress = True
                    break
            if progress:
                break
    return result
