"""Coupling loss where two different fibres meet, and the ideal loss of a power splitter.

All losses in dB, positive for a loss. The formulas are the published geometric-optics forms for
multimode fibre (uniform mode fill) and the Gaussian-beam overlap for single-mode fibre.

References
----------
Multimode core-diameter and NA mismatch (step-index, fully filled; used as the planning estimate
for graded-index fibre too): J. Hecht, "Understanding Fiber Optics", 5th ed., ch. "Fiber-to-fiber
coupling" (from memory); G. Keiser, "Optical Fiber Communications", 4th ed., §5.4 (from memory).
Single-mode mode-field mismatch: D. Marcuse, "Loss analysis of single-mode fiber splices", Bell
Syst. Tech. J. 56 (1977) 703–718, the Gaussian overlap formula (from memory).
"""

from __future__ import annotations

import math

from fieldkit.calc.units import InputError


def _positive(x: float, what: str) -> float:
    if not math.isfinite(x) or x <= 0:
        raise InputError(f"{what}: {x} must be a positive, finite number")
    return x


def _ratio_loss_db(amplitude_ratio: float, what: str) -> float:
    """−10·log10(ratio²) = −20·log10(ratio), refusing a ratio too small for a float."""
    if amplitude_ratio < 1e-150:  # its square would be below the smallest float
        raise InputError(f"{what}: the two values are too far apart to be joined fibres")
    return -20.0 * math.log10(amplitude_ratio)


def core_diameter_mismatch_loss_db(core_tx_um: float, core_rx_um: float) -> float:
    """Loss when light passes from a multimode core of ``core_tx_um`` into one of ``core_rx_um``.

    .. math:: L = -10 \\log_{10}\\left( (d_{rx}/d_{tx})^2 \\right) \\quad (d_{tx} > d_{rx}),
              \\qquad 0 \\text{ otherwise}

    62.5 µm into 50 µm: −10·log10((50/62.5)²) = 1.938 dB.
    """
    d_tx = _positive(core_tx_um, "emitting core diameter")
    d_rx = _positive(core_rx_um, "receiving core diameter")
    if d_tx <= d_rx:
        return 0.0
    return _ratio_loss_db(d_rx / d_tx, "core diameters")


def na_mismatch_loss_db(na_tx: float, na_rx: float) -> float:
    """Loss when light passes from a fibre of numerical aperture ``na_tx`` into one of ``na_rx``.

    .. math:: L = -10 \\log_{10}\\left( (NA_{rx}/NA_{tx})^2 \\right) \\quad (NA_{tx} > NA_{rx}),
              \\qquad 0 \\text{ otherwise}

    NA 0.275 into NA 0.200: −10·log10((0.2/0.275)²) = 2.766 dB.
    """
    tx = _positive(na_tx, "emitting numerical aperture")
    rx = _positive(na_rx, "receiving numerical aperture")
    if tx <= rx:
        return 0.0
    return _ratio_loss_db(rx / tx, "numerical apertures")


def multimode_mismatch_loss_db(
    core_tx_um: float, na_tx: float, core_rx_um: float, na_rx: float
) -> float:
    """Core-diameter plus NA mismatch loss from the emitting to the receiving multimode fibre."""
    return core_diameter_mismatch_loss_db(core_tx_um, core_rx_um) + na_mismatch_loss_db(
        na_tx, na_rx
    )


def mfd_mismatch_loss_db(mfd_1_um: float, mfd_2_um: float) -> float:
    """Loss at a joint of two single-mode fibres of mode-field diameters ``mfd_1_um`` and
    ``mfd_2_um`` (Gaussian overlap; the same in both directions).

    .. math:: L = -10 \\log_{10}\\left( \\left( \\frac{2 w_1 w_2}{w_1^2 + w_2^2} \\right)^2 \\right)

    9.2 µm to 8.6 µm: −10·log10((2·9.2·8.6 / (9.2² + 8.6²))²) = 0.0197 dB.
    """
    w1 = _positive(mfd_1_um, "mode-field diameter")
    w2 = _positive(mfd_2_um, "mode-field diameter")
    # the same overlap written with r = w_small / w_large, so that no square overflows
    r = min(w1, w2) / max(w1, w2)
    return _ratio_loss_db(2.0 * r / (1.0 + r * r), "mode-field diameters")


def splitter_ideal_loss_db(outputs: int) -> float:
    """The ideal (lossless, equal) split loss of a 1xN or 2xN splitter, per output path.

    .. math:: L = 10 \\log_{10} N

    1x32: 10·log10(32) = 15.051 dB.

    Raises
    ------
    InputError
        For fewer than 2 outputs.
    """
    if isinstance(outputs, bool) or not isinstance(outputs, int) or outputs < 2:
        raise InputError(f"splitter: {outputs} outputs; a splitter has 2 or more")
    return 10.0 * math.log10(outputs)
