"""Pictures of complexes and spectra (matplotlib, drawn off-screen).

A complex is drawn from its 1-skeleton: vertices are labelled dots, edges are lines,
2-simplices are filled translucent triangles.  Complexes of dimension 3 and more are
drawn by their 2-skeleton and the title says so (a flat picture of a solid simplex is
a crossing of triangles, not something a reader can recognise).

Every artist that stands for a simplex carries a *gid* naming it, so a program (a
test, a report) can read the picture's content from the figure's data instead of its
pixels:

* ``vertex:<label>`` -- the text that labels a vertex;
* ``edge:<a>,<b>`` -- the line of an edge;
* ``triangle:<a>,<b>,<c>`` -- the filled polygon of a 2-simplex;
* ``highlight:<...>`` -- an extra artist emphasising a simplex named in ``highlight``
  (a ring for a vertex, a thick line for an edge, a hatched polygon for a triangle or
  the convex hull of a higher simplex's vertices);
* in spectral pictures: ``eigenvalues:positive|negative|zero`` (point sets),
  ``pair:reciprocal:<k>`` / ``pair:unmatched:<k>`` (arcs), ``counts`` and
  ``floating-point`` (the two texts).

Labels are written as text (``str`` for numbers and strings).  :func:`drawn` collects
these names from a figure.  Above ``MAX_LABELLED_VERTICES`` vertices the labels would be
unreadable (and cost most of the drawing time): vertices are then plain dots (one
collection, gid ``vertex-dots``) and the title says the labels are omitted.

Layout (deterministic; nothing random without a fixed seed): each connected component
is laid out on its own and the components are set side by side in label order.  A
component on at most 3 vertices is a regular polygon; a planar 2-connected one gets
Tutte's barycentric embedding with its longest face outside (crossing-free when
the graph is 3-connected [T]); other
components on at most 12 vertices sit on a circle in label order; larger ones use
Kamada-Kawai (up to 300 vertices) or a spring layout with seed 0.  A 2-sphere has no
crossing-free plane drawing in which every triangle is bounded: one triangle surrounds
the others, is shaded lighter, and the title names it.

Closed surfaces and other 2-complexes whose 1-skeleton is not planar (the 6-vertex
projective plane has the complete graph K_6 as its 1-skeleton) have no plane drawing
without crossings.  They are drawn as a 3-dimensional view (mplot3d): vertex positions
by a Kamada-Kawai layout in three dimensions [KK] (a spring layout with seed 0 above
300 vertices), triangles shaded by the angle of their plane to a fixed light, and the
title says it is a 3-dimensional view.  The same gids name the same simplices.

Spectral pictures (:func:`draw_spectrum`) are made from floating-point eigenvalues and
say so; the counts written on them are exact and supplied by the caller (for the
connection matrix, :func:`spectrum_of` takes them from the exact signature).

Figures are created as ``matplotlib.figure.Figure`` objects with an Agg canvas, never
through ``pyplot``: nothing is displayed, no global backend is switched and nothing
accumulates in pyplot's figure registry.

References:
    [T] W. T. Tutte, "How to draw a graph", Proc. London Math. Soc. (3) 13 (1963) 743-767.
    [KK] T. Kamada and S. Kawai, "An algorithm for drawing general undirected graphs",
         Inform. Process. Lett. 31 (1989) 7-15.
    [K] O. Knill, "One can hear the Euler characteristic of a simplicial complex",
        arXiv:1711.09527 (2017): the connection matrix L has as many positive eigenvalues
        as K has even-dimensional simplices and as many negative ones as odd-dimensional
        ones.
    [H] O. Knill, "The hydrogen identity for Laplacians", arXiv:1803.01464 (2018): for
        1-dimensional complexes the spectrum of L^2 is closed under lambda -> 1/lambda.
"""

from __future__ import annotations

import ast
import base64
import html
import io
import math
import textwrap
from collections.abc import Iterable, Mapping

import numpy as np
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure
from matplotlib.lines import Line2D
from matplotlib.patches import Arc, Polygon

from .complex import Complex, _label_text

__all__ = [
    "DrawingError",
    "draw_complex",
    "layout",
    "space_layout",
    "needs_space",
    "counterexample_figure",
    "draw_spectrum",
    "spectrum_of",
    "figure_png",
    "figure_svg",
    "data_uri",
    "drawn",
    "witness_simplices",
    "complex_html",
    "MAX_DRAWN_SIMPLICES",
    "MAX_SPECTRUM_ORDER",
]

MAX_DRAWN_SIMPLICES = 20_000      # simplices of the 2-skeleton a drawing may hold
MAX_LABELLED_VERTICES = 150       # beyond this many vertices, dots without label texts
MAX_SPECTRUM_ORDER = 2_000        # order of the dense matrix spectrum_of will diagonalise
HTML_BETTI_LIMIT = 3_000          # _repr_html_ computes Betti numbers up to this many simplices
HTML_DRAW_LIMIT = 5_000           # ... and draws 2-skeletons up to this many simplices
LAYOUT_SEED = 0

_FILL = "#4c78a8"
_EDGE = "#303030"
_HIGHLIGHT = "#d62728"
_POSITIVE = "#1f77b4"
_NEGATIVE = "#d62728"
_ZERO = "#7f7f7f"


class DrawingError(ValueError):
    """A picture was asked of something that cannot be drawn (says what and why)."""


