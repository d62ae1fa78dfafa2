"""Figures: spanning-tree growth, random critical groups, cospectral separation, graph drawings.

Every function returns a ``matplotlib.figure.Figure`` drawn with the non-interactive Agg
canvas (no pyplot state, no display needed); :func:`save_figure` writes it as PNG and SVG and
:func:`figure_png` / :func:`figure_svg` give the bytes or text for embedding in a report.
Measured values are drawn as points or bars and published limits as lines, each labelled with
its source.

References
----------
Temperley 1974 (grid growth); Wood, J. Amer. Math. Soc. 30 (2017) (random critical groups);
Haemers & Spence, European J. Combin. 25 (2004) (cospectral graphs).
"""

from __future__ import annotations

import io
import math
from collections.abc import Collection, Hashable, Iterable, Mapping, Sequence
from pathlib import Path
from typing import TYPE_CHECKING, Any

import networkx as nx

from graphinv._graphs import require_nonempty, weighted_edges

if TYPE_CHECKING:
    from matplotlib.figure import Figure

    from graphinv.report.growth import GrowthFit
    from graphinv.report.random_groups import RandomGroupSample

__all__ = [
    "COLOURINGS",
    "FIGURE_FORMATS",
    "figure_png",
    "figure_svg",
    "graph_figure",
    "graphs_figure",
    "growth_figure",
    "random_groups_figure",
    "rank_distribution_figure",
    "ranking_figure",
    "save_figure",
    "separation_figure",
    "write_drawing",
]

FIGURE_FORMATS = ("png", "svg")
_DPI = 100
_MEASURED = "#1f5fa8"
_LIMIT = "#c0392b"
_MUTED = "#8c8c8c"


def _new_figure(width: float, height: float) -> Figure:
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    figure = Figure(figsize=(width, height), dpi=_DPI, layout="constrained")
    FigureCanvasAgg(figure)
    return figure


def figure_png(figure: Figure, *, palette: bool = True) -> bytes:
    """The figure as PNG bytes.

    With ``palette`` (the default) the image is reduced to an adaptive 256-colour palette
    without dithering, which keeps line art and text unchanged to the eye at a third of the size.

    Examples
    --------
    >>> figure_png(graph_figure(nx.cycle_graph(4)))[:8]
    b'\\x89PNG\\r\\n\\x1a\\n'
    """
    buffer = io.BytesIO()
    figure.savefig(buffer, format="png", dpi=_DPI)
    if not palette:
        return buffer.getvalue()
    from PIL import Image

    buffer.seek(0)
    with Image.open(buffer) as image:
        reduced = image.convert("RGB").quantize(
            colors=256, method=Image.Quantize.MEDIANCUT, dither=Image.Dither.NONE
        )
    compact = io.BytesIO()
    reduced.save(compact, format="PNG", optimize=True)
    return compact.getvalue()


def figure_svg(figure: Figure) -> str:
    """The figure as SVG text (fonts as paths, so it renders the same everywhere).

    Examples
    --------
    >>> "<svg" in figure_svg(graph_figure(nx.cycle_graph(4)))
    True
    """
    import matplotlib

    buffer = io.StringIO()
    with matplotlib.rc_context({"svg.fonttype": "path", "svg.hashsalt": "graphinv"}):
        figure.savefig(buffer, format="svg")
    return buffer.getvalue()


