"""Chip-firing: configurations, stabilization, recurrent configurations and their group.

Modules: :mod:`~graphinv.chipfiring.configurations` (chip graphs and configurations),
:mod:`~graphinv.chipfiring.stabilize` (the vectorised stabilizer),
:mod:`~graphinv.chipfiring.recurrents` (recurrents, superstables, the identity, group
operations), :mod:`~graphinv.chipfiring.group` (explicit isomorphism with the invariant-factor
presentation) and :mod:`~graphinv.chipfiring.families` (the wired grid).
"""

from __future__ import annotations

from graphinv.chipfiring.configurations import (
    ChipGraph,
    Configuration,
    ConfigurationError,
    chip_graph,
)
from graphinv.chipfiring.families import WIRED_SINK, wired_grid
from graphinv.chipfiring.group import (
    RecurrentGroup,
    coordinates,
    from_coordinates,
    group_generators,
    recurrent_group,
)
from graphinv.chipfiring.recurrents import (
    burning_configuration,
    burning_script,
    configuration_order,
    equivalent_recurrent,
    equivalent_superstable,
    identity_configuration,
    is_recurrent,
    is_superstable,
    recurrent_configurations,
    recurrent_identity,
    recurrent_negative,
    recurrent_sum,
    superstable_configurations,
)
from graphinv.chipfiring.stabilize import (
    Stabilization,
    StabilizationError,
    stabilize,
)

__all__ = [
    "WIRED_SINK",
    "ChipGraph",
    "Configuration",
    "ConfigurationError",
    "RecurrentGroup",
    "Stabilization",
    "StabilizationError",
    "burning_configuration",
    "burning_script",
    "chip_graph",
    "configuration_order",
    "coordinates",
    "equivalent_recurrent",
    "equivalent_superstable",
    "from_coordinates",
    "group_generators",
    "identity_configuration",
    "is_recurrent",
    "is_superstable",
    "recurrent_configurations",
    "recurrent_group",
    "recurrent_identity",
    "recurrent_negative",
    "recurrent_sum",
    "stabilize",
    "superstable_configurations",
    "wired_grid",
]
