"""``fieldkit budget``: the loss budget of a link per wavelength, with application and
transceiver checks; optionally saved onto a job's link.

:func:`add_link_options` and :func:`link_from_args` are shared with ``fieldkit loss``, so both
commands describe a link with exactly the same options.
"""

from __future__ import annotations

import argparse
from pathlib import Path
from typing import Any

from fieldkit.commands.common import (
    CommandError,
    add_by,
    add_data_dir,
    add_fibre_type,
    add_job_link,
    open_store,
    plain_text,
    print_json,
    warn_preset_problems,
)

_LINK_DESTS = ("fibre_type", "attenuation", "length", "link_file")


def add_link_options(parser: argparse.ArgumentParser, *, fibre_alias: bool = False) -> None:
    """The options that describe a link (fibre, length, connections, splices, components,
    margin). Wavelengths are left to the command (``--wavelength``).

    The fibre type is ``--fibre-type`` (``dest="fibre_type"``) in every command: ``--fibre``
    is a fibre number wherever it appears. The old spelling ``--fiber`` (and, in a command with
    no fibre number, ``--fibre TYPE`` when ``fibre_alias`` is set) stops with a message naming
    ``--fibre-type``.
    """
    group = parser.add_argument_group("the link")
    add_fibre_type(
        group,
        "fibre type from the presets, e.g. OS2, OM4, G.652.D "
        "('fieldkit presets fibres' lists them)",
        fibre_alias=fibre_alias,
    )
    group.add_argument(
        "--attenuation",
        action="append",
        metavar="COEF",
        help="instead of --fibre-type: attenuation with its length unit, e.g. "
        "'0.35 dB/km' (every wavelength) or '1310=0.35 dB/km' (repeat per "
        "wavelength)",
    )
    group.add_argument(
        "--length", metavar="L", help="fibre length with its unit, e.g. 12.4km, '3900 ft'"
    )
    group.add_argument(
        "--connectors",
        metavar="N",
        help="mated connector pairs, counting the two end connections "
        "(default 2); a reference method decides how many of the two ends a "
        "measured limit keeps",
    )
    group.add_argument(
        "--connector-loss",
        metavar="DB",
        help="loss per mated pair in dB (default: the --connector-grade maximum)",
    )
    group.add_argument(
        "--connector-grade",
        metavar="NAME",
        help="connector preset (default TIA-568.3-D, 0.75 dB maximum)",
    )
    group.add_argument("--splices", metavar="N", help="number of splices (default 0)")
    group.add_argument(
        "--splice-loss",
        metavar="DB",
        help="loss per splice in dB (default: the --splice-type maximum)",
    )
    group.add_argument(
        "--splice-type", metavar="NAME", help="splice preset: fusion (default), mechanical, ..."
    )
    group.add_argument(
        "--splitter",
        action="append",
        metavar="1xN",
        help="a 1xN or 2xN splitter: ideal 10·log10(N) plus the preset's excess (repeatable)",
    )
    group.add_argument(
        "--component",
        action="append",
        metavar="NAME",
        help="a component preset, e.g. 'CWDM mux or demux' (repeatable)",
    )
    group.add_argument(
        "--attenuator",
        action="append",
        metavar="DB",
        help="a fixed attenuator of this value (repeatable)",
    )
    group.add_argument(
        "--other-loss",
        action="append",
        metavar="DB",
        help="any other loss in the path, in dB (repeatable)",
    )
    group.add_argument(
        "--margin",
        metavar="DB",
        help="design margin for repairs and ageing, shown beside the link loss",
    )
    group.add_argument(
        "--link-file",
        metavar="FILE",
        help="a link description file (TOML or JSON) instead of the options above",
    )


def link_given(args: argparse.Namespace) -> bool:
    """True when the command line describes a link (a fibre, attenuation, length or file)."""
    return any(getattr(args, dest, None) for dest in _LINK_DESTS)


