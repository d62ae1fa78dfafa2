"""The batch, survey and export commands."""

from __future__ import annotations

import json

from graphinv.cli import app


def test_batch_survey_export(cli_runner, tmp_path):
    store = str(tmp_path / "cli.db")
    result = cli_runner.invoke(
        app, ["batch", "wheel:3..6", "complete:5", "--store", store, "--workers", "1"]
    )
    assert result.exit_code == 0, result.output
    assert "5 graphs computed (0 failed), 0 already stored" in result.output
    again = cli_runner.invoke(app, ["batch", "wheel:3..6", "complete:5", "-s", store, "--jsonl"])
    assert json.loads(again.output)["skipped"] == 5

    survey = cli_runner.invoke(app, ["survey", store])
    assert survey.exit_code == 0, survey.output
    # W_6: Z8 + Z40, order 320 (Biggs 1999, memory; OEIS A004146 for the order)
    assert "largest   order 320: Z/8 ⊕ Z/40  [wheel:6]" in survey.output
    assert "ranks     2: 4, 3: 1" in survey.output
    record = json.loads(cli_runner.invoke(app, ["survey", store, "--jsonl"]).output)
    assert record["cyclic_fraction"] == "0" and record["graphs"] == 5

    target = tmp_path / "out.jsonl"
    exported = cli_runner.invoke(app, ["export", store, "-o", str(target)])
    assert exported.exit_code == 0
    lines = [json.loads(line) for line in target.read_text().splitlines()]
    assert [r["index"] for r in lines] == [0, 1, 2, 3, 0]


def test_cospectral_classes_listing(cli_runner, tmp_path):
    source = tmp_path / "pair.g6"
    source.write_text("Cs\nCw\n")  # K_{1,3} and K_3 + K_1: same Q spectrum (common fact)
    store = str(tmp_path / "pair.db")
    assert cli_runner.invoke(app, ["batch", str(source), "-s", store, "-w", "1"]).exit_code == 0
    listing = cli_runner.invoke(app, ["survey", store, "--classes", "signless"])
    assert listing.output.strip() == "2 graphs: Cs Cw"
    assert cli_runner.invoke(app, ["survey", store, "--classes", "laplacian"]).output == ""


def test_errors_are_one_line(cli_runner, tmp_path):
    store = str(tmp_path / "e.db")
    missing = cli_runner.invoke(app, ["batch", str(tmp_path / "nope.g6"), "-s", store])
    assert missing.exit_code == 2
    assert "no such file or folder" in missing.output and "Traceback" not in missing.output
    unknown = cli_runner.invoke(app, ["batch", "cycle:4", "-s", store, "--only", "colour"])
    assert unknown.exit_code == 2 and "unknown invariant 'colour'" in unknown.output
    engine = cli_runner.invoke(app, ["batch", "cycle:4", "-s", store, "--engine", "spark"])
    assert engine.exit_code == 2 and "unknown engine 'spark'" in engine.output
    survey = cli_runner.invoke(app, ["survey", str(tmp_path / "none.db")])
    assert survey.exit_code == 2 and "no such store" in survey.output


def test_folder_of_edge_lists(cli_runner, tmp_path, stored_rows):
    folder = tmp_path / "campus"
    folder.mkdir()
    # an invented campus ring of four buildings, one link doubled (multiplicity 2)
    (folder / "ring.edges").write_text("library lab\nlab hall 2\nhall gym\ngym library\n")
    (folder / "spur.edges").write_text("library lab\nlab hall\n")
    (folder / "broken.edges").write_text("library lab -3\n")
    (folder / "extra.g6").write_text("Bw\nC~\n")
    store = tmp_path / "campus.db"
    result = cli_runner.invoke(app, ["batch", str(folder), "-s", str(store), "-w", "1"])
    assert result.exit_code == 0, result.output
    rows = {(row["source"].rsplit("/", 1)[-1], row["content"]): row for row in stored_rows(store)}
    ring = rows[("campus", "ring.edges")]
    # 4-cycle with one doubled edge: a spanning tree drops one edge, so tau = sum over the
    # dropped edge of the product of the other multiplicities = 2 + 1 + 2 + 2 = 7 (common
    # fact, by hand); order 7 is prime, so the group is Z7
    assert (ring["critical_group"], ring["spanning_trees"]) == ("7", "7")
    assert rows[("campus", "spur.edges")]["spanning_trees"] == "1"  # a tree (common fact)
    assert "multiplicity" in rows[("campus", "broken.edges")]["error"]
    assert rows[("extra.g6", "C~")]["critical_group"] == "4,4"  # K_4 (Lorenzini 1991, memory)
    assert [row["position"] for row in stored_rows(store) if row["source"].endswith("campus")] == [
        0,
        1,
        2,
    ]
