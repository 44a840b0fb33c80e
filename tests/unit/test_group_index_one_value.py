"""One group index for G.652.D at 1550 nm (review: the traces default and the demo said 1.4682,
the Fault preset 1.4677, so Traces -> Fault moved an event at 1815.0 m to "fibre 1816 m").

The value comes from the preset library, presets/fibres.toml (G.652.D and OS2 at 1550 nm,
a typical value, from memory); the traces layer may not read presets (import contract), so
its constants are checked against the library here.
"""

from __future__ import annotations

from datetime import UTC, datetime

import pytest

from fieldkit.jobs import demo
from fieldkit.presets import load_presets
from fieldkit.traces import synthetic
from fieldkit.traces.analysis import DEFAULT_GROUP_INDEX


def _preset(name: str) -> float:
    return load_presets(None).fibres[name].group_index(1550.0)


@pytest.mark.parametrize("name", ["G.652.D", "OS2"])
def test_the_traces_default_is_the_preset(name: str) -> None:
    assert DEFAULT_GROUP_INDEX == pytest.approx(_preset(name), abs=1e-9)


def test_the_synthetic_traces_use_the_preset() -> None:
    assert synthetic.SynthFibre(length_m=1000.0).group_index == pytest.approx(_preset("G.652.D"))


def test_the_demo_fault_uses_the_preset() -> None:
    jobs = demo.build(datetime(2026, 3, 10, tzinfo=UTC))
    indexes = [f.inputs["group_index"] for j in jobs for link in j.links for f in link.faults]
    assert indexes and all(n == pytest.approx(_preset("G.652.D")) for n in indexes)
