"""The export dialogs of the Jobs workspace: choose a format and a file; the report is written
there through :func:`fieldkit.actions.export.export_job` (never inside the data folder).
:class:`DayExportDialog` does the same for every job of a day (the end-of-day view), through
:func:`fieldkit.actions.export.export_range`, the day export of ``fieldkit jobs export --day``."""

from __future__ import annotations

import re
from datetime import date
from pathlib import Path
from typing import TYPE_CHECKING

from rich.text import Text
from textual import events, on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.screen import ModalScreen
from textual.widgets import Button, Input, Label, OptionList, Static
from textual.widgets.option_list import Option

from fieldkit.jobs.reports import EXPORT_FORMATS
from fieldkit.jobs.store import StoreError
from fieldkit.text.escape import terminal

if TYPE_CHECKING:
    from fieldkit.jobs.models import Job
    from fieldkit.jobs.store import JobStore


def name_lines(name: str, width: int) -> list[str]:
    """``name`` in lines of at most ``width``, broken after a '_' where that is enough (the
    job's name, then its date), else after a '-', '_' or '.' (a part longer than the width
    alone is cut into widths)."""
    parts: list[str] = [name]
    for seps in ("_", "-_."):
        parts = re.findall(rf"[^{seps}]*[{seps}]|[^{seps}]+$", name) or [name]
        if all(len(part) <= width for part in parts):
            break
    return _fill(parts, width)


def _fill(parts: list[str], width: int) -> list[str]:
    lines = [""]
    for part in parts:
        while len(part) > width:
            if lines[-1]:
                lines.append("")
            lines[-1], part = part[:width], part[width:]
            lines.append("")
        if len(lines[-1]) + len(part) > width and lines[-1]:
            lines.append("")
        lines[-1] += part
    return [line for line in lines if line]


def _t(text: str, style: str = "") -> Text:
    return Text(terminal(text, multiline=True), style=style)


class ExportDialog(ModalScreen[Path | None]):
    """Choose a format and a file; the report is written there."""

    BINDINGS = [Binding("escape", "cancel", "Cancel", id="jobs_export.cancel")]
    # the file's name whole under the field (which shows one line of a long path)
    DEFAULT_CSS = """
    ExportDialog #export-name {
        height: auto;
        color: $text-muted;
    }
    """

    def __init__(self, job: Job, store: JobStore) -> None:
        super().__init__()
        self._job = job
        self._store = store
        self._folder = default_export_folder()

    def compose(self) -> ComposeResult:
        with Vertical(id="export-dialog"):
            yield Label(Text(self._title()), id="export-title")
            yield OptionList(
                *[Option(_FORMAT_NAMES[f], id=f) for f in EXPORT_FORMATS],
                id="export-format",
                markup=False,
            )
            yield Label("File", classes="field-note")
            yield Input(str(self._path("html")), id="export-path", type="text", compact=True)
            yield Static("", id="export-name", markup=False)
            yield Static("", id="export-error", classes="field-error", markup=False)
            with Horizontal(id="export-buttons"):
                yield Button("Cancel", id="export-cancel", compact=True)
                yield Button("Write", id="export-write", variant="primary", compact=True)

    def on_mount(self) -> None:
        formats = self.query_one("#export-format", OptionList)
        formats.highlighted = EXPORT_FORMATS.index("html")
        formats.focus()

    def _title(self) -> str:
        return f"Export {terminal(self._job.name)}"

    def _file_name(self, fmt: str) -> str:
        from fieldkit.actions.export import job_file_name

        return job_file_name(self._job, fmt)  # the job's name and date, never its id

    def _export(self, fmt: str, target: str, config: Path | None) -> tuple[Path | None, str]:
        """Write the report; the file and the line the toast shows."""
        from fieldkit.actions.export import export_job

        done = export_job(self._store, self._job.id, fmt, target, config=config)
        return done.path, f"Wrote {done.path}"

    def _path(self, fmt: str) -> Path:
        from fieldkit.reports.names import free_name

        # a name already taken gets -2, -3 ...
        return free_name(self._folder, self._file_name(fmt))

    @on(OptionList.OptionHighlighted, "#export-format")
    def _format_changed(self, event: OptionList.OptionHighlighted) -> None:
        field = self.query_one("#export-path", Input)
        current = Path(field.value)
        if not event.option_id:
            return
        if current.parent == self._folder:
            field.value = str(self._path(event.option_id))
        elif _format_of(current) not in (None, event.option_id):
            # A typed file keeps its name; its suffix follows the format.
            field.value = str(current.with_suffix(f".{event.option_id}"))

    def on_key(self, event: events.Key) -> None:
        """A character typed on the format list goes on in the File field (Space and Enter
        still choose on the list): nothing typed is lost."""
        formats = self.query_one("#export-format", OptionList)
        if self.focused is formats and event.is_printable and event.character not in (None, " "):
            event.stop()
            event.prevent_default()
            field = self.query_one("#export-path", Input)
            # Focused by typing, the field must not select its text: the next key would
            # replace what was just typed.
            field.select_on_focus = False
            field.focus()
            field.insert_text_at_cursor(event.character or "")

    @on(Input.Changed, "#export-path")
    def _path_changed(self) -> None:
        """The file's name on its own line(s), broken after a '-' or '_' where it is longer
        than the dialog is wide, then its folder: neither cut at 44 columns."""
        self.call_after_refresh(self._show_name)

    def _show_name(self) -> None:
        text = self.query_one("#export-path", Input).value.strip()
        shown = self.query_one("#export-name", Static)
        if not text:
            shown.update("")
            return
        path = Path(text)
        lines = name_lines(terminal(path.name), shown.content_size.width or 34)
        shown.update("\n".join([*lines, terminal(f"in {path.parent}")]))

    @on(OptionList.OptionSelected, "#export-format")
    @on(Input.Submitted, "#export-path")
    @on(Button.Pressed, "#export-write")
    def _write(self) -> None:
        from fieldkit.actions.errors import ActionError

        formats = self.query_one("#export-format", OptionList)
        fmt = EXPORT_FORMATS[formats.highlighted or 0]
        text = self.query_one("#export-path", Input).value.strip()
        error = self.query_one("#export-error", Static)
        if not text or text == "-":
            error.update("Type a file name.")
            return
        try:
            named = _format_of(Path(text))
            if named is not None and named != fmt:
                from fieldkit.actions.export import check_target

                check_target(self._store, text)  # a target refused anyway says why first
                # JSON written into x.csv without a word: the name and the format must agree.
                raise ActionError(
                    f"the file name ends .{named} but the format is {fmt.upper()}: "
                    f"choose the {named.upper()} format or name the file .{fmt}"
                )
            config = getattr(self.app, "config_dir", None)
            path, told = self._export(fmt, text, config)
        except (ActionError, StoreError) as exc:
            error.update(_t(f"Not written: {exc}"))
            return
        except OSError as exc:
            error.update(_t(f"Not written: {exc.strerror or exc}"))
            return
        self.app.notify(told)
        self.dismiss(path)

    @on(Button.Pressed, "#export-cancel")
    def action_cancel(self) -> None:
        self.dismiss(None)


