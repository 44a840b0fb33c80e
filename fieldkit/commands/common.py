"""Helpers shared by the CLI subcommands."""

from __future__ import annotations

import argparse
import json
import math
import sys
import unicodedata
from pathlib import Path
from typing import TYPE_CHECKING, Any, NamedTuple

from fieldkit.text.words import preset_problems

if TYPE_CHECKING:
    from fieldkit.jobs.store import JobStore


class CommandError(Exception):
    """Bad input or an impossible request on the command line: exit 2 with this message."""


class StartUi(NamedTuple):
    """A command's request that ``cli.main`` start the terminal UI when the command is done.

    Commands never import the UI (the layer contract in pyproject.toml): ``fieldkit demo``
    writes its data, sets ``args.start_ui`` to one of these, and the entry point starts the app.
    """

    data_dir: Path | None = None
    start_mode: str | None = None


class RenamedOption(argparse.Action):
    """An option whose name changed: using the old name stops with one line naming the new one.

    ``--fibre`` is a fibre number in every command; a fibre type is ``--fibre-type``. The old
    spellings of the type option (``--fiber``, and ``--fibre TYPE`` in ``budget`` and
    ``locate``) are refused with this message rather than guessed.
    """

    def __init__(self, option_strings: list[str], dest: str, *, new: str, **kwargs: Any) -> None:
        kwargs.setdefault("help", argparse.SUPPRESS)
        super().__init__(option_strings, dest, nargs="?", **kwargs)
        self.new = new

    def __call__(
        self,
        parser: argparse.ArgumentParser,
        namespace: argparse.Namespace,
        values: Any,
        option_string: str | None = None,
    ) -> None:
        parser.error(
            f"{option_string} is now {self.new} (a fibre type, e.g. {self.new} OS2); "
            "--fibre is a fibre number"
        )


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


def open_store(args: argparse.Namespace) -> JobStore:
    """The job store of the data folder: ``--data-dir``, else ``$FIELDKIT_DATA_DIR``, else the
    platform data folder (see :mod:`fieldkit.locations`)."""
    from fieldkit import locations
    from fieldkit.jobs.store import JobStore

    return JobStore(locations.jobs_dir(locations.data_dir(getattr(args, "data_dir", None))))


def operator(args: argparse.Namespace) -> str:
    """Who does the work: ``--by``, else ``$FIELDKIT_OPERATOR``, else the name saved in the
    settings (see :mod:`fieldkit.actions.operator`)."""
    from fieldkit import locations
    from fieldkit.actions.operator import resolve_operator

    given = getattr(args, "by", None)
    try:
        config = locations.config_dir(getattr(args, "config_dir", None))
    except OSError:
        config = None
    return resolve_operator(given, config)


# an argument group or a parser: the option helpers below add to either
Options = argparse._ActionsContainer


def add_by(parser: Options, what: str = "who does it", *, settings: bool = True) -> None:
    """``--by NAME``: the operator stamped on the record (default ``$FIELDKIT_OPERATOR``, then,
    with ``settings``, the name saved in the terminal UI: see :func:`operator`)."""
    then = ", else the name set in the terminal UI" if settings else ""
    parser.add_argument(
        "--by", default=None, metavar="NAME", help=f"{what} (default: $FIELDKIT_OPERATOR{then})"
    )


def add_job_link(
    parser: Options,
    *,
    job: str = "the job (id or its start)",
    link: str = "the link's label or id",
    required: bool = False,
) -> None:
    """``--job ID`` and ``--link LINK``: the job's link a command reads or saves onto."""
    parser.add_argument("--job", required=required, metavar="ID", help=job)
    parser.add_argument("--link", required=required, metavar="LINK", help=link)


def add_fibre_type(parser: Options, what: str, *, fibre_alias: bool = False) -> None:
    """``--fibre-type TYPE`` (``dest="fibre_type"``), and the old spellings that stop with a
    line naming it (:class:`RenamedOption`): ``--fiber`` always, ``--fibre`` with
    ``fibre_alias`` (only in a command where ``--fibre`` is no fibre number)."""
    parser.add_argument("--fibre-type", dest="fibre_type", metavar="TYPE", help=what)
    old = ("--fiber", "--fibre") if fibre_alias else ("--fiber",)
    parser.add_argument(*old, dest="renamed_fibre_type", action=RenamedOption, new="--fibre-type")


def saved_on_link(saved: Any, **more: Any) -> dict[str, Any]:
    """What ``--json`` says of a record saved onto a job's link: the job's and the link's ids,
    the link's label, then ``more`` (what was kept)."""
    return {
        "job_id": saved.job_id,
        "link_id": saved.link_id,
        "link_label": saved.link_label,
        **more,
    }


def warn_preset_problems(args: argparse.Namespace, problems: list[str]) -> None:
    """One line on stderr when a preset file or entry was skipped, so that a user's own preset
    that did not load is never replaced by the shipped one without a word."""
    line = preset_problems(problems, "warning: preset skipped")
    if line is not None:
        print(f"fieldkit {getattr(args, 'command', '')}: {line}", file=sys.stderr)


def plain_text(text: str, what: str, *, multiline: bool = False) -> str:
    """``text`` as typed, refusing what would corrupt a record or the terminal showing it.

    Refuses bytes that are not UTF-8 (they reach Python as lone surrogates and cannot be saved)
    and control characters (an escape sequence would recolour or move the terminal's cursor; a
    line break would split a one-line field in lists and reports). ``multiline`` text (a note)
    may hold line breaks and tabs.
    """
    for ch in text:
        if multiline and ch in "\n\t":
            continue
        category = unicodedata.category(ch)
        if category == "Cs":
            raise CommandError(f"{what}: holds bytes that are not UTF-8 text; retype it")
        if category == "Cc" or ch in "\u2028\u2029":
            where = "" if multiline else " on one line"
            raise CommandError(
                f"{what}: holds a control character (U+{ord(ch):04X}); type plain text{where}"
            )
    return text


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
