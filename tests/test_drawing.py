"""Pictures of complexes, counterexamples and spectra, checked from the figures' data.

Every simplex in a drawing is an artist with a gid ("vertex:1", "edge:1,2",
"triangle:1,2,3"), so these tests count what a picture shows without looking at pixels;
the counts must equal the f-vector recorded (with its source) in
verifier/families/data/triangulations.json.
"""

from __future__ import annotations

import io
import json
import os
import subprocess
import sys
from pathlib import Path

import matplotlib.image
import numpy as np
import pytest

from verifier import drawing, invariants
from verifier.cli import main
from verifier.complex import Complex
from verifier.drawing import (DrawingError, complex_html, counterexample_figure, data_uri,
                              draw_complex, draw_spectrum, drawn, figure_png, figure_svg,
                              spectrum_of, witness_simplices)
from verifier.families import catalog

ROOT = Path(__file__).resolve().parent.parent
RECORDED = {e["id"]: e for e in json.loads(
    (ROOT / "verifier/families/data/triangulations.json").read_text())["entries"]}
PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"   # PNG specification (W3C/ISO 15948), section 5.2


def counts(fig) -> tuple[int, int, int]:
    found = drawn(fig)
    return len(found["vertex"]), len(found["edge"]), len(found["triangle"])


# ------------------------------------------------------------ counterexamples
@pytest.fixture(scope="module")
def companion_records(tmp_path_factory):
    """The counterexample records of the two shipped failing companions, from a real run."""
    from verifier.run.runner import RunOptions, run

    store = tmp_path_factory.mktemp("store") / "drawing.sqlite"
    result = run([str(ROOT / "claims/reciprocal-2d-fails.toml"),
                  str(ROOT / "claims/hydrogen-2d-fails.toml")],
                 RunOptions(store=str(store), engine="inline", workers=1))
    return {r.claim.name: r.counterexample for r in result.claims}


def test_companion_counterexamples_draw_as_one_filled_triangle(companion_records):
    # The minimal counterexample of both companions is a single filled triangle [[0, 1, 2]]
    # (reciprocity of L^2 and the hydrogen identity are stated for graphs only: O. Knill,
    # "The hydrogen identity for Laplacians", arXiv:1803.01464, 2018; the runner finds
    # the triangle).  Its drawing: one triangle, three edges, labels 0, 1, 2.
    assert set(companion_records) == {"reciprocal-charpoly-2d", "hydrogen-identity-2d"}
    for name, record in companion_records.items():
        (facets,) = record["complexes"].values()
        assert facets == [[0, 1, 2]], name
        fig = counterexample_figure(record["complexes"], sides=record["sides"],
                                    witness=record["witness"])
        found = drawn(fig)
        assert found["triangle"] == ["0,1,2"]
        assert sorted(found["edge"]) == ["0,1", "0,2", "1,2"]
        labels = sorted(found["vertex"])
        assert labels == sorted(str(v) for f in facets for v in f)
        texts = sorted(t.get_text() for t in fig.findobj(
            lambda a: str(a.get_gid()).startswith("vertex:")))
        assert texts == ["0", "1", "2"]          # the label text itself, not only the gid
        assert figure_png(fig).startswith(PNG_SIGNATURE)


def test_matrix_witness_is_highlighted(companion_records):
    # hydrogen-identity-2d: L - g and the signless Hodge operator differ first at the
    # diagonal entry of vertex 0 (L - g = 1 there, H = 2: a vertex of a triangle has
    # degree 2 in the 1-skeleton; hand computation).
    record = companion_records["hydrogen-identity-2d"]
    assert record["witness"]["entry"] == "[[0], [0]]"
    fig = counterexample_figure(record["complexes"], witness=record["witness"])
    assert drawn(fig)["highlight"] == ["0"]


def test_witness_texts_are_read_as_literals_only():
    # Witness texts come from stores and certificates: they are parsed with
    # ast.literal_eval, so code in them is never run (common practice, no source).
    K = Complex.from_facets([[0, 1, 2]])
    assert witness_simplices(K, {"x": "[1, 2]"}) == [(1, 2)]
    assert witness_simplices(K, {"entry": "[[0, 1], [2]]", "left": "1", "right": "0"}) == \
        [(0, 1), (2,)]
    assert witness_simplices(K, {"v": "__import__('os').getcwd()"}) == []
    assert witness_simplices(K, {"x": "[0, 9]", "y": "[[", "z": None}) == []
    fig = counterexample_figure([[0, 1, 2]], witness={"x": "[[[broken"})
    assert drawn(fig)["highlight"] == []


