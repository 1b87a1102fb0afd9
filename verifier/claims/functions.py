"""The function table of the claim language: one entry per function.

Each entry gives the name, the parameters with the types they accept, the result type,
the library function whose docstring documents it, and the source.  ``verifier
functions`` prints this table.  Implementations live in backends that provide every
name: :mod:`verifier.claims.backend` (python-flint through :mod:`verifier.exact`) and
:mod:`verifier.independent.claims` (plain integers and fractions, for re-checking
certificates).  To add a function: write the invariant with its docstring, add one line
to ``TABLE`` below and one adapter to each backend.

This module imports no backend, so the language can be parsed in any process.
"""

from __future__ import annotations

import importlib
from dataclasses import dataclass

__all__ = ["Param", "Function", "TABLE", "FUNCTIONS", "QUANTIFIERS", "REQUIRED", "SAME"]

REQUIRED = object()


@dataclass(frozen=True)
class Param:
    name: str
    types: tuple[str, ...]
    default: object = REQUIRED


@dataclass(frozen=True)
class Function:
    """One function of the claim language."""
    name: str
    params: tuple[Param, ...]
    returns: str
    documented_by: str | None   # "module.function" inside verifier, for the summary line
    source: str
    summary_text: str = ""
    combinatorial: bool = False  # no exact linear algebra inside
    evidence: str = "exact"      # the weakest evidence its results can carry (SPEC §6);
                                 # "certified" results are enclosures or certified counts
    always: bool = False         # True when every result carries that weakest evidence
                                 # (then a claim must allow it: checked when it loads)
    returns_by_count: tuple = ()  # (number of arguments, result type) where the result
                                  # type depends on how many arguments are given

    def result_type(self, count: int) -> str:
        """The result type of a call with ``count`` arguments (``same``: the type of the
        first argument, see :data:`SAME`)."""
        return dict(self.returns_by_count).get(count, self.returns)

    @property
    def summary(self) -> str:
        """One line: the documenting function's first docstring line unless given."""
        if self.summary_text or not self.documented_by:
            return self.summary_text
        module, attribute = self.documented_by.rsplit(".", 1)
        target = getattr(importlib.import_module(f"verifier.{module}"), attribute)
        doc = (target.__doc__ or "").strip()
        return doc.splitlines()[0] if doc else ""

    def signature(self) -> str:
        parts = []
        for p in self.params:
            text = f"{p.name}: {'|'.join(p.types)}"
            if p.default is not REQUIRED:
                text += f" = {p.default!r}"
            parts.append(text)
        result = self.returns
        for count, kind in self.returns_by_count:
            result += f" ({kind} with {count} arguments)"
        return f"{self.name}({', '.join(parts)}) -> {result}"


def P(name, *types, default=REQUIRED) -> Param:
    return Param(name, types, default)


C, M, N, S = "complex", "matrix", "number", "simplex"
SAME = "same"   # result of the type of the first argument; every argument must have it
CB = {"combinatorial": True}

