"""The forms of the Jobs workspace: a job (new, edit, rename) and a link (add, edit).

Each form saves through :mod:`fieldkit.actions.jobs` when the user presses Save (or Enter in
the last field) and dismisses with the saved job's id; a refusal is shown beside the form and
nothing the user typed is lost. Escape cancels and creates nothing.
"""

from __future__ import annotations

from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Button, Input, Label, Static

from fieldkit.jobs.models import Job, Link
from fieldkit.tui.typed import fieldkit_app

FORM_CSS = """
JobForm, LinkForm {
    align: center middle;
}
JobForm > VerticalScroll, LinkForm > VerticalScroll {
    width: 72;
    max-width: 100%;
    height: auto;
    max-height: 100%;
    border: round $accent;
    background: $surface;
    padding: 0 1;
}
JobForm Label, LinkForm Label {
    margin-top: 0;
}
JobForm .form-buttons, LinkForm .form-buttons {
    height: auto;
}
JobForm .form-buttons Button, LinkForm .form-buttons Button {
    margin-right: 1;
}
"""


def _field(label: str, field_id: str, value: str, placeholder: str = "") -> ComposeResult:
    yield Label(label, classes="field-note")
    yield Input(value, placeholder=placeholder, id=field_id, type="text", compact=True)


class JobForm(ModalScreen[str | None]):
    """A new job, or an edit of ``job`` (its name, customer, site and crew)."""

    DEFAULT_CSS = FORM_CSS
    BINDINGS = [Binding("escape", "cancel", "Cancel", id="jobs_form.cancel")]

    def __init__(self, job: Job | None = None) -> None:
        super().__init__()
        self._job = job

    def compose(self) -> ComposeResult:
        job = self._job
        with VerticalScroll():
            yield Label("Edit the job" if job else "New job", id="form-title")
            yield from _field(
                "Name", "form-name", job.name if job else "", "e.g. Station Road spur"
            )
            yield from _field("Customer", "form-customer", job.customer if job else "")
            yield from _field("Site", "form-site", job.site if job else "")
            yield from _field(
                "Crew (names, comma between)", "form-crew", ", ".join(job.crew) if job else ""
            )
            yield Static("", id="form-error", classes="field-error", markup=False)
            with Horizontal(classes="form-buttons"):
                yield Button("Save", id="form-save", variant="primary", compact=True)
                yield Button("Cancel", id="form-cancel", compact=True)

    def on_mount(self) -> None:
        self.query_one("#form-name", Input).focus()

    def _value(self, field_id: str) -> str:
        return self.query_one(f"#{field_id}", Input).value

    @on(Input.Submitted)
    def _submitted(self, event: Input.Submitted) -> None:
        if event.input.id == "form-crew":
            self._save()
        else:
            self.focus_next()

    @on(Button.Pressed, "#form-save")
    def _save(self) -> None:
        from fieldkit.actions.errors import ActionError
        from fieldkit.actions.jobs import create_job, edit_job
        from fieldkit.jobs.store import StoreError

        app = fieldkit_app(self)
        crew = [c for c in self._value("form-crew").split(",") if c.strip()]
        try:
            if self._job is None:
                done = create_job(
                    app.store,
                    self._value("form-name"),
                    customer=self._value("form-customer"),
                    site=self._value("form-site"),
                    crew=crew,
                    by=app.operator,
                )
            else:
                done = edit_job(
                    app.store,
                    self._job.id,
                    name=self._value("form-name"),
                    customer=self._value("form-customer"),
                    site=self._value("form-site"),
                    crew=crew,
                    by=app.operator,
                )
        except (ActionError, StoreError) as exc:
            self.query_one("#form-error", Static).update(f"Not saved: {exc}")
            return
        for warning in done.warnings:
            app.notify(warning, severity="warning", timeout=8)
        self.dismiss(done.job.id)

    @on(Button.Pressed, "#form-cancel")
    def action_cancel(self) -> None:
        self.dismiss(None)


class LinkForm(ModalScreen[str | None]):
    """A new link of ``job``, or an edit of ``link``; dismisses with the link's id."""

    DEFAULT_CSS = FORM_CSS
    BINDINGS = [Binding("escape", "cancel", "Cancel", id="jobs_link_form.cancel")]

    def __init__(self, job: Job, link: Link | None = None) -> None:
        super().__init__()
        self._job = job
        self._link = link

    def compose(self) -> ComposeResult:
        link = self._link
        length = f"{link.length_m:g} m" if link and link.length_m is not None else ""
        count = str(link.fibre_count) if link and link.fibre_count else ""
        with VerticalScroll():
            yield Label(
                f"Edit link {link.label}" if link else f"New link on {self._job.name}",
                id="form-title",
                markup=False,
            )
            yield from _field("Label", "link-label", link.label if link else "", "e.g. Exch-Cab4")
            yield from _field(
                "End A", "link-end-a", link.end_a if link else "", "a frame, a closure"
            )
            yield from _field("End B", "link-end-b", link.end_b if link else "")
            yield from _field(
                "Fibre type", "link-fibre-type", link.fibre_type if link else "", "OS2"
            )
            yield from _field("Fibre count", "link-fibre-count", count, "e.g. 48")
            yield from _field("Cable id", "link-cable-id", link.cable_id if link else "")
            yield from _field("Length", "link-length", length, "e.g. 1.2 km, 3900 ft")
            yield Static("", id="link-error", classes="field-error", markup=False)
            with Horizontal(classes="form-buttons"):
                yield Button("Save", id="link-save", variant="primary", compact=True)
                yield Button("Cancel", id="link-cancel", compact=True)

    def on_mount(self) -> None:
        self.query_one("#link-label", Input).focus()

    def _value(self, field_id: str) -> str:
        return self.query_one(f"#{field_id}", Input).value

    @on(Input.Submitted)
    def _submitted(self, event: Input.Submitted) -> None:
        if event.input.id == "link-length":
            self._save()
        else:
            self.focus_next()

    @on(Button.Pressed, "#link-save")
    def _save(self) -> None:
        from fieldkit.actions.errors import ActionError
        from fieldkit.actions.jobs import add_link, edit_link, parse_link_text
        from fieldkit.jobs.store import StoreError

        app = fieldkit_app(self)
        error = self.query_one("#link-error", Static)
        try:
            fields = parse_link_text(
                label=self._value("link-label"),
                end_a=self._value("link-end-a"),
                end_b=self._value("link-end-b"),
                fibre_type=self._value("link-fibre-type"),
                fibre_count=self._value("link-fibre-count"),
                cable_id=self._value("link-cable-id"),
                length=self._value("link-length"),
            )
            if self._link is None:
                _job, link = add_link(app.store, self._job.id, fields, by=app.operator)
            else:
                _job, link = edit_link(
                    app.store, self._job.id, self._link.id, fields, by=app.operator
                )
        except (ActionError, StoreError) as exc:
            error.update(f"Not saved: {exc}")
            return
        self.dismiss(link.id)

    @on(Button.Pressed, "#link-cancel")
    def action_cancel(self) -> None:
        self.dismiss(None)
