"""Counterexamples a person can read (issue 13, section 3).

* Shrinking within a topological type: an edge contraction that satisfies the link
  condition Lk(a) ∩ Lk(b) = Lk(ab) keeps a triangulated surface's homeomorphism type
  (Dey, Edelsbrunner, Guha, Nekhayev, Publ. Inst. Math. 66 (1999)); the projective plane
  has exactly two irreducible triangulations, on 6 and 7 vertices (D. Barnette, "Generating
  the triangulations of the projective plane", J. Combin. Theory B 33 (1982)), so a
  shrinker with contractions alone may stop at 7 vertices; a flip followed by a
  contraction reaches the 6-vertex one, which is unique up to isomorphism.
* Relabelling 1..n with the map to the original labels, and recognition in the catalog.
* The smallest failing case of an exhaustive family by (vertices, simplices).
"""

from __future__ import annotations

import json
import sqlite3
import subprocess
import sys

import pytest

from verifier.complex import Complex
from verifier.families import catalog
from verifier.run.readable import readable, recognise
from verifier.run.runner import RunOptions, run
from verifier.run.shrink import candidates, satisfies_link_condition
from verifier.run.store import Store

# H_1 of a closed surface has no torsion iff the surface is orientable (Munkres (1984)
# §22); over Z/2 and over Q the first Betti numbers differ exactly by the Z/2 torsion
NON_ORIENTABLE_FAILS = """[[claim]]
name = "first-betti-field-independent"
statement = "betti(K, 1, 2) == betti(K, 1)"
source = "Munkres (1984) §22, universal coefficients"
[[claim.over]]
family = "refine"
of = {{ family = "catalog", names = ["{name}"] }}
times = 1
"""

# the 7-vertex irreducible triangulation of the projective plane that the shrinker with
# contractions alone reached from the refined Klein bottle
RP2_SEVEN = [[0, 3, 28], [0, 3, 31], [0, 5, 30], [0, 5, 31], [0, 28, 47], [0, 30, 47],
             [3, 5, 28], [3, 5, 30], [3, 30, 47], [3, 31, 47], [5, 28, 47], [5, 31, 47]]


def options(tmp_path, **extra) -> RunOptions:
    return RunOptions(**dict(store=str(tmp_path / "store.sqlite"), engine="inline", **extra))


def test_link_condition_on_the_seven_vertex_projective_plane():
    # an irreducible triangulation: no edge satisfies the link condition (Barnette 1982),
    # while in the 7-vertex torus (Möbius) every vertex link is a 6-cycle and the torus is
    # irreducible too; a stellar subdivision of a triangle has contractible new edges
    K = Complex.from_facets(RP2_SEVEN)
    assert K.f_vector == (7, 18, 12)
    edges = [s for s in K.simplices if len(s) == 2]
    assert not any(satisfies_link_condition(K, *e) for e in edges)
    T = catalog.complex("torus-7")
    assert not any(satisfies_link_condition(T, *e) for e in T.simplices if len(e) == 2)
    subdivided = Complex.from_facets([[1, 2, 4], [1, 3, 4], [2, 3, 4]])
    new = subdivided.simplex_of([1, 4])
    assert satisfies_link_condition(subdivided, *new)


def test_the_irreducible_seven_vertex_projective_plane_has_a_move_to_six_vertices():
    K = Complex.from_facets(RP2_SEVEN)
    RP2 = catalog.complex("projective-plane-6")
    moves = [(d, C) for d, C in candidates(K) if d.startswith("flipped edge")]
    assert moves, "flip-then-contract moves are offered on an irreducible 2-complex"
    assert any(C.is_isomorphic(RP2) for _, C in moves)
    # every such move keeps the type: a closed surface with Euler characteristic 1
    assert all(C.f_vector[0] - C.f_vector[1] + C.f_vector[2] == 1 for _, C in moves)
    # the order is deterministic (the check replays it)
    assert [d for d, _ in moves] == [d for d, _ in candidates(K) if d.startswith("flipped")]


