"""Critical groups of random graphs G(n, q), tallied against their limiting law.

:func:`sample_random_groups` computes the critical groups of seeded samples of G(n, q) (the
loaders' ``gnp:n,q,seed=S`` family, so every sample can be regenerated from its spec) and
tallies their ranks, how many are cyclic, and how often the Sylow 2-, 3- and 5-subgroups are
trivial.  :mod:`graphinv.report.limits` gives what Wood (2017) predicts for large n.

References
----------
M. M. Wood, "The distribution of sandpile groups of random graphs", J. Amer. Math. Soc. 30 (2017);
J. Clancy, N. Kaplan, T. Leake, S. Payne, M. M. Wood, "On a Cohen–Lenstra heuristic for
Jacobians of random graphs", J. Algebraic Combin. 42 (2015).
"""

from __future__ import annotations

import math
from collections import Counter
from dataclasses import dataclass
from fractions import Fraction
from typing import Any

from graphinv.errors import InvalidGraphError

__all__ = ["RandomGroupSample", "sample_random_groups"]

#: Primes whose Sylow subgroups are tallied.
TALLIED_PRIMES = (2, 3, 5)


@dataclass(frozen=True)
class RandomGroupSample:
    """Tallies of the critical groups of ``samples`` seeded draws of G(n, q).

    Attributes
    ----------
    n : int
        Vertices per graph.
    q : str
        The edge probability as written in the spec (e.g. ``"1/2"``).
    first_seed : int
        Seeds ``first_seed .. first_seed + samples - 1`` were drawn.
    samples : int
    rank_counts : tuple of (int, int)
        ``(rank, how many)`` in increasing rank; rank is the minimum number of generators of the
        finite critical group (the number of invariant factors).
    sylow_trivial : tuple of (int, int)
        ``(p, how many groups have no element of order p)`` for p = 2, 3, 5.
    disconnected : int
        How many samples were disconnected (their group is then the torsion of coker L).
    """

    n: int
    q: str
    first_seed: int
    samples: int
    rank_counts: tuple[tuple[int, int], ...]
    sylow_trivial: tuple[tuple[int, int], ...]
    disconnected: int

    @property
    def spec(self) -> str:
        """The family spec that regenerates the samples."""
        last = self.first_seed + self.samples - 1
        return f"gnp:{self.n},{self.q},seed={self.first_seed}..{last}"

    @property
    def cyclic(self) -> int:
        """How many sampled groups are cyclic (rank at most 1)."""
        return sum(count for rank, count in self.rank_counts if rank <= 1)

    @property
    def cyclic_fraction(self) -> float:
        """The fraction of cyclic groups."""
        return self.cyclic / self.samples

    @property
    def cyclic_standard_error(self) -> float:
        """Binomial standard error of :attr:`cyclic_fraction`."""
        f = self.cyclic_fraction
        return math.sqrt(f * (1 - f) / self.samples)

    def rank_fraction(self, rank: int) -> float:
        """The fraction of sampled groups of exactly this rank."""
        return dict(self.rank_counts).get(rank, 0) / self.samples

    def _repr_html_(self) -> str:
        import html

        record = self.to_record()
        rows = "".join(
            f"<tr><td>rank {r['rank']}</td><td>{r['count']}</td>"
            f"<td>{r['count'] / self.samples:.4f}</td>"
            f"<td>{'' if r['limit'] is None else format(r['limit'], '.4f')}</td></tr>"
            for r in record["ranks"]
        )
        rows += (
            f"<tr><td>cyclic</td><td>{self.cyclic}</td><td>{self.cyclic_fraction:.4f}</td>"
            f"<td>{record['cyclic_limit']:.4f}</td></tr>"
        )
        rows += "".join(
            f"<tr><td>no {s['p']}-torsion</td><td>{s['count']}</td>"
            f"<td>{s['count'] / self.samples:.4f}</td><td>{s['limit']:.4f}</td></tr>"
            for s in record["sylow_trivial"]
        )
        return (
            f"<table><caption>{html.escape(self.spec)}</caption>"
            "<tr><th></th><th>graphs</th><th>fraction</th><th>limit (Wood 2017)</th></tr>"
            f"{rows}</table>"
        )

    def to_record(self) -> dict[str, Any]:
        """A JSON-ready dict of the tallies and the limiting predictions beside them."""
        from graphinv.report.limits import (
            cyclic_probability_limit,
            rank_distribution_limit,
            sylow_trivial_probability_limit,
        )

        top = max(rank for rank, _ in self.rank_counts)
        law = rank_distribution_limit(max(top, 1))
        return {
            "spec": self.spec,
            "n": self.n,
            "q": self.q,
            "samples": self.samples,
            "disconnected": self.disconnected,
            "cyclic": self.cyclic,
            "cyclic_fraction": self.cyclic_fraction,
            "cyclic_limit": cyclic_probability_limit(),
            "ranks": [
                {"rank": rank, "count": count, "limit": law.get(rank)}
                for rank, count in self.rank_counts
            ],
            "sylow_trivial": [
                {"p": p, "count": count, "limit": sylow_trivial_probability_limit(p)}
                for p, count in self.sylow_trivial
            ],
        }


