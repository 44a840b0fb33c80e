"""Link descriptions as people write them (preset names, values with units) turned into the
resolved :class:`fieldkit.calc.budget.LinkDescription` the calculation takes.

Split by role: :mod:`.files` reads a TOML or JSON file; :mod:`.resolve` resolves a written
description against the presets. Typed values are parsed by :mod:`fieldkit.inputs`, the record a
job keeps is built by :mod:`fieldkit.jobs.budget_records`, the text by
:mod:`fieldkit.text.budget`.
"""

from fieldkit.linkspec.files import load_spec_file
from fieldkit.linkspec.resolve import (
    DEFAULT_CONNECTOR_GRADE,
    DEFAULT_CONNECTORS,
    DEFAULT_SPLICE_GRADE,
    ResolvedBudget,
    application_limits,
    custom_fibre,
    resolve,
    splitter_component,
    transceiver_from_levels,
    transceiver_preset,
)

__all__ = [
    "DEFAULT_CONNECTORS",
    "DEFAULT_CONNECTOR_GRADE",
    "DEFAULT_SPLICE_GRADE",
    "ResolvedBudget",
    "application_limits",
    "custom_fibre",
    "load_spec_file",
    "resolve",
    "splitter_component",
    "transceiver_from_levels",
    "transceiver_preset",
]