@pytest.mark.parametrize("name", ["klein-bottle-8", "projective-plane-6"])
def test_refined_non_orientable_surfaces_shrink_to_the_six_vertex_projective_plane(
        tmp_path, name):
    path = tmp_path / "claim.toml"
    path.write_text(NON_ORIENTABLE_FAILS.format(name=name))
    result = run([path], options(tmp_path))
    c = result.claims[0].counterexample
    K = Complex.from_facets(c["complexes"]["K"])
    assert K.f_vector == (6, 15, 10) and c["minimal"]
    assert K.is_isomorphic(catalog.complex("projective-plane-6"))
    readable_K = c["readable"]["K"]
    assert readable_K["isomorphic_to"][0] == "projective-plane-6"
    assert sorted({v for f in readable_K["facets"] for v in f}) == [1, 2, 3, 4, 5, 6]
    # the map to the original labels recovers the counterexample exactly
    back = dict((new, old) for new, old in readable_K["labels"])
    assert sorted(sorted(back[v] for v in f) for f in readable_K["facets"]) == \
        sorted(sorted(f) for f in c["complexes"]["K"])
    # stored with the counterexample, in its own column
    db = sqlite3.connect(tmp_path / "store.sqlite")
    (stored,) = db.execute("SELECT readable FROM counterexamples").fetchone()
    assert json.loads(stored) == c["readable"]


def test_the_shrinking_record_of_the_klein_bottle_is_verified(tmp_path):
    # verifier check replays the shrinking with the same candidates, flips included
    path = tmp_path / "claim.toml"
    path.write_text(NON_ORIENTABLE_FAILS.format(name="klein-bottle-8"))
    run_ = subprocess.run([sys.executable, "-m", "verifier", "run", str(path), "--engine",
                           "inline", "--store", str(tmp_path / "s.sqlite"), "--certificates",
                           str(tmp_path / "certs")], capture_output=True, text=True,
                          timeout=300)
    assert run_.returncode == 1, run_.stderr
    summary = " ".join(run_.stdout.split())
    assert "relabelled: K = [[1, 2, 3]," in summary
    assert "isomorphic to projective-plane-6" in summary
    assert "vertex labels 1=" in summary
    checked = subprocess.run([sys.executable, "-m", "verifier", "check",
                              str(tmp_path / "certs" / "first-betti-field-independent.json")],
                             capture_output=True, text=True, timeout=300)
    assert checked.returncode == 0, checked.stdout + checked.stderr
    assert checked.stdout.startswith("verified")


def test_relabel_and_recognise():
    # the boundary of the tetrahedron on labels 5, 7, 9, 11 is the 2-sphere of the catalog
    K = Complex.from_facets([[5, 7, 9], [5, 7, 11], [5, 9, 11], [7, 9, 11]])
    described = readable({"K": K.facet_labels()})["K"]
    assert described["facets"] == [[1, 2, 3], [1, 2, 4], [1, 3, 4], [2, 3, 4]]
    assert described["labels"] == [[1, 5], [2, 7], [3, 9], [4, 11]]
    assert "sphere-2" in described["isomorphic_to"]
    assert "simplex-boundary-3" in described["isomorphic_to"]
    # same f-vector, not isomorphic: a Möbius strip is not recognised as anything else
    assert recognise(catalog.complex("moebius-strip-5")) == ["moebius-strip-5"]
    assert recognise(Complex.from_facets([[1, 2], [2, 3]])) == []


def test_smallest_failing_case_of_an_exhaustive_family(tmp_path):
    # fails exactly when the complex has two or more triangles: the smallest such complex
    # by (vertices, simplices) is two triangles sharing an edge, 4 vertices and 11 simplices
    path = tmp_path / "claim.toml"
    path.write_text('[[claim]]\nname = "at-most-one-triangle"\n'
                    'statement = "f_vector(K)[2] < 2 if dim(K) >= 2 else True"\n'
                    'source = "demo"\n[[claim.over]]\nfamily = "all-complexes"\n'
                    'max_vertices = 5\n')
    result = run([path], options(tmp_path))
    store = Store.read_only(tmp_path / "store.sqlite")
    smallest = store.smallest_failing(result.run_id, "at-most-one-triangle")
    assert (smallest["vertices"], smallest["simplices"]) == (4, 11)
    assert smallest["family"] == "all-complexes"
    out = subprocess.run([sys.executable, "-m", "verifier", "run", str(path), "--engine",
                          "inline", "--store", str(tmp_path / "t.sqlite"), "--certificates",
                          str(tmp_path / "c")], capture_output=True, text=True, timeout=300)
    assert ("smallest failing case of the exhaustive families: "
            f"{smallest['case_id']} (4 vertices, 11 simplices)") in " ".join(out.stdout.split())


