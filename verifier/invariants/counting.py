"""Counting invariants: simplices, f-vector, Euler and Wu characteristics.

Part of :mod:`verifier.invariants` (see its docstring for the conventions).

References
----------
.. [EC]  L. Euler (1758); H. Poincare (1895): chi = sum_k (-1)^k f_k = sum_k (-1)^k b_k.
.. [Wu]  W. Wu, "Topologie combinatoire et invariants combinatoires",
         Colloq. Math. 7 (1959) 1-8.
.. [GB]  O. Knill, "Gauss-Bonnet for multi-linear valuations", arXiv:1601.04533 (2016).
"""

from __future__ import annotations

from collections.abc import Iterable
from math import comb

import numpy as np

from ..complex import Complex

__all__ = ["omega", "simplices", "vertices", "facets", "dim", "size", "f_vector", "h_vector",
           "euler", "wu"]

def omega(x) -> int:
    """The sign (-1)^dim x of a simplex x (a tuple of vertices).

    >>> omega((0,)), omega((0, 1)), omega((0, 1, 2))
    (1, -1, 1)
    """
    return -1 if len(x) % 2 == 0 else 1


def simplices(K: Complex) -> tuple[tuple, ...]:
    """All simplices of K in the user's vertex labels, ordered by (dimension, lex).

    >>> simplices(Complex.from_facets([[1, 2]]))
    ((1,), (2,), (1, 2))
    """
    return tuple(K.label_of(s) for s in K.simplices)


def vertices(K: Complex) -> tuple:
    """The vertex labels of K, in order.

    >>> vertices(Complex.from_facets([["b", "a"]]))
    ('a', 'b')
    """
    return K.labels


def facets(K: Complex) -> tuple[tuple, ...]:
    """The maximal simplices of K in the user's labels, ordered by (dimension, lex).

    >>> facets(Complex.from_facets([[1, 2, 3], [3, 4]]))
    ((3, 4), (1, 2, 3))
    """
    return tuple(K.label_of(s) for s in K.facets)


def dim(K: Complex) -> int:
    """The dimension of K: the largest dim of a simplex, -1 when K is empty.

    >>> dim(Complex.from_facets([[1, 2, 3], [3, 4]]))
    2
    """
    return K.dim


def size(K: Complex) -> int:
    """The number of simplices of K (the order of its connection matrix).

    >>> size(Complex.from_facets([[1, 2]]))
    3
    """
    return len(K.simplices)


def f_vector(K: Complex) -> tuple[int, ...]:
    """(f_0, ..., f_d): f_k is the number of k-dimensional simplices.

    >>> f_vector(Complex.from_facets([[1, 2, 3], [3, 4]]))
    (4, 4, 1)
    """
    return K.f_vector


def euler(K: Complex | Iterable) -> int:
    """The Euler characteristic chi = sum over simplices x of omega(x).

    Accepts a complex or any collection of simplices (a star, an interior, ...);
    for a complex this is f_0 - f_1 + f_2 - ... [EC].

    >>> euler(Complex.from_facets([[1, 2], [2, 3], [1, 3]]))   # a circle
    0
    >>> euler([(0,), (0, 1)])                                  # a half-open edge
    0

    References: [EC].
    """
    if isinstance(K, Complex):
        return sum((-1) ** k * f for k, f in enumerate(K.f_vector))
    return sum(omega(x) for x in K)


def _omega_vector(K: Complex) -> np.ndarray:
    """omega(x) for every simplex, in simplex order."""
    f = K.f_vector
    return np.repeat(np.array([(-1) ** k for k in range(len(f))], dtype=np.int64), f)


def _star_euler(K: Complex) -> np.ndarray:
    """chi(St(z)) = sum over simplices containing z of omega, for every simplex z."""
    faces, cofaces = K.containments()
    chi = np.bincount(faces, weights=_omega_vector(K)[cofaces], minlength=len(K.simplices))
    return np.rint(chi).astype(np.int64)   # integer sums of +-1 below 2^53: exact


def h_vector(K: Complex) -> tuple[int, ...]:
    """(h_0, ..., h_d), d = dim K + 1: the h-vector of K.

    Definition: with f_(-1) = 1, h_k = sum_(i=0..k) (-1)^(k-i) C(d-i, k-i) f_(i-1); in
    generating-function form sum_k h_k x^(d-k) = sum_i f_(i-1) (x - 1)^(d-i).  For a
    simplicial sphere the Dehn-Sommerville relations read h_k = h_(d-k), and the sum of the
    h_k is the number of facets of a pure complex [DS].

    >>> h_vector(Complex.from_facets([[1, 2], [2, 3], [1, 3]]))     # a triangle's boundary
    (1, 1, 1)
    >>> h_vector(Complex.from_facets([[1, 2, 3], [1, 2, 4], [1, 3, 4], [2, 3, 4]]))
    (1, 1, 1, 1)

    References: [DS] R. P. Stanley, Combinatorics and Commutative Algebra, 2nd ed.,
    Birkhauser 1996, ch. II.2; G. M. Ziegler, Lectures on Polytopes, Springer 1995, §8.3.
    """
    f = (1,) + tuple(K.f_vector)
    d = len(f) - 1
    return tuple(sum((-1) ** (k - i) * comb(d - i, k - i) * f[i] for i in range(k + 1))
                 for k in range(d + 1))


def wu(K: Complex) -> int:
    """The Wu characteristic: the sum of omega(x) omega(y) over ordered pairs of
    intersecting simplices x, y.

    Computed as sum over z of omega(z) chi(St(z))^2, which is the same number because the
    connection matrix factors as L = Z^T diag(omega) Z with Z the containment matrix
    (see :func:`connection`).  For a d-manifold with boundary, wu(K) = chi(K) - chi(boundary);
    for closed manifolds it equals chi [GB].

    >>> wu(Complex.from_facets([[1, 2]]))      # chi - chi(two endpoints) = 1 - 2
    -1

    References: [Wu], [GB].
    """
    chi = _star_euler(K)
    if len(chi) and len(chi) * int(np.abs(chi).max()) ** 2 >= 2 ** 62:
        return sum(int(w) * int(c) ** 2 for w, c in zip(_omega_vector(K), chi))
    return int(np.dot(_omega_vector(K), chi * chi))   # bounded above: exact in int64