def save_figure(
    figure: Figure, path: str | Path, *, formats: Sequence[str] = FIGURE_FORMATS
) -> list[Path]:
    """Write ``figure`` to ``path`` with each suffix in ``formats``; return the files written.

    ``path`` is a stem: ``figures/growth`` gives ``figures/growth.png`` and
    ``figures/growth.svg``.  Parent folders are created.

    Examples
    --------
    >>> import tempfile
    >>> with tempfile.TemporaryDirectory() as folder:
    ...     [p.name for p in save_figure(graph_figure(nx.path_graph(3)), Path(folder) / "p")]
    ['p.png', 'p.svg']
    """
    stem = Path(path)
    if stem.suffix.lower().lstrip(".") in FIGURE_FORMATS:
        stem = stem.with_suffix("")
    stem.parent.mkdir(parents=True, exist_ok=True)
    written = []
    for suffix in formats:
        if suffix not in FIGURE_FORMATS:
            raise ValueError(f"Argument 'formats' must hold 'png' or 'svg', not {suffix!r}.")
        target = stem.with_name(f"{stem.name}.{suffix}")
        if suffix == "png":
            target.write_bytes(figure_png(figure))
        else:
            target.write_text(figure_svg(figure), encoding="utf-8")
        written.append(target)
    return written


def growth_figure(fit: GrowthFit) -> Figure:
    """Spanning-tree growth across a family, with the fitted per-vertex constant and its limit.

    Left: ``log10 τ`` against the number of vertices (a log scale for τ), measured points and
    the fitted curve.  Right: ``τ^(1/N)`` for each graph, approaching the fitted constant
    ``exp(a)`` and, where one is known, the published limit.

    Examples
    --------
    >>> from graphinv.report.growth import fit_growth
    >>> fit = fit_growth([4, 9, 16], [math.log(4), math.log(192), math.log(100352)])
    >>> len(growth_figure(fit).axes)
    2

    References
    ----------
    Temperley 1974; Kasteleyn, Physica 27 (1961).
    """
    import numpy as np

    figure = _new_figure(9.0, 3.6)
    left, right = figure.subplots(1, 2)
    sizes = np.array(fit.vertex_counts, dtype=float)
    logs = np.array(fit.log_counts)
    exact = np.array(fit.exact, dtype=bool)
    ln10 = math.log(10)
    for mask, label, marker in ((exact, "exact count", "o"), (~exact, "sparse log-determinant", "s")):
        if mask.any():
            left.plot(sizes[mask], logs[mask] / ln10, marker, color=_MEASURED, ms=4, label=label)
    grid = np.linspace(sizes.min(), sizes.max(), 200)
    left.plot(
        grid,
        [fit.predicted_log_count(x) / ln10 for x in grid],
        "-",
        color=_MUTED,
        lw=1,
        label="least-squares fit",
    )
    left.set_xlabel("vertices N")
    left.set_ylabel("log₁₀ (spanning trees)")
    left.set_title(f"Spanning trees of the {fit.family}", fontsize=10)
    left.legend(fontsize=8, frameon=False)

    right.plot(sizes, np.exp(logs / sizes), "o", color=_MEASURED, ms=4, label="τ^(1/N) measured")
    right.axhline(
        fit.per_vertex, color=_MUTED, lw=1, ls="--", label=f"fitted exp(a) = {fit.per_vertex:.5f}"
    )
    if fit.limit is not None:
        right.axhline(
            fit.limit,
            color=_LIMIT,
            lw=1.2,
            label=f"limit {fit.limit:.5f}" + (f"\n{fit.limit_source}" if fit.limit_source else ""),
        )
    right.set_xscale("log")
    right.set_xlabel("vertices N (log scale)")
    right.set_ylabel("per-vertex growth τ^(1/N)")
    right.set_title("Per-vertex growth constant", fontsize=10)
    right.legend(fontsize=7, frameon=False, loc="lower right")
    return figure


