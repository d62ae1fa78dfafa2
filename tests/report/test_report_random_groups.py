"""Critical groups of G(n, 1/2) against the limiting law of Wood (2017)."""

from __future__ import annotations

import pytest

from graphinv.errors import InvalidGraphError
from graphinv.io import family_graph
from graphinv.report.limits import (
    cyclic_probability_limit,
    p_rank_probability_limit,
    rank_distribution_limit,
    sylow_trivial_probability_limit,
)
from graphinv.report.random_groups import sample_random_groups

# ∏_{k≥1} ζ(2k+1)^{-1} ≈ 0.79352: Clancy, Kaplan, Leake, Payne, Wood, J. Algebraic Combin. 42
# (2015); Wood, J. Amer. Math. Soc. 30 (2017) (shared/reference, memory).
CYCLIC_LIMIT = 0.79352


def test_cyclic_limit_value():
    assert cyclic_probability_limit() == pytest.approx(CYCLIC_LIMIT, abs=1e-5)


def test_two_routes_to_the_cyclic_limit_agree():
    # The zeta product and the product over primes of P(p-rank ≤ 1) are different formulas for
    # the same number (Wood 2017 with independence over primes).
    law = rank_distribution_limit(1)
    assert law[0] + law[1] == pytest.approx(cyclic_probability_limit(), abs=1e-7)


def test_sylow_trivial_limits():
    # Wood 2017: P(Sylow p trivial) → ∏_{k≥0} (1 - p^(-2k-1)); p = 2, 3, 5: 0.41942, 0.63900,
    # 0.79334 (shared/reference, memory).
    assert sylow_trivial_probability_limit(2) == pytest.approx(0.41942, abs=1e-5)
    assert sylow_trivial_probability_limit(3) == pytest.approx(0.63900, abs=1e-5)
    assert sylow_trivial_probability_limit(5) == pytest.approx(0.79334, abs=1e-5)
    assert sum(p_rank_probability_limit(7, r) for r in range(20)) == pytest.approx(1.0)
    with pytest.raises(ValueError, match="prime"):
        p_rank_probability_limit(4, 1)


def test_rank_law_sums_to_one():
    law = rank_distribution_limit(6)
    assert law[0] == 0.0
    assert sum(law.values()) == pytest.approx(1.0, abs=1e-7)  # P(rank > 6) is about 5e-9
    assert law[1] > law[2] > law[3] > 0


def test_sample_is_reproducible_from_its_spec():
    sample = sample_random_groups(10, "1/2", samples=30, first_seed=5)
    assert sample.spec == "gnp:10,1/2,seed=5..34"
    assert "<caption>gnp:10,1/2,seed=5..34</caption>" in sample._repr_html_()
    assert sum(count for _, count in sample.rank_counts) == 30
    from graphinv import critical_group

    first = critical_group(family_graph("gnp:10,1/2,seed=5"))
    again = sample_random_groups(10, "1/2", samples=1, first_seed=5)
    assert again.rank_counts == ((len(first.invariant_factors), 1),)


def test_bad_arguments():
    with pytest.raises(InvalidGraphError, match="'n'"):
        sample_random_groups(1, samples=3)
    with pytest.raises(InvalidGraphError, match="probability"):
        sample_random_groups(10, "3/2", samples=3)
    with pytest.raises(InvalidGraphError, match="'samples'"):
        sample_random_groups(10, samples=0)


def test_cyclic_fraction_of_2000_samples_of_g30():
    # Binomial standard error at p ≈ 0.79 with 2,000 samples is ≈ 0.009, so 3 percentage points
    # is about 3.3 standard errors; systematic errors (counting the free part as a generator
    # makes every group non-cyclic, dropping factors makes every group cyclic) land far
    # outside.  Seeded, so the outcome is fixed.  About 13 s on this machine.
    sample = sample_random_groups(30, "1/2", samples=2000)
    assert sum(count for _, count in sample.rank_counts) == 2000
    assert min(rank for rank, _ in sample.rank_counts) >= 1
    assert abs(sample.cyclic_fraction - CYCLIC_LIMIT) <= 0.03  # Wood 2017; CKLPW 2015
    # Sylow 2-part trivial: limit 0.41942 (Wood 2017); standard error ≈ 0.011.
    two = dict(sample.sylow_trivial)[2] / sample.samples
    assert abs(two - sylow_trivial_probability_limit(2)) <= 0.04
