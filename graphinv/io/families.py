"""Named graph families generated from a short spec such as ``grid:30x30`` or ``petersen:5,2``.

Grammar
-------
A spec is ``name:params``; parameters are separated by commas and the sizes of a grid or torus
are joined with ``x``.  Any integer parameter may be a range ``A..B`` (inclusive):
:func:`family_graphs` then yields every combination, the leftmost parameter varying slowest.

=============================  ==========================================================
spec                           graph (vertices are ``0 .. n-1`` in the order given)
=============================  ==========================================================
``complete:N``                 complete graph K_N
``bipartite:M,N``              K_{M,N}; part one ``0..M-1``, part two ``M..M+N-1``
``multipartite:A,B,C,...``     complete multipartite graph; parts numbered one after another
``cycle:N``                    cycle C_N (N >= 3), ``i ~ i+1 mod N``
``path:N``                     path on N vertices, ``i ~ i+1``
``star:N``                     star with N leaves; centre 0, leaves ``1..N``
``wheel:N``                    wheel W_N with N spokes (N + 1 vertices); hub 0, rim ``1..N``
``grid:AxB[xC...]``            grid graph (cartesian product of paths), numbered row-major
``torus:AxB[xC...]``           torus (cartesian product of cycles, sizes >= 3), row-major
``hypercube:D``                hypercube Q_D; vertices ``0..2^D-1``, adjacent when one bit differs
``prism:N``                    prism C_N x K_2; outer cycle ``0..N-1``, inner ``N..2N-1``, ``i ~ N+i``
``moebius:N``                  Möbius ladder on 2N vertices: cycle ``0..2N-1`` plus ``i ~ i+N``
``circulant:N:J1,J2,...``      circulant graph, ``i ~ i ± J mod N`` for each jump J (1 <= J <= N/2)
``petersen:N,K``               generalized Petersen graph GP(N, K), 1 <= K < N/2; outer ``0..N-1``,
                               inner ``N..2N-1``; ``petersen:5,2`` is the Petersen graph
``paley:Q``                    Paley graph of the field with Q elements (Q a prime power ≡ 1 mod 4)
``gnp:N,P[,seed=S]``           random G(N, P); P a decimal or a fraction such as 1/3; seed default 0
``regular:N,D[,seed=S]``       random D-regular graph on N vertices (N·D even); seed default 0
=============================  ==========================================================

A single size for ``grid`` or ``torus`` means a square: ``grid:5`` is 5x5 and ``grid:2..10``
gives the square grids 2x2 .. 10x10.  ``seed=1..2000`` gives 2000 samples.  The name of each
generated graph (``G.graph["name"]``) is its own spec without ranges, e.g. ``grid:3x3`` or
``gnp:10,0.5,seed=7``.

The elements of GF(p^k) in a Paley graph are the polynomials ``a_0 + a_1 x + ...`` of degree
below ``k`` modulo the lexicographically first monic irreducible polynomial of degree ``k``;
element ``sum a_i p^i`` is vertex ``sum a_i p^i``.  G(N, P) uses the geometric skipping method
of Batagelj and Brandes with Python's ``random.Random(seed)``, so a seed gives the same graph on
every platform; random regular graphs come from networkx's ``random_regular_graph``.

References
----------
M. E. Watkins, "A theorem on Tait colorings with an application to the generalized Petersen
graphs", J. Combin. Theory 6 (1969).  R. E. A. C. Paley, "On orthogonal matrices",
J. Math. Phys. 12 (1933).  V. Batagelj, U. Brandes, "Efficient generation of large random
networks", Phys. Rev. E 71 (2005).  A. Steger, N. Wormald, "Generating random regular graphs
quickly", Combin. Probab. Comput. 8 (1999).
"""

from __future__ import annotations

import itertools
import math
import random
import re
from collections.abc import Callable, Iterable, Iterator, Sequence
from dataclasses import dataclass
from fractions import Fraction
from typing import Any

import networkx as nx

from graphinv.errors import GraphFormatError

__all__ = [
    "count_family_graphs",
    "family_graph",
    "family_graphs",
    "family_names",
    "family_table",
    "is_family_spec",
]

