"""The ``fieldkit`` command: no arguments start the TUI; subcommands serve scripts.

Each subcommand lives in ``fieldkit/commands/<name>.py`` and exposes ``register(subparsers)``,
which adds its parser and sets ``func`` to a function ``(args) -> int``. Bad input raises
:class:`fieldkit.commands.common.CommandError` (or ``InputError``): exit status 2, one line on
stderr, never a traceback.
"""

from __future__ import annotations

import gc
import importlib
import sys
from collections.abc import Sequence
from functools import cache
from typing import TYPE_CHECKING, Any

from fieldkit import __version__

if TYPE_CHECKING:
    import argparse

#: The subcommand modules, in the order ``fieldkit --help`` lists them.
COMMAND_MODULES: tuple[str, ...] = (
    "fieldkit.commands.convert",
    "fieldkit.commands.budget",
    "fieldkit.commands.presets_cmd",
    "fieldkit.commands.levels",
    "fieldkit.commands.loss",
    "fieldkit.commands.reference",
    "fieldkit.commands.locate",
    "fieldkit.commands.splice",
    "fieldkit.commands.trace",
    "fieldkit.commands.jobs",
    "fieldkit.commands.settings_cmd",
    "fieldkit.commands.demo",
)


@cache
def _parser_class() -> type[argparse.ArgumentParser]:
    """The parser class of ``fieldkit`` and its commands. Made on first use: argparse is not
    imported when ``fieldkit`` starts the UI without arguments (a hundredth of the start-up)."""
    import argparse
    import re

    class _Parser(argparse.ArgumentParser):
        def __init__(self, *args: Any, **kwargs: Any) -> None:
            super().__init__(*args, **kwargs)
            # argparse reads only -5 and -5.5 as negative numbers; anything else starting
            # with '-' is taken for an option, so `--reference -7,5` or `--length -5km` failed
            # with "expected one argument". A '-' before a digit (or .digit / ,digit) is a
            # value: no fieldkit option starts with a digit.
            self._negative_number_matcher = re.compile(r"^-[.,]?\d")

        def error(self, message: str) -> None:  # type: ignore[override]
            # argparse prints usage plus the message; keep it to one line that names the
            # problem.
            self.exit(2, f"{self.prog}: error: {message}\n")

    return _Parser


def build_parser(modules: Sequence[str] = COMMAND_MODULES) -> argparse.ArgumentParser:
    """The ``fieldkit`` parser with the commands of ``modules`` (by default all of them)."""
    return _build(modules)[0]


def _build(modules: Sequence[str]) -> tuple[argparse.ArgumentParser, set[str]]:
    parser_class = _parser_class()
    parser = parser_class(
        prog="fieldkit",
        description="Offline field assistant for fibre-optic crews. Without a command, starts "
        "the terminal UI.",
    )
    parser.add_argument("--version", action="version", version=f"fieldkit {__version__}")
    parser.add_argument(
        "--data-dir",
        help="folder for job data (default: the platform data folder; or $FIELDKIT_DATA_DIR)",
    )
    parser.add_argument(
        "--config-dir",
        help="folder for settings and user presets (default: the "
        "platform config folder; or $FIELDKIT_CONFIG_DIR)",
    )
    subparsers = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=parser_class)
    for name in modules:
        importlib.import_module(name).register(subparsers)
    return parser, set(subparsers.choices)


#: Options of ``fieldkit`` itself that take a value (``--data-dir DIR``).
_VALUE_OPTIONS = ("--data-dir", "--config-dir")


def _needed_modules(argv: Sequence[str]) -> tuple[tuple[str, ...], str | None]:
    """The command modules ``argv`` needs, and the command it names.

    None to start the UI (no command, no help), only the named command's module when its
    name says which, all of them otherwise (help, or a name argparse must refuse by listing
    the commands). Importing every command's parser is a tenth of the UI's start-up.
    """
    expect_value = False
    for arg in argv:
        if expect_value:
            expect_value = False
        elif arg in ("-h", "--help", "--version"):
            return COMMAND_MODULES, None
        elif not arg.startswith("-"):
            named = tuple(
                module
                for module in COMMAND_MODULES
                if module.rpartition(".")[2] in (arg, f"{arg}_cmd")
            )
            return named or COMMAND_MODULES, arg
        elif "=" not in arg and any(o.startswith(arg) for o in _VALUE_OPTIONS if len(arg) > 2):
            expect_value = True
    return (), None


