"""``fieldkit presets``: the shipped and user presets with their sources, and any problems."""

from __future__ import annotations

import argparse
from dataclasses import asdict
from pathlib import Path
from typing import Any

from fieldkit.commands.common import CommandError, add_data_dir, print_json


def register(subparsers: Any) -> None:
    # The kinds are spelled out here rather than imported: registering a command must not load
    # the presets module at start-up (a test checks the two lists agree).
    parser: argparse.ArgumentParser = subparsers.add_parser(
        "presets",
        help="list fibre, connection, component, application, transceiver, cable, colour "
        "code, splice plan and reflectance presets",
        description="Lists the presets with the standard and edition each value comes from. "
        "Your own preset files in <config>/presets/*.toml add to them or replace one by "
        "name; a bad file or entry is reported and the rest still load. "
        "Kinds: fibres, connectors, splices, components, applications, transceivers, cables, "
        "colour_sequences, splice_plans, reflectance.",
    )
    parser.add_argument(
        "kind",
        nargs="?",
        metavar="KIND",
        help="one kind only (fibres, connectors, splices, components, "
        "applications, transceivers, cables, colour_sequences, splice_plans, reflectance)",
    )
    parser.add_argument(
        "--check",
        metavar="FILE",
        help="check one preset file before putting it in <config>/presets: "
        "lists its entries, or its problems (exit status 2)",
    )
    parser.add_argument("--json", action="store_true", help="print one JSON object")
    add_data_dir(parser)
    parser.set_defaults(func=run)


def _kind(text: str) -> str:
    from fieldkit.presets import KINDS

    low = text.strip().lower()
    aliases = {
        "fibers": "fibres",
        "fiber": "fibres",
        "fibre": "fibres",
        "cable": "cables",
        "connections": "connectors",
    }
    low = aliases.get(low, low)
    for kind in KINDS:
        if low in (kind, kind[:-1]):
            return kind
    raise CommandError(f"unknown preset kind '{text}' (kinds: {', '.join(KINDS)})")


def _plain(value: Any) -> Any:
    if isinstance(value, dict):
        return {
            str(k if not isinstance(k, float) else format(k, "g")): _plain(v)
            for k, v in value.items()
        }
    if isinstance(value, (list, tuple)):
        return [_plain(v) for v in value]
    return value


def run(args: argparse.Namespace) -> int:
    from fieldkit import locations
    from fieldkit.presets import KINDS, load_presets

    # an empty KIND or --check (an unset shell variable) is refused, not read as "everything"
    kinds = [_kind(args.kind)] if args.kind is not None else list(KINDS)
    if args.check is not None:
        if not args.check.strip():
            raise CommandError("--check: empty; give a preset file (.toml)")
        return _check(Path(args.check), kinds, args.json)
    library = load_presets(locations.config_dir(getattr(args, "config_dir", None)))
    if args.json:
        out: dict[str, Any] = {}
        for kind in kinds:
            out[kind] = [_plain(asdict(p)) for p in library.of_kind(kind).values()]
        out["problems"] = list(library.problems)
        print_json(out)
        return 0
    for kind in kinds:
        print(f"{kind}:")
        for preset in library.of_kind(kind).values():
            print(f"  {preset.name}: {_summary(kind, preset)}")
            print(f"      source: {preset.source}")
            if preset.origin and not preset.origin.startswith("presets/"):
                print(f"      from {preset.origin}")
    for problem in library.problems:
        print(f"problem: {problem}")
    return 0


def _summary(kind: str, p: Any) -> str:
    def per_nm(table: dict[float, float], unit: str) -> str:
        unit_text = f" {unit}" if unit else ""
        return ", ".join(f"{v:g}{unit_text} at {k:g} nm" for k, v in sorted(table.items()))

    if kind == "fibres":
        geometry = (
            f"core {p.core_diameter_um:g} µm, NA {p.numerical_aperture:g}"
            if p.family == "multimode"
            else f"MFD {per_nm(p.mfd_um, 'µm')}"
            if p.mfd_um
            else ""
        )
        return (
            f"{p.family}; maximum {per_nm(p.attenuation_max, 'dB/km')}"
            + (
                f"; typical {per_nm(p.attenuation_typical, 'dB/km')}"
                if p.attenuation_typical
                else ""
            )
            + (f"; group index {per_nm(p.group_indices, '')}" if p.group_indices else "")
            + (f"; {geometry}" if geometry else "")
        )
    if kind in ("connectors", "splices"):
        typical = "" if p.loss_typical_db is None else f", typical {p.loss_typical_db:g} dB"
        method = f"{p.method}, " if kind == "splices" else ""
        return f"{method}maximum {p.loss_max_db:g} dB{typical}"
    if kind == "components":
        if p.kind == "splitter":
            return f"{p.inputs}xN splitter, excess over 10·log10(N): " + ", ".join(
                f"{p.inputs}x{n} {v:g} dB" for n, v in sorted(p.excess_max_db.items())
            )
        typical = "" if p.loss_typical_db is None else f", typical {p.loss_typical_db:g} dB"
        return f"{p.kind}, maximum {p.loss_max_db:g} dB{typical}"
    if kind == "applications":
        limits = "; ".join(
            f"{fibre} {lim.loss_max_db:g} dB / {lim.reach_m:g} m"
            + ("" if lim.loss_min_db is None else f" (min {lim.loss_min_db:g} dB)")
            for fibre, lim in p.limits.items()
        )
        nm = ", ".join(f"{w:g}" for w in p.wavelengths_nm)
        return f"{p.kind} at {nm} nm: {limits}"
    if kind == "transceivers":
        at = "" if p.wavelength_nm is None else f"{p.wavelength_nm:g} nm: "
        return (
            f"{at}Tx {p.tx_min_dbm:g} to {p.tx_max_dbm:g} dBm, Rx sensitivity "
            f"{p.rx_sensitivity_dbm:g} dBm, overload {p.rx_overload_dbm:g} dBm"
        )
    if kind == "cables":
        return f"helix {p.helix_percent:g} ± {p.helix_uncertainty_percent:g} %; {p.construction}"
    if kind == "colour_sequences":
        return (
            " ".join(f"{i} {c}" for i, c in enumerate(p.colours, start=1))
            + f"; repeats with a {p.tracer_colour} tracer ({p.tracer_on_tracer} on "
            f"{p.tracer_colour})"
        )
    if kind == "splice_plans":
        return str(p.plan)
    if kind == "reflectance":
        orl = "" if p.orl_min_db is None else f"; optical return loss at least {p.orl_min_db:g} dB"
        return f"discrete reflectance at most {p.reflectance_max_db:g} dB{orl}".replace("-", "−")
    return ""


def _check(path: Path, kinds: list[str], as_json: bool) -> int:
    from fieldkit.presets import load_file

    if path.is_dir():
        raise CommandError(f"{path}: is a folder; give one preset file (.toml)")
    if not path.is_file():
        raise CommandError(f"{path}: no such file")
    library = load_file(path)
    entries = {kind: list(library.of_kind(kind)) for kind in kinds if library.of_kind(kind)}
    if as_json:
        print_json({"file": str(path), "entries": entries, "problems": library.problems})
    else:
        for kind, names in entries.items():
            print(f"{kind}: {', '.join(names)}")
        for problem in library.problems:
            print(f"problem: {problem}")
    if library.problems:
        raise CommandError(
            f"{path}: {len(library.problems)} problem(s), listed above; "
            "fix them before using the file"
        )
    return 0