_RANGE = re.compile(r"(\d+)\.\.(\d+)")
_INTEGER = re.compile(r"\d+")
_SPEC_START = re.compile(r"[A-Za-z][A-Za-z_-]*:")


class _BadSpec(Exception):
    """Internal: the parameters do not fit the family (turned into GraphFormatError)."""


def _values(token: str) -> list[int]:
    """The integers a token stands for: ``7`` or a range ``3..9``."""
    if _INTEGER.fullmatch(token):
        return [int(token)]
    match = _RANGE.fullmatch(token)
    if match:
        low, high = int(match.group(1)), int(match.group(2))
        if low > high:
            raise _BadSpec(f"empty range {token!r}")
        return list(range(low, high + 1))
    raise _BadSpec(f"{token!r} is not an integer or a range A..B")


def _split(params: str) -> list[str]:
    return [] if params == "" else params.split(",")


# --- graph builders -------------------------------------------------------------------------


def _simple_graph(n: int, edges: Iterable[tuple[int, int]]) -> nx.Graph:
    G = nx.Graph()
    G.add_nodes_from(range(n))
    G.add_edges_from(edges, weight=1)
    return G


def _complete(n: int) -> nx.Graph:
    return _simple_graph(n, itertools.combinations(range(n), 2))


def _multipartite(sizes: Sequence[int]) -> nx.Graph:
    starts = list(itertools.accumulate(sizes, initial=0))
    parts = [range(starts[i], starts[i + 1]) for i in range(len(sizes))]
    edges = ((u, v) for a, b in itertools.combinations(parts, 2) for u in a for v in b)
    return _simple_graph(starts[-1], edges)


def _cycle_edges(n: int, offset: int = 0) -> list[tuple[int, int]]:
    return [(offset + i, offset + (i + 1) % n) for i in range(n)]