def spec_from_args(args: argparse.Namespace) -> dict[str, Any]:
    """The written link description of the command-line options (or of ``--link-file``)."""
    from fieldkit.linkspec import load_spec_file

    file_name = getattr(args, "link_file", None) or getattr(args, "file", None)
    wavelengths = _wavelengths(args)
    if file_name:
        used = [
            flag
            for flag, d in (
                ("--fibre-type", "fibre_type"),
                ("--attenuation", "attenuation"),
                ("--length", "length"),
            )
            if getattr(args, d, None)
        ]
        if used:
            raise CommandError(f"give a link file or {', '.join(used)}, not both")
        from_file = load_spec_file(Path(file_name))
        if wavelengths:
            from_file["wavelengths"] = wavelengths
        return _overlay_checks(from_file, args)
    if not getattr(args, "length", None):
        raise CommandError("give --length (e.g. --length 12.4km) or a link file")
    fibre = getattr(args, "fibre_type", None)
    attenuation: list[str] = getattr(args, "attenuation", None) or []
    if fibre and attenuation:
        raise CommandError("give --fibre-type or --attenuation, not both")
    if not fibre and not attenuation:
        raise CommandError("give --fibre-type TYPE or --attenuation COEF")
    segment: dict[str, Any] = {"length": args.length}
    if fibre:
        segment["fibre"] = fibre
    else:
        segment["attenuation"] = _attenuation_spec(attenuation)
    spec: dict[str, Any] = {"segments": [segment]}
    connectors: dict[str, Any] = {}
    if getattr(args, "connectors", None) is not None:
        connectors["count"] = args.connectors
    if getattr(args, "connector_loss", None):
        if getattr(args, "connector_grade", None):
            raise CommandError("give --connector-loss or --connector-grade, not both")
        connectors["loss"] = args.connector_loss
    elif getattr(args, "connector_grade", None):
        connectors["grade"] = args.connector_grade
    if connectors:
        spec["connectors"] = connectors
    splices: dict[str, Any] = {}
    if getattr(args, "splices", None) is not None:
        splices["count"] = args.splices
    if getattr(args, "splice_loss", None):
        splices["loss"] = args.splice_loss
        if getattr(args, "splice_type", None):
            if args.splice_type not in ("fusion", "mechanical"):
                raise CommandError("with --splice-loss, --splice-type is fusion or mechanical")
            splices["method"] = args.splice_type
    elif getattr(args, "splice_type", None):
        splices["grade"] = args.splice_type
    if splices:
        if "count" not in splices:
            raise CommandError("give --splices N with a splice loss or type")
        spec["splices"] = [splices]
    components: list[dict[str, Any]] = []
    for split in getattr(args, "splitter", None) or []:
        components.append({"splitter": split})
    for name in getattr(args, "component", None) or []:
        components.append({"preset": name})
    for value in getattr(args, "attenuator", None) or []:
        components.append({"kind": "attenuator", "loss": value})
    for value in getattr(args, "other_loss", None) or []:
        components.append({"kind": "other", "name": "other loss", "loss": value})
    if components:
        spec["components"] = components
    if getattr(args, "margin", None):
        spec["margin"] = args.margin
    if wavelengths:
        spec["wavelengths"] = wavelengths
    return _overlay_checks(spec, args)


def _wavelengths(args: argparse.Namespace) -> list[str]:
    raw = getattr(args, "wavelength", None)
    if raw is None:
        return []
    return [raw] if isinstance(raw, str) else list(raw)


def _attenuation_spec(values: list[str]) -> Any:
    """One bare coefficient for every wavelength, or NM=COEF pairs (the workspace's rule)."""
    from fieldkit.inputs import attenuation_entry

    return attenuation_entry(values, "--attenuation")


