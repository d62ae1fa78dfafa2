"""What people read: summaries, tables, JSON Lines, figures, HTML reports and the demo.

- :mod:`graphinv.report.summary`: :func:`summarize` a graph into a :class:`GraphSummary`
  (rich tables in the terminal, HTML and LaTeX in notebooks);
- :mod:`graphinv.report.jsonl`: JSON Lines with big integers as decimal strings;
- :mod:`graphinv.report.plots`: matplotlib figures (PNG and SVG);
- :mod:`graphinv.report.growth`, :mod:`graphinv.report.random_groups`,
  :mod:`graphinv.report.limits`: spanning-tree growth fits and random critical groups beside
  their published limits;
- :mod:`graphinv.report.html`: self-contained HTML reports;
- :mod:`graphinv.report.demo` and :mod:`graphinv.report.gallery`: ``graphinv demo`` and
  ``graphinv figures``.

Heavy libraries (matplotlib, rich) are imported only by the functions that use them.
"""

from __future__ import annotations

from graphinv.report.growth import GrowthFit, family_growth, fit_growth, grid_growth
from graphinv.report.html import (
    collection_report,
    graph_report,
    store_report,
    write_report,
)
from graphinv.report.jsonl import read_json_lines, to_json_line, write_json_lines
from graphinv.report.limits import (
    cyclic_probability_limit,
    grid_growth_limit,
    rank_distribution_limit,
    sylow_trivial_probability_limit,
)
from graphinv.report.random_groups import RandomGroupSample, sample_random_groups
from graphinv.report.summary import (
    GraphSummary,
    format_group,
    summaries,
    summaries_table,
    summarize,
    summary_table,
)

__all__ = [
    "GraphSummary",
    "GrowthFit",
    "RandomGroupSample",
    "collection_report",
    "cyclic_probability_limit",
    "family_growth",
    "fit_growth",
    "format_group",
    "graph_report",
    "grid_growth",
    "grid_growth_limit",
    "rank_distribution_limit",
    "read_json_lines",
    "sample_random_groups",
    "store_report",
    "summaries",
    "summaries_table",
    "summarize",
    "summary_table",
    "sylow_trivial_probability_limit",
    "to_json_line",
    "write_json_lines",
    "write_report",
]