def _lattice(sizes: Sequence[int], wrap: bool) -> nx.Graph:
    n = math.prod(sizes)
    strides = [math.prod(sizes[d + 1 :]) for d in range(len(sizes))]
    edges = []
    for v in range(n):
        for size, stride in zip(sizes, strides, strict=True):
            coordinate = (v // stride) % size
            if coordinate + 1 < size:
                edges.append((v, v + stride))
            elif wrap:
                edges.append((v, v - coordinate * stride))
    return _simple_graph(n, edges)


def _circulant(n: int, jumps: Sequence[int]) -> nx.Graph:
    edges = {tuple(sorted((i, (i + j) % n))) for j in jumps for i in range(n)}
    return _simple_graph(n, sorted(edges))  # type: ignore[arg-type]


def _petersen(n: int, k: int) -> nx.Graph:
    edges = _cycle_edges(n)
    edges += [(i, n + i) for i in range(n)]
    edges += [(n + i, n + (i + k) % n) for i in range(n)]
    return _simple_graph(2 * n, edges)


def _prime_power(q: int) -> tuple[int, int] | None:
    """``(p, k)`` with ``q = p**k``, p prime; None if ``q`` is not a prime power."""
    if q < 2:
        return None
    p = next(d for d in itertools.count(2) if q % d == 0 or d * d > q)
    if q % p:
        p = q
    k = 0
    while q % p == 0:
        q //= p
        k += 1
    return (p, k) if q == 1 else None


def _poly_mod(dividend: list[int], divisor: list[int], p: int) -> list[int]:
    """Remainder of polynomials over GF(p); coefficient lists lowest degree first, divisor monic."""
    rest = dividend[:]
    degree = len(divisor) - 1
    for shift in range(len(rest) - 1 - degree, -1, -1):
        factor = rest[shift + degree] % p
        if factor:
            for i, c in enumerate(divisor):
                rest[shift + i] = (rest[shift + i] - factor * c) % p
    return [c % p for c in rest[:degree]]


def _monic_polynomials(p: int, degree: int) -> Iterator[list[int]]:
    for number in range(p**degree):
        yield [(number // p**i) % p for i in range(degree)] + [1]


def _irreducible(p: int, k: int) -> list[int]:
    """The first monic irreducible polynomial of degree ``k`` over GF(p) (trial division)."""
    for candidate in _monic_polynomials(p, k):
        if all(
            any(_poly_mod(candidate, factor, p))
            for degree in range(1, k // 2 + 1)
            for factor in _monic_polynomials(p, degree)
        ):
            return candidate
    raise AssertionError(
        f"no irreducible polynomial of degree {k} over GF({p})"
    )  # pragma: no cover


def _paley(q: int) -> nx.Graph:
    p, k = _prime_power(q)  # type: ignore[misc]
    modulus = _irreducible(p, k) if k > 1 else [0, 1]
    digits = [[(e // p**i) % p for i in range(k)] for e in range(q)]
    powers = [p**i for i in range(k)]

    def square(a: list[int]) -> int:
        product = [0] * (2 * k - 1)
        for i, x in enumerate(a):
            for j, y in enumerate(a):
                product[i + j] += x * y
        reduced = _poly_mod(product, modulus, p) if k > 1 else [product[0] % p]
        return sum(c * w for c, w in zip(reduced, powers, strict=True))

    squares = sorted({square(digits[e]) for e in range(1, q)})
    edges = set()
    for a in range(q):
        da = digits[a]
        for s in squares:
            ds = digits[s]
            b = sum(((x + y) % p) * w for x, y, w in zip(da, ds, powers, strict=True))
            edges.add((a, b) if a < b else (b, a))
    return _simple_graph(q, sorted(edges))


def _gnp(n: int, probability: float, seed: int) -> nx.Graph:
    rng = random.Random(seed)
    if probability <= 0:
        return _simple_graph(n, [])
    if probability >= 1:
        return _complete(n)
    edges = []
    log_q = math.log(1.0 - probability)
    v, w = 1, -1
    while v < n:
        w += 1 + int(math.log(1.0 - rng.random()) / log_q)
        while w >= v and v < n:
            w -= v
            v += 1
        if v < n:
            edges.append((w, v))
    return _simple_graph(n, edges)


def _regular(n: int, d: int, seed: int) -> nx.Graph:
    H = nx.random_regular_graph(d, n, seed=seed)
    return _simple_graph(n, sorted(tuple(sorted(e)) for e in H.edges()))


# --- the family table -------------------------------------------------------------------------


@dataclass(frozen=True)
class _Family:
    name: str
    grammar: str
    expects: str
    summary: str
    example: str
    parse: Callable[[str], list[list[Any]]]
    valid: Callable[[tuple[Any, ...]], bool]
    spec: Callable[[tuple[Any, ...]], str]
    build: Callable[[tuple[Any, ...]], nx.Graph]


def _fixed(count: int) -> Callable[[str], list[list[Any]]]:
    def parse(params: str) -> list[list[Any]]:
        tokens = _split(params)
        if len(tokens) != count:
            raise _BadSpec(f"{len(tokens)} parameters")
        return [_values(t) for t in tokens]

    return parse


def _at_least_one(params: str) -> list[list[Any]]:
    tokens = _split(params)
    if not tokens:
        raise _BadSpec("no parameters")
    return [_values(t) for t in tokens]


def _dimensions(params: str) -> list[list[Any]]:
    if "," in params or not params:
        raise _BadSpec("sizes must be joined with 'x'")
    tokens = params.split("x")
    choices = [_values(t) for t in tokens]
    if len(tokens) == 1:
        # One size (or one range) means a square.
        return [[(v, v) for v in choices[0]]]
    return [[tuple(c) for c in itertools.product(*choices)]]


def _circulant_parse(params: str) -> list[list[Any]]:
    size, colon, jumps = params.partition(":")
    if not colon or not jumps:
        raise _BadSpec("missing ':J1,J2,...'")
    jump_choices = [_values(t) for t in _split(jumps)]
    return [_values(size), [tuple(c) for c in itertools.product(*jump_choices)]]


def _probability(token: str) -> tuple[str, float]:
    try:
        value = float(Fraction(token))
    except (ValueError, ZeroDivisionError):
        raise _BadSpec(f"{token!r} is not a probability") from None
    return token, value


def _random_parse(second: Callable[[str], list[Any]]) -> Callable[[str], list[list[Any]]]:
    def parse(params: str) -> list[list[Any]]:
        tokens = _split(params)
        seeds = [0]
        if len(tokens) == 3:
            key, equals, value = tokens[2].partition("=")
            if key != "seed" or not equals:
                raise _BadSpec(f"third parameter {tokens[2]!r} is not seed=S")
            seeds = _values(value)
        elif len(tokens) != 2:
            raise _BadSpec(f"{len(tokens)} parameters")
        return [_values(tokens[0]), second(tokens[1]), seeds]

    return parse


def _dims_text(sizes: Sequence[int]) -> str:
    return "x".join(map(str, sizes))


_FAMILIES: dict[str, _Family] = {
    f.name: f
    for f in [
        _Family(
            "complete",
            "complete:N",
            "1 parameter N >= 1",
            "complete graph K_N",
            "complete:5",
            _fixed(1),
            lambda a: a[0] >= 1,
            lambda a: f"complete:{a[0]}",
            lambda a: _complete(a[0]),
        ),
        _Family(
            "bipartite",
            "bipartite:M,N",
            "2 parameters M,N >= 1",
            "complete bipartite graph K_{M,N}",
            "bipartite:3,4",
            _fixed(2),
            lambda a: min(a) >= 1,
            lambda a: f"bipartite:{a[0]},{a[1]}",
            lambda a: _multipartite(a),
        ),
        _Family(
            "multipartite",
            "multipartite:A,B,C,...",
            "part sizes A,B,C,... >= 1",
            "complete multipartite graph",
            "multipartite:2,2,2",
            _at_least_one,
            lambda a: min(a) >= 1,
            lambda a: "multipartite:" + ",".join(map(str, a)),
            lambda a: _multipartite(a),
        ),
        _Family(
            "cycle",
            "cycle:N",
            "1 parameter N >= 3",
            "cycle C_N",
            "cycle:8",
            _fixed(1),
            lambda a: a[0] >= 3,
            lambda a: f"cycle:{a[0]}",
            lambda a: _simple_graph(a[0], _cycle_edges(a[0])),
        ),
        _Family(
            "path",
            "path:N",
            "1 parameter N >= 1 (vertices)",
            "path on N vertices",
            "path:6",
            _fixed(1),
            lambda a: a[0] >= 1,
            lambda a: f"path:{a[0]}",
            lambda a: _simple_graph(a[0], [(i, i + 1) for i in range(a[0] - 1)]),
        ),
        _Family(
            "star",
            "star:N",
            "1 parameter N >= 1 (leaves)",
            "star with N leaves",
            "star:5",
            _fixed(1),
            lambda a: a[0] >= 1,
            lambda a: f"star:{a[0]}",
            lambda a: _simple_graph(a[0] + 1, [(0, i) for i in range(1, a[0] + 1)]),
        ),
        _Family(
            "wheel",
            "wheel:N",
            "1 parameter N >= 3",
            "wheel W_N: N spokes, N + 1 vertices",
            "wheel:6",
            _fixed(1),
            lambda a: a[0] >= 3,
            lambda a: f"wheel:{a[0]}",
            lambda a: _simple_graph(
                a[0] + 1, [(0, i) for i in range(1, a[0] + 1)] + _wheel_rim(a[0])
            ),
        ),
        _Family(
            "grid",
            "grid:AxB[xC...]",
            "sizes AxB[xC...] >= 1 (one size for a square)",
            "grid graph, vertices row-major",
            "grid:4x6",
            _dimensions,
            lambda a: min(a[0]) >= 1,
            lambda a: f"grid:{_dims_text(a[0])}",
            lambda a: _lattice(a[0], wrap=False),
        ),
        _Family(
            "torus",
            "torus:AxB[xC...]",
            "sizes AxB[xC...] >= 3 (one size for a square)",
            "torus (product of cycles), vertices row-major",
            "torus:5x5",
            _dimensions,
            lambda a: min(a[0]) >= 3,
            lambda a: f"torus:{_dims_text(a[0])}",
            lambda a: _lattice(a[0], wrap=True),
        ),
        _Family(
            "hypercube",
            "hypercube:D",
            "1 parameter D >= 0",
            "hypercube Q_D on 2^D vertices",
            "hypercube:4",
            _fixed(1),
            lambda a: a[0] >= 0,
            lambda a: f"hypercube:{a[0]}",
            lambda a: _simple_graph(
                2 ** a[0],
                [(v, v | 1 << b) for v in range(2 ** a[0]) for b in range(a[0]) if not v >> b & 1],
            ),
        ),
        _Family(
            "prism",
            "prism:N",
            "1 parameter N >= 3",
            "prism C_N x K_2 on 2N vertices",
            "prism:6",
            _fixed(1),
            lambda a: a[0] >= 3,
            lambda a: f"prism:{a[0]}",
            lambda a: _simple_graph(
                2 * a[0],
                _cycle_edges(a[0])
                + _cycle_edges(a[0], a[0])
                + [(i, a[0] + i) for i in range(a[0])],
            ),
        ),
        _Family(
            "moebius",
            "moebius:N",
            "1 parameter N >= 2",
            "Möbius ladder on 2N vertices",
            "moebius:5",
            _fixed(1),
            lambda a: a[0] >= 2,
            lambda a: f"moebius:{a[0]}",
            lambda a: _simple_graph(
                2 * a[0], _cycle_edges(2 * a[0]) + [(i, i + a[0]) for i in range(a[0])]
            ),
        ),
        _Family(
            "circulant",
            "circulant:N:J1,J2,...",
            "N >= 3 and distinct jumps 1 <= J <= N/2",
            "circulant graph with the given jumps",
            "circulant:10:1,3",
            _circulant_parse,
            lambda a: (
                a[0] >= 3 and len(set(a[1])) == len(a[1]) and all(1 <= j <= a[0] // 2 for j in a[1])
            ),
            lambda a: f"circulant:{a[0]}:" + ",".join(map(str, a[1])),
            lambda a: _circulant(a[0], a[1]),
        ),
        _Family(
            "petersen",
            "petersen:N,K",
            "2 parameters N,K with N >= 3 and 1 <= K < N/2",
            "generalized Petersen graph GP(N,K)",
            "petersen:5,2",
            _fixed(2),
            lambda a: a[0] >= 3 and a[1] >= 1 and 2 * a[1] < a[0],
            lambda a: f"petersen:{a[0]},{a[1]}",
            lambda a: _petersen(a[0], a[1]),
        ),
        _Family(
            "paley",
            "paley:Q",
            "1 parameter Q, a prime power with Q ≡ 1 (mod 4)",
            "Paley graph on GF(Q)",
            "paley:13",
            _fixed(1),
            lambda a: a[0] % 4 == 1 and _prime_power(a[0]) is not None,
            lambda a: f"paley:{a[0]}",
            lambda a: _paley(a[0]),
        ),
        _Family(
            "gnp",
            "gnp:N,P[,seed=S]",
            "N >= 1, a probability 0 <= P <= 1 and optional seed=S",
            "random graph G(N,P)",
            "gnp:20,0.3,seed=7",
            _random_parse(lambda t: [_probability(t)]),
            lambda a: a[0] >= 1 and 0.0 <= a[1][1] <= 1.0,
            lambda a: f"gnp:{a[0]},{a[1][0]},seed={a[2]}",
            lambda a: _gnp(a[0], a[1][1], a[2]),
        ),
        _Family(
            "regular",
            "regular:N,D[,seed=S]",
            "N >= 1, 0 <= D < N with N·D even, optional seed=S",
            "random D-regular graph",
            "regular:12,3,seed=1",
            _random_parse(_values),
            lambda a: a[0] >= 1 and 0 <= a[1] < a[0] and a[0] * a[1] % 2 == 0,
            lambda a: f"regular:{a[0]},{a[1]},seed={a[2]}",
            lambda a: _regular(a[0], a[1], a[2]),
        ),
    ]
}


def _wheel_rim(n: int) -> list[tuple[int, int]]:
    return [(i, i % n + 1) for i in range(1, n + 1)]


def family_names() -> list[str]:
    """The names of the families, in the order :func:`family_table` lists them.

    Examples
    --------
    >>> family_names()[:3]
    ['complete', 'bipartite', 'multipartite']
    """
    return list(_FAMILIES)


def family_table() -> list[tuple[str, str, str]]:
    """``(grammar, description, example)`` for every family.

    Examples
    --------
    >>> family_table()[0]
    ('complete:N', 'complete graph K_N', 'complete:5')
    """
    return [(f.grammar, f.summary, f.example) for f in _FAMILIES.values()]


def is_family_spec(text: str) -> bool:
    """Whether ``text`` has the shape ``name:params`` of a family spec (the name is not checked).

    Examples
    --------
    >>> is_family_spec("grid:3x3"), is_family_spec("graphs/campus.txt")
    (True, False)
    """
    return bool(_SPEC_START.match(text.strip()))


def _expand(spec: str) -> tuple[_Family, list[list[Any]]]:
    text = "".join(spec.split())
    name, colon, params = text.partition(":")
    family = _FAMILIES.get(name.lower())
    if family is not None and not colon:
        raise GraphFormatError(
            f"family {family.name!r} expects {family.expects} ({family.grammar}), got {spec!r}"
        )
    if family is None:
        known = ", ".join(_FAMILIES)
        raise GraphFormatError(
            f"unknown graph family in {spec!r}; expected name:params with one of: {known}",
        )
    try:
        choices = family.parse(params)
    except _BadSpec as exc:
        raise GraphFormatError(
            f"family {family.name!r} expects {family.expects} ({family.grammar}), "
            f"got {spec!r}: {exc}",
        ) from None
    return family, choices


def _members(spec: str) -> Iterator[tuple[_Family, tuple[Any, ...]]]:
    family, choices = _expand(spec)
    for combination in itertools.product(*choices):
        if not family.valid(combination):
            raise GraphFormatError(
                f"family {family.name!r} expects {family.expects}, got {spec!r}"
                + (f" (at {family.spec(combination)!r})" if ".." in spec else ""),
            )
        yield family, combination


def count_family_graphs(spec: str) -> int:
    """How many graphs :func:`family_graphs` yields for ``spec`` (without building them).

    Examples
    --------
    >>> count_family_graphs("grid:2..4x3..5"), count_family_graphs("gnp:10,0.5,seed=1..2000")
    (9, 2000)
    """
    _, choices = _expand(spec)
    return math.prod(len(c) for c in choices)


def family_graphs(spec: str) -> Iterator[nx.Graph]:
    """Generate the graphs a family spec describes, lazily, ranges expanded.

    Parameters
    ----------
    spec : str
        ``name:params`` as in the module docstring; integer parameters may be ranges ``A..B``.

    Yields
    ------
    networkx.Graph
        Vertices ``0 .. n-1``, every edge with ``weight`` 1; ``G.graph["name"]`` is the spec of
        this member, ``G.graph["source"]`` the spec given, ``G.graph["family"]`` the name.

    Raises
    ------
    GraphFormatError
        For an unknown family, a wrong number of parameters or a parameter out of range
        (raised when the offending member is reached).

    Examples
    --------
    >>> [G.graph["name"] for G in family_graphs("grid:2..3")]
    ['grid:2x2', 'grid:3x3']
    >>> [G.number_of_edges() for G in family_graphs("cycle:3..5")]
    [3, 4, 5]

    References
    ----------
    See the module docstring (Watkins 1969; Paley 1933; Batagelj and Brandes 2005).
    """
    for family, arguments in _members(spec):
        G = family.build(arguments)
        G.graph["name"] = family.spec(arguments)
        G.graph["family"] = family.name
        G.graph["source"] = spec
        yield G


def family_graph(spec: str) -> nx.Graph:
    """The one graph a family spec without ranges describes.

    Raises
    ------
    GraphFormatError
        For an unknown family, a bad parameter, or a spec holding a range ``A..B``
        (use :func:`family_graphs`).

    Examples
    --------
    >>> G = family_graph("petersen:5,2")
    >>> G.number_of_nodes(), G.number_of_edges(), {d for _, d in G.degree()}
    (10, 15, {3})
    >>> family_graph("wheel:2")
    Traceback (most recent call last):
    ...
    graphinv.errors.GraphFormatError: family 'wheel' expects 1 parameter N >= 3, got 'wheel:2'

    References
    ----------
    See the module docstring.
    """
    if ".." in spec:
        count = count_family_graphs(spec)
        raise GraphFormatError(
            f"the spec {spec!r} holds a range ({count} graphs); expected one graph "
            "(use family_graphs for ranges)",
        )
    return next(family_graphs(spec))