class DayExportDialog(ExportDialog):
    """Every job of one day in one report (HTML, Markdown) or one CSV (or one hand-off file),
    as ``fieldkit jobs export --day``: the same formats, file checks and settings."""

    def __init__(self, day: date, store: JobStore) -> None:
        ModalScreen.__init__(self)  # no one job: every use of it is overridden below
        self._day = day
        self._store = store
        self._folder = default_export_folder()

    def _title(self) -> str:
        return f"Export the jobs of {self._day.isoformat()}"

    def _file_name(self, fmt: str) -> str:
        from fieldkit.actions.export import range_file_name

        return range_file_name(self._day, self._day, fmt)  # jobs_2026-03-10.html

    def _export(self, fmt: str, target: str, config: Path | None) -> tuple[Path | None, str]:
        from fieldkit.actions.errors import ActionError
        from fieldkit.actions.export import export_range, jobs_between

        day = self._day
        if not jobs_between(self._store, day, day):
            raise ActionError(f"no job was worked on on {day.isoformat()}: nothing to export")
        done, jobs = export_range(self._store, day, day, fmt, target, config=config)
        return done.path, f"Wrote {done.path} ({len(jobs)} {'job' if len(jobs) == 1 else 'jobs'})"


def _format_of(path: Path) -> str | None:
    """The export format ``path``'s suffix names (None for another or no suffix)."""
    suffix = path.suffix.lower().lstrip(".")
    return suffix if suffix in EXPORT_FORMATS else None


def default_export_folder() -> Path:
    """Where reports go unless the user types another folder: Documents in the home folder
    when there is one, else the home folder (never the data folder: a report must not land
    beside the job files)."""
    home = Path.home()
    documents = home / "Documents"
    return documents if documents.is_dir() else home


_FORMAT_NAMES = {
    "csv": "CSV: one row per result (spreadsheet)",
    "md": "Markdown report",
    "html": "HTML report (prints on A4 / Letter)",
    "json": "JSON hand-off (jobs import on another laptop)",
}