def test_a_counterexample_with_two_complexes_draws_two_panels():
    # a claim about a pair (K, L): one panel per variable, the witness highlighted where
    # it names a simplex of that complex; an edge and a triangle: f = (2, 1) and (3, 3, 1)
    fig = counterexample_figure({"K": [[0, 1]], "L": [[5, 6, 7]]}, witness={"x": "[5, 6]"})
    found = drawn(fig)
    assert len(found["vertex"]) == 5 and len(found["edge"]) == 4
    assert found["triangle"] == ["5,6,7"] and found["highlight"] == ["5,6"]
    assert sorted(ax.get_title() for ax in fig.axes) == ["K: f-vector [2, 1]",
                                                         "L: f-vector [3, 3, 1]"]


def test_every_dimension_of_simplex_can_be_highlighted():
    # cube-ball-8: the staircase triangulation's tetrahedra all contain the main diagonal
    # {1, 8} (Freudenthal/Kuhn; from memory -- the facets recorded in
    # triangulations.json agree)
    K = catalog.complex("cube-ball-8")
    tetrahedron = K.facet_labels()[0]
    assert len(tetrahedron) == 4 and {1, 8} <= set(tetrahedron)
    fig = draw_complex(K, highlight=[(1,), (1, 8), tuple(tetrahedron[:3]), tuple(tetrahedron)])
    assert sorted(drawn(fig)["highlight"], key=len) == \
        ["1", "1,8", ",".join(map(str, tetrahedron[:3])), ",".join(map(str, tetrahedron))]


def test_a_highlight_that_is_not_a_simplex_is_refused():
    with pytest.raises(DrawingError, match=r"highlight: \[0, 5\] is not a simplex"):
        draw_complex(Complex.from_facets([[0, 1, 2]]), highlight=[(0, 5)])


# ----------------------------------------------------------- catalog counts
@pytest.mark.parametrize("name", ["torus-7", "projective-plane-6", "moebius-strip-5",
                                  "simplex-boundary-2", "cross-polytope-boundary-2",
                                  "cross-polytope-boundary-3"])
def test_drawn_simplices_match_the_recorded_f_vector(name):
    # f-vectors recorded with their sources in triangulations.json: torus-7 (Moebius 1861,
    # Csaszar 1949) (7, 21, 14); projective-plane-6 (hemi-icosahedron) (6, 15, 10); the
    # 3- and 4-cycles have no triangle.
    recorded = RECORDED[name]["f_vector"] + [0, 0]
    K = catalog.complex(name)
    fig = draw_complex(K)
    assert counts(fig) == tuple(recorded[:3])
    assert sorted(drawn(fig)["vertex"], key=int) == \
        [str(v) for v in range(1, RECORDED[name]["vertices"] + 1)]
    # every facet of the recorded list that is a triangle is drawn as a triangle
    triangles = {tuple(sorted(map(int, t.split(",")))) for t in drawn(fig)["triangle"]}
    assert triangles == {tuple(f) for f in K.facet_labels() if len(f) == 3}


def test_a_three_dimensional_complex_is_drawn_by_its_two_skeleton():
    # cube-ball-8 (staircase triangulation of the cube) has f = (8, 19, 18, 6), recorded in
    # triangulations.json: the drawing shows the 18 triangles and says the 6 tetrahedra
    # are not drawn.
    recorded = RECORDED["cube-ball-8"]["f_vector"]
    fig = draw_complex(catalog.complex("cube-ball-8"))
    assert counts(fig) == tuple(recorded[:3])
    assert "2-skeleton drawn" in fig.get_suptitle()
    assert "3-simplices not shown" in fig.get_suptitle()


def test_a_two_sphere_says_which_triangle_is_outside():
    # The octahedron boundary is planar (Steinitz); in a plane drawing one of its 8
    # triangles must surround the others (Euler's formula: 8 faces, one unbounded).
    fig = draw_complex(catalog.complex("cross-polytope-boundary-3"))
    assert "is drawn around the others" in fig.get_suptitle()


def test_disconnected_complexes_and_isolated_vertices_are_drawn():
    # a triangle, a separate edge and an isolated vertex: f = (6, 4, 1) (hand count)
    K = Complex.from_facets([[0, 1, 2], [3, 4], [5]])
    fig = draw_complex(K)
    assert counts(fig) == (6, 4, 1)
    positions = {t.get_gid(): t.get_position() for t in fig.findobj(
        lambda a: str(a.get_gid()).startswith("vertex:"))}
    assert len(set(positions.values())) == 6   # no two vertices on the same spot


