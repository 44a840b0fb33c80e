"""Synthetic OTDR traces from the physical model, for tests, the benchmark and examples.

The model (one-way dB display, 5·log10 of the received power P, relative to the launch power):

- Backscatter from a point x: p(x) = 10^(B(x)/10) · D · T²(x), with B the backscatter
  coefficient for 1 ns (dB), D the pulse width (ns) and T²(x) = 10^(-2·A(x)/10) the round-trip
  transmission, A(x) the one-way loss from the start (fibre attenuation plus event losses).
- A rectangular pulse of one-way length Δz = c·D/(2n) smears it: the signal at x is the mean of
  p over [x - Δz, x], so a step loss shows as a ramp one pulse long starting at the event.
- A reflection of reflectance R at d adds R·T²(d) over [d, d + Δz] (the Fresnel peak), and the
  receiver recovers from a strong one with an exponential tail (the dead zone).
- A change of B at a splice (fibres of different mode-field diameter) shifts the backscatter by
  ΔB/2 in the display: one direction sees a gain, the other an extra loss.
- Past the end of the fibre only noise remains. Noise is Gaussian in power, with an RMS set as
  a level below the launch backscatter (the one-way dynamic range).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, replace

import numpy as np

from fieldkit.calc.otdr import backscatter_coefficient_db, one_way_resolution_m
from fieldkit.traces.model import Trace


@dataclass(frozen=True, slots=True)
class SynthEvent:
    """An event to build into a synthetic trace."""

    distance_m: float
    loss_db: float = 0.0
    reflectance_db: float | None = None  # None: non-reflective
    backscatter_change_db: float = 0.0  # B after minus B before, dB
    recovery_m: float = 0.0  # receiver recovery tail length after a strong reflection


@dataclass(frozen=True, slots=True)
class SynthFibre:
    """A fibre to trace: its length, attenuation, events and the instrument set-up."""

    length_m: float
    attenuation_db_per_km: float = 0.33
    events: tuple[SynthEvent, ...] = ()
    end_reflectance_db: float | None = -14.7  # a clean cleave into air (Fresnel, n 1.468)
    wavelength_nm: float = 1550.0
    pulse_width_ns: float = 30.0
    group_index: float = 1.4677  # = analysis.DEFAULT_GROUP_INDEX, the G.652.D 1550 nm preset
    spacing_m: float = 1.0
    points: int | None = None  # default: 30 % beyond the end
    dynamic_range_db: float = 14.0  # launch backscatter to noise RMS, one-way dB
    launch_reflectance_db: float | None = -45.0
    fibre_id: str = ""
    cable_id: str = ""
    origin: str = "A"
    destination: str = "B"

    def reversed(self) -> SynthFibre:
        """The same fibre traced from its other end."""
        events = tuple(
            SynthEvent(
                self.length_m - e.distance_m,
                e.loss_db,
                e.reflectance_db,
                -e.backscatter_change_db,
                e.recovery_m,
            )
            for e in reversed(self.events)
        )
        return replace(self, events=events, origin=self.destination, destination=self.origin)


def synth_trace(fibre: SynthFibre, *, seed: int = 1, source: str = "synthetic") -> Trace:
    """A :class:`Trace` of ``fibre`` from the model in the module docstring."""
    rng = np.random.default_rng(seed)
    b0 = backscatter_coefficient_db(fibre.wavelength_nm)
    dz = one_way_resolution_m(fibre.pulse_width_ns, fibre.group_index)
    n = fibre.points or int(math.ceil(fibre.length_m * 1.3 / fibre.spacing_m)) + 1
    sub = 4  # sub-samples per sample: events need not sit on the sample grid
    fine_dx = fibre.spacing_m / sub
    xf = np.arange(n * sub, dtype=np.float64) * fine_dx
    one_way = fibre.attenuation_db_per_km * xf / 1000.0
    bscat = np.full_like(xf, b0)
    for e in fibre.events:
        after = xf >= e.distance_m
        one_way = one_way + np.where(after, e.loss_db, 0.0)
        bscat = bscat + np.where(after, e.backscatter_change_db, 0.0)
    p = 10.0 ** (bscat / 10.0) * fibre.pulse_width_ns * 10.0 ** (-2.0 * one_way / 10.0)
    p[xf > fibre.length_m] = 0.0
    # rectangular pulse: mean over the trailing pulse length
    k = max(1, int(round(dz / fine_dx)))
    c = np.concatenate(([0.0], np.cumsum(p)))
    idx = np.arange(p.size)
    lo = np.maximum(idx + 1 - k, 0)
    smeared = (c[idx + 1] - c[lo]) / k
    reflections = list(fibre.events)
    if fibre.end_reflectance_db is not None:
        reflections.append(SynthEvent(fibre.length_m, 0.0, fibre.end_reflectance_db))
    if fibre.launch_reflectance_db is not None:
        reflections.append(SynthEvent(0.0, 0.0, fibre.launch_reflectance_db, recovery_m=2 * dz))
    for e in reflections:
        if e.reflectance_db is None:
            continue
        before = xf < e.distance_m
        t2 = 10.0 ** (-2.0 * float(one_way[before][-1] if before.any() else 0.0) / 10.0)
        peak = 10.0 ** (e.reflectance_db / 10.0) * t2
        on = (xf >= e.distance_m) & (xf < e.distance_m + dz)
        smeared = smeared + np.where(on, peak, 0.0)
        if e.recovery_m > 0:
            tail = xf >= e.distance_m + dz
            decay = np.exp(-np.clip(xf - e.distance_m - dz, 0.0, None) / (e.recovery_m / 3.0))
            smeared = smeared + np.where(tail, 0.02 * peak * decay, 0.0)
    sampled = smeared[::sub][:n]  # sample j is the signal at j·spacing
    launch = 10.0 ** (b0 / 10.0) * fibre.pulse_width_ns
    noise_rms = launch * 10.0 ** (-fibre.dynamic_range_db / 5.0)
    noisy = sampled + rng.normal(0.0, noise_rms, sampled.size)
    # the receiver cannot show less than a fraction of its noise: clip like an instrument does
    noisy = np.maximum(noisy, noise_rms * 0.05)
    level = 5.0 * np.log10(noisy / launch)
    return Trace(
        level_db=level,
        spacing_m=fibre.spacing_m,
        source=source,
        file_format="synthetic",
        wavelength_nm=fibre.wavelength_nm,
        pulse_width_ns=fibre.pulse_width_ns,
        group_index=fibre.group_index,
        backscatter_db=b0,
        fibre_id=fibre.fibre_id,
        cable_id=fibre.cable_id,
        origin=fibre.origin,
        destination=fibre.destination,
    )


def example_fibre(
    fibre_number: int = 1,
    *,
    length_m: float = 8000.0,
    wavelength_nm: float = 1550.0,
    spacing_m: float = 0.5,
    points: int | None = None,
    closures: Sequence[float] = (2100.0, 4650.0),
) -> SynthFibre:
    """A plausible span: a patch connector, fusion splices at the closures, a clean end.

    Splice losses vary a little with the fibre number so a cable's fibres are not identical.
    """
    rng = np.random.default_rng(fibre_number)
    events = [SynthEvent(35.0, 0.35, -52.0, recovery_m=20.0)]
    for d in closures:
        events.append(
            SynthEvent(
                d,
                float(rng.uniform(0.02, 0.12)) if fibre_number % 17 else 0.42,
                None,
                float(rng.normal(0.0, 0.08)),
            )
        )
    return SynthFibre(
        length_m=length_m,
        attenuation_db_per_km=0.19 if wavelength_nm >= 1500 else 0.33,
        events=tuple(events),
        wavelength_nm=wavelength_nm,
        pulse_width_ns=30.0,
        spacing_m=spacing_m,
        points=points,
        dynamic_range_db=16.0,
        fibre_id=str(fibre_number),
        cable_id="Mill Lane feeder",
        origin="Exchange",
        destination="Cabinet 4",
    )