def _overlay_checks(spec: dict[str, Any], args: argparse.Namespace) -> dict[str, Any]:
    application = getattr(args, "application", None)
    # An empty name (an unset shell variable) is refused by name, never dropped silently.
    for option, value in (
        ("--application", application),
        ("--transceiver", getattr(args, "transceiver", None)),
    ):
        if value is not None and not value.strip():
            raise CommandError(
                f"{option}: empty; give a preset name ('fieldkit presets' lists them)"
            )
    if application:
        spec["application"] = application
    for option, key in (("bit_rate", "bit_rate"), ("spectral_width", "spectral_width")):
        value = getattr(args, option, None)
        if value is not None:
            spec[key] = value
    levels = [getattr(args, k, None) for k in ("tx_min", "tx_max", "rx_sensitivity", "rx_overload")]
    named = getattr(args, "transceiver", None)
    if any(v is not None for v in levels):
        if named:
            raise CommandError("give --transceiver or the four levels, not both")
        if not all(v is not None for v in levels):
            raise CommandError(
                "the transceiver check needs all four of --tx-min, --tx-max, "
                "--rx-sensitivity and --rx-overload"
            )
        spec["transceiver"] = dict(
            zip(
                ("tx_min_dbm", "tx_max_dbm", "rx_sensitivity_dbm", "rx_overload_dbm"),
                levels,
                strict=True,
            )
        )
    elif named:
        spec["transceiver"] = named
    return spec


def _config_dir(args: argparse.Namespace) -> Path:
    from fieldkit import locations

    return locations.config_dir(getattr(args, "config_dir", None))


def resolved_from_args(args: argparse.Namespace) -> Any:
    """The resolved link, application and transceiver of the command line."""
    from fieldkit.linkspec import resolve
    from fieldkit.presets import load_presets

    library = load_presets(_config_dir(args))
    warn_preset_problems(args, library.problems)
    return resolve(spec_from_args(args), library)


def link_from_args(args: argparse.Namespace) -> Any:
    """The :class:`~fieldkit.calc.budget.LinkDescription` of the command line's link options.

    Raises
    ------
    CommandError, InputError
        For missing or bad options (the CLI turns either into exit 2 and one line).
    """
    return resolved_from_args(args).link


_FILE_EXAMPLE = """\
a link description FILE (TOML; the same keys in JSON):

  label = "hut 3 to cabinet 12"
  margin = "3 dB"                    # optional; wavelengths = [1310, 1550] too
  application = "GPON Class B+"      # optional; transceiver = "GPON B+ downstream"
  [[segments]]                       # in order from end A; repeat per fibre type
  fibre = "G.652.D"                  # or attenuation = "0.35 dB/km"
  length = "12.4 km"
  [connectors]
  count = 4                          # every mated pair, both end connections too
  grade = "TIA-568.3-D"              # or loss = "0.5 dB"
  [[splices]]
  count = 6
  grade = "fusion"                   # or method = "mechanical" with loss = "0.2 dB"
  [[components]]
  splitter = "1x32"                  # or preset = "CWDM mux or demux", or
                                     # kind = "attenuator" / "other" with loss = "5 dB"
"""