def test_string_labels_are_written_as_text():
    K = Complex.from_facets([["a", "b", "c"], ["c", "d"]])
    assert sorted(drawn(draw_complex(K))["vertex"]) == ["a", "b", "c", "d"]


def test_many_vertices_are_drawn_as_dots_without_labels(monkeypatch):
    monkeypatch.setattr(drawing, "MAX_LABELLED_VERTICES", 2)
    fig = draw_complex(Complex.from_facets([[0, 1, 2]]))
    assert drawn(fig)["vertex"] == [] and len(drawn(fig)["edge"]) == 3
    (dots,) = fig.findobj(lambda a: a.get_gid() == "vertex-dots")
    assert len(dots.get_offsets()) == 3
    assert "3 vertices: labels omitted" in fig.get_suptitle()


def test_too_large_a_complex_is_refused_with_its_size(monkeypatch):
    monkeypatch.setattr(drawing, "MAX_DRAWN_SIMPLICES", 30)
    with pytest.raises(DrawingError, match=r"2-skeleton has 42 simplices \(limit 30\)"):
        draw_complex(catalog.complex("torus-7"))


# ------------------------------------------------------------------- output
def test_png_is_a_real_picture_and_svg_names_the_simplices():
    fig = draw_complex(catalog.complex("torus-7"))
    png = figure_png(fig)
    assert png.startswith(PNG_SIGNATURE)
    pixels = matplotlib.image.imread(io.BytesIO(png))
    assert pixels.shape[0] > 100 and pixels.shape[1] > 100
    assert len(np.unique(pixels.reshape(-1, pixels.shape[-1]), axis=0)) > 1   # not blank
    svg = figure_svg(fig)
    assert svg.count('id="triangle:') == 14 and svg.count('id="edge:') == 21
    uri = data_uri(png)
    assert uri.startswith("data:image/png;base64,iVBORw0KGgo")   # base64 of the signature


def _figure_data(fig) -> list:
    """Everything a drawing places: gid and coordinates of each simplex artist."""
    data = []
    for artist in fig.findobj(lambda a: isinstance(a.get_gid(), str)):
        if hasattr(artist, "get_xy"):
            where = np.asarray(artist.get_xy()).round(12).tolist()
        elif hasattr(artist, "get_xydata"):
            where = np.asarray(artist.get_xydata()).round(12).tolist()
        elif hasattr(artist, "get_position"):
            where = [round(float(c), 12) for c in artist.get_position()]
        else:
            where = np.asarray(artist.get_offsets()).round(12).tolist()
        data.append((artist.get_gid(), where))
    return data


@pytest.mark.parametrize("name", ["torus-7", "cross-polytope-boundary-3", "poincare-sphere-16"])
def test_layouts_are_deterministic(name):
    # circle (torus-7), Tutte embedding (octahedron), Kamada-Kawai (16 vertices)
    K = catalog.complex(name)
    first, second = draw_complex(K), draw_complex(K)
    assert _figure_data(first) == _figure_data(second)
    assert figure_svg(first) == figure_svg(second)


def test_public_layout_is_the_drawing_layout():
    # other pictures of a complex (the TikZ export of reports) reuse drawing.layout; a
    # complex whose 1-skeleton is not planar (the projective plane's is K_6) is drawn as
    # a 3-dimensional view at drawing.space_layout
    K = catalog.complex("cross-polytope-boundary-3")
    where = {t.get_gid(): tuple(t.get_position()) for t in draw_complex(K).findobj(
        lambda a: str(a.get_gid()).startswith("vertex:"))}
    assert {f"vertex:{v}": tuple(p) for v, p in zip(K.labels, drawing.layout(K))} == where
    P = catalog.complex("projective-plane-6")
    where = {t.get_gid(): tuple(t.get_position_3d()) for t in draw_complex(P).findobj(
        lambda a: str(a.get_gid()).startswith("vertex:"))}
    assert {f"vertex:{v}": tuple(p) for v, p in zip(P.labels, drawing.space_layout(P))} \
        == where