def random_groups_figure(sample: RandomGroupSample) -> Figure:
    """Ranks of sampled critical groups and the fraction cyclic, against Wood's limiting law.

    Left: the fraction of sampled groups of each rank (bars) beside the limiting law (red).
    Right: the fractions of cyclic groups and of groups with trivial Sylow 2-, 3-, 5-parts,
    with 95% binomial intervals, beside their limits.

    Examples
    --------
    >>> from graphinv.report.random_groups import RandomGroupSample
    >>> sample = RandomGroupSample(30, "1/2", 1, 100, ((1, 79), (2, 20), (3, 1)),
    ...                            ((2, 42), (3, 64), (5, 80)), 0)
    >>> len(random_groups_figure(sample).axes)
    2

    References
    ----------
    Wood, J. Amer. Math. Soc. 30 (2017); Clancy, Kaplan, Leake, Payne, Wood,
    J. Algebraic Combin. 42 (2015).
    """
    import numpy as np

    from graphinv.report.limits import (
        cyclic_probability_limit,
        rank_distribution_limit,
        sylow_trivial_probability_limit,
    )

    figure = _new_figure(9.0, 3.6)
    left, right = figure.subplots(1, 2, gridspec_kw={"width_ratios": [1.1, 1]})
    top = max(max(rank for rank, _ in sample.rank_counts), 3)
    law = rank_distribution_limit(top)
    ranks = np.arange(0, top + 1)
    measured = [sample.rank_fraction(int(r)) for r in ranks]
    left.bar(ranks - 0.2, measured, width=0.4, color=_MEASURED, label=f"{sample.samples} samples")
    left.bar(ranks + 0.2, [law[int(r)] for r in ranks], width=0.4, color=_LIMIT, label="limit (Wood 2017)")
    left.set_xticks(ranks)
    left.set_xlabel("rank of the critical group (number of invariant factors)")
    left.set_ylabel("fraction of graphs")
    left.set_title(f"G({sample.n}, {sample.q}): {sample.spec}", fontsize=9)
    left.legend(fontsize=8, frameon=False)

    names = ["cyclic"] + [f"no {p}-torsion" for p, _ in sample.sylow_trivial]
    fractions = [sample.cyclic_fraction] + [c / sample.samples for _, c in sample.sylow_trivial]
    limits = [cyclic_probability_limit()] + [
        sylow_trivial_probability_limit(p) for p, _ in sample.sylow_trivial
    ]
    errors = [1.96 * math.sqrt(f * (1 - f) / sample.samples) for f in fractions]
    positions = np.arange(len(names))
    right.errorbar(
        positions, fractions, yerr=errors, fmt="o", color=_MEASURED, capsize=3, label="measured (95%)"
    )
    right.scatter(positions, limits, marker="_", s=600, color=_LIMIT, label="limit", zorder=3)
    for x, value in zip(positions, limits, strict=True):
        right.annotate(f"{value:.4f}", (x, value), textcoords="offset points", xytext=(14, -3), fontsize=7, color=_LIMIT)
    right.set_xticks(positions, names, fontsize=8)
    right.set_xlim(-0.5, len(names) - 0.3)
    right.set_ylim(0, 1)
    right.set_ylabel("fraction of graphs")
    right.set_title("cyclic: ∏ ζ(2k+1)⁻¹;  no p-torsion: ∏ (1 − p^(−2k−1))", fontsize=9)
    right.legend(fontsize=8, frameon=False, loc="lower right")
    return figure


def rank_distribution_figure(
    rank_counts: Mapping[int, int],
    *,
    title: str = "Ranks of the critical groups",
    limit: Mapping[int, float] | None = None,
) -> Figure:
    """The number of graphs whose critical group has each rank, with fractions on the bars.

    Parameters
    ----------
    rank_counts : mapping
        ``{rank: number of graphs}``.
    title : str
    limit : mapping, optional
        ``{rank: limiting probability}`` drawn as red marks (e.g. from
        :func:`graphinv.report.limits.rank_distribution_limit`).

    Examples
    --------
    >>> len(rank_distribution_figure({1: 30, 2: 8, 3: 1}).axes)
    1

    References
    ----------
    Wood, J. Amer. Math. Soc. 30 (2017).
    """
    figure = _new_figure(6.5, 3.4)
    axes = figure.subplots()
    total = sum(rank_counts.values()) or 1
    ranks = sorted(rank_counts)
    bars = axes.bar(ranks, [rank_counts[r] / total for r in ranks], color=_MEASURED, width=0.6, label="measured")
    axes.bar_label(bars, [str(rank_counts[r]) for r in ranks], fontsize=8, padding=1)
    if limit is not None:
        axes.scatter(list(limit), list(limit.values()), marker="_", s=500, color=_LIMIT, label="limit", zorder=3)
        axes.legend(fontsize=8, frameon=False)
    axes.set_xticks(sorted(set(ranks) | set(limit or ())))
    axes.set_xlabel("rank (number of invariant factors)")
    axes.set_ylabel(f"fraction of {sum(rank_counts.values())} graphs")
    axes.set_title(title, fontsize=10)
    axes.margins(y=0.15)
    return figure


