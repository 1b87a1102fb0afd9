"""Hypothesis strategies for simplicial complexes, for your own test suites.

>>> from hypothesis import given
>>> from verifier.strategies import complexes
>>> from verifier.invariants import euler, green
>>> @given(complexes(max_vertices=6, max_dim=2))
... def test_energy_theorem(K):
...     assert green(K).total() == euler(K)
>>> test_energy_theorem()

Every strategy shrinks towards small complexes (fewer vertices, fewer and smaller facets),
so a failing property reports a small counterexample.

* :func:`complexes` -- any complex: a few random facets closed downward;
* :func:`flag_complexes` -- flag (clique) complexes of random graphs;
* :func:`manifolds` -- closed combinatorial manifolds from the catalog (spheres, surfaces
  of every genus, 3-manifolds), optionally refined, with shuffled vertex labels.
"""

from __future__ import annotations

from hypothesis import strategies as st

from .complex import Complex

__all__ = ["complexes", "flag_complexes", "manifolds"]


@st.composite
def complexes(draw, max_vertices: int = 7, max_dim: int = 3, max_facets: int = 8,
              min_vertices: int = 1) -> Complex:
    """A complex on at most ``max_vertices`` vertices, of dimension at most ``max_dim``."""
    if not 1 <= min_vertices <= max_vertices:
        raise ValueError("need 1 <= min_vertices <= max_vertices")
    n = draw(st.integers(min_vertices, max_vertices))
    vertices = list(range(n))
    facet = st.sets(st.sampled_from(vertices), min_size=1, max_size=min(n, max_dim + 1))
    facets = draw(st.lists(facet, min_size=1, max_size=max_facets))
    return Complex.from_facets([sorted(f) for f in facets] + [[v] for v in vertices])


@st.composite
def flag_complexes(draw, max_vertices: int = 9, max_dim: int | None = None) -> Complex:
    """The flag complex of a random graph on at most ``max_vertices`` vertices."""
    import networkx as nx
    n = draw(st.integers(1, max_vertices))
    pairs = [(u, v) for u in range(n) for v in range(u + 1, n)]
    chosen = draw(st.lists(st.booleans(), min_size=len(pairs), max_size=len(pairs)))
    graph = nx.Graph()
    graph.add_nodes_from(range(n))
    graph.add_edges_from(p for p, keep in zip(pairs, chosen) if keep)
    return Complex.from_graph(graph, flag=True, max_dim=max_dim)


CLOSED_MANIFOLDS = {
    1: ["simplex-boundary-2", "cross-polytope-boundary-2"],
    2: ["simplex-boundary-3", "cross-polytope-boundary-3", "torus-7", "projective-plane-6",
        "klein-bottle-8", "surface-orientable-2", "surface-nonorientable-3"],
    3: ["simplex-boundary-4", "cross-polytope-boundary-4", "projective-space-3-11",
        "poincare-sphere-16", "lens-3-1"],
}


@st.composite
def manifolds(draw, dims=(1, 2, 3), refine: bool = True) -> Complex:
    """A closed combinatorial manifold of one of the given dimensions, from the catalog,
    possibly refined once (dimension <= 2), with its vertex labels shuffled."""
    from . import operations
    from .families import catalog
    names = [name for d in dims for name in CLOSED_MANIFOLDS.get(d, [])]
    if not names:
        raise ValueError(f"no catalog manifolds of dimensions {dims}")
    K = catalog.complex(draw(st.sampled_from(names)))
    if refine and K.dim <= 2 and draw(st.booleans()):
        K = operations.refine(K)
    order = draw(st.permutations(range(K.n_vertices)))
    return K.relabel({label: order[i] for i, label in enumerate(K.labels)})