TABLE: list[Function] = [
    # counting
    Function("simplices", (P("K", C),), "list[simplex]", "invariants.simplices", "definition", **CB),
    Function("vertices", (P("K", C),), "list[simplex]", "invariants.vertices", "definition",
             "The vertices of K, each as a one-vertex simplex.", **CB),
    Function("facets", (P("K", C),), "list[simplex]", "invariants.facets", "definition", **CB),
    Function("dim", (P("x", C, S),), N, "invariants.dim", "definition",
             "The dimension of a complex or of a simplex.", **CB),
    Function("size", (P("x", C, "set", "list", M),), N, "invariants.size", "definition",
             "Number of simplices of a complex, elements of a set or list, or rows of a matrix.",
             **CB),
    Function("f_vector", (P("K", C),), "list[number]", "invariants.f_vector", "definition", **CB),
    Function("h_vector", (P("K", C),), "list[number]", "invariants.h_vector",
             "R. P. Stanley, Combinatorics and Commutative Algebra (1996), II.2", **CB),
    Function("omega", (P("x", S),), N, "invariants.omega", "definition", **CB),
    Function("range", (P("n", N),), "list[number]", None, "definition",
             "The integers 0, 1, ..., n-1 (for sums over dimensions).", **CB),
    Function("euler", (P("x", C, "set", "list[simplex]"),), N, "invariants.euler",
             "L. Euler (1758); H. Poincare (1895)", **CB),
    Function("wu", (P("K", C),), N, "invariants.wu",
             "W. Wu, Colloq. Math. 7 (1959); O. Knill, arXiv:1601.04533 (2016)", **CB),
    # matrices of a complex
    Function("connection", (P("K", C),), M, "invariants.connection",
             "O. Knill, arXiv:1612.08229 (2016)"),
    Function("green", (P("K", C),), M, "invariants.green",
             "O. Knill, Linear Algebra Appl. 600 (2020) 96-129"),
    Function("hodge", (P("K", C),), M, "invariants.hodge", "O. Knill, arXiv:1301.1408 (2013)"),
    Function("signless_hodge", (P("K", C),), M, "invariants.signless_hodge",
             "O. Knill, arXiv:1803.01464 (2018)"),
    Function("dirac", (P("K", C),), M, "invariants.dirac", "O. Knill, arXiv:1301.1408 (2013)"),
    Function("boundary_matrix", (P("K", C), P("k", N)), M, "invariants.boundary_matrix",
             "J. R. Munkres, Elements of Algebraic Topology (1984) §5"),
    Function("identity", (P("n", N, C),), M, None, "definition",
             "The identity matrix of order n, or indexed by the simplices of a complex."),
    # linear algebra
    Function("transpose", (P("A", M),), M, None, "definition", "The transpose of a matrix."),
    Function("abs", (P("x", N, M, "ball"),), SAME, None, "definition",
             "Absolute value of a number (the modulus of a certified complex number), or of "
             "every entry of a matrix."),
    Function("det", (P("A", M),), N, "invariants.det", "exact elimination"),
    Function("trace", (P("A", M),), N, "invariants.trace", "definition"),
    Function("rank", (P("A", M),), N, "invariants.rank", "exact elimination over Q"),
    Function("kernel_dim", (P("A", M),), N, "invariants.kernel_dim", "exact elimination over Q"),
    Function("charpoly", (P("A", M),), "poly", "invariants.charpoly", "det(xI - A)"),
    Function("is_reciprocal", (P("p", "poly"),), "bool", "invariants.is_reciprocal",
             "p(x) = +-x^n p(1/x)"),
    Function("signature", (P("A", M),), "list[number]", "invariants.signature",
             "Sylvester's law of inertia; O. Knill, arXiv:1711.09527 (2017)"),
    Function("positive", (P("A", M),), N, "invariants.positive", "Sylvester's law of inertia"),
    Function("negative", (P("A", M),), N, "invariants.negative", "Sylvester's law of inertia"),
    Function("multiplicity", (P("A", M), P("value", N)), N, "invariants.multiplicity",
             "exact nullity or root multiplicity"),
    Function("zeta", (P("A", M), P("s", N), P("t", N, default=0)), "number|ball", None,
             "tr A^-s; O. Knill, arXiv:1312.4239 (2013)",
             "zeta_A(s + i t) = sum of lambda^-(s+it) over the eigenvalues of A: exact (tr A^-s) "
             "at an integer s with t = 0, otherwise a certified enclosure.",
             evidence="certified"),
    # certified numerics (enclosures with exact rational ends; SPEC §6)
    Function("eigenvalue_enclosures", (P("A", M),), "list[ball]", "exact.eigenvalue_enclosures",
             "F. Johansson, IEEE Trans. Comput. 66 (2017) 1281-1292", evidence="certified",
             always=True),
    Function("zeros_in_box", (P("A", M), P("re_lo", N), P("re_hi", N), P("im_lo", N),
                              P("im_hi", N)), N, "exact.zeros_in_box",
             "argument principle; P. Henrici, Applied and Computational Complex Analysis I, "
             "§4.6", evidence="certified", always=True),
    Function("zeros_on_axis", (P("A", M), P("t_lo", N), P("t_hi", N)), N,
             "exact.zeros_on_axis", "O. Knill, arXiv:1312.4239 (2013)", evidence="certified",
             always=True),
    Function("re", (P("z", N, "ball"),), "number|ball", None, "definition",
             "The real part of a number or of a certified complex number."),
    Function("im", (P("z", N, "ball"),), "number|ball", None, "definition",
             "The imaginary part of a number or of a certified complex number."),
    # free energy (O. Knill, arXiv:2105.07553)
    Function("free_energy", (P("V", C, M), P("p", "list[number]"), P("T", N)), "number|ball",
             None, "O. Knill, arXiv:2105.07553 (2021)",
             "F_T(p) = sum V(x,y) p(x) p(y) - T S(p), S(p) = -sum p log p; V a matrix or the "
             "Green function of a complex. Exact when S(p) = 0 or T = 0, else certified.",
             evidence="certified"),
    Function("critical_points", (P("V", C, M), P("T", N)), "list[list[number]]",
             "energy.critical_points", "O. Knill, arXiv:2105.07553 (2021); Lagrange conditions",
             "Critical points of F_T on the probability simplex, lowest F first (floating "
             "point, rounded to 6 decimals: evidence float).", evidence="float", always=True),
    # topology
    Function("betti", (P("K", C), P("k", N, default=None), P("p", N, default=0)),
             "list[number]", "invariants.betti", "J. R. Munkres (1984) §5, §7, §11; Morse "
             "reduction: R. Forman, Adv. Math. 134 (1998)",
             returns_by_count=((2, N), (3, N))),
    Function("homology", (P("K", C),), "list[tuple[number,list[number]]]",
             "invariants.homology",
             "J. R. Munkres (1984) §11; Morse reduction: R. Forman, Adv. Math. 134 (1998); "
             "M. Mrozek, B. Batko, Discrete Comput. Geom. 42 (2009)"),
    Function("torsion", (P("K", C), P("k", N)), "list[number]", "invariants.torsion",
             "J. R. Munkres (1984) §11 (Smith normal form)"),
    Function("is_manifold", (P("K", C),), "bool", "invariants.is_manifold",
             "vertex links are spheres or balls; Munkres (1984) §35", **CB),
    Function("is_manifold_with_boundary", (P("K", C),), "bool",
             "invariants.is_manifold_with_boundary", "Munkres (1984) §35", **CB),
    Function("is_closed_manifold", (P("K", C),), "bool", "invariants.is_closed_manifold",
             "Munkres (1984) §35", **CB),
    Function("is_sphere", (P("K", C),), "bool", "invariants.is_sphere",
             "PL spheres: links, homology and a collapse witness; Munkres (1984) §35", **CB),
    Function("is_ball", (P("K", C),), "bool", "invariants.is_ball",
             "PL balls: a collapsible manifold with a sphere as boundary; Munkres (1984) §35",
             **CB),
    Function("curvature", (P("K", C), P("v", S)), N, "invariants.curvature",
             "N. Levitt, Discrete Comput. Geom. 7 (1992) 59-67", **CB),
    Function("index", (P("K", C), P("v", S)), N, "invariants.index",
             "O. Knill, arXiv:1201.1162 (2012); f = the order of the vertices", **CB),
    # local pieces and operations
    Function("star", (P("K", C), P("x", S)), "set", "operations.star", "definition", **CB),
    Function("closed_star", (P("K", C), P("x", S)), C, "operations.closed_star", "definition",
             **CB),
    Function("link", (P("K", C), P("x", S)), C, "operations.link", "Munkres (1984) §2", **CB),
    Function("unit_sphere", (P("K", C), P("x", S)), C, "operations.unit_sphere", "definition",
             **CB),
    Function("boundary", (P("K", C),), C, "operations.boundary", "definition", **CB),
    Function("interior", (P("K", C),), "set", "operations.interior", "definition", **CB),
    Function("refine", (P("K", C), P("times", N, default=1)), C, "operations.refine",
             "barycentric refinement", **CB),
    Function("join", (P("A", C), P("B", C)), C, "operations.join", "definition", **CB),
    Function("cone", (P("K", C),), C, "operations.cone", "definition", **CB),
    Function("suspension", (P("K", C),), C, "operations.suspension", "definition", **CB),
    Function("product", (P("A", C), P("B", C)), C, "operations.product",
             "order complex of the product of face posets", **CB),
    Function("skeleton", (P("K", C), P("k", N)), C, "operations.skeleton", "definition", **CB),
    Function("union", (P("A", C, "set"), P("B", C, "set")), SAME, None, "definition",
             "Disjoint union of two complexes, or union of two sets of simplices.", **CB),
]

# all/any/sum/count/prod/min/max take generators: they are syntax, listed here for
# `verifier functions`
QUANTIFIERS = {
    "all": "True when the condition holds for every generated item: all(P for x in S).",
    "any": "True when the condition holds for some generated item.",
    "sum": "Sum of generated numbers, of a list, or of all entries of a matrix.",
    "count": "Number of generated items (after if-filters) whose value is true.",
    "prod": "Product of generated numbers or of a list of numbers (1 for no items).",
    "min": "Least of generated numbers or of a list of numbers.",
    "max": "Greatest of generated numbers or of a list of numbers.",
}

FUNCTIONS: dict[str, Function] = {f.name: f for f in TABLE}
