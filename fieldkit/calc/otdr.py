"""OTDR trace analysis: section slopes, events, losses, reflectance, dead zones, ORL.

A trace is the backscattered level in one-way dB (the instrument shows 5·log10 of the received
power) sampled at a uniform spacing along the fibre. Everything here works on numpy arrays and
plain numbers; the file formats, the event names shown to people and the verdicts live in
``fieldkit.traces``.

Method (our own implementation of the published approach)
---------------------------------------------------------
1. **Sliding line fits.** For every sample *i* a least-squares line is fitted to the ``w``
   samples before *i* and to the ``w`` samples starting ``g`` samples after *i* (``g`` is one
   pulse length plus two samples, so the pulse-smeared transition is skipped). Window sums come
   from cumulative sums, so the whole trace costs O(N). The gap between the two lines at *i* is a
   step (a loss or a gain); the height of the sample itself above the left line is a peak.
2. **Candidates.** A step larger than the splice-loss threshold (and five times its own noise) or
   a peak higher than the height the reflectance threshold implies (and five times the noise)
   marks a candidate; contiguous candidates form one event.
3. **Location.** A reflective event is placed at the leading edge of its peak (the first sample
   more than 10 % of the peak height, and 3 noise deviations, above the backscatter line). A
   non-reflective event is placed by fitting the transition a rectangular pulse makes: the
   backscattered *power* moves linearly from the line before to the line after over one pulse
   length, and the start that minimises the squared error is the event's distance.
4. **Dead zone.** After a reflective event the level returns to the backscatter; the attenuation
   dead zone ends where it is within 0.5 dB of the line after the event (IEC 61746-1 defines the
   attenuation dead zone with this ±0.5 dB band, from memory).
5. **Sections.** Between events (outside pulse transitions and dead zones) each section is
   fitted by least squares; the slope is its attenuation in dB/km (the least-squares approach of
   ITU-T G.650.3 Appendix I and IEC 61746-1, from memory).
6. **Event loss.** Two-line method: the gap at the event between the lines fitted over the whole
   sections either side. Five-point method: the same gap with lines fitted only over short
   windows next to the event (the marker pairs A-B before and D-E after the event C), for events
   too close together for long sections (from memory of G.650.3 / IEC 61746-1). Both are given.
7. **End of fibre.** The first event whose loss reaches the end threshold (common practice 3 dB)
   and after which the level is within that threshold of the noise is the end; what follows is
   noise. The noise floor is the RMS noise level after the end (5·log10 of the RMS power).

References
----------
ITU-T G.650.3 (2008), "Test methods for installed single-mode optical fibre cable links",
Appendix I (bidirectional OTDR, least-squares approximation) (from memory).
IEC 61746-1 (2009), "Calibration of optical time-domain reflectometers - Part 1: OTDR for
single-mode fibres" (dead zones, loss and reflectance definitions) (from memory).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Literal

import numpy as np
import numpy.typing as npt

FloatArray = npt.NDArray[np.float64]

#: Speed of light in vacuum, m/s (exact by the SI definition of the metre).
C_M_PER_S = 299_792_458.0

#: Backscatter coefficient (dB for a 1 ns pulse) of standard single-mode fibre (ITU-T G.652)
#: by wavelength (nm). Typical values, from memory: about -79 dB at 1310 nm and -82 dB at
#: 1550 nm; the others lie on the same Rayleigh trend. The file's own coefficient wins.
SINGLE_MODE_BACKSCATTER_DB: dict[float, float] = {
    1310.0: -79.0,
    1383.0: -80.0,
    1490.0: -81.0,
    1550.0: -82.0,
    1625.0: -82.5,
}
#: 50/125 µm multimode, typical (from memory): 850 nm -68 dB, 1300 nm -76 dB for 1 ns.
MULTIMODE_BACKSCATTER_DB: dict[float, float] = {850.0: -68.0, 1300.0: -76.0}

EventKind = Literal["splice", "reflective", "gainer", "end"]
LossMethod = Literal["two-line", "five-point"]


@dataclass(frozen=True, slots=True)
class Thresholds:
    """Detection thresholds. Defaults are common practice, editable by the user.

    Attributes
    ----------
    splice_loss_db : float
        Smallest loss (or gain) reported as an event, dB (common practice 0.05 dB).
    reflectance_db : float
        Weakest reflection reported as reflective, dB (common practice -72 dB).
    end_of_fibre_db : float
        A loss at least this large is the end of the fibre, dB (common practice 3 dB).
    dead_zone_db : float
        The band around the backscatter line that ends a dead zone, dB (IEC 61746-1 uses 0.5 dB,
        from memory).
    """

    splice_loss_db: float = 0.05
    reflectance_db: float = -72.0
    end_of_fibre_db: float = 3.0
    dead_zone_db: float = 0.5


@dataclass(frozen=True, slots=True)
class Section:
    """A fitted stretch of fibre between two events.

    ``start_m``/``end_m`` bound the samples used in the fit; ``from_m``/``to_m`` are the event
    positions the section runs between (the fibre is there even inside a dead zone).
    """

    start_index: int
    end_index: int  # exclusive
    from_m: float
    to_m: float
    slope_db_per_m: float
    intercept_db: float  # level at distance 0 of the fitted line
    rms_db: float

    @property
    def attenuation_db_per_km(self) -> float:
        """Attenuation coefficient: the fitted level falls by this much per km."""
        return -self.slope_db_per_m * 1000.0

    @property
    def length_m(self) -> float:
        return self.to_m - self.from_m

    @property
    def loss_db(self) -> float:
        return self.attenuation_db_per_km * self.length_m / 1000.0

    def level_at(self, distance_m: float) -> float:
        return self.intercept_db + self.slope_db_per_m * distance_m


@dataclass(frozen=True, slots=True)
class Event:
    """One event found in a trace."""

    index: int
    distance_m: float
    kind: EventKind
    loss_two_line_db: float | None  # None at the end of the fibre
    loss_five_point_db: float | None
    peak_height_db: float | None  # None for a non-reflective event
    reflectance_db: float | None  # None for a non-reflective event or without a coefficient
    saturated: bool
    zone_end_index: int  # first sample after the pulse transition / dead zone
    dead_zone_m: float  # 0 for non-reflective events
    cumulative_loss_db: float

    def loss_db(self, method: LossMethod = "two-line") -> float | None:
        return self.loss_two_line_db if method == "two-line" else self.loss_five_point_db


@dataclass(frozen=True, slots=True)
class Analysis:
    """Everything found in one trace."""

    events: tuple[Event, ...]
    sections: tuple[Section, ...]
    spacing_m: float
    length_m: float | None  # distance of the end event; None when no end was found
    end_found: bool
    launch_level_db: float  # first section's line at distance 0
    noise_floor_db: float | None
    noise_rms_db: float  # typical noise of a sample on the first section
    orl_db: float | None
    front_dead_zone_m: float
    thresholds: Thresholds = field(default_factory=Thresholds)

    @property
    def total_loss_db(self) -> float | None:
        """End-to-end loss (the cumulative loss at the end event)."""
        if not self.end_found:
            return None
        return self.events[-1].cumulative_loss_db


# -- formulas ----------------------------------------------------------------------------------


def one_way_resolution_m(pulse_width_ns: float, group_index: float) -> float:
    """Length of fibre one pulse occupies in the one-way distance scale, m.

    .. math:: \\Delta z = \\frac{c\\,D}{2\\,n_g}

    Parameters
    ----------
    pulse_width_ns : float
        Pulse width D, ns.
    group_index : float
        Group index n_g of the fibre.
    """
    return C_M_PER_S * pulse_width_ns * 1e-9 / (2.0 * group_index)


def backscatter_coefficient_db(wavelength_nm: float) -> float:
    """Typical backscatter coefficient for a 1 ns pulse, dB (from memory, see the tables).

    Below 1200 nm the multimode table applies, else single-mode; between table entries the
    value is interpolated linearly, outside them the nearest entry is used.
    """
    table = MULTIMODE_BACKSCATTER_DB if wavelength_nm < 1200.0 else SINGLE_MODE_BACKSCATTER_DB
    if wavelength_nm == 1300.0:
        table = MULTIMODE_BACKSCATTER_DB
    keys = sorted(table)
    return float(np.interp(wavelength_nm, keys, [table[k] for k in keys]))


def reflectance_db(peak_height_db: float, pulse_width_ns: float, backscatter_db: float) -> float:
    """Reflectance of a reflective event from its peak height above the backscatter.

    .. math:: R = B + 10 \\log_{10}\\left[\\left(10^{H/5} - 1\\right) D\\right]

    with H the peak height in one-way dB, D the pulse width in ns and B the backscatter
    coefficient for a 1 ns pulse in dB. It follows from the display being 5·log10 of the
    received power: the peak holds the reflected power R·P0 on top of the backscatter
    10^(B/10)·D·P0, so (10^(H/5) - 1) is their ratio. Form as in IEC 61746-1 and the SR-4731
    event table's reflectance (from memory).

    Returns
    -------
    float
        Reflectance, dB (negative: -14.7 dB is a glass-air break, -55 dB a good APC connector).
    """
    ratio = 10.0 ** (peak_height_db / 5.0) - 1.0
    if ratio <= 0.0:
        return -math.inf
    return backscatter_db + 10.0 * math.log10(ratio * pulse_width_ns)


def peak_height_db(reflectance: float, pulse_width_ns: float, backscatter_db: float) -> float:
    """Peak height (one-way dB) a reflection of ``reflectance`` dB shows: the inverse of
    :func:`reflectance_db`.

    .. math:: H = 5 \\log_{10}\\left(1 + \\frac{10^{(R-B)/10}}{D}\\right)
    """
    return 5.0 * math.log10(1.0 + 10.0 ** ((reflectance - backscatter_db) / 10.0) / pulse_width_ns)


def fit_line(x: FloatArray, y: FloatArray) -> tuple[float, float, float]:
    """Least-squares straight line through (x, y): slope, intercept and RMS residual.

    .. math:: b = \\frac{\\sum (x-\\bar x)(y-\\bar y)}{\\sum (x-\\bar x)^2},\\quad
              a = \\bar y - b\\,\\bar x
    """
    n = x.size
    if n == 0:
        raise ValueError("no points to fit")
    if n == 1:
        return 0.0, float(y[0]), 0.0
    xm = float(x.mean())
    ym = float(y.mean())
    # element-wise sums, not `@`: a BLAS dot product on a busy 2-core machine waits for its
    # threads and took 20 times longer
    dx = x - xm
    sxx = float(np.sum(dx * dx))
    slope = float(np.sum(dx * (y - ym))) / sxx if sxx > 0 else 0.0
    intercept = ym - slope * xm
    resid = y - (intercept + slope * x)
    return slope, intercept, float(math.sqrt(float(np.sum(resid * resid)) / n))


# -- sliding fits ------------------------------------------------------------------------------


def _window_sums(values: FloatArray, w: int) -> FloatArray:
    """Sum of values[j:j+w] for every j (length N - w + 1)."""
    c = np.concatenate(([0.0], np.cumsum(values)))
    out: FloatArray = c[w:] - c[:-w]
    return out


@dataclass(frozen=True, slots=True)
class _Sliding:
    left: FloatArray  # left-window line at i (NaN where undefined)
    right: FloatArray  # right-window line at i
    sigma: FloatArray  # smoothed residual RMS of the left window
    # the fit of the window starting at j, in index units: slope, value at j, residual RMS
    w_slope: FloatArray
    w_start: FloatArray
    w_rms: FloatArray


def _sliding_fits(y: FloatArray, w: int, g: int) -> _Sliding:
    """Left and right window fits extrapolated to every sample (see the module docstring)."""
    n = y.size
    # Local coordinates t = 0..w-1 within each window: sums over t are constants, so only the
    # sums of y and t·y slide, and precision does not depend on the position in the trace.
    t = np.arange(w, dtype=np.float64)
    st, stt = float(t.sum()), float(np.sum(t * t))
    den = w * stt - st * st
    sy = _window_sums(y, w)  # window starting at j
    idx = np.arange(n, dtype=np.float64)
    sxy_global = _window_sums(idx * y, w)
    starts = np.arange(sy.size, dtype=np.float64)
    sty = sxy_global - starts * sy  # sum of t·y with t = j' - j
    syy = _window_sums(y * y, w)
    slope = (w * sty - st * sy) / den
    icpt = (sy - slope * st) / w  # value at t = 0 (the window's first sample)
    sse = np.maximum(syy - icpt * sy - slope * sty, 0.0)
    rms = np.sqrt(sse / max(w - 2, 1))

    left = np.full(n, np.nan)
    right = np.full(n, np.nan)
    sigma = np.full(n, np.nan)
    # left window for i is [i - w, i): start j = i - w, extrapolate to t = w
    i_left = np.arange(w, n)
    left[i_left] = icpt[i_left - w] + slope[i_left - w] * w
    sigma[i_left] = rms[i_left - w]
    # right window for i is [i + g, i + g + w): start j = i + g, extrapolate to t = -g
    i_right = np.arange(0, n - g - w + 1)
    right[i_right] = icpt[i_right + g] - slope[i_right + g] * g
    # Smooth the noise estimate over a few windows (one window's RMS scatters by ~20 %), over
    # the windows before i only, so an event never raises the noise estimate in front of it.
    good = np.isfinite(sigma)
    if good.sum() > 4 * w:
        s = sigma[good]
        k = 4 * w
        trailing = _window_sums(s, k) / k
        sigma[good] = np.concatenate((np.full(k - 1, trailing[0]), trailing))
    return _Sliding(left, right, sigma, slope, icpt, rms)


def _runs(mask: npt.NDArray[np.bool_], merge_gap: int) -> list[tuple[int, int]]:
    """Contiguous True runs [a, b) of ``mask``, merging runs closer than ``merge_gap``."""
    if not mask.any():
        return []
    m = mask.astype(np.int8)
    edges = np.diff(np.concatenate(([0], m, [0])))
    starts = np.flatnonzero(edges == 1)
    ends = np.flatnonzero(edges == -1)
    runs: list[tuple[int, int]] = []
    for a, b in zip(starts.tolist(), ends.tolist(), strict=True):
        if runs and a - runs[-1][1] < merge_gap:
            runs[-1] = (runs[-1][0], b)
        else:
            runs.append((a, b))
    return runs


def _line_on(y: FloatArray, a: int, b: int) -> tuple[float, float, float]:
    """Line fitted to samples [a, b) in index units: slope, intercept at index 0, rms."""
    a = max(a, 0)
    b = min(b, y.size)
    x = np.arange(a, b, dtype=np.float64)
    return fit_line(x, y[a:b])


def _ramp_start(
    y: FloatArray,
    lo: int,
    hi: int,
    left: tuple[float, float],
    right: tuple[float, float] | None,
    floor_power: float,
    wd: float,
) -> int:
    """The start of a pulse transition that best explains y between two lines.

    The backscattered power (10^(y/5)) moves linearly from the left line to the right line (or
    to ``floor_power`` at the end of the fibre) over ``wd`` samples. Candidates c in [lo, hi];
    the squared error is taken in power units over [lo - wd, hi + 2·wd).
    """
    n = y.size
    a = max(lo - int(math.ceil(wd)), 0)
    b = min(hi + 2 * int(math.ceil(wd)) + 1, n)
    if b - a < 3 or hi < lo:
        return max(lo, 0)
    j = np.arange(a, b, dtype=np.float64)
    ref = left[1] + left[0] * lo
    p_data = 10.0 ** ((y[a:b] - ref) / 5.0)
    p_left = 10.0 ** ((left[1] + left[0] * j - ref) / 5.0)
    if right is None:
        p_right = np.full_like(j, floor_power / 10.0 ** (ref / 5.0))
    else:
        p_right = 10.0 ** ((right[1] + right[0] * j - ref) / 5.0)
    cands = np.arange(max(lo, a), min(hi, b - 1) + 1)
    if cands.size == 0:
        return max(lo, 0)
    # fraction of the way through the transition, per candidate (rows) and sample (columns)
    frac = np.clip((j[None, :] - cands[:, None]) / max(wd, 0.5), 0.0, 1.0)
    model = p_left[None, :] * (1.0 - frac) + p_right[None, :] * frac
    sse = ((model - p_data[None, :]) ** 2).sum(axis=1)
    return int(cands[int(np.argmin(sse))])


# -- the analysis ------------------------------------------------------------------------------


@dataclass
class _Raw:
    x0: int
    zone_end: int  # end of the pulse transition or of the dead zone
    fit_start: int  # where the next section's fit may begin
    reflective: bool
    peak_height: float | None
    saturated: bool
    end: bool


def analyse(
    level_db: FloatArray,
    spacing_m: float,
    *,
    resolution_m: float,
    thresholds: Thresholds | None = None,
    pulse_width_ns: float | None = None,
    backscatter_db: float | None = None,
    group_index: float | None = None,
    start_m: float = 0.0,
) -> Analysis:
    """Find and measure the events of one trace (method in the module docstring).

    Parameters
    ----------
    level_db : array of float
        Backscattered level, one-way dB, uniformly sampled.
    spacing_m : float
        Sample spacing, m.
    resolution_m : float
        One pulse length in the distance scale, m (:func:`one_way_resolution_m`); the samples
        a pulse smears an event over.
    thresholds : Thresholds
        Detection thresholds (common-practice defaults).
    pulse_width_ns, backscatter_db : float, optional
        Needed for reflectance and ORL; without them those are None.
    group_index : float, optional
        Needed for ORL (the time a metre of fibre takes).
    start_m : float
        Distance of the first sample, m.

    Returns
    -------
    Analysis
        Events in distance order (the end event last when found), sections between them.
    """
    th = thresholds or Thresholds()
    y = np.asarray(level_db, dtype=np.float64)
    n = y.size
    if n < 40:
        raise ValueError("a trace needs at least 40 points")
    if not np.isfinite(y).all():
        raise ValueError("a trace level is not a finite number")
    if not (spacing_m > 0 and math.isfinite(spacing_m)):
        raise ValueError("the sample spacing must be a positive number")
    wd_exact = max(resolution_m / spacing_m, 0.5)
    wd = max(1, int(math.ceil(wd_exact)))
    w = int(min(max(12, 2 * wd), max(12, n // 8)))
    g = wd + 2
    sl = _sliding_fits(y, w, g)

    def at(i: int) -> float:
        return start_m + i * spacing_m

    reflect_height = 0.0
    if pulse_width_ns and backscatter_db is not None:
        reflect_height = peak_height_db(th.reflectance_db, pulse_width_ns, backscatter_db)
    # without a pulse width, any peak clearly above the noise counts as reflective
    reflect_height = max(reflect_height, 0.02)

    # -- the front: skip the launch reflection and its dead zone -----------------------------
    front = _front_end(y, sl, wd, w, g, th)

    # -- candidates --------------------------------------------------------------------------
    sigma = np.where(np.isfinite(sl.sigma), sl.sigma, np.nanmax(sl.sigma[np.isfinite(sl.sigma)]))
    step = sl.left - sl.right
    peak = y - sl.left
    step_thr = np.maximum(th.splice_loss_db, 5.0 * sigma * math.sqrt(8.0 / w))
    peak_thr = np.maximum(reflect_height, 5.0 * sigma * math.sqrt(1.0 + 4.0 / w))
    with np.errstate(invalid="ignore"):
        is_peak = peak > peak_thr
        cand = (np.abs(step) > step_thr) | is_peak
    cand[: front + w] = False
    cand[~np.isfinite(sl.left)] = False
    # right fits are undefined near the tail: only peaks count there
    tail = ~np.isfinite(sl.right)
    cand[tail] = is_peak[tail]
    runs = _runs(cand, merge_gap=g)

    raws: list[_Raw] = []
    prev_end = front
    # The RMS noise level of the last 2 % (in power: the noise is Gaussian in power, and its
    # logarithm is skewed and clipped by the receiver).
    floor_power = _rms_power(y[-max(8, n // 50) :])
    floor_est = 5.0 * math.log10(floor_power)
    trace_max = float(y.max())
    for k_run, (a, b) in enumerate(runs):
        # the next event's window may not reach past this (see the step detector's lead)
        limit = min(n, runs[k_run + 1][0] + g + w // 2) if k_run + 1 < len(runs) else n
        if a < prev_end:
            a = prev_end
            if a >= b:
                continue
        base_lo = max(prev_end, a - 3 * w)
        left_fit = _line_on(y, base_lo, a) if a - base_lo >= 3 else _line_on(y, a - w, a)
        lslope, lint, _ = left_fit
        run_peaks = np.flatnonzero(is_peak[a:b])
        s_here = float(sigma[a])
        if run_peaks.size:
            first = a + int(run_peaks[0])
            # leading edge: first sample 10 % of the peak height (and 3 sigma) above the line
            stop = min(first + wd + 3, n)
            seg = y[a:stop] - (lint + lslope * np.arange(a, stop))
            height = float(seg.max())
            low = max(0.1 * height, 3.0 * s_here)
            above = np.flatnonzero(seg > low)
            x0 = a + int(above[0]) if above.size else first
            top = int(np.argmax(y[x0:stop])) + x0
            # a receiver that clipped shows a flat top at the trace's highest level
            saturated = bool(np.sum(np.abs(y[x0:stop] - trace_max) < 5e-4) >= 3)
            zone_end, fit_start, right_line = _dead_zone_end(
                y, sl, top, wd, w, lslope, s_here, spacing_m, th, limit
            )
            # the end: the level after the peak is nearer the noise than the backscatter before
            after = y[min(top + wd + 1, n - 1) : min(top + wd + 1 + 4 * w, limit, n)]
            after_db = 5.0 * math.log10(_rms_power(after)) if after.size else floor_est
            before_db = lint + lslope * x0
            to_floor = after_db < floor_est + max(th.end_of_fibre_db, 0.5 * (before_db - floor_est))
            is_end = to_floor and before_db - after_db >= th.end_of_fibre_db
            raws.append(_Raw(x0, zone_end, fit_start, True, height, saturated, is_end))
        else:
            rlo = min(b + g, n)
            right_fit = _line_on(y, rlo, rlo + w) if rlo + 3 <= n else None
            right = (right_fit[0], right_fit[1]) if right_fit is not None else None
            loss_short = (
                (lint + lslope * a) - (right[1] + right[0] * a) if right is not None else math.inf
            )
            is_end = loss_short >= th.end_of_fibre_db
            if is_end:
                x0 = _ramp_start(y, a, b, (lslope, lint), None, floor_power, wd_exact)
            else:
                x0 = _ramp_start(y, a, b, (lslope, lint), right, floor_power, wd_exact)
                # a run may be a noise blip; check the refined loss against the threshold
                if right is not None:
                    loss_here = (lint + lslope * x0) - (right[1] + right[0] * x0)
                    if abs(loss_here) < th.splice_loss_db:
                        continue
            zone = min(x0 + wd + 1, n)
            raws.append(_Raw(x0, zone, zone, False, None, False, is_end))
        prev_end = raws[-1].fit_start
        if raws[-1].end:
            break

    # merge events whose section between them is too short to fit (< 5 samples)
    merged: list[_Raw] = []
    for r in raws:
        if merged and r.x0 - merged[-1].fit_start < 5 and not merged[-1].end:
            m = merged[-1]
            merged[-1] = _Raw(
                m.x0,
                max(m.zone_end, r.zone_end),
                max(m.fit_start, r.fit_start),
                m.reflective or r.reflective,
                max(m.peak_height or 0.0, r.peak_height or 0.0)
                if (m.reflective or r.reflective)
                else None,
                m.saturated or r.saturated,
                r.end,
            )
        else:
            merged.append(r)
    raws = merged
    end_found = bool(raws) and raws[-1].end
    last_index = raws[-1].x0 if end_found else n

    # -- sections ----------------------------------------------------------------------------
    bounds: list[tuple[int, int, float, float]] = []
    begin, from_m = front, start_m
    for r in raws:
        bounds.append((begin, r.x0, from_m, at(r.x0)))
        begin, from_m = r.fit_start, at(r.x0)
    if not end_found:
        bounds.append((begin, n, from_m, at(n - 1)))
    # Short sections (under four windows) take their slope from the nearest long one: a few
    # dozen samples next to a dead zone give no usable slope, only a level.
    fits: list[tuple[float, float, float] | None] = []
    for lo, hi, _f, _t in bounds:
        if hi - lo >= 4 * w:
            xs = start_m + np.arange(lo, hi, dtype=np.float64) * spacing_m
            fits.append(fit_line(xs, y[lo:hi]))
        else:
            fits.append(None)
    long_ones = [k for k, f in enumerate(fits) if f is not None]
    sections: list[Section] = []
    for k, (lo, hi, f_m, t_m) in enumerate(bounds):
        fit = fits[k]
        if fit is None:
            if long_ones:
                near = min(long_ones, key=lambda j: abs(j - k))
                slope = fits[near][0]  # type: ignore[index]
            else:
                lo_fit, hi_fit = lo, hi
                if hi_fit - lo_fit < 3:
                    lo_fit, hi_fit = max(0, lo - w), min(n, hi + w)
                xs = start_m + np.arange(lo_fit, hi_fit, dtype=np.float64) * spacing_m
                slope = fit_line(xs, y[lo_fit:hi_fit])[0]
            lo_fit, hi_fit = (lo, hi) if hi > lo else (max(0, lo - 1), min(n, lo + 1))
            xs = start_m + np.arange(lo_fit, hi_fit, dtype=np.float64) * spacing_m
            icpt = float(np.mean(y[lo_fit:hi_fit] - slope * xs))
            resid = y[lo_fit:hi_fit] - (icpt + slope * xs)
            fit = (slope, icpt, float(np.sqrt(np.mean(resid * resid))))
        sections.append(Section(lo, hi, f_m, t_m, fit[0], fit[1], fit[2]))

    # -- events ------------------------------------------------------------------------------
    events: list[Event] = []
    cumulative = 0.0
    for k, r in enumerate(raws):
        d = at(r.x0)
        cumulative += sections[k].loss_db
        loss2: float | None = None
        loss5: float | None = None
        if not r.end:
            loss2 = sections[k].level_at(d) - sections[k + 1].level_at(d)
            ls, li, _ = _line_on(y, max(r.x0 - w, sections[k].start_index), r.x0)
            rs, ri, _ = _line_on(y, r.fit_start, min(r.fit_start + w, n))
            loss5 = (li + ls * r.x0) - (ri + rs * r.x0)
            cumulative += loss2
        refl: float | None = None
        if (
            r.reflective
            and r.peak_height is not None
            and pulse_width_ns
            and backscatter_db is not None
        ):
            refl = reflectance_db(r.peak_height, pulse_width_ns, backscatter_db)
            if not math.isfinite(refl):
                refl = None
        if r.end:
            kind: EventKind = "end"
        elif r.reflective:
            kind = "reflective"
        elif loss2 is not None and loss2 < 0:
            kind = "gainer"
        else:
            kind = "splice"
        events.append(
            Event(
                index=r.x0,
                distance_m=d,
                kind=kind,
                loss_two_line_db=loss2,
                loss_five_point_db=loss5,
                peak_height_db=r.peak_height if r.reflective else None,
                reflectance_db=refl,
                saturated=r.saturated,
                zone_end_index=r.zone_end,
                dead_zone_m=(r.zone_end - r.x0) * spacing_m if r.reflective and not r.end else 0.0,
                cumulative_loss_db=cumulative,
            )
        )

    # -- noise floor, ORL --------------------------------------------------------------------
    noise_floor: float | None = None
    if end_found:
        tail_start = min(n, last_index + 2 * wd + 4)
        if n - tail_start >= 16:
            noise_floor = 5.0 * math.log10(_rms_power(y[tail_start:]))
    first_section = sections[0]
    launch = first_section.level_at(0.0)
    noise_rms = first_section.rms_db
    orl: float | None = None
    if end_found and pulse_width_ns and backscatter_db is not None and group_index:
        orl = _orl(sections, events, launch, backscatter_db, group_index, spacing_m)
    return Analysis(
        events=tuple(events),
        sections=tuple(sections),
        spacing_m=spacing_m,
        length_m=at(last_index) if end_found else None,
        end_found=end_found,
        launch_level_db=launch,
        noise_floor_db=noise_floor,
        noise_rms_db=noise_rms,
        orl_db=orl,
        front_dead_zone_m=front * spacing_m,
        thresholds=th,
    )


def _rms_power(levels_db: FloatArray) -> float:
    """RMS of the power (10^(L/5)) of some samples: the noise level as a power."""
    p = 10.0 ** (levels_db / 5.0)
    return float(np.sqrt(np.mean(p * p)))


def _front_end(y: FloatArray, sl: _Sliding, wd: int, w: int, g: int, th: Thresholds) -> int:
    """First sample after the launch reflection and its dead zone."""
    n = y.size
    search = min(n // 4, 40 * wd + 4 * w)
    top = int(np.argmax(y[: max(search, 1)]))
    for i in range(top, min(n - g - w, top + search)):
        r = sl.right[i]
        if np.isfinite(r) and y[i] <= r + th.dead_zone_db:
            return i
    return top


def _dead_zone_end(
    y: FloatArray,
    sl: _Sliding,
    top: int,
    wd: int,
    w: int,
    fibre_slope: float,
    s_sigma: float,
    spacing_m: float,
    th: Thresholds,
    limit: int,
) -> tuple[int, int, tuple[float, float] | None]:
    """End of the dead zone after a reflective peak at ``top``, where the next fit may start,
    and the line after it.

    The first window after the end of the pulse whose slope is that of fibre (the receiver's
    recovery tail falls much faster), that starts on its own line and is not noise, gives the
    line; the dead zone
    ends at the first sample within ``th.dead_zone_db`` of that window's line. The line is None
    when the trace ends first; when the next event (at ``limit``) comes first, the last window
    before it serves.
    """
    n = min(y.size, limit)
    # two fibres' attenuations differ by well under 0.5 dB/km
    slope_tol = 4.0 * s_sigma * math.sqrt(12.0 / float(w) ** 3) + 0.5e-3 * spacing_m
    line: tuple[float, float] | None = None
    j0, j1 = top + wd + 1, n - w + 1
    s = j0
    if j1 > j0:
        slope = sl.w_slope[j0:j1]
        start = sl.w_start[j0:j1]
        ok = (
            (np.abs(slope - fibre_slope) <= slope_tol)
            & (y[j0:j1] - start < 3.0 * s_sigma + 0.02)
            # calm: not the noise past the end of the fibre
            & (sl.w_rms[j0:j1] < 2.0 * s_sigma + 0.02)
        )
        hits = np.flatnonzero(ok)
        if hits.size:
            s = j0 + int(hits[0])
            line = (float(sl.w_slope[s]), float(sl.w_start[s] - sl.w_slope[s] * s))
    if line is None and n < y.size and n - w >= top + wd + 1:
        s = n - w
        last_slope, last_icpt, _ = _line_on(y, s, n)
        line = (last_slope, last_icpt)
    if line is None:
        return n, n, None
    j = np.arange(top, s + 1)
    within = np.flatnonzero(y[top : s + 1] <= line[1] + line[0] * j + th.dead_zone_db)
    end = top + int(within[0]) if within.size else s
    return max(end, top + 1), s, line


def _orl(
    sections: list[Section],
    events: list[Event],
    launch_db: float,
    backscatter_db: float,
    group_index: float,
    spacing_m: float,
) -> float:
    """Optical return loss of the fibre up to its end, dB, from the fitted trace.

    .. math:: ORL = -10\\log_{10}\\Big(\\sum_i 10^{B/10}\\,\\frac{\\Delta x}{\\delta z_1}\\,
              T^2(x_i) + \\sum_k R_k\\,T^2(x_k)\\Big)

    with δz₁ = c·1 ns/(2n) the fibre one nanosecond of pulse covers and T²(x) = 10^((L(x) -
    L(0))/5) the round-trip transmission read off the fitted sections (one-way dB doubled).
    The front connector is not counted (its reflection is hidden in the launch dead zone).
    """
    dz1 = one_way_resolution_m(1.0, group_index)
    b_lin = 10.0 ** (backscatter_db / 10.0)
    total = 0.0
    for s in sections:
        if s.to_m <= s.from_m:
            continue
        xs = np.arange(s.from_m, s.to_m, spacing_m)
        levels = s.intercept_db + s.slope_db_per_m * xs
        total += float(np.sum(10.0 ** ((levels - launch_db) / 5.0))) * b_lin * spacing_m / dz1
    for e, s in zip(events, sections, strict=False):
        if e.reflectance_db is not None:
            t2 = 10.0 ** ((s.level_at(e.distance_m) - launch_db) / 5.0)
            total += 10.0 ** (e.reflectance_db / 10.0) * t2
    return -10.0 * math.log10(total)


def loss_at(
    level_db: FloatArray,
    analysis: Analysis,
    distance_m: float,
    *,
    resolution_m: float,
    start_m: float = 0.0,
) -> float | None:
    """Two-line loss at a distance where no event was found (the other direction saw one).

    The section holding ``distance_m`` is split there: a least-squares line on each side (the
    pulse transition after the point left out), their gap at the point is the loss. None when
    the point is inside an event zone or either side has fewer than 5 samples.
    """
    y = np.asarray(level_db, dtype=np.float64)
    i = int(round((distance_m - start_m) / analysis.spacing_m))
    wd = max(1, int(math.ceil(resolution_m / analysis.spacing_m)))
    for s in analysis.sections:
        if s.start_index <= i < s.end_index:
            left_hi, right_lo = i, i + wd + 1
            if left_hi - s.start_index < 5 or s.end_index - right_lo < 5:
                return None
            ls, li, _ = _line_on(y, s.start_index, left_hi)
            rs, ri, _ = _line_on(y, right_lo, s.end_index)
            return (li + ls * i) - (ri + rs * i)
    return None
