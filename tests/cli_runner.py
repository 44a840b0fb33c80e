"""Run the ``fieldkit`` command in this process, as a user would run it, but without paying for
a new interpreter per call (about 0.3 s each, most of the CLI tests' time).

:func:`run` returns a :class:`subprocess.CompletedProcess` like ``subprocess.run(...,
capture_output=True, text=True)`` would, so tests read ``returncode``, ``stdout`` and ``stderr``
the same way. An exception that escapes ``cli.main`` becomes exit status 1 with its traceback on
stderr, exactly what a user would see, so ``"Traceback" not in result.stderr`` still means what
it says. A few smoke tests in ``test_cli_smoke.py`` still start a real subprocess.

``timeout_s`` guards a call that could hang (a FIFO named like a job file, a device link): after
that many seconds a signal interrupts the call (a blocked ``open`` or ``read`` included) and
:class:`CliHang` fails the test, as a subprocess timeout would, without a stuck suite.
"""

from __future__ import annotations

import contextlib
import io
import os
import signal
import subprocess
import sys
import threading
import traceback
from collections.abc import Iterator
from pathlib import Path

from fieldkit import cli


class _Stdout(io.StringIO):
    """A text stream with a ``buffer`` for code that writes bytes to standard output."""

    def __init__(self) -> None:
        super().__init__()
        self.buffer = io.BytesIO()

    def text(self) -> str:
        return self.getvalue() + self.buffer.getvalue().decode("utf-8", errors="replace")


class CliHang(BaseException):  # not an Exception: the runner's catch-all must not take it
    """The command was still running when its time was up."""


@contextlib.contextmanager
def _deadline(timeout_s: float | None, args: tuple[str, ...]) -> Iterator[None]:
    if timeout_s is None or threading.current_thread() is not threading.main_thread():
        yield
        return

    def hang(_signum: int, _frame: object) -> None:
        raise CliHang(f"fieldkit {' '.join(args)} still running after {timeout_s} s")

    previous = signal.signal(signal.SIGALRM, hang)
    signal.setitimer(signal.ITIMER_REAL, timeout_s)
    try:
        yield
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, previous)


def run(
    *args: str,
    cwd: Path | None = None,
    stdin: str = "",
    env: dict[str, str] | None = None,
    timeout_s: float | None = None,
) -> subprocess.CompletedProcess[str]:
    """``fieldkit ARGS...`` in this process; ``env`` adds to (never replaces) the environment."""
    out, err = _Stdout(), io.StringIO()
    saved_env = dict(os.environ)
    saved_cwd = os.getcwd()
    saved_stdin = sys.stdin
    code: int
    try:
        if env:
            os.environ.update(env)
        if cwd is not None:
            os.chdir(cwd)
        sys.stdin = io.StringIO(stdin)
        with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
            try:
                with _deadline(timeout_s, args):
                    code = int(cli.main(list(args)) or 0)
            except SystemExit as exc:  # argparse: --help, --version, usage errors
                code = exc.code if isinstance(exc.code, int) else (0 if exc.code is None else 1)
                if exc.code is not None and not isinstance(exc.code, int):
                    print(exc.code, file=sys.stderr)
            except Exception:
                traceback.print_exc()
                code = 1
    finally:
        sys.stdin = saved_stdin
        os.chdir(saved_cwd)
        os.environ.clear()
        os.environ.update(saved_env)
    return subprocess.CompletedProcess(["fieldkit", *args], code, out.text(), err.getvalue())


def options(**given: str | bool | list[str]) -> list[str]:
    """Command-line options from keywords, in the order given: ``reading_back="-8.6"`` is
    ``--reading-back -8.6``, ``recheck=True`` is ``--recheck``, a list repeats the option
    (``cord=["TC-1", "TC-2"]`` is ``--cord TC-1 --cord TC-2``)."""
    argv: list[str] = []
    for name, value in given.items():
        option = "--" + name.replace("_", "-")
        if value is True:
            argv.append(option)
        elif isinstance(value, list):
            for one in value:
                argv += [option, one]
        elif isinstance(value, str):
            argv += [option, value]
        else:
            raise TypeError(f"{option}: {value!r} is not text, True or a list of text")
    return argv
