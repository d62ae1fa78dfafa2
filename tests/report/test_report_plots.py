"""A figure of each kind is produced, as PNG and SVG."""

from __future__ import annotations

import math

import networkx as nx
import pytest

from graphinv.errors import InvalidGraphError
from graphinv.report.chipfiring_figures import grid_identity_figure
from graphinv.report.growth import fit_growth
from graphinv.report.plots import (
    figure_png,
    graph_figure,
    graphs_figure,
    growth_figure,
    random_groups_figure,
    rank_distribution_figure,
    ranking_figure,
    save_figure,
    separation_figure,
)
from graphinv.report.random_groups import RandomGroupSample

PNG_MAGIC = b"\x89PNG\r\n\x1a\n"


def _growth():
    # OEIS A007341, n = 2..6.
    counts = [4, 192, 100352, 557568000, 32565539635200]
    return fit_growth([n * n for n in range(2, 7)], [math.log(c) for c in counts])


def _sample():
    return RandomGroupSample(30, "1/2", 1, 100, ((1, 80), (2, 19), (3, 1)), ((2, 40), (3, 66), (5, 81)), 0)


FIGURES = {
    "growth": lambda: growth_figure(_growth()),
    "random groups": lambda: random_groups_figure(_sample()),
    "rank distribution": lambda: rank_distribution_figure({1: 8, 2: 3}, limit={1: 0.79, 2: 0.2}),
    "cospectral separation": lambda: separation_figure(
        {"laplacian": {"with a mate": 4, "critical group": 2}, "adjacency": {"with a mate": 2}}
    ),
    "ranking": lambda: ranking_figure({"ring": 14, "huge": 10**400}),
    "configuration drawing": lambda: graph_figure(
        nx.petersen_graph(), values={v: v % 4 for v in range(1, 10)}, title="chips"
    ),
    "identity picture": lambda: grid_identity_figure(8),
    "panels": lambda: graphs_figure(
        [("C6", nx.cycle_graph(6), {v: v for v in range(6)}), ("P6", nx.path_graph(6), None)],
        highlights=[[(0, 5)], []],
    ),
}


@pytest.mark.parametrize("kind", sorted(FIGURES))
def test_each_kind_renders_png_and_svg(kind, tmp_path):
    written = save_figure(FIGURES[kind](), tmp_path / kind.replace(" ", "-"))
    assert [p.suffix for p in written] == [".png", ".svg"]
    png, svg = written
    assert png.read_bytes().startswith(PNG_MAGIC) and png.stat().st_size > 2000
    assert "<svg" in svg.read_text(encoding="utf-8")


def test_palette_png_is_smaller_and_same_size_in_pixels():
    from io import BytesIO

    from PIL import Image

    figure = graph_figure(nx.cycle_graph(5), values={v: v for v in range(5)})
    full, compact = figure_png(figure, palette=False), figure_png(figure)
    assert len(compact) < len(full)
    with Image.open(BytesIO(full)) as a, Image.open(BytesIO(compact)) as b:
        assert a.size == b.size


def test_drawing_rejects_an_empty_graph():
    with pytest.raises(InvalidGraphError):
        graph_figure(nx.Graph())


def test_save_figure_rejects_unknown_format(tmp_path):
    with pytest.raises(ValueError, match="formats"):
        save_figure(graph_figure(nx.path_graph(2)), tmp_path / "x", formats=["pdf"])


def test_committed_readme_figures_exist_and_stay_small():
    from pathlib import Path

    from graphinv.report.gallery import FIGURE_NAMES

    folder = Path(__file__).resolve().parents[2] / "figures"
    for name in FIGURE_NAMES:
        png = folder / f"{name}.png"
        assert png.read_bytes().startswith(PNG_MAGIC), png
        assert png.stat().st_size < 200_000, png
