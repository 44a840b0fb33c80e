"""The splice workspace: log a closure fibre by fibre, with colours, losses and verdicts.

Layout and wiring only: the state and what each key does live in
:class:`fieldkit.tui.splice_session.SpliceSession`; every save goes through
:mod:`fieldkit.actions.splices`.
"""

from __future__ import annotations

import os
from collections.abc import Callable

from rich.text import Text
from textual import events, on
from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical
from textual.screen import Screen
from textual.widgets import Button, Input, Label, OptionList, Static
from textual.widgets.option_list import Option

from fieldkit import safety
from fieldkit.calc.units import InputError
from fieldkit.presets import load_presets
from fieldkit.text import escape
from fieldkit.tui import keys
from fieldkit.tui.splice_session import (
    ENTRY_MODES,
    LABELS,
    SAFETY_SHORT,
    SWATCH,
    ClosureSetup,
    SpliceSession,
    Step,
)
from fieldkit.tui.typed import fieldkit_app
from fieldkit.tui.widgets.key_footer import KeyFooter
from fieldkit.tui.widgets.readings_grid import EntryInput
from fieldkit.tui.widgets.workspace_bar import WorkspaceBar

LOSS_CHARS = r"[0-9A-Za-z .,+\-\u2212]*"
#: What the workspace shows before a link is chosen: what it is for and the first key.
_START_HELP = (
    "Log the splices of a closure on a job's link.\n\n"
    f"1. {keys.display('open')}: choose the job and link (or name a new one).\n"
    "2. Open a closure, or start one: name, route distance, cables, trays.\n"
    "3. Type each splice's loss; Enter moves to the next fibre in TIA-598 colour order.\n\n"
    "Each splice is saved as it is typed. OTDR losses from both ends come from Traces (F8)."
)

_SETUP = (
    ("name", "Closure", "e.g. JC-7"),
    ("route", "Route", "e.g. 2.1 km (optional)"),
    ("cable_a", "Cable A", "e.g. A"),
    ("count_a", "Fibres A", "e.g. 144"),
    ("cable_b", "Cable B", "e.g. B"),
    ("count_b", "Fibres B", "e.g. 144"),
    ("per_tube", "Per tube", "e.g. 12"),
    ("type_a", "Type A", "e.g. G.652.D (optional)"),
    ("type_b", "Type B", "e.g. G.657.A2 (optional)"),
    ("trays", "Trays", "e.g. 12"),
    ("capacity", "Tray size", "e.g. 12"),
    ("limit", "Limit", "fusion preset, or e.g. 0.15 dB"),
    ("plan", "Plan", "straight; or e.g. 1-12 > 25-36; park 13-24; a preset"),
)
_MODE_WORDS = {"estimate": "estimate", "otdr": "A→B, B→A", "all": "estimate, A→B, B→A"}


class WhereLine(Static):
    """The top line: a line made to fit the width it has, made again when that changes."""

    def __init__(self, text: str, *, id: str) -> None:  # noqa: A002
        super().__init__(text, id=id)
        self._fit: Callable[[int], str] | None = None

    def say(self, text: str) -> None:
        self._fit = None
        self.update(Text(text))

    def show(self, fit: Callable[[int], str]) -> None:
        self._fit = fit
        self._draw()

    def on_resize(self) -> None:
        self._draw()

    def _draw(self) -> None:
        if self._fit is not None:
            self.update(Text(self._fit(self.content_size.width or self.app.size.width - 10)))


