"""Local geometry: Levitt curvature and Poincare-Hopf indices.

Part of :mod:`verifier.invariants` (see its docstring for the conventions).

References
----------
.. [LE]  N. Levitt, "The Euler characteristic is the unique locally determined numerical
         homotopy invariant of finite complexes", Discrete Comput. Geom. 7 (1992) 59-67.
.. [PH]  O. Knill, "A graph theoretical Poincare-Hopf theorem", arXiv:1201.1162 (2012).
"""

from __future__ import annotations

from fractions import Fraction

import numpy as np

from .. import operations
from ..complex import Complex
from .counting import euler, omega

__all__ = ["curvature", "index", "indices"]

def _vertex(K: Complex, v) -> int:
    """Vertex index from an index or a one-element simplex."""
    if isinstance(v, tuple):
        if len(v) != 1:
            raise ValueError(f"{v!r} is not a vertex")
        v = v[0]
    if not (isinstance(v, int) and 0 <= v < K.n_vertices):
        raise ValueError(f"{v!r} is not a vertex index of this complex")
    return v


def curvature(K: Complex, v, form: str = "link") -> Fraction:
    """Levitt curvature at the vertex v (an index).

    K(v) = sum_{k >= 0} (-1)^k f_{k-1}(S(v)) / (k + 1), with f_{-1} = 1, where S(v) is
    the link of v (``form="link"``, general complexes) or the unit sphere of v in the
    1-skeleton taken as a flag complex (``form="graph"``, equal to the link for flag
    complexes).  The link form equals sum over simplices x containing v of omega(x)/|x|,
    so Gauss-Bonnet sum_v K(v) = chi holds for every complex; the graph form only for
    flag complexes (a hollow triangle has graph curvatures 1/3 each) [LE].

    >>> [curvature(Complex.from_facets([[1, 2], [2, 3], [1, 3]]), v) for v in range(3)]
    [Fraction(0, 1), Fraction(0, 1), Fraction(0, 1)]

    References: [LE]; O. Knill, "A graph theoretical Gauss-Bonnet-Chern theorem",
    arXiv:1111.5395 (2011).
    """
    v = _vertex(K, v)
    if form == "link":
        return sum((Fraction(omega(K.simplices[j]), len(K.simplices[j]))
                    for j in K.vertex_stars()[v]), Fraction(0))
    if form == "graph":
        sphere = operations.graph_unit_sphere(K, v)
        return Fraction(1) + sum((Fraction((-1) ** (k + 1) * f, k + 2)
                                  for k, f in enumerate(sphere.f_vector)), Fraction(0))
    raise ValueError(f"unknown form {form!r}; use 'link' or 'graph'")


def _values(K: Complex, f) -> list:
    values = [f[v] for v in range(K.n_vertices)] if not isinstance(f, dict) else \
        [f[label] for label in K.labels]
    if len(set(values)) != len(values):
        raise ValueError("the function must be injective on vertices")
    return values


def index(K: Complex, f, v, form: str = "link") -> int:
    """Poincare-Hopf index of an injective function f on the vertices at the vertex v.

    i_f(v) = 1 - chi(S^-(v)), where S^-(v) is the part of the link of v spanned by the
    vertices w with f(w) < f(v) (``form="link"``), or the flag complex of the lower part
    of the unit sphere in the 1-skeleton (``form="graph"``, for flag complexes).  With the
    link, every simplex is counted at its vertex of largest f, so sum_v i_f(v) = chi
    holds for every complex [PH].

    f is a dict {label: value} or a sequence indexed by vertex index.

    >>> K = Complex.from_facets([[1, 2], [2, 3], [1, 3]])
    >>> [index(K, [0, 1, 2], v) for v in range(3)]
    [1, 0, -1]

    Notes: with the link, i_f(v) = sum of omega(z) over the simplices z in the star of v
    whose largest vertex under f is v (z = x + v for each x in S^-(v), with omega(z) =
    -omega(x), and z = v itself), so one pass over the star suffices.

    References: [PH].
    """
    v = _vertex(K, v)
    values = _values(K, f)
    if form == "link":
        start, star = K.vertex_star_arrays()
        simplices = K.simplices
        return sum(omega(simplices[j]) for j in star[start[v]:start[v + 1]].tolist()
                   if all(values[w] <= values[v] for w in simplices[j]))
    if form == "graph":
        sphere = operations.graph_unit_sphere(K, v)
        lower = [x for x in sphere.simplices
                 if all(values[K.simplex_of([sphere.labels[w]])[0]] < values[v] for w in x)]
        return 1 - euler(lower)
    raise ValueError(f"unknown form {form!r}; use 'link' or 'graph'")


def indices(K: Complex, f, form: str = "link") -> list[int]:
    """The Poincare-Hopf indices of f at all vertices, in vertex order (see :func:`index`).

    >>> indices(Complex.from_facets([[1, 2], [2, 3], [1, 3]]), [0, 1, 2])
    [1, 0, -1]

    With the link, all at once: every simplex adds its omega to the index of its largest
    vertex under f (array passes over the simplices of each dimension).
    """
    if form != "link":
        return [index(K, f, v, form) for v in range(K.n_vertices)]
    values = _values(K, f)
    rank = np.empty(K.n_vertices, dtype=np.int64)
    rank[sorted(range(K.n_vertices), key=values.__getitem__)] = np.arange(K.n_vertices)
    result = np.zeros(K.n_vertices, dtype=np.int64)
    for k in range(K.dim + 1):
        S = K.simplex_array(k)
        top = S[np.arange(len(S)), np.argmax(rank[S], axis=1)]
        result += (-1) ** k * np.bincount(top, minlength=K.n_vertices)
    return result.tolist()
