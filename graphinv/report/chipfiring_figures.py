"""Pictures of chip configurations on the wired grid, above all the identity.

The identity of the group of recurrent configurations on the ``n x n`` grid with its boundary
wired to a sink shows a striking nested square pattern (Creutz 1991; Le Borgne, Rossin 2002).
Each cell is a grid vertex coloured by its number of chips, 0 to 3, with a discrete colour map.

References
----------
M. Creutz, "Abelian sandpiles", Computers in Physics 5 (1991); Y. Le Borgne, D. Rossin, "On
the identity of the sandpile group", Discrete Math. 256 (2002).
"""

from __future__ import annotations

from collections.abc import Hashable, Mapping, Sequence
from pathlib import Path
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from matplotlib.figure import Figure

__all__ = [
    "CHIP_COLOURS",
    "configuration_grid_figure",
    "grid_identity_figure",
    "grid_values",
    "identity_grid",
    "save_identity_grid",
]

#: One colour per chip count 0, 1, 2, 3 (light to dark, distinguishable in grey scale).
CHIP_COLOURS = ("#f7f4e9", "#8fc1d9", "#2f6fa8", "#0b1f3a")


def grid_values(chips: Mapping[Hashable, int], rows: int, columns: int) -> list[list[int]]:
    """Chip counts of a wired-grid configuration as a ``rows x columns`` table.

    Examples
    --------
    >>> grid_values({(0, 0): 1, (0, 1): 2, (1, 0): 3, (1, 1): 0}, 2, 2)
    [[1, 2], [3, 0]]

    References
    ----------
    Dhar (1990) (the wired square grid).
    """
    return [[int(chips[(r, c)]) for c in range(columns)] for r in range(rows)]


def identity_grid(n: int) -> list[list[int]]:
    """The identity recurrent configuration of the wired ``n x n`` grid, as a table.

    Examples
    --------
    >>> identity_grid(3)
    [[2, 1, 2], [1, 0, 1], [2, 1, 2]]

    References
    ----------
    Le Borgne, Rossin, Discrete Math. 256 (2002); OEIS A007341 comments (small cases).
    """
    from graphinv.chipfiring import WIRED_SINK, recurrent_identity, wired_grid

    return grid_values(recurrent_identity(wired_grid(n), WIRED_SINK), n, n)


def configuration_grid_figure(
    values: Sequence[Sequence[int]], *, title: str = "", levels: int = 4
) -> Figure:
    """A grid of chip counts drawn cell by cell with a discrete colour map and colour bar.

    Parameters
    ----------
    values : table of int
        Chip counts, each in ``0 .. levels - 1``.
    title : str, optional
    levels : int, optional
        Number of colours (4 for a stable configuration on a degree-4 grid).

    Examples
    --------
    >>> figure = configuration_grid_figure([[0, 1], [2, 3]], title="demo")
    >>> figure.axes[0].get_title()
    'demo'

    References
    ----------
    Creutz, Computers in Physics 5 (1991) (drawing sandpiles cell by cell).
    """
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.colors import BoundaryNorm, ListedColormap
    from matplotlib.figure import Figure

    rows = len(values)
    columns = len(values[0]) if rows else 0
    colours: list[Any] = list(CHIP_COLOURS)
    if levels > len(CHIP_COLOURS):
        from matplotlib import colormaps

        ramp = colormaps["cividis"]
        colours = [ramp(i / (levels - 1)) for i in range(levels)]
    colour_map = ListedColormap(colours[:levels])
    norm = BoundaryNorm([k - 0.5 for k in range(levels + 1)], colour_map.N)
    side = 6.0
    figure = Figure(figsize=(side + 1.2, side), dpi=100, layout="constrained")
    FigureCanvasAgg(figure)
    axes = figure.add_subplot()
    image = axes.imshow(values, cmap=colour_map, norm=norm, interpolation="nearest")
    axes.set_xticks([])
    axes.set_yticks([])
    if title:
        axes.set_title(title)
    bar = figure.colorbar(image, ax=axes, ticks=list(range(levels)), shrink=0.8)
    bar.set_label("chips")
    axes.set_xlabel(f"{rows} x {columns} grid, boundary wired to the sink")
    return figure


def grid_identity_figure(n: int) -> Figure:
    """The picture of the identity of the wired ``n x n`` grid (computed here).

    Examples
    --------
    >>> grid_identity_figure(5).axes[0].get_title()
    'Identity of the sandpile group, 5 x 5 wired grid'

    References
    ----------
    Creutz (1991); Le Borgne, Rossin (2002).
    """
    return configuration_grid_figure(
        identity_grid(n), title=f"Identity of the sandpile group, {n} x {n} wired grid"
    )


def save_identity_grid(n: int, path: str | Path) -> Path:
    """Compute the identity of the wired ``n x n`` grid and save its picture as PNG.

    Examples
    --------
    >>> import tempfile, os
    >>> with tempfile.TemporaryDirectory() as folder:
    ...     written = save_identity_grid(4, os.path.join(folder, "identity_grid_4.png"))
    ...     written.read_bytes()[:8]
    b'\\x89PNG\\r\\n\\x1a\\n'

    References
    ----------
    Creutz (1991); Le Borgne, Rossin (2002).
    """
    figure = grid_identity_figure(n)
    target = Path(path)
    if target.parent and not target.parent.exists():
        target.parent.mkdir(parents=True, exist_ok=True)
    # at least four pixels per cell, so large grids stay legible
    figure.savefig(target, format="png", dpi=max(100, (4 * n + 4) // 5))
    return target
