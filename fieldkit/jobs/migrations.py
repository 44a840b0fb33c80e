"""Migrations of job files from older schema versions: plain functions on the parsed dict.

They run before validation, so the models never see an old layout. Each step takes a dict of
version N and returns one of version N + 1; :func:`migrate` chains them.

Version 1 (fieldkit before per-link records were shared): ``crew`` was one comma-separated
string, notes named their author ``author``, there was no ``revision``, and result directions
were written ``"AB"`` / ``"BA"``.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from fieldkit.jobs.models import SCHEMA_VERSION


class MigrationError(ValueError):
    """A file claims a version we can migrate but its content does not fit that version."""


def _v1_to_v2(data: dict[str, Any]) -> dict[str, Any]:
    out = dict(data)
    crew = out.get("crew", "")
    if isinstance(crew, str):
        out["crew"] = [name.strip() for name in crew.split(",") if name.strip()]
    notes = []
    for note in out.get("notes", []) or []:
        if not isinstance(note, dict):
            raise MigrationError("a note is not an object")
        note = dict(note)
        if "author" in note:
            note["by"] = note.pop("author")
        notes.append(note)
    out["notes"] = notes
    out.setdefault("revision", 0)
    links = []
    for link in out.get("links", []) or []:
        if not isinstance(link, dict):
            raise MigrationError("a link is not an object")
        link = dict(link)
        results = []
        for result in link.get("results", []) or []:
            if not isinstance(result, dict):
                raise MigrationError("a result is not an object")
            result = dict(result)
            result["direction"] = {"AB": "A->B", "BA": "B->A"}.get(
                result.get("direction", "AB"), result.get("direction")
            )
            results.append(result)
        link["results"] = results
        links.append(link)
    out["links"] = links
    out["schema_version"] = 2
    return out


#: MIGRATIONS[n] turns a version-n dict into a version-(n+1) dict.
MIGRATIONS: dict[int, Callable[[dict[str, Any]], dict[str, Any]]] = {1: _v1_to_v2}


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