def ranking_figure(
    counts: Mapping[str, int], *, title: str = "Spanning trees", xlabel: str = "spanning trees"
) -> Figure:
    """Horizontal bars of exact counts on a log scale, largest at the top.

    The bar length is ``log10`` of the count (computed exactly from the integer, so counts far
    beyond float range still draw); each bar is labelled with the count.

    Examples
    --------
    >>> len(ranking_figure({"ring": 14, "ladder": 2911}).axes)
    1
    """
    from graphinv.report.summary import scientific

    # Reversed first, so that among equal counts the one given first ends up on top.
    ordered = sorted(reversed(list(counts.items())), key=lambda item: item[1])
    figure = _new_figure(7.5, 0.42 * len(ordered) + 1.2)
    axes = figure.subplots()
    lengths = [math.log10(c) if c > 0 else 0.0 for _, c in ordered]
    bars = axes.barh([name for name, _ in ordered], lengths, color=_MEASURED, height=0.6)
    axes.bar_label(
        bars,
        [str(c) if c < 10**12 else scientific(c, 3) for _, c in ordered],
        fontsize=8,
        padding=3,
    )
    axes.set_xlabel(f"log₁₀ ({xlabel})")
    axes.set_title(title, fontsize=10)
    axes.margins(x=0.18)
    return figure


def separation_figure(
    tallies: Mapping[str, Mapping[str, int]], *, title: str = "Cospectral graphs"
) -> Figure:
    """How many graphs have a cospectral mate, and how many of them each invariant separates.

    Parameters
    ----------
    tallies : mapping
        ``{matrix: {"with a mate": k, "<invariant>": separated, ...}}``, e.g. from
        :func:`graphinv.report.cospectral_tallies`; the ``"with a mate"`` entry is the total
        and every other entry is drawn beside it.
    title : str

    Examples
    --------
    >>> tallies = {"laplacian": {"with a mate": 4, "critical group": 2, "degree sequence": 4}}
    >>> len(separation_figure(tallies).axes)
    1

    References
    ----------
    Haemers & Spence, "Enumeration of cospectral graphs", European J. Combin. 25 (2004).
    """
    import numpy as np

    figure = _new_figure(8.0, 3.6)
    axes = figure.subplots()
    matrices = list(tallies)
    invariants: list[str] = []
    for counts in tallies.values():
        for key in counts:
            if key != "with a mate" and key not in invariants:
                invariants.append(key)
    series = ["with a mate", *invariants]
    width = 0.8 / max(len(series), 1)
    colours = [_MUTED, _MEASURED, _LIMIT, "#2e8b57", "#d4a017", "#7b4fa0", "#444444"]
    positions = np.arange(len(matrices))
    for i, name in enumerate(series):
        values = [tallies[m].get(name, 0) for m in matrices]
        bars = axes.bar(
            positions + (i - (len(series) - 1) / 2) * width,
            values,
            width=width,
            color=colours[i % len(colours)],
            label=name if i == 0 else f"separated by {name}",
        )
        axes.bar_label(bars, fontsize=7, padding=1)
    axes.set_xticks(positions, [f"{m}-cospectral" for m in matrices])
    axes.set_ylabel("graphs")
    axes.set_title(title, fontsize=10)
    axes.legend(fontsize=8, frameon=False, loc="upper center", ncols=3)
    axes.margins(y=0.35)
    return figure