def register(subparsers: Any) -> None:
    parser: argparse.ArgumentParser = subparsers.add_parser(
        "budget",
        help="loss budget of a link per wavelength, with application and transceiver checks",
        formatter_class=argparse.RawDescriptionHelpFormatter,
        description="The maximum (acceptance) and typical loss of a link at each wavelength,\n"
        "with a line-item breakdown that adds up, and the total with the design margin.\n"
        "Describe the link with the options, or give a TOML/JSON link description FILE\n"
        "with several segments and components. --application checks an Ethernet PHY or\n"
        "PON class (loss and length separately); --transceiver or the four --tx/--rx\n"
        "levels check a transceiver pair and size an attenuator.",
        epilog=_FILE_EXAMPLE,
    )
    parser.add_argument(
        "file", nargs="?", metavar="FILE", help="a link description file (TOML or JSON)"
    )
    add_link_options(parser, fibre_alias=True)
    parser.add_argument(
        "--wavelength",
        action="append",
        metavar="NM",
        help="wavelength in nm (repeatable; default 850 and 1300 nm multimode, "
        "1310 and 1550 nm single-mode)",
    )
    checks = parser.add_argument_group("checks")
    checks.add_argument(
        "--application",
        metavar="NAME",
        help="application preset, e.g. 10GBASE-SR, 'GPON Class B+' "
        "('fieldkit presets applications' lists them)",
    )
    checks.add_argument("--transceiver", metavar="NAME", help="transceiver preset")
    checks.add_argument("--tx-min", metavar="DBM", help="transmitter minimum launch power")
    checks.add_argument("--tx-max", metavar="DBM", help="transmitter maximum launch power")
    checks.add_argument("--rx-sensitivity", metavar="DBM", help="receiver sensitivity")
    checks.add_argument("--rx-overload", metavar="DBM", help="receiver overload level")
    checks.add_argument(
        "--bit-rate",
        metavar="GBD",
        help="line rate in GBd (symbols per second on the fibre, coding included: 10GBASE-LR's "
        "10 Gb/s of data run at 10.3125 GBd; for a two-level signal, the bit rate on the line), "
        "for the dispersion and modal-bandwidth checks, e.g. 10.3125 (default: the "
        "transceiver's or the application's)",
    )
    checks.add_argument(
        "--spectral-width",
        metavar="NM",
        help="source RMS spectral width in nm, for the dispersion check without a "
        "transceiver tolerance, e.g. 0.1",
    )
    checks.add_argument(
        "--fibre-data",
        action="store_true",
        help="also print each fibre's data: NA, acceptance angle, V-number, modes, cut-off, "
        "dispersion, at each wavelength",
    )
    save = parser.add_argument_group("saving onto a job")
    add_job_link(
        save,
        job="save the budget onto this job (id or prefix)",
        link="the job's link (label or id; a new link by that label is added)",
    )
    add_by(save, "who computed the budget")
    parser.add_argument("--json", action="store_true", help="print one JSON object")
    add_data_dir(parser)
    parser.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    if args.file and args.link_file:
        raise CommandError("give the link file once (FILE or --link-file)")
    if bool(args.job) != bool(args.link):
        raise CommandError("saving onto a job needs both --job and --link")
    resolved = resolved_from_args(args)
    report = resolved.evaluate()
    saved = None
    if args.job:
        saved = _save(args, resolved, report)
    data = report.as_dict()
    data["description"] = resolved.spec
    data["saved"] = saved
    fibre_data = _fibre_data(resolved, report) if args.fibre_data else []
    if args.fibre_data:
        data["fibre_data"] = [d.as_dict() for d in fibre_data]
    if args.json:
        print_json(data)
    else:
        _print_text(report, saved)
        if fibre_data:
            from fieldkit.text.budget import fibre_data_lines

            print()
            print("Fibre data:")
            for item in fibre_data:
                for i, line in enumerate(fibre_data_lines(item)):
                    print(f"  {'' if i == 0 else '  '}{line}")
    return 0


def _fibre_data(resolved: Any, report: Any) -> list[Any]:
    from fieldkit.calc.checks import fibre_data

    fibres = {s.fibre.name: s.fibre for s in resolved.link.segments}
    return [
        fibre_data(f, w.wavelength_nm) for f in fibres.values() for w in report.result.wavelengths
    ]


def _save(args: argparse.Namespace, resolved: Any, report: Any) -> dict[str, str]:
    from fieldkit.actions.saves import save_budget
    from fieldkit.commands.common import operator
    from fieldkit.jobs.budget_records import budget_record
    from fieldkit.jobs.store import StoreError

    plain_text(args.link, "link")
    store = open_store(args)
    record = budget_record(resolved, report, by=operator(args))
    try:
        job_id = store.resolve(args.job)
        saved = save_budget(
            store,
            job_id,
            args.link,
            record,
            create=True,
            length_m=resolved.link.length_m,
            fibre_type=", ".join(resolved.link.fibre_names),
        )
    except StoreError as exc:
        raise CommandError(str(exc)) from None
    return {
        "job_id": saved.job_id,
        "job": saved.job_name,
        "link_id": saved.link_id,
        "link": saved.link_label,
    }


def _print_text(report: Any, saved: dict[str, str] | None) -> None:
    from fieldkit.text.budget import report_lines

    for line in report_lines(report):
        print(line)
    if saved:
        print(f"Saved onto job {saved['job']}, link {saved['link']}.")