def test_layouts_do_not_depend_on_the_hash_seed():
    # String labels hash differently in every interpreter (PYTHONHASHSEED); the drawing
    # must not (common practice, no source).
    script = ("from verifier.drawing import draw_complex, figure_svg\n"
              "from verifier.families import catalog\n"
              "import hashlib\n"
              "for name in ('torus-7', 'cross-polytope-boundary-3'):\n"
              "    K = catalog.complex(name).relabel(lambda v: 'v' + str(v))\n"
              "    print(hashlib.sha256(figure_svg(draw_complex(K)).encode()).hexdigest())\n")
    outputs = set()
    for seed in ("1", "2"):
        env = dict(os.environ, PYTHONHASHSEED=seed)
        done = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True,
                              env=env, cwd=ROOT, timeout=120)
        assert done.returncode == 0, done.stderr
        outputs.add(done.stdout)
    assert len(outputs) == 1


def test_tutte_layout_draws_a_planar_disc_without_crossings():
    # Tutte's theorem (W. T. Tutte, "How to draw a graph", Proc. LMS 13, 1963): the
    # barycentric embedding of a 3-connected planar graph has no crossing.  The cone over
    # a hexagon (a triangulated disc with 7 vertices) is 3-connected.  Check: the
    # triangles' oriented areas sum to the area of the outer polygon (no overlaps).
    K = Complex.from_facets([[0, i, i % 6 + 1] for i in range(1, 7)])
    fig = draw_complex(K)
    patches = {p.get_gid(): np.asarray(p.get_xy())[:3] for p in fig.findobj(
        lambda a: str(a.get_gid()).startswith("triangle:"))}

    def area(points):
        x, y = np.asarray(points).T
        return 0.5 * abs(np.dot(x, np.roll(y, -1)) - np.dot(y, np.roll(x, -1)))

    centre = {t.get_gid(): np.asarray(t.get_position()) for t in fig.findobj(
        lambda a: str(a.get_gid()).startswith("vertex:"))}
    rim = [centre[f"vertex:{i}"] for i in range(1, 7)]
    assert sum(area(p) for p in patches.values()) == pytest.approx(area(rim))


# ------------------------------------------------------------------- spectra
@pytest.mark.parametrize("name", ["torus-7", "projective-plane-6", "simplex-boundary-2"])
def test_spectrum_picture_states_the_exact_signature(name):
    # Knill, "One can hear the Euler characteristic of a simplicial complex",
    # arXiv:1711.09527 (2017): L has f_0 + f_2 + ... positive and f_1 + f_3 + ...
    # negative eigenvalues (none zero); f-vectors recorded in triangulations.json.
    f = RECORDED[name]["f_vector"]
    even, odd = sum(f[0::2]), sum(f[1::2])
    K = catalog.complex(name)
    values, exact = spectrum_of(K)
    assert exact == (even, odd, 0) == invariants.signature(invariants.connection(K))
    assert len(values) == sum(f)
    fig = draw_spectrum(values, exact)
    (text,) = [t.get_text() for t in fig.findobj(lambda a: a.get_gid() == "counts")]
    assert text == f"exact counts: {even} positive, {odd} negative, 0 zero"
    (remark,) = [t.get_text() for t in fig.findobj(lambda a: a.get_gid() == "floating-point")]
    assert remark == "floating-point eigenvalues; counts exact"   # float signs agree here
    shown = {k: v for k, v in _points(fig).items()}
    assert (shown["positive"], shown["negative"], shown["zero"]) == (even, odd, 0)


def _points(fig) -> dict[str, int]:
    return {a.get_gid().split(":")[1]: len(a.get_offsets()) for a in fig.findobj(
        lambda a: str(a.get_gid()).startswith("eigenvalues:"))}


def test_the_picture_says_when_floating_point_signs_disagree():
    fig = draw_spectrum([-1.0, 2.0], (2, 0, 0))
    (remark,) = [t.get_text() for t in fig.findobj(lambda a: a.get_gid() == "floating-point")]
    assert remark.endswith("(floating-point signs give 1, 1, 0)")


@pytest.mark.parametrize("facets", [
    [[1, 2], [2, 3], [3, 1]],                 # a triangle's boundary (1-dimensional)
    [[1, 2], [2, 3], [3, 4], [4, 5]],         # a path
    [[0, 1, 2]],                              # the companions' counterexample (2-dim)
    [[1, 2, 3], [3, 4]],
])
def test_reciprocal_pairing_of_the_squared_spectrum_agrees_with_exact_reciprocity(facets):
    # For 1-dimensional complexes the characteristic polynomial of L^2 is reciprocal
    # (O. Knill, "The hydrogen identity for Laplacians", arXiv:1803.01464, 2018), so
    # lambda <-> 1/lambda pairs the spectrum; for the filled triangle it does not (the
    # failing companion).  The picture's arcs must agree with the exact decision.
    K = Complex.from_facets(facets)
    values, exact = spectrum_of(K, squared=True)
    assert exact == (len(K.simplices), 0, 0)      # L is unimodular (det = +-1), so L^2 > 0
    fig = draw_spectrum(values, exact, squared=True)
    arcs = drawn(fig)["pair"]
    assert len(arcs) == len(values) // 2
    all_paired = all(a.startswith("reciprocal:") for a in arcs)
    L = invariants.connection(K)
    assert all_paired == bool(invariants.is_reciprocal(invariants.charpoly(L @ L)))
    assert all_paired == (K.dim <= 1)


