"""Feed fieldkit 100,000+ generated inputs and count what happens (see README.md here).

Targets: the typed-value parser and every conversion of what it accepts; the calculation
functions with extreme floats; the four escaping functions; job files (mutated bytes and mutated
values) through the store's parser and, when accepted, every export; hand-offs through import.
Only InputError / StoreError may refuse; anything else is a failure and is printed.
"""

from __future__ import annotations

import argparse
import json
import math
import random
import re
import sys
import tempfile
import time
import traceback
from collections import Counter
from collections.abc import Callable
from pathlib import Path
from typing import Any

from fieldkit.calc import coupling, locate, optics, power, reference
from fieldkit.calc.units import InputError, convert, parse, units_of
from fieldkit.jobs.handoff import read_handoff
from fieldkit.jobs.models import Job, LossResult
from fieldkit.jobs.reports import EXPORT_FORMATS, HANDOFF_FORMAT
from fieldkit.jobs.store import StoreError, parse_job
from fieldkit.reports import export
from fieldkit.text.escape import csv_cell, html, markdown, terminal

RAW = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\x7f-\x9f]")
ALPHABET = list("0123456789.,+-eE /%'dDbBmMwWkKuUnNfFtTiIaAhHzZsSpP") + [
    "\u2212",
    "\u00b5",
    "\u03bc",
    "\u00a0",
    "\u221e",
    "\x1b",
    "\n",
    "[",
    "]",
    "<",
]
FLOATS = [
    0.0,
    -0.0,
    5e-324,
    1e-320,
    2.2250738585072014e-308,
    1e-300,
    1e300,
    1.7e308,
    -1.7e308,
    math.inf,
    -math.inf,
    math.nan,
    -4000.0,
    4000.0,
    3082.0,
    -3077.0,
]

counts: Counter[str] = Counter()
failures: list[str] = []


def record(target: str, call: Callable[[], Any], refusals: tuple[type[BaseException], ...]) -> Any:
    counts[f"{target}: tried"] += 1
    try:
        result = call()
    except refusals as exc:
        counts[f"{target}: refused"] += 1
        if not str(exc) or "\n" in str(exc):
            fail(target, f"refusal without a one-line message: {exc!r}")
        return None
    except Exception:
        fail(target, traceback.format_exc(limit=3))
        return None
    counts[f"{target}: accepted"] += 1
    return result


def fail(target: str, detail: str) -> None:
    counts[f"{target}: FAILED"] += 1
    if len(failures) < 20:
        failures.append(f"{target}: {detail}")


def finite(target: str, value: Any) -> None:
    if isinstance(value, float) and not math.isfinite(value):
        fail(target, f"returned {value}")


def fuzz_typed_text(rng: random.Random, n: int) -> None:
    for _ in range(n):
        text = "".join(rng.choice(ALPHABET) for _ in range(rng.randint(0, 16)))
        if rng.random() < 0.3:
            sign = rng.choice(["", "-"])
            mantissa = rng.choice(["1e", "9e", "1.5e"])
            unit = rng.choice(["dBm", "pW", "dB", "km", "nm", "mW", "%", "dB/km", "THz"])
            text = f"{sign}{mantissa}{rng.randint(-400, 400)} {unit}"
        value = record("parse", lambda text=text: parse(text, what="field"), (InputError,))
        if value is None:
            continue
        for unit in units_of(value.kind):
            result = record(
                "convert", lambda unit=unit, value=value: convert(value, unit), (InputError,)
            )
            finite("convert", result)


def fuzz_calc_floats(rng: random.Random, n: int) -> None:
    one: list[Callable[[float], float]] = [
        power.dbm_to_mw,
        power.mw_to_dbm,
        power.db_to_ratio,
        power.ratio_to_db,
        power.loss_db_to_percent_transmitted,
        power.percent_transmitted_to_loss_db,
        optics.wavelength_nm_to_thz,
        optics.thz_to_wavelength_nm,
        lambda x: power.power_to_dbm(x, "pW"),
        lambda x: locate.in_unit(x, "ft"),
    ]
    two: list[Callable[[float, float], float]] = [
        power.apply_loss,
        power.level_difference_db,
        power.loss_of_length_db,
        coupling.core_diameter_mismatch_loss_db,
        coupling.mfd_mismatch_loss_db,
        reference.insertion_loss_db,
        reference.bidirectional_average_db,
        locate.fibre_distance_from_time,
        lambda a, b: power.sum_levels_dbm([a, b]),
    ]

    def pick() -> float:
        r = rng.random()
        if r < 0.4:
            return rng.choice(FLOATS)
        if r < 0.7:
            return rng.uniform(-5000, 5000)
        return math.ldexp(rng.uniform(-1, 1), rng.randint(-1074, 1023))

    for _ in range(n):
        if rng.random() < 0.5:
            f1 = rng.choice(one)
            x = pick()
            finite("calc", record("calc", lambda f1=f1, x=x: f1(x), (InputError,)))
        else:
            f2 = rng.choice(two)
            a, b = pick(), pick()
            finite("calc", record("calc", lambda f2=f2, a=a, b=b: f2(a, b), (InputError,)))


