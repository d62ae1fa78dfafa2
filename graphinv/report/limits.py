"""Published limits that measured invariants are plotted against.

These are real numbers (floats), computed here from their defining formulas with mpmath rather
than typed in, so that a reader can see where each comes from:

- the growth constant of spanning trees of the square grid, ``exp(4G/π)`` per vertex with ``G``
  Catalan's constant (Temperley 1974; Kasteleyn 1961);
- the limiting probability that the critical group of the random graph G(n, q) is cyclic,
  ``∏_{k≥1} ζ(2k+1)^{-1}`` (conjectured by Clancy, Kaplan, Leake, Payne and Wood 2015; the Sylow
  distribution is Wood 2017);
- the limiting distribution of the Sylow p-rank and of the rank (minimum number of generators)
  of that group, from Wood's theorem that the Sylow p-subgroups are distributed as the cokernels
  of random symmetric p-adic matrices, whose p-rank law is the corank law of random symmetric
  matrices over F_p.

References
----------
H. N. V. Temperley, "Enumeration of graphs on a large periodic lattice", in *Combinatorics*
(Proc. British Combinatorial Conf. 1973), T. P. McDonough, V. C. Mavron (eds.), Cambridge
University Press, 1974, pp. 285-294 (page range from memory).
P. W. Kasteleyn, "The statistics of dimers on a lattice", Physica 27 (1961).
J. Clancy, N. Kaplan, T. Leake, S. Payne, M. M. Wood, "On a Cohen–Lenstra heuristic for
Jacobians of random graphs", J. Algebraic Combin. 42 (2015).
M. M. Wood, "The distribution of sandpile groups of random graphs", J. Amer. Math. Soc. 30 (2017).
F. J. MacWilliams, "Orthogonal matrices over finite fields", Amer. Math. Monthly 76 (1969).
"""

from __future__ import annotations

import functools
import math

__all__ = [
    "cyclic_probability_limit",
    "grid_growth_limit",
    "p_rank_probability_limit",
    "rank_distribution_limit",
    "sylow_trivial_probability_limit",
]

# Primes up to this bound enter the Euler products; the neglected tail of a product over
# primes p of (1 - O(p^-3)) is below 1e-8 here, far under any sampling error we compare with.
_PRIME_BOUND = 20_000


def grid_growth_limit() -> float:
    """The per-vertex growth constant of spanning trees of the n × n grid, ``exp(4G/π)``.

    ``τ(n × n grid)^(1/n²) → exp(4G/π) ≈ 3.20991`` where ``G`` is Catalan's constant.

    Examples
    --------
    >>> round(grid_growth_limit(), 5)
    3.20991

    References
    ----------
    Temperley 1974; Kasteleyn 1961.
    """
    import mpmath

    return float(mpmath.exp(4 * mpmath.catalan / mpmath.pi))


def cyclic_probability_limit() -> float:
    """Limiting probability that the critical group of G(n, q) is cyclic: ``∏_{k≥1} ζ(2k+1)^{-1}``.

    Computed with mpmath until the factors equal 1 to working precision.

    Examples
    --------
    >>> round(cyclic_probability_limit(), 5)
    0.79352

    References
    ----------
    Clancy, Kaplan, Leake, Payne, Wood, J. Algebraic Combin. 42 (2015) (the conjecture);
    Wood, J. Amer. Math. Soc. 30 (2017).
    """
    import mpmath

    with mpmath.workdps(30):
        product = mpmath.mpf(1)
        k = 1
        while True:
            zeta = mpmath.zeta(2 * k + 1)
            if zeta - 1 < mpmath.mpf(10) ** -25:
                break
            product /= zeta
            k += 1
        return float(product)


def sylow_trivial_probability_limit(p: int) -> float:
    """Limiting probability that the Sylow p-subgroup is trivial: ``∏_{k≥0} (1 - p^(-2k-1))``.

    Examples
    --------
    >>> [round(sylow_trivial_probability_limit(p), 5) for p in (2, 3, 5)]
    [0.41942, 0.639, 0.79334]

    References
    ----------
    Wood, J. Amer. Math. Soc. 30 (2017), Theorem 1.1 and Corollary 1.2 (memory).
    """
    return p_rank_probability_limit(p, 0)


