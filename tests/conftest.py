"""Shared test data: seeded random complexes and the networkx graph atlas."""

from __future__ import annotations

import random

import networkx as nx
import pytest

from verifier.complex import Complex


def random_complex(rng: random.Random, max_vertices: int = 7, max_dim: int = 3,
                   max_facets: int = 6) -> Complex:
    """A random complex: a few random vertex sets of size <= max_dim + 1, closed downward."""
    n = rng.randint(1, max_vertices)
    facets = [rng.sample(range(n), rng.randint(1, min(n, max_dim + 1)))
              for _ in range(rng.randint(1, max_facets))]
    return Complex.from_facets(facets)


def random_complexes(count: int, seed: int, **options) -> list[Complex]:
    rng = random.Random(seed)
    return [random_complex(rng, **options) for _ in range(count)]


@pytest.fixture(scope="session")
def atlas_graphs() -> list[nx.Graph]:
    """The 1,253 graphs on 0..7 vertices of the graph atlas that networkx ships
    (R. C. Read and R. J. Wilson, "An Atlas of Graphs", Oxford, 1998); graphs with no
    vertex give the empty complex and are skipped."""
    return [g for g in nx.graph_atlas_g() if g.number_of_nodes() > 0]


@pytest.fixture(scope="session")
def atlas_complexes(atlas_graphs) -> dict[str, list[Complex]]:
    """Every atlas graph as a 1-dimensional complex and as its flag (clique) complex."""
    return {"1-dimensional": [Complex.from_graph(g) for g in atlas_graphs],
            "flag": [Complex.from_graph(g, flag=True) for g in atlas_graphs]}


ENERGY_ON_SIX_VERTICES = (
    '[[claim]]\nname = "energy-6"\nstatement = "sum(green(K)) == euler(K)"\n'
    'source = "O. Knill, Linear Algebra Appl. 600 (2020)"\nmax_cases = {cases}\n'
    '[[claim.over]]\nfamily = "all-complexes"\nmax_vertices = 6\n')


# every graph on 6, 7 and 8 vertices as a flag complex: three shards (6/all, 7/all and one
# block of parents), 156 + 1,044 + 12,346 cases (OEIS A000088)
SHARDED_ENERGY = """[[claim]]
name = "energy-graphs-8"
statement = "sum(green(K)) == euler(K)"
source = "O. Knill, The energy of a simplicial complex, Linear Algebra Appl. 600 (2020) 96-129"
[[claim.over]]
family = "graphs"
min_vertices = 6
max_vertices = 8
as = "flag"
"""


def wait_for_stored_cases(store, seconds: float = 180.0, table: str = "cases") -> bool:
    """Wait until a run has written at least one case (or with ``table="shard_parts"``
    one part of a shard) to the SQLite store."""
    import sqlite3
    import time
    deadline = time.monotonic() + seconds
    while time.monotonic() < deadline:
        time.sleep(0.2)
        try:
            with sqlite3.connect(store) as db:
                if db.execute(f"SELECT COUNT(*) FROM {table}").fetchone()[0] > 0:
                    return True
        except sqlite3.OperationalError:
            pass
    return False