# ----------------------------------------------------------------------- text
def _text(label) -> str:
    """A label as the text written on the picture."""
    if isinstance(label, (int, str)) and not isinstance(label, bool):
        return str(label)
    return _label_text(label)


def _name(K: Complex, simplex: tuple[int, ...]) -> str:
    return ",".join(_text(K.labels[v]) for v in simplex)


# --------------------------------------------------------------------- layout
def _polygon(m: int, phase: float = math.pi / 2) -> np.ndarray:
    """m points evenly spaced on the unit circle, the first at angle ``phase``."""
    angles = phase - 2 * math.pi * np.arange(m) / m
    return np.column_stack([np.cos(angles), np.sin(angles)])


def _faces(embedding) -> list[list[int]]:
    """The faces (as vertex cycles) of a networkx planar embedding."""
    seen: set[tuple[int, int]] = set()
    faces = []
    for u, v in sorted(embedding.edges()):
        if (u, v) in seen:
            continue
        face = embedding.traverse_face(u, v, mark_half_edges=seen)
        faces.append(list(face))
    return faces


def _tutte(graph, nodes: list[int], outer: list[int]) -> np.ndarray:
    """Tutte's barycentric embedding [T]: the outer cycle on a circle, every other
    vertex at the average of its neighbours (one linear solve)."""
    where = {v: i for i, v in enumerate(nodes)}
    pos = np.zeros((len(nodes), 2))
    pos[[where[v] for v in outer]] = _polygon(len(outer))
    inner = [v for v in nodes if v not in set(outer)]
    if inner:
        import scipy.sparse as sp
        from scipy.sparse.linalg import spsolve

        k = {v: i for i, v in enumerate(inner)}
        rows, cols, entries = [], [], []
        b = np.zeros((len(inner), 2))
        for v in inner:
            rows.append(k[v]), cols.append(k[v]), entries.append(float(graph.degree(v)))
            for w in graph.neighbors(v):
                if w in k:
                    rows.append(k[v]), cols.append(k[w]), entries.append(-1.0)
                else:
                    b[k[v]] += pos[where[w]]
        A = sp.csc_array((entries, (rows, cols)), shape=(len(inner), len(inner)))
        solution = spsolve(A, b)
        pos[[where[v] for v in inner]] = np.asarray(solution).reshape(len(inner), 2)
    return pos


def _component_layout(graph, nodes: list[int], triangles: set):
    """Positions (one row per node, in the order of ``nodes``) of one component, and the
    2-simplex that had to be the outside face of a planar drawing (None if there is none)."""
    import networkx as nx

    m = len(nodes)
    if m <= 3:
        return (np.zeros((1, 2)) if m == 1
                else _polygon(m, math.pi if m == 2 else math.pi / 2)), None
    sub = graph.subgraph(nodes)
    planar, embedding = nx.check_planarity(sub)
    if planar and nx.is_biconnected(sub):
        # outside: the longest face, preferring one that is not a filled triangle
        faces = _faces(embedding)
        outer = min(faces, key=lambda f: (tuple(sorted(f)) in triangles, -len(f), sorted(f)))
        start = outer.index(min(outer))
        filled = tuple(sorted(outer)) if tuple(sorted(outer)) in triangles else None
        return _tutte(sub, nodes, outer[start:] + outer[:start]), filled
    if m <= 12:
        return _polygon(m), None
    if m <= 300:
        layout = nx.kamada_kawai_layout(sub)
    else:
        layout = nx.spring_layout(sub, seed=LAYOUT_SEED)
    return np.array([layout[v] for v in nodes], dtype=float), None


def _layout(K: Complex) -> tuple[np.ndarray, list[tuple[int, ...]]]:
    """Deterministic plane positions of K's vertices (row i for vertex index i), and the
    2-simplices drawn as the outside face of a planar component (a 2-sphere has one)."""
    import networkx as nx

    n = K.n_vertices
    pos = np.zeros((n, 2))
    outside = []
    if n == 0:
        return pos, outside
    graph = K.graph()
    triangles = {s for s in K.simplices if len(s) == 3}
    components = sorted((sorted(c) for c in nx.connected_components(graph)), key=lambda c: c[0])
    columns = math.ceil(math.sqrt(len(components)))
    for number, nodes in enumerate(components):
        local, filled = _component_layout(graph, nodes, triangles)
        if filled:
            outside.append(filled)
        local = local - (local.max(axis=0) + local.min(axis=0)) / 2
        radius = np.abs(local).max()
        if radius > 0:
            local = local / radius
        row, column = divmod(number, columns)
        pos[nodes] = local + np.array([2.6 * column, -2.6 * row])
    return np.round(pos, 12) + 0.0, outside       # no rounding noise, no negative zeros


def layout(K: Complex) -> np.ndarray:
    """Plane positions of K's vertices, as used by :func:`draw_complex`.

    Row i is the position of vertex i (label ``K.labels[i]``); each connected component
    fits in a square of side 2 and the components sit side by side.  Deterministic:
    the same complex gets the same positions in every process (see the module
    docstring for the rules), so other pictures of K (TikZ, reports) can match it.

    Parameters:
        K: the complex.

    Returns:
        a numpy float array of shape (number of vertices, 2).

    >>> layout(Complex.from_facets([["a", "b"]])).round(6).tolist()   # one edge, level
    [[-1.0, 0.0], [1.0, 0.0]]

    Notes: planar 2-connected components by Tutte's barycentric embedding (one sparse
    linear solve), others on a circle (at most 12 vertices), by Kamada-Kawai (at most
    300) or a spring layout with seed 0.  References: [T], [KK].
    """
    return _layout(K)[0]


