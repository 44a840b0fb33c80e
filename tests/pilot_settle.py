"""Pilot waits that end when the app has handled a key, not after a fixed sleep.

Textual's Pilot waits after every key, click and ``pause()`` until the process looks idle: it
sleeps 20 ms at a time until one sleep passed with almost no CPU used, twice per key. That is
at least 40 ms a key, most of the suite's time, and still a guess: a save on a thread that
waits on the disk looks idle, so a dialog pushed after it may not be there yet.

Here the wait is for what the key set going instead, checked after each turn of the event loop:

- every message queue of the app and of the screens on the stack is empty, and no message
  handler or after-idle callback is still running anywhere (counted around Textual's
  ``_dispatch_message`` and ``_flush_next_callbacks``);
- no callback waits for the next idle moment (``call_later``), and the current screen has no
  layout, paint or ``call_after_refresh`` callback waiting for its update timer: the settle
  runs that update itself rather than wait for the timer's next tick;
- no worker of the current screen (or of the app) is still running: a thread save, a load. A
  worker of a screen underneath, waiting on a dialog the test has yet to answer, is left alone;
- no animation is running or scheduled: a scroll is one, even with animations off (it lands on
  the animator's next frame, a timer), and Textual's own key sender waits for it too;
- and the current screen stayed the same while all that was checked.

Timers are not waited for: a test that needs a delayed refresh (the meter's summary) asks for
it, or pauses for that delay, which ``Pilot.pause(delay)`` still does before settling.

:func:`install` puts these waits in place of Textual's for the whole test session.
"""

from __future__ import annotations

import asyncio
from typing import Any

from textual import events
from textual.app import App
from textual.pilot import Pilot
from textual.worker import WorkerState

#: Turns of the event loop a settle may take before it gives up and lets the test go on (the
#: test's own assertions then say what did not happen). A busy key takes a few dozen.
MAX_TURNS = 20_000
#: How long a settle waits on a running worker before it looks at the app again.
WORKER_LOOK_S = 0.002
#: Quiet checks in a row that count as settled: a callback run on one turn may post on the next.
QUIET_TURNS = 3

_RUNNING = (WorkerState.PENDING, WorkerState.RUNNING)

#: Message handlers (and after-idle callback flushes) running now, in every app of the session.
_in_flight = 0


def _nodes(app: App[Any]) -> list[Any]:
    nodes: list[Any] = [app]
    for screen in app.screen_stack:
        nodes.extend(screen.walk_children(with_self=True))
    return nodes


def _busy_node(node: Any) -> bool:
    queue = node.__dict__.get("_message_queue")  # Textual makes it on first use
    if queue is not None and queue.qsize():
        return True
    return bool(getattr(node, "_next_callbacks", None))


def _pending_workers(app: App[Any]) -> list[Any]:
    try:
        screen = app.screen
    except Exception:  # no screen yet, or the app is closing
        return []
    pending = []
    for worker in app.workers:
        if worker.state not in _RUNNING:
            continue
        node = worker.node
        owner = node if isinstance(node, App) else getattr(node, "screen", None)
        if node is app or owner is screen:
            pending.append(worker)
    return pending


def _refresh_due(screen: Any) -> bool:
    return bool(
        screen._layout_required  # noqa: SLF001
        or screen._scroll_required  # noqa: SLF001
        or screen._repaint_required  # noqa: SLF001
        or screen._dirty_widgets  # noqa: SLF001
        or screen._recompose_required  # noqa: SLF001
        or screen._callbacks  # noqa: SLF001
    )