def _layout(G: nx.Graph) -> dict[Hashable, tuple[float, float]]:
    positions = nx.get_node_attributes(G, "pos")
    if len(positions) == G.number_of_nodes():
        return {v: (float(p[0]), float(p[1])) for v, p in positions.items()}
    simple = nx.Graph(G)
    if G.number_of_nodes() <= 300:
        try:
            return dict(nx.kamada_kawai_layout(simple))
        except Exception:  # scipy's optimizer may fail on odd graphs; a spring layout always works
            pass
    return dict(nx.spring_layout(simple, seed=1))


def _draw(
    figure: Figure,
    axes: Any,
    G: nx.Graph,
    where: Mapping[Hashable, tuple[float, float]],
    values: Mapping[Hashable, float] | None,
    *,
    title: str | None,
    value_label: str,
    labels: bool | None,
    colour_bar: bool,
    scale: tuple[float, float] | None = None,
    highlight: Collection[frozenset[Hashable]] = frozenset(),
) -> None:
    from matplotlib import colormaps
    from matplotlib.collections import LineCollection

    segments = []
    widths = []
    colours = []
    for u, v, m in weighted_edges(G):
        segments.append([where[u], where[v]])
        marked = frozenset((u, v)) in highlight
        widths.append(0.8 + 1.2 * (m - 1) + (1.4 if marked else 0.0))
        colours.append(_LIMIT if marked else "#777777")
    axes.add_collection(LineCollection(segments, linewidths=widths, colors=colours, zorder=1))
    n = G.number_of_nodes()
    size = max(12.0, min(260.0, 9000.0 / n))
    coloured = [v for v in G if values is not None and v in values]
    hollow = [v for v in G if v not in coloured]
    if coloured and values is not None:
        data = [float(values[v]) for v in coloured]
        norm, ticks = _colour_norm(data, scale)
        points = axes.scatter(
            [where[v][0] for v in coloured],
            [where[v][1] for v in coloured],
            c=data,
            cmap=colormaps["viridis"],
            norm=norm,
            s=size,
            edgecolors="#333333",
            linewidths=0.5,
            zorder=2,
        )
        if colour_bar:
            bar = figure.colorbar(points, ax=axes, shrink=0.8)
            bar.set_label(value_label)
            if ticks is not None:
                bar.set_ticks(ticks)
    if hollow:
        axes.scatter(
            [where[v][0] for v in hollow],
            [where[v][1] for v in hollow],
            s=size,
            facecolors="white" if values is not None else "#9cc3e6",
            edgecolors="#333333",
            linewidths=0.8,
            zorder=2,
        )
    if labels if labels is not None else n <= 40:
        for v in G:
            x, y = where[v]
            axes.annotate(
                str(v), (x, y), textcoords="offset points", xytext=(0, 7), ha="center", fontsize=7
            )
    axes.set_aspect("equal", adjustable="datalim")
    axes.margins(0.08)
    axes.set_axis_off()
    if title:
        axes.set_title(title, fontsize=9)


def _colour_norm(
    data: Sequence[float], scale: tuple[float, float] | None
) -> tuple[Any, list[int] | None]:
    """A discrete norm (and its ticks) for few integer levels, else a continuous one."""
    from matplotlib.colors import BoundaryNorm, Normalize

    low, high = scale if scale is not None else (min(data), max(data))
    if all(float(x).is_integer() for x in data) and high - low <= 20:
        levels = list(range(int(low), int(high) + 1))
        return BoundaryNorm([x - 0.5 for x in [*levels, levels[-1] + 1]], 256), levels
    return Normalize(low, high if high > low else low + 1), None


