"""The Tarn Hollow campus demo: designs, published counts, cospectral pairs, files."""

from __future__ import annotations

import html
import json

import pytest

from graphinv.report.demo import DISCLAIMER, run_demo


@pytest.fixture(scope="module")
def demo(tmp_path_factory):
    return run_demo(out=tmp_path_factory.mktemp("demo"))


def _design(result, name):
    return next(d for d in result.designs if d.name == name)


def test_designs_are_ranked_by_spanning_trees(demo):
    counts = [d.summary.spanning_trees for d in demo.designs]
    assert counts == sorted(counts, reverse=True)
    assert len(demo.designs) == 10


def test_published_counts_and_groups(demo):
    # Ladder P2 x P7: 2911 spanning trees (OEIS A001353) and a cyclic group.
    assert _design(demo, "ladder").summary.spanning_trees == 2911
    # Wheel with 13 spokes: τ = L_26 - 2 = 271441 (OEIS A004146); K = Z521 ⊕ Z521 with
    # L_13 = 521 (Biggs 1999, odd wheels, memory).
    wheel = _design(demo, "wheel-core").summary
    assert wheel.spanning_trees == 271441
    assert wheel.critical_group.invariant_factors == (521, 521)
    # A 14-cycle: τ = 14 and K = Z14 (common fact); doubled, τ = 14 · 2^13 (each of the 14
    # spanning paths picks one of two parallel links for each of its 13 edges; common fact).
    assert _design(demo, "ring").summary.critical_group.invariant_factors == (14,)
    assert _design(demo, "dual-ring").summary.spanning_trees == 14 * 2**13
    # Four 4-cycles glued at cut vertices: the group is the sum over blocks, (Z4)^4
    # (common fact: the critical group is the direct sum over biconnected components).
    assert _design(demo, "star-of-rings").summary.critical_group.invariant_factors == (4, 4, 4, 4)
    # Minimum cuts: a ring loses connectivity after 2 cuts; the star of rings has bridges.
    assert _design(demo, "ring").min_cut == 2
    assert _design(demo, "star-of-rings").min_cut == 1
    assert _design(demo, "dual-ring").min_cut == 4


def test_cospectral_pairs_are_found_and_groups_compared(demo):
    laplacian = {f.designs: f for f in demo.cospectral if f.matrix == "laplacian"}
    assert set(laplacian) == {("dual-homed-a", "dual-homed-b"), ("hub-a", "hub-b")}
    # Checked against python-flint's Smith form while building the data (see graphs/demo).
    assert laplacian[("dual-homed-a", "dual-homed-b")].groups_differ
    assert not laplacian[("hub-a", "hub-b")].groups_differ
    assert "critical group" in laplacian[("dual-homed-a", "dual-homed-b")].separated_by


def test_mesh_plans_fit_near_the_square_grid_limit(demo):
    # Square grids 2x2..12x12; Temperley 1974: exp(4G/π) ≈ 3.20991.
    assert demo.mesh.vertex_counts == tuple(k * k for k in range(2, 13))
    assert demo.mesh.limit == pytest.approx(3.20991, abs=1e-5)
    assert abs(demo.mesh.relative_error) < 0.01


def test_files_written(demo):
    page = demo.report.read_text(encoding="utf-8")
    pngs = [p for p in demo.figures if p.suffix == ".png"]
    assert pngs and all(p.exists() for p in demo.figures)
    assert page.count('src="data:image/png;base64,') == len(pngs)
    assert html.escape(DISCLAIMER) in page
    lines = [json.loads(line) for line in demo.records.read_text(encoding="utf-8").splitlines()]
    designs = [r for r in lines if "design" in r]
    assert [r["design"] for r in designs] == [d.name for d in demo.designs]
    assert all(isinstance(r["spanning_trees"], str) for r in designs)
    assert any(r.get("record") == "cospectral" for r in lines)
    assert lines[-1]["record"] == "mesh_growth"