# -------------------------------------------------------------------- drawing
def _resolve_highlight(K: Complex, highlight) -> list[tuple[int, ...]]:
    chosen = []
    for item in highlight or ():
        labels = (item,) if isinstance(item, (int, str)) else tuple(item)
        try:
            chosen.append(K.simplex_of(labels))
        except (KeyError, TypeError):
            raise DrawingError(f"highlight: {list(labels)!r} is not a simplex of the complex "
                               f"(vertex labels: {[_text(v) for v in K.labels[:12]]}"
                               f"{' ...' if K.n_vertices > 12 else ''})") from None
    return sorted(set(chosen), key=lambda s: (len(s), s))


def needs_space(K: Complex) -> bool:
    """Whether K is drawn as a 3-dimensional view: it has a 2-simplex and its 1-skeleton
    is not planar (no plane drawing of its edges without crossings).

    >>> needs_space(Complex.from_facets([[0, 1, 2], [0, 2, 3]]))
    False
    """
    import networkx as nx

    if K.dim < 2 or K.n_vertices < 5 or sum(K.f_vector[:3]) > MAX_DRAWN_SIMPLICES:
        return False
    planar, _ = nx.check_planarity(K.graph())
    return not planar


def space_layout(K: Complex) -> np.ndarray:
    """Positions in space of K's vertices, as used by the 3-dimensional view.

    Row i is the position of vertex i; deterministic: Kamada-Kawai in 3 dimensions [KK]
    from a fixed start, or a spring layout with seed 0 above 300 vertices; scaled into
    the cube [-1, 1]^3.  Floating point: a drawing, nothing is decided by it.

    >>> space_layout(Complex.from_facets([[0, 1]])).shape
    (2, 3)
    """
    import networkx as nx

    graph = K.graph()
    nodes = list(range(K.n_vertices))
    if K.n_vertices <= 300:
        start = {v: (math.cos(2 * math.pi * v / len(nodes)), math.sin(2 * math.pi * v / len(nodes)),
                     ((v % 3) - 1) / 2) for v in nodes}
        found = nx.kamada_kawai_layout(graph, pos=start, dim=3)
    else:
        found = nx.spring_layout(graph, dim=3, seed=LAYOUT_SEED)
    pos = np.array([found[v] for v in nodes], dtype=float)
    pos = pos - pos.mean(axis=0)
    radius = np.abs(pos).max()
    return np.round(pos / radius if radius > 0 else pos, 12) + 0.0


def _draw_in_space(ax, K: Complex, highlight=()) -> str:
    """Draw K on 3-dimensional axes; returns the note for the title."""
    from mpl_toolkits.mplot3d.art3d import Poly3DCollection

    chosen = _resolve_highlight(K, highlight)
    pos = space_layout(K)
    light = np.array([0.4, -0.5, 0.77])
    base = np.array([int(_FILL[i:i + 2], 16) / 255 for i in (1, 3, 5)])
    for s in K.simplices:
        if len(s) == 3:
            a, b, c = pos[list(s)]
            normal = np.cross(b - a, c - a)
            length = np.linalg.norm(normal)
            shade = 0.45 + 0.55 * (abs(normal @ light) / length if length > 0 else 0.5)
            patch = Poly3DCollection([pos[list(s)]], facecolors=[(*(base * shade), 0.45)],
                                     edgecolors="none")
            patch.set_gid(f"triangle:{_name(K, s)}")
            ax.add_collection3d(patch)
        elif len(s) == 2:
            (line,) = ax.plot(*pos[list(s)].T, color=_EDGE, linewidth=1.0)
            line.set_gid(f"edge:{_name(K, s)}")
    for s in chosen:
        xyz = pos[list(s)]
        if len(s) == 1:
            artist = ax.scatter(*xyz.T, s=420, facecolors="none", edgecolors=_HIGHLIGHT,
                                linewidths=2.5, depthshade=False)
        elif len(s) == 2:
            (artist,) = ax.plot(*xyz.T, color=_HIGHLIGHT, linewidth=4)
        else:
            artist = Poly3DCollection([xyz[:3]] if len(s) == 3 else [
                xyz[list(t)] for t in ((0, 1, 2), (0, 1, 3), (0, 2, 3), (1, 2, 3))],
                facecolors=(*[int(_HIGHLIGHT[i:i + 2], 16) / 255 for i in (1, 3, 5)], 0.55),
                edgecolors=_HIGHLIGHT, linewidths=2)
            ax.add_collection3d(artist)
        artist.set_gid(f"highlight:{_name(K, s)}")
    labelled = K.n_vertices <= MAX_LABELLED_VERTICES
    for v, label in enumerate(K.labels if labelled else ()):
        text = ax.text(*pos[v], _text(label), ha="center", va="center", fontsize=10,
                       zorder=6, bbox=dict(boxstyle="circle,pad=0.25", facecolor="white",
                                           edgecolor=_EDGE, linewidth=0.8))
        text.set_gid(f"vertex:{_text(label)}")
    if not labelled:
        dots = ax.scatter(*pos.T, s=8, color=_EDGE)
        dots.set_gid("vertex-dots")
    ax.set_xlim(-1.05, 1.05)
    ax.set_ylim(-1.05, 1.05)
    ax.set_zlim(-1.05, 1.05)
    ax.set_box_aspect((1, 1, 1))
    ax.view_init(elev=22, azim=35)
    ax.set_axis_off()
    notes = ["3-dimensional view, the 1-skeleton is not planar; a drawing, positions by a "
             "force layout in floating point"]
    if K.dim >= 3:
        hidden = "3-simplices" if K.dim == 3 else f"simplices of dimension 3 to {K.dim}"
        notes.append(f"{K.dim}-dimensional: 2-skeleton drawn, {hidden} not shown")
    if not labelled:
        notes.append(f"{K.n_vertices} vertices: labels omitted")
    return "; ".join(notes)


