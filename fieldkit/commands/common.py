"""Helpers shared by the CLI subcommands."""

from __future__ import annotations

import argparse
import json
import math
import sys
from typing import Any


class CommandError(Exception):
    """Bad input or an impossible request on the command line: exit 2 with this message."""


def add_data_dir(parser: argparse.ArgumentParser) -> None:
    """``--data-dir`` on a subcommand too, so it may follow the command name."""
    parser.add_argument(
        "--data-dir",
        default=argparse.SUPPRESS,
        help="folder for job data (default: the platform data folder)",
    )
    parser.add_argument(
        "--config-dir", default=argparse.SUPPRESS, help="folder for settings and user presets"
    )


def warn_preset_problems(args: argparse.Namespace, problems: list[str]) -> None:
    """One line on stderr when a preset file or entry was skipped, so that a user's own preset
    that did not load is never replaced by the shipped one without a word."""
    if not problems:
        return
    more = f" (and {len(problems) - 1} more)" if len(problems) > 1 else ""
    first = " ".join(problems[0].split())
    print(f"fieldkit {getattr(args, 'command', '')}: warning: preset skipped: {first}{more}; "
          "'fieldkit presets' lists the problems", file=sys.stderr)


def print_json(data: Any) -> None:
    """Print ``data`` as one JSON object; refuses NaN/inf so scripts never see invalid JSON."""
    json.dump(_clean(data), sys.stdout, indent=2, ensure_ascii=False, allow_nan=False)
    sys.stdout.write("\n")


def _clean(data: Any) -> Any:
    if isinstance(data, float) and not math.isfinite(data):
        raise CommandError("internal: a result is not a finite number")
    if isinstance(data, dict):
        return {k: _clean(v) for k, v in data.items()}
    if isinstance(data, (list, tuple)):
        return [_clean(v) for v in data]
    return data