async def settle(app: App[Any]) -> None:
    """Wait until ``app`` has handled everything queued so far and its current screen's
    workers have finished (see the module's text)."""
    quiet = 0
    last_screen = None
    for _ in range(MAX_TURNS):
        await asyncio.sleep(0)
        if app._closed or app._closing:  # noqa: SLF001
            return
        try:
            screen = app.screen
        except Exception:
            return
        if screen is not last_screen:  # a dialog opened or closed: settle it afresh
            last_screen = screen
            quiet = 0
        animator = app.animator
        if animator._animations or animator._scheduled:  # noqa: SLF001
            # A scroll is an animation even with animations off (it lands on the animator's
            # next frame, a timer): wait for it, as Textual's own key sender does.
            quiet = 0
            await animator.wait_until_complete()
            continue
        workers = _pending_workers(app)
        if workers:
            # A short wait, then look again: the worker may open a dialog and wait on it, and
            # then it is the dialog's turn (the test answers it), not the worker's.
            quiet = 0
            await asyncio.wait([_finished(w) for w in workers], timeout=WORKER_LOOK_S)
            continue
        if _in_flight or any(_busy_node(node) for node in _nodes(app)):
            quiet = 0
            continue
        if _refresh_due(screen):
            # What the screen's 60 Hz update timer would do next: lay out, paint, then run
            # the callbacks waiting for a refresh (``call_after_refresh``).
            quiet = 0
            screen._on_timer_update()  # noqa: SLF001
            continue
        quiet += 1
        if quiet >= QUIET_TURNS:
            return


def _finished(worker: Any) -> asyncio.Future[Any]:
    """A future done when ``worker`` has ended, however it ended (the app reports a failure)."""
    task = worker._task  # noqa: SLF001 - Worker.wait() raises for a failed worker
    if task is None:
        return asyncio.ensure_future(asyncio.sleep(WORKER_LOOK_S))
    return asyncio.shield(task)


async def _press_keys(self: App[Any], keys: Any) -> None:
    """Textual's key sender, with :func:`settle` after each key instead of idle sleeps."""
    import unicodedata

    from textual.keys import (  # the same helpers Textual's own sender uses
        REPLACED_KEYS,
        _character_to_key,
        _get_unicode_name_from_key,
    )

    for key in keys:
        if key.startswith("wait:"):
            _, wait_ms = key.split(":")
            await asyncio.sleep(float(wait_ms) / 1000)
            await settle(self)
            continue
        if len(key) == 1 and not key.isalnum():
            key = _character_to_key(key)
        original_key = REPLACED_KEYS.get(key, key)
        char: str | None
        try:
            char = unicodedata.lookup(_get_unicode_name_from_key(original_key))
        except KeyError:
            char = key if len(key) == 1 else None
        key_event = events.Key(key, char)
        key_event.set_sender(self)
        # Straight into the app's queue (the driver would post it from the next turn of the
        # loop, which the settle could take for quiet).
        await self._post_message(key_event)  # noqa: SLF001
        await settle(self)


async def _pause(self: Pilot[Any], delay: float | None = None) -> None:
    """``Pilot.pause``: sleep ``delay`` if given, then settle."""
    if delay is not None:
        await asyncio.sleep(delay)
    await settle(self.app)
    self.app.screen._on_timer_update()  # noqa: SLF001 - as Textual's pause does


async def _idle(*_args: Any, **_kwargs: Any) -> None:
    """Textual's ``wait_for_idle`` where a Pilot calls it without an app at hand (``exit``,
    the scheduled-animation wait): one turn of the loop; what matters is settled around it."""
    await asyncio.sleep(0)


def _counted(method: Any) -> Any:
    async def counted(self: Any, *args: Any, **kwargs: Any) -> Any:
        global _in_flight
        _in_flight += 1
        try:
            return await method(self, *args, **kwargs)
        finally:
            _in_flight -= 1

    return counted


def install() -> None:
    """Use these waits for every Pilot of the session, and buttons without their 0.2 s pressed
    look: Textual ignores a click on a button still showing it (a bounce), which a test that
    clicks the same button again at once would otherwise meet."""
    import textual.pilot
    from textual.message_pump import MessagePump
    from textual.widgets import Button

    button_init = Button.__init__

    def unbounced(self: Button, *args: Any, **kwargs: Any) -> None:
        button_init(self, *args, **kwargs)
        self.active_effect_duration = 0

    Button.__init__ = unbounced  # type: ignore[method-assign]

    MessagePump._dispatch_message = _counted(MessagePump._dispatch_message)  # type: ignore[method-assign]  # noqa: SLF001
    MessagePump._flush_next_callbacks = _counted(MessagePump._flush_next_callbacks)  # type: ignore[method-assign]  # noqa: SLF001

    App._press_keys = _press_keys  # type: ignore[method-assign]  # noqa: SLF001
    Pilot.pause = _pause  # type: ignore[method-assign]
    textual.pilot.wait_for_idle = _idle  # type: ignore[assignment]
