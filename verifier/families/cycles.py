"""The cycle graphs C_n: the circular graphs of spectral zeta questions.

C_n is the 1-dimensional complex with vertices 0, ..., n-1 and the edges {i, i+1 mod n};
its barycentric refinements (family ``refine``) are the cycles C_2n, C_4n, ... with
their own labels.  They are the circular graphs whose spectral zeta functions are
studied in O. Knill, "The zeta function for circular graphs", arXiv:1312.4239 (2013).

>>> family = CYCLES.build({"lengths": [3, 5]}, None)
>>> [(case, K.f_vector) for case, K in family]
[('cycles/C3', (3, 3)), ('cycles/C4', (4, 4)), ('cycles/C5', (5, 5))]
"""

from __future__ import annotations

from ..complex import Complex
from .family import Family, FamilyType, Param

__all__ = ["CYCLES", "cycle"]

MAX_LENGTH = 2000


def cycle(n: int) -> Complex:
    """The cycle graph C_n (n >= 3) as a 1-dimensional complex on the vertices 0..n-1."""
    return Complex.from_facets([[i, (i + 1) % n] for i in range(n)])


class Cycles(Family):
    """C_n for n in the range ``lengths``."""

    def _lengths(self) -> range:
        lo, hi = self.params["lengths"]
        return range(lo, hi + 1)

    def size(self) -> int:
        return len(self._lengths())

    def case_ids(self):
        return (f"cycles/C{n}" for n in self._lengths())

    def get(self, case_id) -> Complex:
        tail = case_id[len("cycles/C"):] if isinstance(case_id, str) else ""
        if (not isinstance(case_id, str) or not case_id.startswith("cycles/C")
                or not tail.isdigit() or int(tail) not in self._lengths()):
            raise self._foreign(case_id, f"its ids are 'cycles/C<n>' for n in "
                                         f"{self.params['lengths']}")
        return cycle(int(tail))

    def f_bound(self):
        n = self.params["lengths"][1]
        return (n, n)


CYCLES = FamilyType(
    name="cycles",
    description="the cycle graphs C_n (circular graphs), as 1-dimensional complexes",
    params=(Param.integer_range("lengths", 3, MAX_LENGTH,
                                "the number of vertices n, or a range [lo, hi] of them"),),
    build=lambda params, context: Cycles("cycles", params),
    reference="definition; O. Knill, The zeta function for circular graphs, arXiv:1312.4239",
)