def test_spectrum_refuses_large_matrices():
    K = Complex.from_facets([[2 * i, 2 * i + 1] for i in range(700)])   # 2,100 simplices
    with pytest.raises(DrawingError, match="order 2100; dense floating-point eigenvalues "
                                           "are computed up to order 2000"):
        spectrum_of(K)


# ---------------------------------------------------------------------- CLI
def test_show_png_writes_a_picture(tmp_path, capsys):
    out = tmp_path / "out.png"
    assert main(["show", "torus-7", "--png", str(out)]) == 0
    assert out.read_bytes().startswith(PNG_SIGNATURE)
    assert f"drawing written to {out}\n" in capsys.readouterr().out   # one unwrapped line
    svg = tmp_path / "out.svg"
    assert main(["show", "projective-plane-6", "--png", str(svg)]) == 0
    assert svg.read_text().count('id="triangle:') == 10   # f_2 = 10, triangulations.json


def test_show_png_as_a_command(tmp_path):
    done = subprocess.run([sys.executable, "-m", "verifier", "show", "torus-7", "--png",
                           "out.png"], capture_output=True, text=True, cwd=tmp_path,
                          timeout=120)
    assert done.returncode == 0, done.stderr
    assert (tmp_path / "out.png").read_bytes().startswith(PNG_SIGNATURE)


@pytest.mark.parametrize("args, message", [
    (["torus-7", "projective-plane-6", "--png", "{tmp}/a.png"],
     "error: show --png: draws one complex, but 2 were named"),
    (["torus-7", "--png", "{tmp}/a.jpg"],
     "error: --png {tmp}/a.jpg: unknown picture format '.jpg'; use a file name ending in "
     ".png or .svg"),
    (["torus-7", "--png", "{tmp}/missing/a.png"],
     "error: --png {tmp}/missing/a.png: cannot write the file (No such file or directory)"),
    (["--list", "--png", "{tmp}/a.png"],
     "error: show: --png draws a complex and cannot be combined with --list"),
])
def test_show_png_errors_are_one_line(tmp_path, capsys, args, message):
    args = [a.format(tmp=tmp_path) for a in args]
    assert main(["show", *args]) == 2
    err = capsys.readouterr().err.strip()
    assert err.replace("\n", "") == message.format(tmp=tmp_path)
    assert not list(tmp_path.iterdir())


# ------------------------------------------------------------------ notebook
def test_complex_shows_itself_in_a_notebook():
    # torus-7: f = (7, 21, 14), chi = 0, Betti numbers over Q (1, 2, 1), as recorded in
    # triangulations.json (Moebius 1861 / Csaszar 1949).
    page = catalog.complex("torus-7")._repr_html_()
    assert '<img src="data:image/png;base64,iVBORw0KGgo' in page
    assert "<td>[7, 21, 14]</td>" in page
    assert "<td>0</td>" in page and "<td>[1, 2, 1]</td>" in page


def test_notebook_block_skips_heavy_parts_of_large_complexes():
    page = complex_html(Complex.from_facets([[0, 1]]), betti_limit=2)
    assert "<td>not computed here (3 simplices &gt; 2)</td>" in page
    assert "<td>[2, 1]</td>" in page                 # the f-vector of an edge
    page = complex_html(Complex.from_facets([[0, 1]]), draw_limit=2)
    assert "not drawn here: the 2-skeleton has 3 simplices (more than 2)" in page
    assert "data:image/png" not in page


def test_importing_complex_stays_light():
    # the notebook hook imports matplotlib lazily: building complexes needs neither
    # matplotlib nor python-flint
    done = subprocess.run([sys.executable, "-c", "import sys, verifier.complex; "
                           "print('matplotlib' in sys.modules, 'flint' in sys.modules)"],
                          capture_output=True, text=True, cwd=ROOT, timeout=60)
    assert done.stdout.split() == ["False", "False"]
