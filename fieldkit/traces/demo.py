"""OTDR traces for the demo scenario (invented): two fibres of the Library to Town Hall backbone.

Link LIB-TH-01 runs 1840 m from the Library comms room (end A) to the Town Hall basement (end B)
with one closure, JC-3 Market Street, where the Library cable (G.652.D) is spliced to the Town
Hall cable (G.657.A2). The demo's meter results have fibre 7 high at 1550 nm only, and its
splice log gives the JC-3 splices as measured both ways. These traces tell the same story:

- fibre 6: a good splice at JC-3 (-0.03 dB from A, 0.09 dB from B: 0.03 dB averaged);
- fibre 7: the worse JC-3 splice (0.21 dB from A, 0.47 dB from B: 0.34 dB averaged) and a
  macrobend of about 2.1 dB near the Town Hall tray, 25 m before end B.

The one-way readings differ because the smaller-mode-field G.657.A2 fibre backscatters more than
the G.652.D (a backscatter step of +0.12 dB and +0.26 dB: each direction reads the true loss
minus or plus half of it; ITU-T G.650.3 Appendix I). The traces are made from the physical
model of :mod:`fieldkit.traces.synthetic` and written as standard records by
:func:`fieldkit.traces.sor.write_sor`, so the demo needs no instrument files.
"""

from __future__ import annotations

from fieldkit.traces.sor import write_sor
from fieldkit.traces.synthetic import SynthEvent, SynthFibre, synth_trace

#: Fibre distance of closure JC-3 from end A, and of the bend near the Town Hall tray (m).
JC3_FIBRE_M = 1162.0
BEND_FIBRE_M = 1815.0
LENGTH_M = 1840.0

#: fibre: (splice loss at JC-3 averaged, backscatter step at JC-3, bend loss at 1550 nm), dB
_FIBRES = {6: (0.03, 0.12, 0.0), 7: (0.34, 0.26, 2.1)}


def _fibre(number: int) -> SynthFibre:
    splice, step, bend = _FIBRES[number]
    events = [SynthEvent(JC3_FIBRE_M, splice, None, step)]
    if bend:
        events.append(SynthEvent(BEND_FIBRE_M, bend, None))
    return SynthFibre(
        length_m=LENGTH_M,
        attenuation_db_per_km=0.19,
        events=tuple(events),
        end_reflectance_db=-48.0,  # an APC patch connector at the far panel, nothing mated
        wavelength_nm=1550.0,
        pulse_width_ns=10.0,
        spacing_m=0.25,
        dynamic_range_db=18.0,
        fibre_id=str(number),
        cable_id="LIB-TH-01",
        origin="Library comms room",
        destination="Town Hall basement",
    )


def demo_trace_files() -> dict[str, bytes]:
    """File name -> SR-4731 record: fibres 6 and 7 from both ends at 1550 nm."""
    out: dict[str, bytes] = {}
    for number in _FIBRES:
        fibre = _fibre(number)
        for direction, seen in (("AB", fibre), ("BA", fibre.reversed())):
            trace = synth_trace(seen, seed=number * 10 + len(out), source=direction)
            out[f"F{number:02d}_1550_{direction}.sor"] = write_sor(
                trace, operator="Ana Ruiz", comment="demo trace (invented scenario)"
            )
    return out