class SplicesScreen(Screen[None]):
    """Closures, cables, trays and every splice of a link."""

    CSS_PATH = "splices.tcss"
    BINDINGS = keys.bindings("splices")

    def __init__(self) -> None:
        super().__init__()
        self.session: SpliceSession | None = None
        self.job_id: str | None = None
        self.link_id: str | None = None
        self._mode = "estimate"
        self._rows: list[tuple[int, str, str]] = []  # what the splice list shows now

    def compose(self) -> ComposeResult:
        yield WorkspaceBar()
        with Horizontal(id="sp-top"):
            yield WhereLine("No link chosen yet", id="sp-where")
            yield Button(f"Open {keys.hint('open')}", id="sp-open", compact=True)
        yield Static(_START_HELP, id="sp-start-help")
        with Vertical(id="sp-setup"):
            yield OptionList(id="sp-closures")
            yield Static(
                f"New closure: fill in, Enter or {keys.hint('save')} saves it", id="sp-setup-title"
            )
            with Vertical(id="sp-form"):
                for key, label, hint in _SETUP:
                    with Horizontal(classes="sp-row"):
                        yield Label(label, classes="sp-label")
                        yield Input(placeholder=hint, id=f"setup-{key}", compact=True)
                yield Static("", id="sp-setup-error", classes="sp-error")
                yield Button(f"Save closure {keys.hint('save')}", id="sp-start", compact=True)
        with Vertical(id="sp-entry"):
            yield Static("", id="sp-fibre")
            yield Static("", id="sp-colour")
            with Horizontal(id="sp-fields"):
                yield Label("", id="sp-field-label")
                yield EntryInput(
                    id="sp-value",
                    restrict=LOSS_CHARS,
                    compact=True,
                    placeholder="e.g. 0.02",
                    check=self._check,
                )
            yield Static("", id="sp-typed")
            yield Static("", id="sp-error", classes="sp-error")
            yield Static("", id="sp-result")
            yield OptionList(id="sp-list")
        yield Static(SAFETY_SHORT, id="sp-safety")
        yield KeyFooter()

    def on_mount(self) -> None:
        defaults = ClosureSetup()
        for key, _, _ in _SETUP:
            self.query_one(f"#setup-{key}", Input).value = getattr(defaults, key)
        self.query_one("#setup-name", Input).value = ""
        self.query_one("#sp-entry").display = False
        self.query_one("#sp-setup").display = False
        self.query_one("#sp-safety", Static).tooltip = "\n\n".join(safety.SPLICING)

    # -- choosing a job, link and closure ---------------------------------------------------
    def _operator(self) -> str:
        name = getattr(self.app, "operator", "") or os.environ.get("FIELDKIT_OPERATOR", "")
        return str(name)

    def action_pick_job(self) -> None:
        from fieldkit.tui.widgets.job_link_picker import JobLinkPicker

        self.app.push_screen(
            JobLinkPicker(job_id=self.job_id, title="Splice log of a job's link", confirm="Open"),
            self.choose,
        )

    @on(Button.Pressed, "#sp-open")
    def _open_pressed(self) -> None:
        self.action_pick_job()

    def choose(self, choice: tuple[str, str] | None) -> None:
        """The job and link picked (the picker's callback; tests call it directly)."""
        if not choice:
            return
        self.job_id, self.link_id = choice
        job = fieldkit_app(self).store.load(self.job_id)
        link = job.link(self.link_id)
        self.query_one("#sp-where", WhereLine).say(f"{job.name} · {link.label}")
        closures = self.query_one("#sp-closures", OptionList)
        closures.clear_options()
        closures.add_options(
            [Option(Text(f"Open closure {c.name}"), id=c.id) for c in link.closures]
        )
        closures.display = bool(link.closures)
        from fieldkit.actions.splices import latest_fault_position

        fault = latest_fault_position(link)
        route = self.query_one("#setup-route", Input)
        if fault is not None and not route.value.strip():
            route.value = f"{fault[0]:.1f} m"
            route.tooltip = f"Route position {fault[1]}"
        self.session = None
        self.query_one("#sp-start-help").display = False
        self.query_one("#sp-entry").display = False
        self.query_one("#sp-setup").display = True
        if link.closures:
            closures.highlighted = 0
            closures.focus()
        else:
            self.query_one("#setup-name", Input).focus()

    @on(OptionList.OptionSelected, "#sp-closures")
    def _closure_picked(self, event: OptionList.OptionSelected) -> None:
        if event.option.id:
            self.open_closure(event.option.id)

    def action_new_closure(self) -> None:
        if self.job_id is None:
            self.action_pick_job()
            return
        self.query_one("#sp-entry").display = False
        self.query_one("#sp-setup").display = True
        self.query_one("#setup-name", Input).focus()

    @on(Button.Pressed, "#sp-start")
    def action_start_closure(self) -> None:
        if self.job_id is None or self.link_id is None or self.session is not None:
            return
        form = ClosureSetup(
            **{key: self.query_one(f"#setup-{key}", Input).value for key, _, _ in _SETUP}
        )
        error = self.query_one("#sp-setup-error", Static)
        try:
            name = SpliceSession.start(
                fieldkit_app(self).store,
                self.job_id,
                self.link_id,
                form,
                by=self._operator(),
                library=load_presets(fieldkit_app(self).config_dir),
            )
        except InputError as exc:
            error.update(Text(str(exc)))
            return
        error.update("")
        self.open_closure(name)

    def open_closure(self, closure: str) -> None:
        assert self.job_id is not None and self.link_id is not None
        self.session = SpliceSession(
            fieldkit_app(self).store, self.job_id, self.link_id, closure, by=self._operator()
        )
        self.session.set_entry(self._mode)
        self.query_one("#sp-list", OptionList).clear_options()
        self._rows = []
        self.query_one("#sp-setup").display = False
        self.query_one("#sp-entry").display = True
        self._show_where()
        self._refresh()
        self.query_one("#sp-value", EntryInput).focus()

    def _show_where(self) -> None:
        """The job, link and closure in the top line, fitted to its width (closure name whole,
        or cut with "…"), fitted again whenever its width changes."""
        session = self.session
        if session is None:
            return
        narrow = self.size.width < 60
        self.query_one("#sp-where", WhereLine).show(
            lambda width: session.where_line(short=narrow, width=width)
        )

    # -- entry -------------------------------------------------------------------------------
    def _check(self, text: str) -> bool:
        return self.session.check(text) if self.session is not None else False

    @on(Input.Submitted)
    def _submitted(self, event: Input.Submitted) -> None:
        if (event.input.id or "").startswith("setup-"):
            self.action_start_closure()

    @on(EntryInput.Entered, "#sp-value")
    def _entered(self, event: EntryInput.Entered) -> None:
        if self.session is None:
            return
        if not event.accepted:
            try:
                from fieldkit import inputs

                inputs.splice_loss_db(event.value, LABELS[self.session.field])
            except InputError as exc:
                self.query_one("#sp-error", Static).update(Text(str(exc)))
            return
        self._apply(self.session.enter_value(event.value))

    def _apply(self, step: Step) -> None:
        assert self.session is not None
        error = self.query_one("#sp-error", Static)
        if step.error:
            error.update(Text(step.error[1]))  # the message names the field
        elif step.question:
            error.update(Text(step.question))
        else:
            error.update("")
        if step.recorded or step.message:
            lines = [step.message, *(f"  {w}" for w in step.warnings)]
            self.query_one("#sp-result", Static).update(Text("\n".join(lines)))
        self._refresh()

    def action_move(self, delta: int) -> None:
        if self.session is not None:
            self.session.move(delta)
            self._refresh()

    def action_resplice(self) -> None:
        if self.session is not None:
            self._apply(self.session.resplice())

    def action_keep(self) -> None:
        if self.session is not None:
            self.session.cancel_question()
            self.query_one("#sp-error", Static).update("kept as recorded")

    def action_cycle_entry(self) -> None:
        modes = list(ENTRY_MODES)
        self._mode = modes[(modes.index(self._mode) + 1) % len(modes)]
        if self.session is not None:
            self.session.set_entry(self._mode)
            self._refresh()

    @on(events.Click, "#sp-colour")
    def _toggle_swatch(self) -> None:
        if self.session is not None:
            self.session.swatch = not self.session.swatch
            self._refresh()

    @on(OptionList.OptionSelected, "#sp-list")
    def _row_picked(self, event: OptionList.OptionSelected) -> None:
        if self.session is not None and event.option.id:
            self.session.goto(int(event.option.id))
            self._refresh()
            self.query_one("#sp-value", EntryInput).focus()

    # -- drawing -------------------------------------------------------------------------------
    def _refresh(self) -> None:
        session = self.session
        if session is None:
            return
        self.query_one("#sp-fibre", Static).update(Text(session.fibre_line(), style="bold"))
        colour = Text()
        for i, (where, words) in enumerate(session.colours()):
            if i:
                colour.append(" · ")
            if session.swatch:
                base = words.split(" ")[0]
                # Two cells painted in the colour, then one plain space before the word (a
                # "██" glyph drawn wider than its cells touched the word: review).
                hue = SWATCH.get(base)
                colour.append("  ", style=f"on {hue}" if hue else "")
                colour.append(" ")
            colour.append(f"{where} {words}")
        hint = f"Enter takes {_MODE_WORDS[self._mode]}; ^Y other fields; ↑↓ fibre"
        if not colour:
            colour.append("tube size not recorded")
        self.query_one("#sp-colour", Static).update(colour)
        self.query_one("#sp-field-label", Label).update(LABELS[session.field] + " ")
        self.query_one("#sp-typed", Static).update(Text(session.typed_line()))
        self.query_one("#sp-colour", Static).tooltip = hint + "; click: colour swatch on/off"
        narrow = self.size.width < 60
        rows = session.rows(short=narrow)
        listing = self.query_one("#sp-list", OptionList)
        header = "Fib   Est   A→B   B→A   Avg" if narrow else session.summary()
        listing.border_title = escape.markup(header)
        self._show_rows(listing, rows)

    def _show_rows(self, listing: OptionList, rows: list[tuple[int, str, str]]) -> None:
        """Change only the rows that changed: a new splice adds one row, a filled one
        replaces its own (rebuilding 144 rows on every Enter would grow with the closure)."""

        def prompt(line: str, mark: str) -> Text:
            style = "bold red" if mark == "fail" else "yellow" if mark == "warn" else ""
            return Text(line, style=style)

        old = self._rows
        if [r[0] for r in rows[: len(old)]] == [r[0] for r in old]:
            for index, (row, before) in enumerate(zip(rows, old, strict=False)):
                if row != before:
                    listing.replace_option_prompt_at_index(index, prompt(row[1], row[2]))
            listing.add_options(
                Option(prompt(line, mark), id=str(fibre)) for fibre, line, mark in rows[len(old) :]
            )
        else:
            highlighted = listing.highlighted
            listing.clear_options()
            listing.add_options(
                Option(prompt(line, mark), id=str(fibre)) for fibre, line, mark in rows
            )
            if highlighted is not None and rows:
                listing.highlighted = min(highlighted, len(rows) - 1)
        self._rows = rows