def fuzz_escaping(rng: random.Random, n: int) -> None:
    for _ in range(n):
        text = "".join(
            chr(
                rng.choice(
                    [
                        rng.randint(0, 0x40),
                        rng.randint(0x7F, 0xA0),
                        rng.randint(0x2000, 0x2070),
                        rng.randint(0x20, 0x7E),
                    ]
                )
            )
            for _ in range(rng.randint(0, 20))
        )
        counts["escape: tried"] += 1
        for name, out in (("terminal", terminal(text)), ("markdown", markdown(text))):
            if RAW.search(out) or "\n" in out:
                fail("escape", f"{name} let a control character through: {text!r}")
        if RAW.search(html(text)):
            fail("escape", f"html: {text!r}")
        cell = csv_cell(text)
        if cell[:1] in ("=", "+", "@", "\t", "\r") or (
            cell[:1] == "-" and not re.fullmatch(r"-\d+(\.\d*)?([eE][+-]?\d+)?", cell)
        ):
            fail("escape", f"csv formula cell: {text!r} -> {cell!r}")
        if re.search(r"(?<!\\)\[", markdown(text)) or "<" in markdown(text):
            fail("escape", f"markdown link or HTML: {text!r}")


def _seed() -> bytes:
    job = Job(name="Station Road", customer="Town", site="Depot")
    job.add_note("Duct proven", by="A. Tech")
    link = job.add_link("L1", end_a="A", end_b="B")
    for fibre in range(1, 7):
        link.results.append(LossResult(fibre=fibre, wavelength_nm=1310, loss_db=0.4, flags=["x"]))
    return job.model_dump_json(indent=1).encode()


def _value(rng: random.Random, depth: int = 0) -> Any:
    r = rng.random()
    if depth > 3 or r < 0.5:
        return rng.choice(
            [
                None,
                True,
                False,
                0,
                -1,
                7,
                "7",
                "yes",
                1e308,
                -0.0,
                "",
                "\x1b[2J",
                "=1+1",
                "[x](https://e.example)",
                "a" * rng.choice([1, 200, 201, 20001]),
                "2026-03-14T07:00:00Z",
                0.5,
                2**70,
            ]
        )
    if r < 0.75:
        return [_value(rng, depth + 1) for _ in range(rng.randint(0, 3))]
    return {
        rng.choice(["id", "text", "at", "x", "fibre", "k"]): _value(rng, depth + 1)
        for _ in range(rng.randint(0, 3))
    }


def _paths(value: Any, prefix: tuple[Any, ...] = ()) -> list[tuple[Any, ...]]:
    out = [prefix]
    if isinstance(value, dict):
        for key, item in value.items():
            out += _paths(item, (*prefix, key))
    elif isinstance(value, list):
        for i, item in enumerate(value):
            out += _paths(item, (*prefix, i))
    return out


def fuzz_job_files(rng: random.Random, n: int, folder: Path) -> None:
    seed = _seed()
    seed_dict = json.loads(seed)
    paths = [p for p in _paths(seed_dict) if p]
    for i in range(n):
        if rng.random() < 0.6:
            data = bytearray(seed)
            for _ in range(rng.randint(1, 6)):
                at = rng.randrange(len(data)) if data else 0
                op = rng.random()
                if op < 0.4 and data:
                    data[at] ^= 1 << rng.randrange(8)
                elif op < 0.6:
                    del data[at:]
                elif op < 0.8:
                    data[at:at] = bytes(rng.randrange(256) for _ in range(rng.randint(1, 6)))
                elif data:
                    del data[at : at + rng.randint(1, 20)]
            raw = bytes(data)
        else:
            mutated = json.loads(seed)
            for _ in range(rng.randint(1, 3)):
                path = rng.choice(paths)
                target: Any = mutated
                try:
                    for key in path[:-1]:
                        target = target[key]
                    target[path[-1]] = _value(rng)
                except (KeyError, IndexError, TypeError):
                    pass
            raw = json.dumps(mutated).encode()
        job = record("job file", lambda raw=raw: parse_job(raw), (StoreError,))
        if job is not None:
            for fmt in EXPORT_FORMATS:
                text = record("export", lambda fmt=fmt, job=job: export(job, fmt), ())
                if text is not None and RAW.search(text.replace("\r\n", "\n").replace("\t", " ")):
                    fail("export", f"raw control character in {fmt}")
        if i % 10 == 0:
            path = folder / "h.json"
            path.write_bytes(
                b'{"format": "'
                + HANDOFF_FORMAT.encode()
                + b'", "handoff_version": 1, "jobs": ['
                + raw
                + b"]}"
            )
            record("hand-off", lambda path=path: read_handoff(path), (StoreError,))


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--n", type=int, default=100_000, help="total inputs (default 100,000)")
    parser.add_argument("--seed", type=int, default=16)
    args = parser.parse_args()
    rng = random.Random(args.seed)
    started = time.perf_counter()
    with tempfile.TemporaryDirectory() as folder:
        fuzz_typed_text(rng, args.n * 40 // 100)
        fuzz_calc_floats(rng, args.n * 30 // 100)
        fuzz_escaping(rng, args.n * 15 // 100)
        fuzz_job_files(rng, args.n * 15 // 100, Path(folder))
    elapsed = time.perf_counter() - started
    inputs = sum(
        v
        for k, v in counts.items()
        if k.endswith(": tried") and not k.startswith(("convert", "export"))
    )
    print(f"fuzz: {inputs:,} generated inputs in {elapsed:.0f} s (seed {args.seed})")
    for key in sorted(counts):
        print(f"  {key:<28} {counts[key]:>9,}")
    failed = sum(v for k, v in counts.items() if k.endswith("FAILED"))
    print(f"failures: {failed:,}")
    for detail in failures:
        print("---", detail, sep="\n")
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
