"""Verdicts per event and per section against a link's limits.

The limits are plain numbers with their sources; the commands and the workspace fill them from
the link's presets (fibre type, splice and connector grades), the defaults below are the ones
the shipped presets use. Verdict words follow the project's counting rule: ``pass``, ``fail``,
``no limit``, ``in doubt``.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import Any, Literal

Polish = Literal["UPC", "APC"]

#: Reflectance maxima by connector polish, dB (common practice: UPC -50 dB, APC -60 dB; the
#: TIA-568.3-D floor for single-mode is -35 dB, from memory).
REFLECTANCE_MAX_DB: dict[str, float] = {"UPC": -50.0, "APC": -60.0}
#: ITU-T G.652.D cabled maxima, dB/km (as in presets/fibres.toml, from memory).
G652D_ATTENUATION_MAX_DB_PER_KM: dict[float, float] = {
    1310.0: 0.4,
    1383.0: 0.4,
    1490.0: 0.4,
    1550.0: 0.3,
    1625.0: 0.4,
}


@dataclass(frozen=True, slots=True)
class Limits:
    """Maxima an event or section is judged against, with where each came from."""

    splice_max_db: float | None = 0.3
    splice_source: str = "TIA-568.3-D splice maximum (from memory)"
    connector_max_db: float | None = 0.75
    connector_source: str = "TIA-568.3-D mated pair maximum (from memory)"
    polish: Polish = "UPC"
    reflectance_max_db: float | None = None  # None: by polish from REFLECTANCE_MAX_DB
    reflectance_source: str = "common practice"
    attenuation_max_db_per_km: dict[float, float] = field(
        default_factory=lambda: dict(G652D_ATTENUATION_MAX_DB_PER_KM)
    )
    attenuation_source: str = "ITU-T G.652.D cabled maximum (from memory)"
    # the one value for the wavelength at hand, set by for_wavelength()
    attenuation_here_db_per_km: float | None = None
    #: The lowest optical return loss of the whole trace, dB (None: not judged).
    orl_min_db: float | None = None
    orl_source: str = ""
    #: Where the set as a whole came from: "defaults", or the job and link it was taken from.
    origin: str = "defaults"

    def to_json(self) -> dict[str, Any]:
        """The limits as used (at the wavelength set by :meth:`for_wavelength`), with sources."""
        return {
            "origin": self.origin,
            "splice_max_db": self.splice_max_db,
            "splice_source": self.splice_source,
            "connector_max_db": self.connector_max_db,
            "connector_source": self.connector_source,
            "polish": self.polish,
            "reflectance_max_db": self.reflectance_limit_db,
            "reflectance_source": self.reflectance_source,
            "attenuation_max_db_per_km": self.attenuation_here_db_per_km,
            "attenuation_source": self.attenuation_source,
            "orl_min_db": self.orl_min_db,
            "orl_source": self.orl_source,
        }

    @property
    def reflectance_limit_db(self) -> float | None:
        if self.reflectance_max_db is not None:
            return self.reflectance_max_db
        return REFLECTANCE_MAX_DB.get(self.polish)

    def for_wavelength(self, wavelength_nm: float | None) -> Limits:
        """These limits with the attenuation maximum of ``wavelength_nm`` (the nearest listed
        wavelength within 20 nm; none otherwise)."""
        here = None
        if wavelength_nm is not None and self.attenuation_max_db_per_km:
            nearest = min(self.attenuation_max_db_per_km, key=lambda w: abs(w - wavelength_nm))
            if abs(nearest - wavelength_nm) <= 20.0:
                here = self.attenuation_max_db_per_km[nearest]
        return replace(self, attenuation_here_db_per_km=here)


def event_verdict(
    kind: str,
    loss_db: float | None,
    reflectance_db: float | None,
    limits: Limits,
    *,
    bidirectional: bool,
) -> tuple[str, str]:
    """Verdict and its reason for one event.

    A one-way gainer is ``in doubt``: only the average of both directions is the splice's loss
    (ITU-T G.650.3). A one-way non-reflective loss is judged but said to be one-way.
    """
    if kind == "end":
        return "no limit", "end of fibre"
    if kind == "gainer" and not bidirectional:
        return "in doubt", "gainer: average both directions"
    reasons: list[str] = []
    failed = False
    judged = False
    # A trace cannot tell a splice from a bend: a non-reflective loss is judged by the splice
    # maximum, and the reason says so (a closure there makes it a splice; none, maybe a bend).
    if kind == "reflective":
        limit, source, which = limits.connector_max_db, limits.connector_source, "connector"
    else:
        limit, source, which = limits.splice_max_db, limits.splice_source, "splice"
    if loss_db is not None and limit is not None:
        judged = True
        if loss_db > limit:
            failed = True
            reasons.append(
                f"loss {loss_db:.2f} dB > {which} max {limit:.2f} dB ".replace("-", "\u2212")
                + f"({source})"
            )
    r_limit = limits.reflectance_limit_db
    if kind == "reflective" and reflectance_db is not None and r_limit is not None:
        judged = True
        if reflectance_db > r_limit:
            failed = True
            reasons.append(
                f"reflectance {reflectance_db:.1f} > {r_limit:.1f} dB ".replace("-", "\u2212")
                + f"({limits.polish}, {limits.reflectance_source})"
            )
    bend = "; splice or bend" if kind != "reflective" else ""
    if failed:
        return "fail", "; ".join(reasons) + bend
    if not judged:
        return "no limit", f"no {which} limit set for this event{bend}"
    within = f"within {which} max {limit:.2f} dB" if limit is not None else "within limits"
    return "pass", within + ("" if bidirectional else " (one direction)") + bend


def section_verdict(
    attenuation_db_per_km: float, length_m: float, limits: Limits
) -> tuple[str, str]:
    """A section's attenuation against the fibre's maximum at this wavelength.

    Sections shorter than 500 m are not judged: their slope is too uncertain (common practice).
    """
    limit = limits.attenuation_here_db_per_km
    if limit is None:
        return "no limit", "no attenuation maximum for this wavelength"
    if length_m < 500.0:
        return "no limit", "section under 500 m: slope not judged"
    if attenuation_db_per_km > limit:
        return "fail", (
            f"{attenuation_db_per_km:.3f} > {limit:g} dB/km ({limits.attenuation_source})"
        )
    return "pass", f"within {limit:g} dB/km"


def orl_verdict(orl_db: float | None, limits: Limits) -> tuple[str, str]:
    """The whole trace's optical return loss against the lowest one allowed (a larger return
    loss reflects less)."""
    if limits.orl_min_db is None:
        return "no limit", "no return loss minimum"
    if orl_db is None:
        return "no limit", "return loss not measurable on this trace"
    if orl_db < limits.orl_min_db:
        return "fail", f"ORL {orl_db:.1f} < {limits.orl_min_db:g} dB ({limits.orl_source})"
    return "pass", f"ORL within {limits.orl_min_db:g} dB minimum"
