"""The errors of the job store, in a module of their own so every part of the store (files,
index, locks) can raise them without importing the others."""

from __future__ import annotations


class StoreError(Exception):
    """A job could not be read or written; the message names the job and the problem."""


class ConflictError(StoreError):
    """Another program saved the job since this copy was loaded; nothing was written."""


class ReadOnlyError(StoreError):
    """The job was written by a newer fieldkit and may only be read."""


class LockTimeoutError(StoreError):
    """Another program kept the job locked for too long."""