def _probability_text(q: float | Fraction | str) -> str:
    text = str(q)
    try:
        value = Fraction(text)
    except (ValueError, ZeroDivisionError):
        raise InvalidGraphError(f"Argument 'q' must be a probability, not {q!r}.") from None
    if not 0 <= value <= 1:
        raise InvalidGraphError(f"Argument 'q' must be a probability in [0, 1], not {q!r}.")
    return text


def sample_random_groups(
    n: int, q: float | Fraction | str = "1/2", *, samples: int, first_seed: int = 1
) -> RandomGroupSample:
    """Critical groups of ``samples`` seeded draws of G(n, q), tallied.

    Parameters
    ----------
    n : int
        Vertices per graph (at least 2).
    q : float, Fraction or str
        Edge probability, e.g. ``"1/2"`` or ``0.5``.
    samples : int
        How many graphs (seeds ``first_seed ..``).
    first_seed : int
        The first seed of the ``gnp`` family spec.

    Returns
    -------
    RandomGroupSample

    Examples
    --------
    >>> sample = sample_random_groups(12, "1/2", samples=20)
    >>> sample.spec, sum(count for _, count in sample.rank_counts)
    ('gnp:12,1/2,seed=1..20', 20)

    References
    ----------
    Wood, J. Amer. Math. Soc. 30 (2017); Clancy et al., J. Algebraic Combin. 42 (2015).
    """
    from graphinv import critical_group
    from graphinv.io import family_graphs

    if isinstance(n, bool) or not isinstance(n, int) or n < 2:
        raise InvalidGraphError(f"Argument 'n' must be an integer >= 2, not {n!r}.")
    if isinstance(samples, bool) or not isinstance(samples, int) or samples < 1:
        raise InvalidGraphError(f"Argument 'samples' must be a positive integer, not {samples!r}.")
    q_text = _probability_text(q)
    ranks: Counter[int] = Counter()
    trivial: Counter[int] = Counter()
    disconnected = 0
    spec = f"gnp:{n},{q_text},seed={first_seed}..{first_seed + samples - 1}"
    for G in family_graphs(spec):
        group = critical_group(G)
        factors = group.invariant_factors
        ranks[len(factors)] += 1
        if group.free_rank > 1:
            disconnected += 1
        for p in TALLIED_PRIMES:
            if all(d % p for d in factors):
                trivial[p] += 1
    return RandomGroupSample(
        n=n,
        q=q_text,
        first_seed=first_seed,
        samples=samples,
        rank_counts=tuple(sorted(ranks.items())),
        sylow_trivial=tuple((p, trivial[p]) for p in TALLIED_PRIMES),
        disconnected=disconnected,
    )
