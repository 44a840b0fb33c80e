"""The meter's background saves: the session's :class:`~fieldkit.tui.meter_session.SaveQueue`
drained by one thread worker into the job, through :func:`fieldkit.actions.meter.apply_changes`.

The worker waits for typing to pause (a burst typed ahead becomes one job update rather than a
reload and write per reading), saves, and reports each batch through ``report`` (the screen
posts itself a message: thread-safe, and the worker never waits on the screen, so a quit's
:meth:`MeterSaver.flush` cannot stall on it). Tests and benchmarks await :meth:`settled`.
"""

from __future__ import annotations

import time
from collections.abc import Callable
from typing import Any

from fieldkit.actions.meter import Applied, MeterChange, apply_changes
from fieldkit.jobs.models import now
from fieldkit.jobs.store import JobStore, StoreError
from fieldkit.tui.meter_session import MeterSession

#: What a failed save can raise: the store's errors, a link gone, a bad record, the disk.
SAVE_ERRORS = (StoreError, KeyError, ValueError, OSError)


class MeterSaver:
    """Saves the session's queued changes into its job's link in the background."""

    #: A reading waits at most this long while more keep coming.
    GATHER_S = 0.5
    #: Typing has paused when nothing new came for this long.
    QUIET_S = 0.01

    def __init__(
        self,
        session: MeterSession,
        store: Callable[[], JobStore],
        run_worker: Callable[..., Any],
        report: Callable[[Applied | str], None],
    ) -> None:
        self.session = session
        self._store = store
        self._run_worker = run_worker
        self._report = report
        self._worker: Any = None

    @property
    def unsaved(self) -> int:
        """Entries not yet in the job file (0 when everything is saved or no job is chosen)."""
        return self.session.saves.unsaved if self.session.job_id else 0

    def queue(self, change: MeterChange | None) -> None:
        """Queue a change for the job (None: just save what is queued)."""
        if self.session.job_id is None:
            return
        if self.session.saves.put(change):
            self._worker = self._run_worker(
                self._drain, thread=True, group="meter-save", exit_on_error=False
            )

    def _save(self, batch: list[MeterChange]) -> Applied:
        s = self.session
        assert s.job_id is not None and s.link_id is not None
        return apply_changes(self._store(), s.job_id, s.link_id, batch)

    def _drain(self) -> None:
        """Save everything queued, in as few job updates as possible (the worker's thread)."""
        saves = self.session.saves
        while batch := self._gathered():
            try:
                outcome = self._save(batch)
            except SAVE_ERRORS as exc:
                saves.failed(str(exc))
                self._report(str(exc))
                return
            saves.done(batch, now())
            self._report(outcome)

    def _gathered(self) -> list[MeterChange]:
        """The next batch, once typing pauses (at most GATHER_S after the first entry)."""
        saves = self.session.saves
        deadline = time.monotonic() + self.GATHER_S
        seen = -1
        while (count := saves.unsaved) != seen and time.monotonic() < deadline:
            seen = count
            time.sleep(self.QUIET_S)
        return saves.take()

    async def settled(self) -> None:
        """Wait until the worker has saved what is queued (or failed)."""
        while (worker := self._worker) is not None and not worker.is_finished:
            await worker.wait()

    def flush(self, timeout_s: float = 5.0) -> bool:
        """Wait for a running save, then save what is still queued, here and now (the
        workspace closes: a reading typed just before is not left in memory). True when
        nothing is left unsaved."""
        saves = self.session.saves
        if self.session.job_id is None:
            return True
        deadline = time.monotonic() + timeout_s
        while not saves.claim():  # the worker's thread ends its batch (it never waits on us)
            if time.monotonic() > deadline:
                return False
            time.sleep(0.01)
        while batch := saves.take():
            try:
                self._save(batch)
            except SAVE_ERRORS as exc:
                saves.failed(str(exc))
                return False
            saves.done(batch, now())
        return True