def main(argv: Sequence[str] | None = None) -> int:
    # Loading the UI (Textual and fieldkit's screens) makes some hundred thousand objects that
    # live as long as the app; the cycle collector walking them again and again while they are
    # made is a twentieth of the start-up. It is off until the first workspace is on screen
    # (FieldkitApp._started freezes what exists then and turns it back on), and back on at
    # once for a command that does not start the UI.
    collecting = gc.isenabled()
    gc.disable()
    try:
        return _main(sys.argv[1:] if argv is None else list(argv), collecting)
    finally:
        if collecting:
            gc.enable()


def _main(arguments: list[str], collecting: bool) -> int:
    if not arguments:
        # No arguments: the UI, as the parser would decide, without building it (argparse and
        # its parser are a hundredth of the start-up).
        from fieldkit.tui.app import make_app

        make_app(welcome=True).run()
        return 0
    modules, command = _needed_modules(arguments)
    parser, commands = _build(modules)
    if command is not None and command not in commands:
        parser, _ = _build(COMMAND_MODULES)
    args = parser.parse_args(arguments)
    if args.command is None:
        from fieldkit.tui.app import make_app

        make_app(data_dir=args.data_dir, config_dir=args.config_dir, welcome=True).run()
        return 0
    if collecting:
        gc.enable()  # a command's own work collects as usual
    try:
        status = int(args.func(args) or 0)
    except KeyboardInterrupt:
        return 130
    except Exception as exc:
        refused = _refused(args.command, exc)
        if refused is None:
            raise
        return refused
    start_ui = getattr(args, "start_ui", None)
    if status == 0 and start_ui is not None:
        # A command (``demo``) asked for the UI once its work was done; commands never import it.
        gc.disable()  # as for the plain start, while the UI loads
        from fieldkit.tui.app import make_app

        # A start by a person like the plain one: on a first start it asks who is working,
        # or every record saved in the demo would be stamped with no name.
        make_app(
            data_dir=start_ui.data_dir,
            config_dir=args.config_dir,
            start_mode=start_ui.start_mode,
            welcome=True,
        ).run()
    return status


def _refused(command: str, exc: Exception) -> int | None:
    """Exit status 2 with one line naming the problem, for a refusal, a file or folder that
    could not be used, or a record refused by its size policy; 0 for a closed pipe; None for
    any other error (raised again). The error classes are imported here, once something went wrong:
    not before a command that starts the UI (``demo``), where they are a hundredth of the
    start-up. Not pydantic: a record's ValidationError exists only once pydantic is imported,
    so it is looked up, never imported."""
    from fieldkit.actions.errors import ActionError
    from fieldkit.calc.units import InputError
    from fieldkit.commands.common import CommandError
    from fieldkit.text.escape import terminal

    if isinstance(exc, (CommandError, InputError, ActionError)):
        # one line whatever the input: user text echoed in the message cannot break it or
        # send control sequences to the terminal
        print(f"fieldkit {command}: {terminal(exc)}", file=sys.stderr)
        return 2
    if isinstance(exc, BrokenPipeError):
        return 0
    if isinstance(exc, OSError):
        # A file or folder the command could not read or write (read-only data folder, full
        # disk, a folder where a file was expected): name it in one line, never a traceback.
        where = f" {exc.filename}" if exc.filename else ""
        print(
            f"fieldkit {command}: cannot use{terminal(where)}: {exc.strerror or exc}",
            file=sys.stderr,
        )
        return 2
    # A record built from what was typed (a --by of 201 characters): the size policy's
    # limits, named in one line like every other refusal.
    pydantic = sys.modules.get("pydantic")
    if pydantic is None or not isinstance(exc, pydantic.ValidationError):
        return None
    from fieldkit.jobs.jobfile import explain

    print(f"fieldkit {command}: {terminal(explain(exc))}", file=sys.stderr)
    return 2


if __name__ == "__main__":
    sys.exit(main())
