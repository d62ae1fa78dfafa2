"""JSON Lines round trips keep every integer exact."""

from __future__ import annotations

import io
import json

import networkx as nx

from graphinv.report.jsonl import (
    SAFE_INTEGER_LIMIT,
    decimal_string,
    json_safe,
    read_json_lines,
    write_json_lines,
)
from graphinv.report.summary import summarize

# Spanning trees of the 8 x 8 grid: OEIS A007341, a(8).
GRID_8_TREES = 126231322912498539682594816


def test_summary_round_trip_keeps_the_8x8_grid_count_exact():
    summary = summarize(nx.grid_2d_graph(8, 8), name="grid 8x8")
    assert summary.spanning_trees == GRID_8_TREES  # OEIS A007341
    buffer = io.StringIO()
    assert write_json_lines([summary], buffer) == 1
    buffer.seek(0)
    (record,) = read_json_lines(buffer)
    assert record == json_safe(summary.to_record())
    assert record["spanning_trees"] == "126231322912498539682594816"
    assert int(record["group_order"]) == GRID_8_TREES
    product = 1
    for factor in record["invariant_factors"]:
        product *= int(factor)
    assert product == GRID_8_TREES  # order of the critical group = spanning trees (Biggs 1999)


def test_integers_beyond_2_53_become_strings_and_small_ones_stay_numbers():
    record = {"small": SAFE_INTEGER_LIMIT - 1, "big": SAFE_INTEGER_LIMIT, "negative": -(2**80)}
    line = json.loads(json.dumps(json_safe(record)))
    assert line == {
        "small": 9007199254740991,
        "big": "9007199254740992",
        "negative": "-1208925819614629174706176",
    }


def test_integers_past_pythons_digit_limit_round_trip():
    huge = 3**20000  # 9543 digits, beyond int's default 4300-digit str() limit
    buffer = io.StringIO()
    write_json_lines([{"count": huge}], buffer)
    buffer.seek(0)
    (record,) = read_json_lines(buffer)
    text = record["count"]
    assert len(text) == 9543
    assert decimal_string(huge) == text
    # Rebuild the int without str(): compare digit blocks against pow arithmetic.
    value = 0
    for start in range(0, len(text), 1000):
        block = text[start : start + 1000]
        value = value * 10 ** len(block) + int(block)
    assert value == huge
