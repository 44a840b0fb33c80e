"""Migrations of job files from older schema versions: plain functions on the parsed dict.

They run before validation, so the models never see an old layout. Each step takes a dict of
version N and returns one of version N + 1; :func:`migrate` chains them.

Version 1 (fieldkit before per-link records were shared): ``crew`` was one comma-separated
string, notes named their author ``author``, there was no ``revision``, and result directions
were written ``"AB"`` / ``"BA"``.

Version 2 (before the splice log): a link held a flat ``splices`` list of ``{fibre, loss_db,
estimate}``. Version 3 keeps splices in closures (:mod:`fieldkit.jobs.splices`); the flat list
moves into one closure per link, "splices before closures", with cables "A" and "B" whose fibre
count and tube size were not recorded, each splice joining the same fibre number on both sides.
A loss estimated by the splicer becomes ``estimate_db``, an OTDR one-way value
``loss_ab_db`` / ``loss_ba_db``, a bidirectional one ``average_only_db``. A second splice of the
same fibre becomes a re-splice of the first (``replaces``).

Version 4 (before traces were kept): located faults named their fibre distance
``fiber_distance_m``; version 5 spells it ``fibre_distance_m`` like every other field, and adds
a link's ``traces`` and a budget's ``checks`` (both start empty).
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from fieldkit.jobs.models import SCHEMA_VERSION


class MigrationError(ValueError):
    """A file claims a version we can migrate but its content does not fit that version."""


def _objects(items: Any, what: str) -> list[dict[str, Any]]:
    """Copies of the objects of a list in a job dict (absent or null: none); one that is not
    an object is refused, ``what`` naming it ("a link")."""
    out = []
    for item in items or []:
        if not isinstance(item, dict):
            raise MigrationError(f"{what} is not an object")
        out.append(dict(item))
    return out


def _v1_to_v2(data: dict[str, Any]) -> dict[str, Any]:
    out = dict(data)
    crew = out.get("crew", "")
    if isinstance(crew, str):
        out["crew"] = [name.strip() for name in crew.split(",") if name.strip()]
    notes = _objects(out.get("notes"), "a note")
    for note in notes:
        if "author" in note:
            note["by"] = note.pop("author")
    out["notes"] = notes
    out.setdefault("revision", 0)
    links = _objects(out.get("links"), "a link")
    for link in links:
        results = _objects(link.get("results"), "a result")
        for result in results:
            result["direction"] = {"AB": "A->B", "BA": "B->A"}.get(
                result.get("direction", "AB"), result.get("direction")
            )
        link["results"] = results
    out["links"] = links
    out["schema_version"] = 2
    return out


#: The name of the closure that holds a version-2 link's splices.
MIGRATED_CLOSURE = "splices before closures"

_ESTIMATE_FIELDS = {
    "fusion-splicer estimate": "estimate_db",
    "OTDR A->B": "loss_ab_db",
    "OTDR B->A": "loss_ba_db",
    "OTDR bidirectional": "average_only_db",
}


def _v2_to_v3(data: dict[str, Any]) -> dict[str, Any]:
    out = dict(data)
    links = _objects(out.get("links"), "a link")
    for link in links:
        old = link.pop("splices", None) or []
        if not isinstance(old, list):
            raise MigrationError("a link's splices are not a list")
        link.setdefault("closures", [])
        link.setdefault("splice_limits", [])
        if old:
            splices = []
            last_of_fibre: dict[int, str] = {}
            ordered = sorted(
                (s for s in old if isinstance(s, dict)), key=lambda s: str(s.get("at", ""))
            )
            if len(ordered) != len(old):
                raise MigrationError("a splice is not an object")
            for sp in ordered:
                estimate = sp.get("estimate", "fusion-splicer estimate")
                if estimate not in _ESTIMATE_FIELDS:
                    raise MigrationError(f"a splice has an unknown estimate {estimate!r}")
                new: dict[str, Any] = {
                    "cable_a": "A",
                    "fibre_a": sp.get("fibre"),
                    "cable_b": "B",
                    "fibre_b": sp.get("fibre"),
                    _ESTIMATE_FIELDS[estimate]: sp.get("loss_db"),
                    "by": sp.get("by", ""),
                }
                for key in ("id", "at"):
                    if key in sp:
                        new[key] = sp[key]
                fibre = sp.get("fibre")
                if isinstance(fibre, int) and fibre in last_of_fibre:
                    new["replaces"] = last_of_fibre[fibre]
                if isinstance(fibre, int) and "id" in sp:
                    last_of_fibre[fibre] = sp["id"]
                splices.append(new)
            first_at = {"at": ordered[0]["at"]} if "at" in ordered[0] else {}
            cable = {"fibre_count": None, "per_tube": None, **first_at}
            link["closures"] = [
                *link["closures"],
                {
                    "name": MIGRATED_CLOSURE,
                    "notes": "Moved from the link's splice list when fieldkit began keeping "
                    "closures; cables, trays and tube sizes were not recorded then.",
                    "cables": [{"name": "A", **cable}, {"name": "B", **cable}],
                    "splices": splices,
                    **first_at,
                },
            ]
    out["links"] = links
    out["schema_version"] = 3
    return out


def _v3_to_v4(data: dict[str, Any]) -> dict[str, Any]:
    """Version 4 keeps history: a retest supersedes instead of replacing.

    A version-3 file holds at most one result per fibre, wavelength and direction (a retest
    replaced it), except where a hand-off merge brought two; of those the latest counts and the
    earlier ones are marked superseded by it. Everything else (job events, cable ids, earlier
    budgets) starts empty.
    """
    out = dict(data)
    links = _objects(out.get("links"), "a link")
    for link in links:
        results = _objects(link.get("results"), "a result")
        latest: dict[tuple[Any, Any, Any], dict[str, Any]] = {}
        for result in results:
            best = latest.get(_result_key(result))
            if best is None or str(result.get("at", "")) >= str(best.get("at", "")):
                latest[_result_key(result)] = result
        for result in results:
            newest = latest[_result_key(result)]
            if newest is not result:
                result["superseded_at"] = newest.get("at")
                result["superseded_by"] = newest.get("id")
        link["results"] = results
    out["links"] = links
    out["schema_version"] = 4
    return out


def _result_key(result: dict[str, Any]) -> tuple[Any, Any, Any]:
    """What a retest of a result shares with it: fibre, wavelength (0.1 nm), direction."""
    wavelength = result.get("wavelength_nm")
    return (
        result.get("fibre"),
        round(wavelength, 1) if isinstance(wavelength, int | float) else wavelength,
        result.get("direction", "A->B"),
    )


def _v4_to_v5(data: dict[str, Any]) -> dict[str, Any]:
    """Version 5: ``fiber_distance_m`` becomes ``fibre_distance_m``; traces and budget checks
    start empty (the models' defaults), so nothing else changes."""
    out = dict(data)
    links = _objects(out.get("links"), "a link")
    for link in links:
        if "faults" not in link:
            continue
        faults = _objects(link["faults"], "a located fault")
        for fault in faults:
            if "fiber_distance_m" in fault:
                if "fibre_distance_m" in fault:
                    raise MigrationError("a located fault has both fiber_ and fibre_distance_m")
                fault["fibre_distance_m"] = fault.pop("fiber_distance_m")
        link["faults"] = faults
    out["links"] = links
    out["schema_version"] = 5
    return out


#: MIGRATIONS[n] turns a version-n dict into a version-(n+1) dict.
MIGRATIONS: dict[int, Callable[[dict[str, Any]], dict[str, Any]]] = {
    1: _v1_to_v2,
    2: _v2_to_v3,
    3: _v3_to_v4,
    4: _v4_to_v5,
}


def migrate(data: dict[str, Any]) -> dict[str, Any]:
    """Bring a parsed job dict up to :data:`SCHEMA_VERSION` (unchanged when already there).

    Raises :class:`MigrationError` for a missing or unusable version number. A newer version is
    returned unchanged: the store opens such a file read-only.
    """
    version = data.get("schema_version")
    if not isinstance(version, int) or isinstance(version, bool) or version < 1:
        raise MigrationError("the file has no valid schema_version")
    while version < SCHEMA_VERSION:
        step = MIGRATIONS.get(version)
        if step is None:
            raise MigrationError(f"no migration from schema version {version}")
        data = step(data)
        version = data["schema_version"]
    return data
