"""A Static whose text changes while its earlier layout request still waits is measured again
(fieldkit.tui.layout_fix; without it a job's link list opened at start showed as one blank
line at 44 columns, tests/functional/test_jobs_traces_detail.py)."""

from __future__ import annotations

from textual.app import App, ComposeResult
from textual.containers import VerticalScroll
from textual.widgets import Static

from fieldkit.tui import layout_fix


class _OneText(App[None]):
    def compose(self) -> ComposeResult:
        with VerticalScroll():
            yield Static("", id="text")


async def test_a_text_changed_while_a_layout_waits_gets_its_new_height() -> None:
    layout_fix.install()
    app = _OneText()
    async with app.run_test(size=(40, 20)) as pilot:
        text = app.query_one("#text", Static)
        text.update("one line")  # a layout request, not yet handled by the widget
        # The screen lays out now, before the widget has handled its request: the height
        # measured is cached under the current count of requests.
        app.screen._refresh_layout(app.screen.size)
        assert text.size.height == 1
        text.update("one\ntwo\nthree\nfour")  # while the first request still waits
        await pilot.pause()
        assert text.size.height == 4


def test_install_twice_wraps_once() -> None:
    from textual.widget import Widget

    layout_fix.install()
    first = Widget.refresh
    layout_fix.install()
    assert Widget.refresh is first
