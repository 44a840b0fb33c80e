"""Recording meter references and results into a job from the command line.

Shared by ``fieldkit loss`` (``--job``/``--link``/``--fibre``: save the reference, when new,
and the result) and ``fieldkit reference`` (set or recheck a reference). The changes
themselves are in :mod:`fieldkit.actions.meter`, which the meter workspace calls too.
"""

from __future__ import annotations

import argparse
from typing import Any

from fieldkit.commands.common import (
    CommandError,
    add_by,
    add_job_link,
    open_store,
    saved_on_link,
)


def add_record_options(parser: argparse.ArgumentParser, *, fibre: bool = True) -> None:
    """``--job``, ``--link``, ``--by`` (and ``--fibre``, ``--source``, ``--meter``, ``--cord``)."""
    group = parser.add_argument_group("saving into a job")
    add_job_link(
        group,
        job="the job to save into (its id or the start of it, as 'fieldkit jobs list' shows)",
        link="the link's label or id (a new link by that label is added if the job has none)",
    )
    if fibre:
        group.add_argument("--fibre", metavar="N", help="the fibre number (1..N)")
    group.add_argument(
        "--source",
        metavar="ID",
        default="",
        help="the light source's identifier (e.g. its serial number)",
    )
    group.add_argument("--meter", metavar="ID", default="", help="the power meter's identifier")
    group.add_argument(
        "--cord",
        action="append",
        default=[],
        metavar="TEXT",
        help="a reference cord used (repeat for each)",
    )
    add_by(group, "who took the measurement")


def wants_record(args: argparse.Namespace) -> bool:
    """True when any of the job options was given (then --job and --link are required)."""
    return bool(args.job or args.link or getattr(args, "fibre", None))


def resolve_job(store: Any, args: argparse.Namespace) -> str:
    from fieldkit.jobs.store import StoreError

    if not args.job or not args.link:
        raise CommandError("saving into a job needs both --job and --link")
    try:
        job_id: str = store.resolve(args.job)
    except StoreError as exc:
        raise CommandError(str(exc)) from None
    return job_id


def load_job(store: Any, args: argparse.Namespace) -> Any:
    """The job named by --job, read once (to find the link's saved budget)."""
    from fieldkit.jobs.store import StoreError

    job_id = resolve_job(store, args)
    try:
        return store.load(job_id)
    except StoreError as exc:
        raise CommandError(str(exc)) from None


def parse_fibre(text: str | None) -> int:
    from fieldkit.calc.units import parse_number

    if text is None:
        raise CommandError("saving a result needs --fibre N")
    number = parse_number(text, "fibre")
    if number != int(number) or number < 1:
        raise CommandError(f"fibre: {text} is not a fibre number (1, 2, 3 ...)")
    if number > MAX_FIBRE_NUMBER:
        raise CommandError(
            f"fibre: {text} is more fibres than any cable holds (at most {MAX_FIBRE_NUMBER})"
        )
    return int(number)


#: The highest fibre number accepted: the largest cables made hold 6912 fibres (common practice).
MAX_FIBRE_NUMBER = 6912


def check_text(args: argparse.Namespace) -> None:
    """Refuse control characters and non-UTF-8 bytes in the free-text options before any write."""
    from fieldkit.commands.common import plain_text

    for option in ("link", "by", "source", "meter", "launch"):
        value = getattr(args, option, None)
        if value:
            plain_text(value, f"--{option}")
    for cord in getattr(args, "cord", None) or ():
        plain_text(cord, "--cord")


def run_update(store: Any, job_id: str, change: Any) -> Any:
    """``store.update`` with store errors and a missing link as one-line command errors."""
    from fieldkit.jobs.store import StoreError

    try:
        return store.update(job_id, change)
    except StoreError as exc:
        raise CommandError(str(exc)) from None
    except KeyError as exc:
        raise CommandError(str(exc.args[0]) if exc.args else "no such link") from None


def details_of(args: argparse.Namespace) -> Any:
    """The reference details the options give (source, meter, cords, launch, operator)."""
    from fieldkit.actions.meter import ReferenceDetails
    from fieldkit.commands.common import operator

    return ReferenceDetails(
        source_id=args.source,
        meter_id=args.meter,
        cords=tuple(args.cord),
        launch_condition=getattr(args, "launch", None) or None,
        by=operator(args),
    )


def record_readings(
    args: argparse.Namespace,
    *,
    method: Any,
    wavelength_nm: float | None,
    references_dbm: dict[str, float],
    readings_dbm: dict[str, float | None],
    verdict: Any,
) -> dict[str, Any]:
    """Save the reference(s) and the result(s) of ``fieldkit loss`` into the job."""
    from fieldkit.actions.meter import record_readings as record
    from fieldkit.jobs.store import StoreError

    if not args.job or not args.link:
        raise CommandError("saving into a job needs both --job and --link")
    if wavelength_nm is None:
        raise CommandError("saving into a job needs --wavelength")
    fibre = parse_fibre(args.fibre)
    store = open_store(args)
    job_id = resolve_job(store, args)
    try:
        saved = record(
            store,
            job_id,
            args.link,
            fibre=fibre,
            wavelength_nm=wavelength_nm,
            method=method,
            references_dbm=references_dbm,
            readings_dbm=readings_dbm,
            limit_db=verdict.limit_db,
            details=details_of(args),
        )
    except StoreError as exc:
        raise CommandError(str(exc)) from None
    return saved_on_link(
        saved,
        fibre=saved.fibre,
        reference_ids=saved.reference_ids,
        result_ids=saved.result_ids,
        warnings=saved.warnings,
    )