def graph_figure(
    G: nx.Graph,
    *,
    values: Mapping[Hashable, float] | None = None,
    title: str | None = None,
    value_label: str = "value",
    labels: bool | None = None,
    positions: Mapping[Hashable, Sequence[float]] | None = None,
) -> Figure:
    """Draw ``G`` with vertices coloured by ``values`` (a configuration, a generator, ...).

    Edges are drawn thicker for higher multiplicity; vertices missing from ``values`` (such as
    a sink) are drawn hollow.  The layout is the ``pos`` vertex attribute when present, else
    Kamada–Kawai (spring layout above 300 vertices, seeded).

    Parameters
    ----------
    G : networkx graph
    values : mapping, optional
        A number per vertex; integer values spanning at most 21 levels get a discrete scale.
    title : str, optional
    value_label : str
        The colour-bar label.
    labels : bool, optional
        Write vertex names (default: when there are at most 40 vertices).
    positions : mapping, optional
        Vertex coordinates.

    Examples
    --------
    >>> len(graph_figure(nx.cycle_graph(5), values={v: v % 3 for v in range(5)}).axes)
    2

    References
    ----------
    T. Kamada, S. Kawai, "An algorithm for drawing general undirected graphs",
    Inform. Process. Lett. 31 (1989).
    """
    require_nonempty(G)
    figure = _new_figure(6.0, 5.0)
    axes = figure.subplots()
    where = _positions(G, positions)
    _draw(
        figure,
        axes,
        G,
        where,
        values,
        title=title,
        value_label=value_label,
        labels=labels,
        colour_bar=True,
    )
    return figure


def _positions(
    G: nx.Graph, positions: Mapping[Hashable, Sequence[float]] | None
) -> dict[Hashable, tuple[float, float]]:
    if positions is None:
        return _layout(G)
    where = {v: (float(p[0]), float(p[1])) for v, p in positions.items() if v in G}
    missing = [v for v in G if v not in where]
    if missing:
        where.update(_layout(G.subgraph(missing)))
    return where


