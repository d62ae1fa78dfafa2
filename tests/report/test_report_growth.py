"""Spanning-tree growth fits against Temperley's constant and exact OEIS counts."""

from __future__ import annotations

import math

import networkx as nx
import pytest

from graphinv.errors import InvalidGraphError
from graphinv.report.growth import family_growth, fit_growth, grid_growth
from graphinv.report.limits import grid_growth_limit

# OEIS A007341: spanning trees of the n x n grid, n = 1..8.
A007341 = [
    1,
    4,
    192,
    100352,
    557568000,
    32565539635200,
    19872369301840986112,
    126231322912498539682594816,
]


def test_grid_limit_value():
    # exp(4G/π) ≈ 3.20991, G Catalan's constant (Temperley 1974; Kasteleyn 1961; memory).
    assert grid_growth_limit() == pytest.approx(3.20991, abs=5e-6)


def test_fitted_grid_constant_within_one_percent_of_temperley():
    # Even sides 2..60: exact counts up to 10x10, the sparse log-determinant beyond.
    fit = grid_growth(range(2, 61, 2))
    assert max(fit.vertex_counts) == 3600
    assert not all(fit.exact) and any(fit.exact)
    # Temperley 1974: τ(n x n)^(1/n²) → exp(4G/π) ≈ 3.2099.
    assert fit.limit == pytest.approx(3.2099, abs=1e-4)
    assert abs(fit.relative_error) < 0.01
    # The boundary term is negative (free boundary loses trees), so a bulk-only estimate
    # τ^(1/N) at the largest grid lies below the limit while the fit recovers it.
    assert math.exp(fit.log_counts[-1] / fit.vertex_counts[-1]) < fit.limit < fit.per_vertex * 1.01


def test_exact_points_match_oeis():
    fit = grid_growth(range(2, 9))
    assert all(fit.exact)
    for n, value in zip(range(2, 9), fit.log_counts, strict=True):
        assert value == pytest.approx(math.log(A007341[n - 1]), rel=1e-12)  # OEIS A007341


def test_ladder_growth_is_two_plus_root_three():
    # Ladders P2 x Pk: OEIS A001353 satisfies a(k) = 4 a(k-1) - a(k-2), growing like (2 + √3)^k.
    fit = family_growth((nx.ladder_graph(k) for k in range(5, 20)), dimension=1)
    assert fit.per_vertex**2 == pytest.approx(2 + math.sqrt(3), rel=1e-6)


def test_fit_needs_two_sizes_and_connected_graphs():
    with pytest.raises(InvalidGraphError, match="two different sizes"):
        fit_growth([9, 9], [1.0, 1.0])
    with pytest.raises(InvalidGraphError, match="no spanning tree"):
        family_growth([nx.path_graph(3), nx.empty_graph(4)])
    with pytest.raises(InvalidGraphError, match="dimension"):
        fit_growth([4, 9], [1.0, 2.0], dimension=3)


def test_record_is_json_ready_and_renders_in_notebooks():
    fit = grid_growth(range(2, 7))
    assert "per vertex; limit 3.209912" in fit._repr_html_()
    record = fit.to_record()
    assert record["limit_source"].startswith("exp(4G/π)")
    assert [g["vertices"] for g in record["graphs"]] == [4, 9, 16, 25, 36]