# ------------------------------------------------------------------- drawings
def test_a_closed_non_orientable_surface_is_drawn_in_three_dimensions():
    # the 1-skeleton of the 6-vertex projective plane is K_6, not planar (Kuratowski), so
    # no plane drawing avoids crossings; the drawing is a 3-dimensional view that still
    # names every simplex, and it says it is a drawing
    from mpl_toolkits.mplot3d import Axes3D

    from verifier.drawing import counterexample_figure, drawn, figure_png, needs_space
    RP2 = catalog.complex("projective-plane-6")
    assert needs_space(RP2) and needs_space(catalog.complex("torus-7"))
    assert not needs_space(catalog.complex("sphere-2"))          # planar: drawn flat
    assert not needs_space(Complex.from_facets([[1, 2], [2, 3], [3, 1]]))
    fig = counterexample_figure(RP2.facet_labels(), sides=["1", "0"])
    assert any(isinstance(ax, Axes3D) for ax in fig.axes)
    shown = drawn(fig)
    assert len(shown["triangle"]) == 10 and len(shown["edge"]) == 15
    assert sorted(shown["vertex"]) == ["1", "2", "3", "4", "5", "6"]
    assert "3-dimensional view" in fig._suptitle.get_text()
    assert "a drawing" in fig._suptitle.get_text()
    assert figure_png(fig).startswith(b"\x89PNG")
    flat = counterexample_figure(catalog.complex("sphere-2").facet_labels())
    assert not any(isinstance(ax, Axes3D) for ax in flat.axes)


def test_only_simplices_named_by_the_witness_are_highlighted():
    # a homology degree k = 1 is a number, not vertex 1; a vertex bound by a quantifier
    # is written [1]; a matrix entry named by row and column numbers names no simplex
    from verifier.drawing import counterexample_figure, drawn, witness_simplices
    K = Complex.from_facets([[1, 2, 3], [3, 4]])
    assert witness_simplices(K, {"k": "1"}) == []
    assert witness_simplices(K, {"entry": "[2, 3]", "left": "1", "right": "0"}) == []
    assert witness_simplices(K, {"v": "[1]"}) == [(1,)]
    assert witness_simplices(K, {"entry": "[[3], [3, 4]]"}) == [(3,), (3, 4)]
    assert drawn(counterexample_figure(K.facet_labels(), witness={"k": "1"})).get(
        "highlight", []) == []


def test_the_sides_of_a_failed_comparison_are_labelled_with_their_expressions():
    from verifier.drawing import counterexample_figure
    from verifier.report import side_expressions
    statement = "betti(K, 1, 2) == betti(K, 1)"
    assert side_expressions(statement) == ("betti(K, 1, 2)", "betti(K, 1)")
    assert side_expressions("is_reciprocal(charpoly(connection(K)))") is None
    fig = counterexample_figure(catalog.complex("projective-plane-6").facet_labels(),
                                sides=["1", "0"], expressions=side_expressions(statement))
    texts = [t.get_text() for t in fig.texts]
    assert "left: betti(K, 1, 2) = 1" in texts and "right: betti(K, 1) = 0" in texts


def test_spectrum_pictures_only_for_spectral_claims(tmp_path):
    # the hydrogen identity compares matrices entry by entry (connection, green,
    # signless_hodge): no spectrum is involved, so its report draws none; a claim on
    # counts of positive eigenvalues keeps its spectrum picture
    from verifier.report import is_spectral, write_report
    assert not is_spectral("connection(K) - green(K) == signless_hodge(K)")
    assert not is_spectral("sum(green(K)) == euler(K)")
    assert is_spectral("positive(connection(K)) - negative(connection(K)) == euler(K)")
    assert is_spectral("is_reciprocal(charpoly(connection(K) ** 2))")
    assert is_spectral("zeros_in_box(connection(K) ** 2, -1, 1, 0, 20) == 0")
    path = tmp_path / "hydrogen.toml"
    path.write_text('[[claim]]\nname = "hydrogen"\n'
                    'statement = "connection(K) - green(K) == signless_hodge(K)"\n'
                    'expect = "fails"\nsource = "O. Knill, arXiv:1803.01464"\n'
                    '[[claim.over]]\nfamily = "all-complexes"\nmax_vertices = 3\n')
    run([path], options(tmp_path))
    written = write_report(tmp_path / "store.sqlite", tmp_path / "out",
                           certificates_dir=tmp_path / "none")
    assert [p.name for p in written if p.suffix == ".png"] == ["hydrogen-counterexample.png"]
    text = (tmp_path / "out" / "report.md").read_text()
    assert "Left side: `connection(K) - green(K)`" in text
    assert "Right side: `signless_hodge(K)`" in text