def graphs_figure(
    panels: Sequence[tuple[str, nx.Graph, Mapping[Hashable, float] | None]],
    *,
    positions: Mapping[Hashable, Sequence[float]] | None = None,
    value_label: str = "value",
    columns: int = 3,
    highlights: Sequence[Iterable[tuple[Hashable, Hashable]]] | None = None,
) -> Figure:
    """Several graphs side by side, sharing one layout and one colour scale.

    Parameters
    ----------
    panels : sequence of (title, graph, values or None)
    positions : mapping, optional
        Vertex coordinates shared by every panel (default: the layout of the first graph, so
        graphs on the same vertex set are drawn comparably).
    value_label : str
        The colour-bar label (one bar for all panels).
    columns : int
        Panels per row.
    highlights : sequence of edge lists, optional
        Per panel, edges to draw thick and red (e.g. the links two designs do not share).

    Examples
    --------
    >>> panels = [("C5", nx.cycle_graph(5), None), ("P5", nx.path_graph(5), None)]
    >>> len(graphs_figure(panels).axes)
    2
    """
    if not panels:
        raise ValueError("Argument 'panels' must hold at least one graph.")
    count = len(panels)
    columns = max(1, min(columns, count))
    rows = math.ceil(count / columns)
    figure = _new_figure(3.4 * columns + 0.8, 3.2 * rows)
    grid = figure.subplots(rows, columns, squeeze=False)
    shared = positions if positions is not None else _layout(panels[0][1])
    numbers = [float(x) for _, _, values in panels if values for x in values.values()]
    scale = (min(numbers), max(numbers)) if numbers else None
    for k, (title, G, values) in enumerate(panels):
        axes = grid[k // columns][k % columns]
        _draw(
            figure,
            axes,
            G,
            _positions(G, shared),
            values,
            title=title,
            value_label=value_label,
            labels=None,
            colour_bar=False,
            scale=scale,
            highlight={frozenset(e) for e in highlights[k]} if highlights else frozenset(),
        )
    for k in range(count, rows * columns):
        grid[k // columns][k % columns].set_axis_off()
    if scale is not None:
        from matplotlib import colormaps
        from matplotlib.cm import ScalarMappable

        norm, ticks = _colour_norm(numbers, scale)
        bar = figure.colorbar(
            ScalarMappable(norm, colormaps["viridis"]), ax=grid.ravel().tolist(), shrink=0.7
        )
        bar.set_label(value_label)
        if ticks is not None:
            bar.set_ticks(ticks)
    return figure


#: What :func:`write_drawing` can colour vertices by.
COLOURINGS = ("degree", "identity", "generator", "none")


def write_drawing(
    source: str,
    *,
    output: str | Path,
    colour: str = "degree",
    sink: Hashable | None = None,
    generator: int = 1,
    format: str | None = None,
) -> Path:
    """Draw the one graph of ``source`` into ``output`` (PNG or SVG, from its suffix).

    Parameters
    ----------
    source : str
        A graph file, ``"-"`` or a family spec holding exactly one graph.
    output : path
        The image to write; the suffix ``.png`` or ``.svg`` chooses the format.
    colour : {"degree", "identity", "generator", "none"}
        Colour vertices by degree, by the identity recurrent configuration, or by the chips of
        a recurrent configuration generating the ``generator``-th invariant factor.
    sink : optional
        The sink for ``identity`` and ``generator`` (default the first vertex); a label that
        reads as an integer is matched to an integer vertex.
    generator : int
        Which generator (1 = the first invariant factor) for ``colour="generator"``.
    format : str, optional
        Input format when the suffix does not tell.

    Returns
    -------
    Path
        The file written.

    Raises
    ------
    GraphInvError
        For an unknown colouring, a bad suffix, a missing sink or generator.

    Examples
    --------
    >>> import tempfile, os
    >>> target = os.path.join(tempfile.mkdtemp(), "wheel.svg")
    >>> write_drawing("wheel:5", output=target, colour="identity", sink=0).suffix
    '.svg'

    References
    ----------
    Biggs, "Chip-firing and the critical group of a graph", J. Algebraic Combin. 9 (1999).
    """
    from graphinv.errors import InvalidGraphError
    from graphinv.io import read_graph

    target = Path(output)
    suffix = target.suffix.lower().lstrip(".")
    if suffix not in FIGURE_FORMATS:
        raise InvalidGraphError(f"{target}: the drawing must end in .png or .svg, not {target.suffix!r}")
    if colour not in COLOURINGS:
        raise InvalidGraphError(
            f"unknown colouring {colour!r}; expected one of {', '.join(COLOURINGS)}"
        )
    G = read_graph(source, format=format)
    name = str(G.graph.get("name") or source)
    values: dict[Hashable, float] | None = None
    label = "value"
    title = name
    if colour == "degree":
        values = {v: float(d) for v, d in G.degree(weight="weight")}
        label = "degree (with multiplicity)"
    elif colour in ("identity", "generator"):
        from graphinv.chipfiring import group_generators, recurrent_identity

        chosen = _vertex(G, sink) if sink is not None else next(iter(G))
        if colour == "identity":
            values = {v: float(c) for v, c in recurrent_identity(G, chosen).items()}
            title = f"{name}: identity configuration, sink {chosen}"
        else:
            generators = group_generators(G, sink=chosen)
            if not 1 <= generator <= len(generators):
                raise InvalidGraphError(
                    f"{name} has {len(generators)} generator(s); "
                    f"ask for one from 1 to {len(generators)}, not {generator}"
                )
            values = {v: float(c) for v, c in generators[generator - 1].to_dict().items()}
            title = f"{name}: generator {generator}, sink {chosen}"
        label = "chips"
    figure = graph_figure(G, values=values, title=title, value_label=label)
    target.parent.mkdir(parents=True, exist_ok=True)
    if suffix == "png":
        target.write_bytes(figure_png(figure))
    else:
        target.write_text(figure_svg(figure), encoding="utf-8")
    return target


def _vertex(G: nx.Graph, label: Hashable) -> Hashable:
    """``label`` as a vertex of ``G``, reading a digit string as an int when that is a vertex."""
    from graphinv.errors import InvalidGraphError

    if label in G:
        return label
    text = str(label)
    if text.lstrip("-").isdigit() and int(text) in G:
        return int(text)
    raise InvalidGraphError(f"the sink {label!r} is not a vertex of the graph")