def _require_prime(p: int) -> None:
    import sympy

    if not isinstance(p, int) or isinstance(p, bool) or not sympy.isprime(p):
        raise ValueError(f"Argument 'p' must be a prime, not {p!r}.")


def p_rank_probability_limit(p: int, r: int) -> float:
    """Limiting probability that the Sylow p-subgroup has rank exactly ``r``.

    Wood (2017) shows the Sylow p-subgroup of the critical group of G(n, q) is distributed in
    the limit as the cokernel of a random symmetric matrix over the p-adic integers; its p-rank
    is the corank modulo p, whose law is

    ``P(r) = ∏_{j≥0} (1 - p^(-2j-1)) · p^(-r(r+1)/2) / ∏_{i=1..r} (1 - p^(-i))``.

    Examples
    --------
    >>> round(sum(p_rank_probability_limit(2, r) for r in range(30)), 12)
    1.0
    >>> round(p_rank_probability_limit(3, 1), 5)
    0.3195

    References
    ----------
    MacWilliams, Amer. Math. Monthly 76 (1969) (coranks of symmetric matrices over F_p);
    Wood, J. Amer. Math. Soc. 30 (2017).
    """
    _require_prime(p)
    if not isinstance(r, int) or r < 0:
        raise ValueError(f"Argument 'r' must be a non-negative integer, not {r!r}.")
    return _p_rank_probability(p, r)


@functools.lru_cache(maxsize=4096)
def _p_rank_probability(p: int, r: int) -> float:
    trivial = 1.0
    j = 0
    while True:
        factor = float(p) ** (-(2 * j + 1))
        if factor < 1e-18:
            break
        trivial *= 1.0 - factor
        j += 1
    denominator = math.prod(1.0 - float(p) ** (-i) for i in range(1, r + 1))
    return trivial * float(p) ** (-r * (r + 1) / 2) / denominator


def rank_distribution_limit(max_rank: int) -> dict[int, float]:
    """Limiting law of the rank (minimum number of generators) of the critical group of G(n, q).

    The rank is the largest Sylow p-rank over all primes p.  With the Sylow subgroups for
    different primes independent in the limit (Wood 2017),
    ``P(rank ≤ r) = ∏_p P(p-rank ≤ r)``; the product runs over primes below 20,000 (the
    rest changes it by less than 1e-8 for r ≥ 1).  Rank 0 has limiting probability 0.

    Parameters
    ----------
    max_rank : int
        The largest rank listed; the returned probabilities for ranks ``0..max_rank`` sum to
        ``P(rank ≤ max_rank)``.

    Returns
    -------
    dict
        ``{rank: probability}`` for ``rank = 0 .. max_rank``.

    Examples
    --------
    >>> law = rank_distribution_limit(3)
    >>> round(law[1], 4), round(law[0] + law[1], 4) == round(cyclic_probability_limit(), 4)
    (0.7935, True)

    References
    ----------
    Wood, J. Amer. Math. Soc. 30 (2017); Clancy et al., J. Algebraic Combin. 42 (2015).
    """
    if not isinstance(max_rank, int) or max_rank < 0:
        raise ValueError(f"Argument 'max_rank' must be a non-negative integer, not {max_rank!r}.")
    at_most = [_rank_at_most(r) for r in range(max_rank + 1)]
    return {r: at_most[r] - (at_most[r - 1] if r else 0.0) for r in range(max_rank + 1)}


@functools.lru_cache(maxsize=64)
def _rank_at_most(r: int) -> float:
    if r == 0:
        return 0.0  # the product over all primes of P(p-rank = 0) diverges to 0
    import sympy

    log_product = 0.0
    for p in sympy.primerange(2, _PRIME_BOUND):
        log_product += math.log(sum(_p_rank_probability(int(p), s) for s in range(r + 1)))
    return math.exp(log_product)