def _panel(fig, rect, K: Complex, highlight=()) -> tuple[object, str]:
    """Axes for K at ``rect`` of the figure (3-dimensional when K needs space), drawn."""
    if needs_space(K):
        ax = fig.add_axes(rect, projection="3d")
        return ax, _draw_in_space(ax, K, highlight)
    ax = fig.add_axes(rect)
    return ax, _draw_on(ax, K, highlight)


def _draw_on(ax, K: Complex, highlight=()) -> str:
    """Draw K on the axes ``ax``; returns a note for the title ('' when nothing to say)."""
    drawn_count = sum(K.f_vector[:3])
    if drawn_count > MAX_DRAWN_SIMPLICES:
        raise DrawingError(f"the complex is too large to draw: its 2-skeleton has {drawn_count} "
                           f"simplices (limit {MAX_DRAWN_SIMPLICES})")
    chosen = _resolve_highlight(K, highlight)
    pos, outside = _layout(K)
    n = K.n_vertices
    small = n <= 40
    width = 1.2 if n <= 40 else 0.6
    notes = []
    for s in K.simplices:
        if len(s) == 3:
            patch = Polygon(pos[list(s)], closed=True, facecolor=_FILL,
                            alpha=0.12 if s in outside else 0.28, edgecolor="none", zorder=1)
            patch.set_gid(f"triangle:{_name(K, s)}")
            ax.add_artist(patch)        # add_artist: the limits are set once, below
        elif len(s) == 2:
            line = Line2D(pos[list(s), 0], pos[list(s), 1], color=_EDGE, linewidth=width,
                          zorder=2, solid_capstyle="round")
            line.set_gid(f"edge:{_name(K, s)}")
            ax.add_artist(line)
    for s in chosen:
        xy = pos[list(s)]
        if len(s) == 1:
            artist = ax.scatter(xy[:, 0], xy[:, 1], s=520 if small else 120, facecolors="none",
                                edgecolors=_HIGHLIGHT, linewidths=2.5, zorder=5)
        elif len(s) == 2:
            (artist,) = ax.plot(xy[:, 0], xy[:, 1], color=_HIGHLIGHT, linewidth=4, zorder=3,
                                solid_capstyle="round")
        else:   # a triangle, or the convex hull of a higher simplex's vertices
            artist = Polygon(_hull(xy), closed=True, facecolor=_HIGHLIGHT, alpha=0.35,
                             edgecolor=_HIGHLIGHT, linewidth=2.5, hatch="//", zorder=3)
            ax.add_patch(artist)
        artist.set_gid(f"highlight:{_name(K, s)}")
    labelled = n <= MAX_LABELLED_VERTICES
    small = small and labelled                # labels written inside circles
    if not small:
        dots = ax.scatter(pos[:, 0], pos[:, 1], s=12, color=_EDGE, zorder=4)
        dots.set_gid("vertex-dots")
    size = 11 if n <= 12 else 9 if n <= 40 else max(5, 8 - n // 50)
    if not labelled:
        notes.append(f"{n} vertices: labels omitted")
    for v, label in enumerate(K.labels if labelled else ()):
        if small:
            text = ax.text(pos[v, 0], pos[v, 1], _text(label), ha="center", va="center",
                           fontsize=size, zorder=6,
                           bbox=dict(boxstyle="circle,pad=0.3", facecolor="white",
                                     edgecolor=_EDGE, linewidth=1.0))
        else:
            text = ax.text(pos[v, 0], pos[v, 1], " " + _text(label), ha="left",
                           va="bottom", fontsize=size, zorder=6)
        text.set_gid(f"vertex:{_text(label)}")
    if K.dim >= 3:
        hidden = "3-simplices" if K.dim == 3 else f"simplices of dimension 3 to {K.dim}"
        notes.append(f"{K.dim}-dimensional: 2-skeleton drawn, {hidden} not shown")
    for s in outside:
        notes.append(f"triangle {_name(K, s)} is drawn around the others, shaded lighter")
    ax.set_aspect("equal")
    ax.set_axis_off()
    if n:
        lo, hi = pos.min(axis=0), pos.max(axis=0)
        pad = 0.25 + 0.05 * float(max(hi - lo))
        ax.set_xlim(lo[0] - pad, hi[0] + pad)
        ax.set_ylim(lo[1] - pad, hi[1] + pad)
    return "; ".join(notes)


def _hull(points: np.ndarray) -> np.ndarray:
    """The convex hull of a few plane points, counter-clockwise (monotone chain)."""
    pts = sorted(map(tuple, np.round(points, 12)))
    if len(pts) <= 2:
        return np.array(pts)

    def cross(o, a, b):
        return (a[0] - o[0]) * (b[1] - o[1]) - (a[1] - o[1]) * (b[0] - o[0])

    lower, upper = [], []
    for p in pts:
        while len(lower) >= 2 and cross(lower[-2], lower[-1], p) <= 0:
            lower.pop()
        lower.append(p)
    for p in reversed(pts):
        while len(upper) >= 2 and cross(upper[-2], upper[-1], p) <= 0:
            upper.pop()
        upper.append(p)
    hull = lower[:-1] + upper[:-1]
    return np.array(hull if len(hull) >= 2 else pts)


def _figure(width: float, height: float) -> Figure:
    fig = Figure(figsize=(width, height), dpi=100)
    FigureCanvasAgg(fig)
    return fig


def draw_complex(K: Complex, highlight: Iterable | None = None, title: str | None = None,
                 size: float = 6.0) -> Figure:
    """A picture of a simplicial complex drawn from its 1-skeleton.

    Vertices are labelled dots, edges are lines and 2-simplices filled translucent
    triangles; the simplices in ``highlight`` are drawn emphasised in red.  A complex
    of dimension d >= 3 is drawn by its 2-skeleton and the title says so.

    Parameters:
        K: the complex.
        highlight: simplices to emphasise, each a tuple of vertex *labels* (a bare
            label stands for a vertex); a simplex not in K raises :class:`DrawingError`.
        title: the figure's title (default: the f-vector).
        size: width and height of the figure in inches.

    Returns:
        a ``matplotlib.figure.Figure`` (Agg canvas, not shown anywhere); every simplex
        artist carries a gid (see the module docstring and :func:`drawn`).

    >>> fig = draw_complex(Complex.from_facets([[0, 1, 2], [2, 3]]), highlight=[(2, 3)])
    >>> found = drawn(fig)
    >>> found["triangle"], sorted(found["edge"]), found["highlight"]
    (['0,1,2'], ['0,1', '0,2', '1,2', '2,3'], ['2,3'])

    Notes: the layout is deterministic (module docstring); cost is dominated by
    matplotlib, about 1 ms per drawn simplex.  At most ``MAX_DRAWN_SIMPLICES``
    simplices in the 2-skeleton.
    Reference: [T] for the planar layout, [KK] for the others.
    """
    fig = _figure(size, size)
    ax, note = _panel(fig, (0.02, 0.02, 0.96, 0.88), K, highlight)
    heading = title if title is not None else f"f-vector {list(K.f_vector)}"
    if note:
        heading = f"{heading}\n" + textwrap.fill(f"({note})", 72)
    fig.suptitle(heading, fontsize=11)
    return fig


# -------------------------------------------------------------- counterexample
def _parse_value(value):
    """A witness value as Python data (literal syntax only; never ``eval``)."""
    if not isinstance(value, str):
        return value
    if len(value) > 10_000:
        return value
    try:
        return ast.literal_eval(value.strip())
    except (ValueError, SyntaxError, TypeError, MemoryError, RecursionError):
        return value


def _candidates(key: str, value) -> list[tuple]:
    """Label tuples a witness entry names as simplices.  A simplex is written as a list
    of labels (the evaluator writes every simplex so, a vertex as ``[v]``); a matrix
    entry (key ``entry``) as a pair of such lists.  A bare number or text -- a degree
    k = 1, a count -- names no simplex, and neither does an entry given by row and
    column numbers."""
    def simplex(x) -> bool:
        return (isinstance(x, (list, tuple)) and len(x) > 0
                and not any(isinstance(y, (list, tuple, bool)) for y in x))
    if key == "entry":
        if isinstance(value, (list, tuple)) and len(value) == 2 and all(map(simplex, value)):
            return [tuple(x) for x in value]
        return []
    return [tuple(value)] if simplex(value) else []


def witness_simplices(K: Complex, witness: Mapping | None) -> list[tuple]:
    """The simplices of K (as label tuples) that a counterexample's witness names.

    A witness maps names to texts: ``{"entry": "[[0, 1], [2]]", "left": "1", "right":
    "0"}`` names the matrix entry at two simplices; ``{"x": "[1, 2, 3]"}`` names the
    simplex a quantifier stopped at.  Texts are read with ``ast.literal_eval``; the
    values of ``left``/``right``, bare numbers (a degree ``k = 1`` is not vertex 1) and
    anything that is not a simplex of K are ignored.

    >>> K = Complex.from_facets([[0, 1, 2]])
    >>> witness_simplices(K, {"entry": "[[0], [1, 2]]", "left": "1", "right": "2"})
    [(0,), (1, 2)]
    >>> witness_simplices(K, {"x": "[0, 7]"})
    []
    >>> witness_simplices(K, {"k": "1"}), witness_simplices(K, {"v": "[1]"})
    ([], [(1,)])
    """
    found = []
    for key, value in (witness or {}).items():
        if key in ("left", "right", "shapes"):
            continue
        for labels in _candidates(key, _parse_value(value)):
            try:
                K.simplex_of(labels)
            except (KeyError, TypeError):
                continue
            if labels not in found:
                found.append(labels)
    return found


def _short(text: str, limit: int = 90) -> str:
    text = " ".join(str(text).split())
    return text if len(text) <= limit else text[: limit - 3] + "..."


def counterexample_figure(facets, sides: list[str] | None = None, witness: Mapping | None = None,
                          title: str | None = None, size: float = 5.0,
                          expressions: tuple[str, str] | None = None) -> Figure:
    """The picture of a counterexample: its complex drawn with the witness highlighted.

    Parameters:
        facets: the counterexample's facet list (lists of vertex labels), or a mapping
            from the claim's variables to facet lists (one panel per variable).
        sides: the exact texts of the claim's two sides (written below when short).
        witness: the counterexample's witness mapping (see :func:`witness_simplices`);
            the simplices it names are highlighted.
        title: the figure's title (default: "counterexample" and the f-vector).
        expressions: the texts of the comparison's left and right sides; with two
            sides, each is written as ``left: EXPRESSION = VALUE`` (the exact value, or a
            note that it is too long to write here and stands beside the drawing).

    Returns:
        a ``Figure`` with gids as in :func:`draw_complex`.

    >>> fig = counterexample_figure([[0, 1, 2]], witness={"entry": "[[0], [0]]"})
    >>> found = drawn(fig)
    >>> found["triangle"], sorted(found["vertex"]), found["highlight"]
    (['0,1,2'], ['0', '1', '2'], ['0'])

    Notes: witness texts are parsed defensively (``ast.literal_eval``, never ``eval``);
    a malformed witness draws no highlight rather than failing.
    """
    if isinstance(facets, Mapping):
        panels = [(str(name), Complex.from_facets(f)) for name, f in facets.items()]
    else:
        panels = [("", Complex.from_facets(facets))]
    count = max(1, len(panels))
    fig = _figure(size * count, size + 0.6)
    captions = []
    if witness:
        shown = ", ".join(f"{k} = {v}" for k, v in witness.items())
        captions.append(_short(f"witness: {shown}"))
    if sides and len(sides) == 2 and expressions:
        for side, expression, value in zip(("left", "right"), expressions, sides):
            value = " ".join(str(value).split())
            shown = value if len(value) <= 48 else "too long to write here; exact value beside"
            captions.append(f"{side}: {_short(expression, 110 - len(shown))} = {shown}")
    elif sides and len(sides) == 2 and len(sides[0]) + len(sides[1]) <= 100:
        captions.append(_short(f"{sides[0]}  vs  {sides[1]}", 110))
    bottom = 0.04 + 0.05 * len(captions)
    notes = []
    for i, (name, K) in enumerate(panels):
        ax, note = _panel(fig, (i / count + 0.01, bottom, 1 / count - 0.02, 0.86 - bottom), K,
                          witness_simplices(K, witness))
        if name:
            ax.set_title(f"{name}: f-vector {list(K.f_vector)}", fontsize=10)
        if note:
            notes.append(note)
    if title is None:
        title = ("counterexample" if len(panels) != 1 or panels[0][0]
                 else f"counterexample: f-vector {list(panels[0][1].f_vector)}")
    if notes:
        title = f"{title}\n" + textwrap.fill(f"({notes[0]})", 64)
    fig.suptitle(title, fontsize=11 if not notes else 9.5)
    for j, caption in enumerate(captions):
        fig.text(0.5, 0.02 + 0.05 * (len(captions) - 1 - j), caption, ha="center",
                 fontsize=9, family="monospace")
    return fig


# ------------------------------------------------------------------- spectra
def spectrum_of(K: Complex, squared: bool = False) -> tuple[np.ndarray, tuple[int, int, int]]:
    """Floating-point eigenvalues of the connection matrix L of K (or of L^2), with the
    exact numbers of positive, negative and zero eigenvalues.

    L[x, y] = 1 when the simplices x and y intersect; it is symmetric, so its spectrum
    is real.  The eigenvalues of L^2 are the squares of those of L.

    Parameters:
        K: the complex (at most ``MAX_SPECTRUM_ORDER`` simplices).
        squared: the spectrum of L^2 instead of L.

    Returns:
        (eigenvalues ascending as a numpy float array, (positive, negative, zero)); the
        counts are exact: the signature of L from exact elimination, and for L^2
        (positive + negative of L, 0, zero of L).

    >>> values, counts = spectrum_of(Complex.from_facets([[0, 1]]))
    >>> counts                      # two vertices (even), one edge (odd) [K]
    (2, 1, 0)
    >>> [round(float(x), 6) for x in values]   # L = [[1,0,1],[0,1,1],[1,1,1]]
    [-0.414214, 1.0, 2.414214]

    Notes: ``numpy.linalg.eigvalsh`` on the dense matrix, O(n^3); only the counts are
    exact, the eigenvalues themselves are pictures.  Reference: [K].
    """
    from . import invariants

    order = len(K.simplices)
    if order > MAX_SPECTRUM_ORDER:
        raise DrawingError(f"spectrum: the connection matrix has order {order}; dense "
                           f"floating-point eigenvalues are computed up to order "
                           f"{MAX_SPECTRUM_ORDER}")
    L = invariants.connection(K)
    positive, negative, zero = invariants.signature(L)
    dense = np.asarray(L.to_scipy().toarray(), dtype=float) if order else np.zeros((0, 0))
    values = np.linalg.eigvalsh(dense) if order else np.zeros(0)
    if squared:
        return np.sort(values ** 2), (positive + negative, 0, zero)
    return values, (positive, negative, zero)


def draw_spectrum(eigenvalues, exact_counts: tuple[int, int, int], squared: bool = False,
                  title: str | None = None, tolerance: float = 1e-9,
                  pair_tolerance: float = 1e-6) -> Figure:
    """A picture of a real spectrum: eigenvalues on a line coloured by sign, with the
    exact counts beside them; for L^2 the reciprocal pairing lambda <-> 1/lambda.

    The picture is labelled "floating-point eigenvalues; counts exact": the positions
    come from floating point, the numbers written on it from exact arithmetic.

    Parameters:
        eigenvalues: real eigenvalues (floats, any order).
        exact_counts: (positive, negative, zero), computed exactly by the caller.
        squared: True for a spectrum of L^2: drawn on a log scale, where lambda and
            1/lambda sit symmetric about 1, and the k-th smallest eigenvalue is joined
            by an arc to the k-th largest (green where their product is 1 within
            ``pair_tolerance``, orange where it is not).  The spectrum is closed under
            lambda -> 1/lambda exactly when every arc is green (up to rounding).
        title: the figure's title.
        tolerance: relative size below which an eigenvalue is drawn as zero.

    Returns:
        a ``Figure``; the text with gid ``counts`` holds the exact counts, the point
        sets have gids ``eigenvalues:positive`` / ``:negative`` / ``:zero`` and the arcs
        ``pair:reciprocal:<k>`` or ``pair:unmatched:<k>``.

    >>> fig = draw_spectrum([-0.414, 1.0, 2.414], (2, 1, 0))
    >>> [t.get_text() for t in fig.findobj(lambda a: a.get_gid() == "counts")]
    ['exact counts: 2 positive, 1 negative, 0 zero']

    Notes: an eigenvalue within ``tolerance`` of 0 is drawn grey as zero; when the
    floating-point signs disagree with the exact counts the picture says so.
    References: [K] (signature of L), [H] (reciprocity for 1-dimensional complexes).
    """
    values = np.sort(np.asarray(list(eigenvalues), dtype=float).ravel())
    if values.size and not np.all(np.isfinite(values)):
        raise DrawingError("spectrum: the eigenvalues must be finite real numbers")
    positive, negative, zero = (int(c) for c in exact_counts)
    scale = max(1.0, float(np.abs(values).max())) if values.size else 1.0
    is_zero = np.abs(values) <= tolerance * scale
    signs = {"positive": (values > 0) & ~is_zero, "negative": (values < 0) & ~is_zero,
             "zero": is_zero}
    height = 3.8 if squared else 3.0
    fig = _figure(8.0, height)
    top = 1.0 - 0.95 / height                       # below the three lines of text
    ax = fig.add_axes((0.05, 0.55 / height if squared else 0.6 / height, 0.9,
                       top - (0.55 if squared else 0.6) / height))
    colours = {"positive": _POSITIVE, "negative": _NEGATIVE, "zero": _ZERO}
    step = 0.11
    if squared:
        if np.any(values <= 0):
            raise DrawingError("spectrum: squared=True needs positive eigenvalues "
                               "(the spectrum of L^2 for an invertible L)")
        x = np.log10(values) if values.size else values
        span = max(float(np.abs(x).max()) if x.size else 1.0, 0.5)
        k = len(x)
        for i in range(k // 2):
            lo, hi = x[i], x[k - 1 - i]
            paired = abs(values[i] * values[k - 1 - i] - 1.0) <= pair_tolerance
            arc = Arc(((lo + hi) / 2, 0.0), hi - lo, 1.6 * (hi - lo) / (2 * span) + 0.15,
                      theta1=0, theta2=180, color="#2ca02c" if paired else "#ff7f0e",
                      linewidth=0.9, zorder=2)
            arc.set_gid(f"pair:{'reciprocal' if paired else 'unmatched'}:{i}")
            ax.add_patch(arc)
        ax.set_xlim(-1.08 * span, 1.08 * span)
        ticks = list(range(-int(math.ceil(span)), int(math.ceil(span)) + 1))
        ax.set_xticks(ticks, [f"$10^{{{t}}}$" for t in ticks])
        ax.set_xlabel("eigenvalues of $L^2$, log scale: $\\lambda$ and $1/\\lambda$ mirror "
                      "about 1; arcs join the k-th smallest to the k-th largest "
                      "(green: product 1)", fontsize=8)
        direction = -1.0                             # repeated eigenvalues stack downwards
    else:
        x = values
        reach = float(np.abs(x).max()) if x.size else 1.0
        if reach > 10:                               # keep the small eigenvalues apart
            ax.set_xscale("symlog", linthresh=1.0)
            ax.set_xlim(-1.3 * reach, 1.3 * reach)
            ax.set_xlabel("eigenvalues (linear in [-1, 1], logarithmic beyond)", fontsize=8)
        else:
            ax.set_xlim(-1.1 * reach - 0.1, 1.1 * reach + 0.1)
            ax.set_xlabel("eigenvalues", fontsize=8)
        direction = 1.0
    ax.axvline(0.0, color=_ZERO, linewidth=0.8, linestyle=":")
    # a repeated eigenvalue (equal up to rounding) is drawn as a column of points
    level = np.zeros(len(values))
    for i in range(1, len(values)):
        if abs(values[i] - values[i - 1]) <= 1e-7 * max(1.0, abs(values[i])):
            level[i] = level[i - 1] + 1
    tallest = float(level.max()) if len(level) else 0.0
    if squared:
        ax.set_ylim(-step * tallest - 0.12, 1.0)
    else:
        ax.set_ylim(-0.15, max(0.5, step * tallest + 0.15))
    ax.axhline(0.0, color=_EDGE, linewidth=0.6, zorder=0)
    for name, mask in signs.items():
        points = ax.scatter(x[mask], direction * step * level[mask], s=22, marker="o",
                            color=colours[name], zorder=3,
                            label=name if mask.any() else "_nolegend_")
        points.set_gid(f"eigenvalues:{name}")
    if values.size:
        ax.legend(loc="upper right" if not squared else "lower right", fontsize=7,
                  frameon=False, handletextpad=0.2, ncol=3)
    ax.set_yticks([])
    for side in ("left", "right", "top"):
        ax.spines[side].set_visible(False)
    line = 0.28 / height                             # one line of text, in figure units
    if title:
        heading = fig.text(0.05, 1 - line * 1.1, title, fontsize=11)
        heading.set_gid("title")
    counts = fig.text(0.05, 1 - line * 2.1, f"exact counts: {positive} positive, "
                      f"{negative} negative, {zero} zero", fontsize=10, weight="bold")
    counts.set_gid("counts")
    floating = tuple(int(signs[s].sum()) for s in ("positive", "negative", "zero"))
    remark = "floating-point eigenvalues; counts exact"
    if floating != (positive, negative, zero):
        remark += f" (floating-point signs give {floating[0]}, {floating[1]}, {floating[2]})"
    source = fig.text(0.05, 1 - line * 2.9, remark, fontsize=8, style="italic",
                      color="#555555")
    source.set_gid("floating-point")
    return fig


# -------------------------------------------------------------------- output
def figure_png(fig: Figure, dpi: int = 100) -> bytes:
    """The figure as PNG bytes.

    >>> figure_png(draw_complex(Complex.from_facets([[0, 1]])))[:8]
    b'\\x89PNG\\r\\n\\x1a\\n'
    """
    buffer = io.BytesIO()
    fig.savefig(buffer, format="png", dpi=dpi, facecolor="white",
                metadata={"Software": None})
    return buffer.getvalue()


def figure_svg(fig: Figure) -> str:
    """The figure as an SVG document (text); the artists' gids become element ids.

    The output is reproducible: no date, fixed id salt.

    >>> 'id="triangle:0,1,2"' in figure_svg(draw_complex(Complex.from_facets([[0, 1, 2]])))
    True
    """
    import matplotlib

    buffer = io.StringIO()
    with matplotlib.rc_context({"svg.hashsalt": "simplicial-verifier", "svg.fonttype": "path"}):
        fig.savefig(buffer, format="svg", facecolor="white", metadata={"Date": None})
    return buffer.getvalue()


def data_uri(png_bytes: bytes, mime: str = "image/png") -> str:
    """A ``data:`` URI holding an image, for self-contained HTML.

    >>> data_uri(b"abc")
    'data:image/png;base64,YWJj'
    """
    return f"data:{mime};base64," + base64.b64encode(png_bytes).decode("ascii")


def drawn(fig: Figure) -> dict[str, list[str]]:
    """The simplices a figure shows, read from its artists' gids.

    Returns a mapping from kind (``vertex``, ``edge``, ``triangle``, ``highlight``, ...)
    to the names after the colon, in drawing order.

    >>> drawn(draw_complex(Complex.from_facets([[1, 2]])))["edge"]
    ['1,2']
    """
    found: dict[str, list[str]] = {"vertex": [], "edge": [], "triangle": [], "highlight": []}
    for artist in fig.findobj(lambda a: isinstance(a.get_gid(), str) and ":" in a.get_gid()):
        kind, _, name = artist.get_gid().partition(":")
        found.setdefault(kind, []).append(name)
    return found


# ---------------------------------------------------------------------- HTML
def complex_html(K: Complex, betti_limit: int = HTML_BETTI_LIMIT,
                 draw_limit: int = HTML_DRAW_LIMIT) -> str:
    """A small self-contained HTML block for K: an inline drawing and key invariants.

    Shows the f-vector, the Euler characteristic and (up to ``betti_limit`` simplices)
    the Betti numbers over Q; used by ``Complex._repr_html_`` for notebooks.

    >>> page = complex_html(Complex.from_facets([[0, 1, 2]]))
    >>> "data:image/png;base64," in page and "[3, 3, 1]" in page
    True

    Notes: the drawing is skipped (and the block says why) when the 2-skeleton has more
    than ``draw_limit`` simplices, so that a notebook cell stays quick; Betti numbers by
    exact rank (verifier.invariants.betti).
    """
    from . import invariants

    rows = [("vertices", str(K.n_vertices)), ("dimension", str(K.dim)),
            ("f-vector", str(list(K.f_vector))),
            ("Euler characteristic", str(invariants.euler(K)))]
    if len(K.simplices) <= betti_limit:
        rows.append(("Betti numbers over Q", str(list(invariants.betti(K)))))
    else:
        rows.append(("Betti numbers over Q",
                     f"not computed here ({len(K.simplices)} simplices > {betti_limit})"))
    drawn_count = sum(K.f_vector[:3])
    if drawn_count > draw_limit:
        picture = (f"<p><em>not drawn here: the 2-skeleton has {drawn_count} simplices "
                   f"(more than {draw_limit}); verifier.drawing.draw_complex draws it"
                   "</em></p>")
    else:
        fig = draw_complex(K, size=3.2, title="")
        picture = (f'<img src="{data_uri(figure_png(fig, dpi=80))}" '
                   f'alt="drawing of the complex" style="width:256px;height:256px"/>')
    table = "".join(f"<tr><th style='text-align:left'>{html.escape(k)}</th>"
                    f"<td>{html.escape(v)}</td></tr>" for k, v in rows)
    return (f'<div class="verifier-complex" style="display:flex;gap:1em;align-items:center">'
            f"{picture}<table>{table}</table></div>")
