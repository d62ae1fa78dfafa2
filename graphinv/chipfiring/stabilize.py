"""Stabilization: fire unstable vertices until none can fire, keeping the firing vector.

The engine is vectorised.  Each round fires every unstable vertex ``v`` ``floor(c(v)/deg(v))``
times at once; by the abelian property (Dhar 1990) any legal order of firings ends in the same
stable configuration with the same firing vector (the *odometer*), so rounds are legal.

Before the rounds, a large pile is cut short by the least action principle (Fey, Levine, Peres
2010): the odometer ``u`` is the least nonnegative integer vector with ``c - L~^T u`` stable, and
firing any ``x <= u`` first and then stabilizing legally gives the same result.  Because the final
configuration is at most ``c_max = deg - 1``, ``u >= w = (L~^T)^{-1} (c - c_max)`` (the inverse of
this M-matrix is entrywise nonnegative), hence ``u >= ceil(w)``.  ``w`` is computed in floating
point, then *certified*: with ``Q w`` rounded to the integer vector ``W``, the exact residual
``R = Q (c - c_max) - L~^T W`` and an integer vector ``h`` with ``L~^T h >= 1`` (checked exactly,
so ``(L~^T)^{-1} 1 <= h``) give ``Q w >= W - max|R| h``; only that rigorous bound is fired.
Counts too large for ``int64`` take the same route with Python integers.

References
----------
D. Dhar, "Self-organized critical state of sandpile automaton models", Phys. Rev. Lett. 64
(1990); A. Fey, L. Levine, Y. Peres, "Growth rates and explosions in sandpiles", J. Stat. Phys.
138 (2010) (least action principle); Björner, Lovász, Shor, "Chip-firing games on graphs",
European J. Combin. 12 (1991).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from graphinv.chipfiring.configurations import (
    INT64_SAFE,
    ChipGraph,
    Configuration,
    as_chip_vector,
    fits_int64,
)
from graphinv.errors import GraphInvError

__all__ = [
    "DEFAULT_MAX_ROUNDS",
    "Stabilization",
    "StabilizationError",
    "stabilize",
]

#: Default cap on vectorised rounds; a run that needs more raises :class:`StabilizationError`.
DEFAULT_MAX_ROUNDS = 20_000_000

# Below this many vertices a modest pile is relaxed by rounds alone: factoring costs more.
_HEAD_START_VERTICES = 400


class StabilizationError(GraphInvError, RuntimeError):
    """Stabilization did not finish within the allowed number of rounds."""


@dataclass(frozen=True, eq=False)
class Stabilization:
    """The result of stabilizing a configuration.

    Attributes
    ----------
    stable : Configuration
        The stable configuration reached.
    firings : numpy.ndarray
        How often each non-sink vertex fired (the odometer), in the chip graph's vertex order;
        ``int64`` or Python ints.
    rounds : int
        Vectorised rounds (or colour-class sweeps) used: a measure of work, not an invariant.

    References
    ----------
    Dhar, Phys. Rev. Lett. 64 (1990) (the firing vector does not depend on the order).
    """

    stable: Configuration
    firings: np.ndarray
    rounds: int

    @property
    def topplings(self) -> int:
        """Total number of vertex firings (exact)."""
        return sum(int(v) for v in self.firings.tolist())

    def firing_dict(self) -> dict[Any, int]:
        """``{vertex: number of firings}``."""
        return dict(
            zip(self.stable.graph.vertices, (int(v) for v in self.firings.tolist()), strict=True)
        )

    def to_record(self) -> dict[str, Any]:
        """JSON-ready: the stable configuration, the firing vector and the totals."""
        record = self.stable.to_record()
        record["firings"] = {str(k): v for k, v in _labelled(self.firing_dict()).items()}
        record["topplings"] = self.topplings
        return record


def _labelled(mapping: dict[Any, int]) -> dict[Any, int]:
    from graphinv.chipfiring.configurations import _label

    return {_label(k): v for k, v in mapping.items()}


def stabilize(
    configuration: Configuration, *, max_rounds: int = DEFAULT_MAX_ROUNDS
) -> Stabilization:
    """Fire unstable vertices until the configuration is stable.

    Parameters
    ----------
    configuration : Configuration
        Any integer counts; a vertex with fewer than ``deg(v)`` chips (negative counts
        included) never fires.
    max_rounds : int, optional
        Cap on vectorised rounds.

    Returns
    -------
    Stabilization
        The stable configuration and the firing vector.

    Raises
    ------
    StabilizationError
        More than ``max_rounds`` rounds were needed.

    Examples
    --------
    >>> import networkx as nx
    >>> from graphinv.chipfiring import chip_graph
    >>> cg = chip_graph(nx.path_graph(4), sink=0)
    >>> result = stabilize(cg.configuration({3: 5}))
    >>> result.stable.to_dict(), result.firing_dict()
    ({1: 1, 2: 1, 3: 0}, {1: 3, 2: 7, 3: 12})

    References
    ----------
    Dhar, Phys. Rev. Lett. 64 (1990) (abelian property); Fey, Levine, Peres, J. Stat. Phys.
    138 (2010) (least action principle).
    """
    graph = configuration.graph
    final, firings, rounds = relax(graph, configuration.chips, max_rounds=max_rounds)
    return Stabilization(Configuration(graph, final), firings, rounds)


def relax(
    graph: ChipGraph, chips: np.ndarray, *, max_rounds: int = DEFAULT_MAX_ROUNDS
) -> tuple[np.ndarray, np.ndarray, int]:
    """Stabilize a raw chip vector: ``(stable vector, firing vector, rounds)``.

    Examples
    --------
    >>> import networkx as nx
    >>> from graphinv.chipfiring import chip_graph
    >>> final, firings, rounds = relax(chip_graph(nx.cycle_graph(3), sink=0), np.array([4, 0]))
    >>> final.tolist(), firings.tolist()
    ([1, 0], [2, 1])

    References
    ----------
    Dhar (1990); Fey, Levine, Peres, J. Stat. Phys. 138 (2010).
    """
    n = len(graph)
    if n == 0:
        return chips.copy(), np.zeros(0, dtype=np.int64), 0
    parts: list[np.ndarray] = []
    current = chips
    if current.dtype == object or not _small_mass(current):
        start = _exact_head_start(graph, current.astype(object))
        if start is not None:
            current = current.astype(object) - _matvec_object(graph, start)
            parts.append(start)
        current = as_chip_vector(current.tolist())
    if current.dtype != object and _small_mass(current):
        start = _head_start(graph, current)
        if start is not None:
            candidate = current - graph.laplacian @ start
            if _small_mass(candidate):
                current = candidate
                parts.append(start)
        schedule = _schedule(graph)
        if schedule is None:
            final, firings, rounds = _rounds_int64(graph, current, max_rounds)
        else:
            final, firings, rounds = _sweeps_int64(schedule, current, max_rounds)
    else:
        final, firings, rounds = _rounds_object(graph, current.astype(object), max_rounds)
    for part in parts:
        if (
            firings.dtype == object
            or part.dtype == object
            or not (fits_int64(firings, 2) and fits_int64(part, 2))
        ):
            firings = firings.astype(object) + part.astype(object)
        else:
            firings = firings + part
    return final, firings, rounds


def _small_mass(chips: np.ndarray) -> bool:
    """Whether the positive chips total below the int64 safety limit (so rounds stay exact)."""
    if chips.dtype == object or not fits_int64(chips):
        return False
    positive = np.maximum(chips, 0)
    top = int(positive.max()) if positive.size else 0
    if top * positive.size < INT64_SAFE:
        return True
    return sum(positive.tolist()) < INT64_SAFE


def _fire_vector(chips: np.ndarray, degree: np.ndarray, twice_min: int) -> np.ndarray | None:
    """How often each vertex fires this round (``floor(c/deg)``, at least 0), or None if stable."""
    if int(chips.max()) < twice_min:
        # every count is below twice its degree, so a comparison gives floor(c/deg)
        unstable = chips >= degree
        return unstable.astype(np.int64) if unstable.any() else None
    fire = chips // degree
    np.maximum(fire, 0, out=fire)
    return fire if fire.any() else None


def _count_round(rounds: int, max_rounds: int, firings: np.ndarray, mass: int) -> np.ndarray:
    """Enforce the round cap; switch the firing counts to Python ints before they could overflow.

    No count ever exceeds the positive mass (it never grows), so a round adds at most ``mass``
    to any firing count.
    """
    if rounds > max_rounds:
        raise StabilizationError(
            f"stabilization did not finish within {max_rounds} rounds; raise max_rounds "
            "if this graph really needs more"
        )
    if firings.dtype != object and (rounds + 1) * mass >= INT64_SAFE:
        return firings.astype(object)
    return firings


def _rounds_int64(
    graph: ChipGraph, chips: np.ndarray, max_rounds: int
) -> tuple[np.ndarray, np.ndarray, int]:
    degree = graph.degree
    laplacian = graph.laplacian
    twice_min = 2 * int(degree.min())
    c = np.array(chips, dtype=np.int64)
    firings: np.ndarray = np.zeros(c.size, dtype=np.int64)
    mass = max(int(np.maximum(c, 0).sum()), 1)
    rounds = 0
    while (fire := _fire_vector(c, degree, twice_min)) is not None:
        rounds += 1
        firings = _count_round(rounds, max_rounds, firings, mass)
        firings += fire
        c -= laplacian @ fire
    return c, firings, rounds


class _Schedule:
    """Colour classes (independent sets) for sweeps that fire one class after another.

    Within a class no vertex sends chips to another, so firing a whole class at once is a
    legal sequence; firing the classes in turn lets chips sent by one class be passed on by the
    next in the same sweep (a Gauss-Seidel order), which roughly halves the sweeps a large
    avalanche needs compared with rounds that fire every unstable vertex at once.
    """

    def __init__(self, graph: ChipGraph, colours: np.ndarray) -> None:
        import scipy.sparse

        n = len(graph)
        self.permutation = np.argsort(colours, kind="stable")
        self.inverse = np.empty(n, dtype=np.int64)
        self.inverse[self.permutation] = np.arange(n, dtype=np.int64)
        permuted = graph.laplacian[self.permutation][:, self.permutation]
        degree = graph.degree[self.permutation]
        transfer = (scipy.sparse.diags_array(degree, dtype=np.int64) - permuted).tocsr()
        self.degree = degree
        self.classes: list[tuple[int, int, Any, np.ndarray, int]] = []
        sizes = np.bincount(colours)
        bounds = np.concatenate([[0], np.cumsum(sizes)])
        for a, b in zip(bounds[:-1].tolist(), bounds[1:].tolist(), strict=True):
            others = np.r_[0:a, b:n]
            block = transfer[others][:, a:b].tocsr().astype(np.int64)
            self.classes.append((a, b, block, degree[a:b], 2 * int(degree[a:b].min())))


_SCHEDULE_VERTICES = 2048
_SCHEDULE_COLOURS = 8


def _greedy_colours(graph: ChipGraph, limit: int) -> np.ndarray | None:
    """A proper colouring of the non-sink vertices (either edge direction), or ``None``."""
    pattern = graph.laplacian.copy()
    pattern.data[:] = 1
    pattern = (pattern + pattern.T).tocsr()
    indptr, indices = pattern.indptr.tolist(), pattern.indices.tolist()
    colours = [-1] * len(graph)
    for v in range(len(graph)):
        taken = {colours[w] for w in indices[indptr[v] : indptr[v + 1]] if w != v}
        colour = 0
        while colour in taken:
            colour += 1
        if colour >= limit:
            return None
        colours[v] = colour
    return np.array(colours, dtype=np.int64)


def _schedule(graph: ChipGraph) -> _Schedule | None:
    if len(graph) < _SCHEDULE_VERTICES:
        return None
    if "schedule" not in graph.cache:
        colours = _greedy_colours(graph, _SCHEDULE_COLOURS)
        graph.cache["schedule"] = None if colours is None else _Schedule(graph, colours)
    schedule: _Schedule | None = graph.cache["schedule"]
    return schedule


def _sweeps_int64(
    schedule: _Schedule, chips: np.ndarray, max_rounds: int
) -> tuple[np.ndarray, np.ndarray, int]:
    c = np.array(chips, dtype=np.int64)[schedule.permutation]
    firings: np.ndarray = np.zeros(c.size, dtype=np.int64)
    mass = max(int(np.maximum(c, 0).sum()), 1)
    sweeps = 0
    while True:
        active = False
        for a, b, block, degree, twice_min in schedule.classes:
            part = c[a:b]
            fire = _fire_vector(part, degree, twice_min)
            if fire is None:
                continue
            active = True
            firings[a:b] += fire
            part -= degree * fire
            sent = block @ fire
            c[:a] += sent[:a]
            c[b:] += sent[a:]
        if not active:
            break
        sweeps += 1
        firings = _count_round(sweeps, max_rounds, firings, mass)
    return c[schedule.inverse], firings[schedule.inverse], sweeps


def _matvec_object(graph: ChipGraph, vector: np.ndarray) -> np.ndarray:
    """``L~^T x`` exactly in Python integers."""
    matrix = graph.laplacian.tocoo()
    out = np.zeros(len(graph), dtype=object)
    out[:] = 0
    values = matrix.data.astype(object) * vector.astype(object)[matrix.col]
    np.add.at(out, matrix.row, values)
    return out


def _rounds_object(
    graph: ChipGraph, chips: np.ndarray, max_rounds: int
) -> tuple[np.ndarray, np.ndarray, int]:
    degree = graph.degree.astype(object)
    c = chips.astype(object)
    firings = np.zeros(c.size, dtype=object)
    firings[:] = 0
    rounds = 0
    while True:
        fire = c // degree
        fire = np.where(fire > 0, fire, 0).astype(object)
        if not fire.any():
            break
        rounds += 1
        firings = _count_round(rounds, max_rounds, firings, 0) + fire
        c = c - _matvec_object(graph, fire)
    return as_chip_vector(c.tolist()), firings, rounds


# A direct factorization is used when its fill-in is surely modest: small graphs, or graphs
# whose reverse Cuthill-McKee bandwidth keeps n * bandwidth below this.  Others (expanders,
# random regular graphs) are solved iteratively; the certificate makes any accuracy safe.
_DIRECT_VERTICES = 3000
_DIRECT_PROFILE = 40_000_000


class _Solver:
    """Approximate solves with ``L~^T`` and a certified bound ``h`` on its inverse.

    The solves are floating point (a sparse LU factorization, or conjugate gradients / GMRES
    where factoring could fill in badly); nothing relies on their accuracy, because every use
    is checked in exact integers.
    """

    def __init__(self, graph: ChipGraph) -> None:
        import scipy.sparse.linalg

        self.graph_size = len(graph)
        self.directed = graph.directed
        self.matrix = graph.laplacian.astype(np.float64).tocsc()
        self.lu: Any = None
        if _direct_is_safe(graph):
            self.lu = scipy.sparse.linalg.splu(self.matrix)
        rhs = np.full(len(graph), float(graph.row_weight + 1))
        bound = np.ceil(self.solve(rhs))
        self.green_bound: np.ndarray | None = None
        if np.isfinite(bound).all() and float(bound.max()) < 2.0**52:
            self.green_bound = _repair_bound(graph, np.maximum(bound, 0).astype(np.int64))

    def solve(self, rhs: np.ndarray) -> np.ndarray:
        if self.lu is not None:
            return np.asarray(self.lu.solve(rhs))
        import scipy.sparse.linalg

        root = int(math.sqrt(self.graph_size))
        if self.directed:
            # maxiter counts restart cycles of 50 steps each
            solution, _ = scipy.sparse.linalg.gmres(
                self.matrix, rhs, rtol=1e-13, restart=50, maxiter=root + 20
            )
        else:
            solution, _ = scipy.sparse.linalg.cg(
                self.matrix, rhs, rtol=1e-13, maxiter=20 * root + 2000
            )
        return np.asarray(solution)


def _repair_bound(graph: ChipGraph, start: np.ndarray, passes: int = 10_000) -> np.ndarray | None:
    """An integer ``h >= start`` with ``L~^T h >= 1`` (checked exactly), or ``None``.

    Raising ``h`` where ``L~^T h`` falls short is a firing process towards the sink, so it ends;
    a good floating-point start makes it end at once.  Any such ``h`` bounds ``(L~^T)^{-1} 1``
    from above, because ``(L~^T)^{-1}`` is entrywise nonnegative.
    """
    h = start.copy()
    degree = graph.degree
    for _ in range(passes):
        if not fits_int64(h, graph.row_weight + 1):
            return None
        deficit = 1 - graph.laplacian @ h
        short = deficit > 0
        if not short.any():
            return h
        h[short] += (deficit[short] + degree[short] - 1) // degree[short]
    return None


def _direct_is_safe(graph: ChipGraph) -> bool:
    """Whether an LU factorization of ``L~^T`` has surely modest fill-in."""
    n = len(graph)
    if n <= _DIRECT_VERTICES:
        return True
    from scipy.sparse.csgraph import reverse_cuthill_mckee

    pattern = graph.laplacian.tocsr()
    order = reverse_cuthill_mckee(pattern, symmetric_mode=not graph.directed)
    position = np.empty(n, dtype=np.int64)
    position[order] = np.arange(n, dtype=np.int64)
    coo = pattern.tocoo()
    bandwidth = int(np.abs(position[coo.row] - position[coo.col]).max())
    return n * bandwidth <= _DIRECT_PROFILE


def _solver(graph: ChipGraph) -> _Solver | None:
    if "solver" not in graph.cache:
        try:
            graph.cache["solver"] = _Solver(graph)
        except (RuntimeError, ValueError, MemoryError):  # singular or too large to factor
            graph.cache["solver"] = None
    solver: _Solver | None = graph.cache["solver"]
    return solver


def certified_lower_solution(graph: ChipGraph, rhs: np.ndarray) -> np.ndarray | None:
    """An integer vector ``x`` with ``x <= ceil((L~^T)^{-1} rhs)``, close to it, or ``None``.

    Computed in floating point and certified exactly (see the module notes); ``rhs`` is an
    ``int64`` vector.  ``None`` when the factorization or the certificate is unavailable.

    Examples
    --------
    >>> import networkx as nx
    >>> from graphinv.chipfiring import chip_graph
    >>> cg = chip_graph(nx.path_graph(3), sink=0)        # L~^T = [[2, -1], [-1, 1]]
    >>> certified_lower_solution(cg, np.array([0, 3])).tolist()   # exact solution [3, 6]
    [3, 6]

    References
    ----------
    Fey, Levine, Peres, J. Stat. Phys. 138 (2010) (least action principle); A. Berman, R. J.
    Plemmons, *Nonnegative Matrices in the Mathematical Sciences*, SIAM 1994 (the inverse of a
    nonsingular M-matrix is nonnegative).
    """
    solver = _solver(graph)
    if solver is None or solver.green_bound is None or not fits_int64(rhs):
        return None
    w = solver.solve(rhs.astype(np.float64))
    if not np.isfinite(w).all():
        return None
    largest = max(float(np.abs(w).max()), float(np.abs(rhs).max()), 1.0)
    room = INT64_SAFE / (4.0 * (graph.row_weight + 1) * largest)
    if room < 1.0:
        return None
    scale = 1 << min(int(math.log2(room)), 40)
    scaled = np.rint(w * scale).astype(np.int64)
    residual = rhs * scale - graph.laplacian @ scaled
    worst = int(np.abs(residual).max())
    bound = solver.green_bound
    if worst * int(bound.max()) >= INT64_SAFE:
        return None
    low = scaled - worst * bound
    return -((-low) // scale)


def _head_start(graph: ChipGraph, chips: np.ndarray) -> np.ndarray | None:
    """A certified part ``x <= u`` of the odometer of ``chips`` (int64), or ``None``."""
    excess = chips - graph.max_stable
    top = int(excess.max())
    if top <= 0:
        return None
    if len(graph) < _HEAD_START_VERTICES and top < 64 * int(graph.degree.max()):
        return None
    low = certified_lower_solution(graph, excess)
    if low is None:
        return None
    np.maximum(low, 0, out=low)
    if not low.any() or not fits_int64(low, graph.row_weight + 1):
        return None
    return low


def _exact_head_start(graph: ChipGraph, chips: np.ndarray) -> np.ndarray | None:
    """For counts beyond int64: Python-int ``x <= u`` with ``c - L~^T x`` of modest size.

    Iterative refinement: ``z`` grows by floating-point corrections until the exact residual
    ``r = c - c_max - L~^T z`` is nonnegative and small; then ``L~^T (u - z) >= r >= 0`` proves
    ``u >= z`` (and ``u >= 0``), so ``x = max(z, 0)`` may be fired.
    """
    solver = _solver(graph)
    if solver is None:
        return None
    excess = chips - graph.max_stable.astype(object)
    z = np.zeros(len(graph), dtype=object)
    z[:] = 0
    margin = float(graph.row_weight + 1)
    for _ in range(200):
        residual = excess - _matvec_object(graph, z)
        if bool((residual >= 0).all()) and fits_int64(residual):
            break
        if max(abs(int(v)) for v in residual.tolist()) > 10**300:
            return None
        w = solver.solve(np.array([float(v) for v in residual.tolist()]) - margin)
        if not np.isfinite(w).all():
            return None
        step = np.array([math.floor(v) for v in w.tolist()], dtype=object)
        if not step.any():
            break
        z = z + step
    residual = excess - _matvec_object(graph, z)
    if not bool((residual >= 0).all()):
        return None
    start = np.where(z > 0, z, 0).astype(object)
    return start if start.any() else None
