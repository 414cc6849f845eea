"""Progress of long work, told to whoever listens.

A stage wraps a long loop in :func:`task` and advances it; nothing happens
unless a listener was installed with :func:`listening` (the command line
installs a rich bar on standard error when that is a terminal: see
:func:`dxfcheck.output.terminal.progress_bar`).  So the stages stay free of
output code, and a library call shows nothing.
"""

from __future__ import annotations

from collections.abc import Iterator
from contextlib import contextmanager
from contextvars import ContextVar
from typing import Protocol

__all__ = ["Listener", "Task", "listening", "task"]


class Listener(Protocol):
    """Receives the tasks of long work (a progress bar)."""

    def start(self, label: str, total: float) -> object:
        """A task began: returns the key its updates carry."""

    def update(self, key: object, done: float) -> None:
        """``done`` of the task's total are done."""

    def stop(self, key: object) -> None:
        """The task ended (finished or not)."""


_LISTENER: ContextVar[Listener | None] = ContextVar("dxfcheck_progress_listener", default=None)


class Task:
    """One long piece of work: ``advance()`` as it goes."""

    def __init__(self, listener: Listener | None, key: object, total: float) -> None:
        self._listener = listener
        self._key = key
        self.total = total
        self.done = 0.0

    def advance(self, amount: float = 1.0) -> None:
        self.done += amount
        if self._listener is not None:
            self._listener.update(self._key, self.done)

    def set(self, done: float) -> None:
        """Set how much is done (a byte offset, ...)."""
        self.done = done
        if self._listener is not None:
            self._listener.update(self._key, done)


@contextmanager
def task(label: str, total: float) -> Iterator[Task]:
    """A task of ``total`` units (drawings, samples, bytes) for the
    listener, if there is one."""
    listener = _LISTENER.get()
    key = listener.start(label, total) if listener is not None else None
    try:
        yield Task(listener, key, total)
    finally:
        if listener is not None:
            listener.stop(key)


@contextmanager
def listening(listener: Listener | None) -> Iterator[None]:
    """Tell the tasks started in this block to ``listener`` (None: to nobody)."""
    token = _LISTENER.set(listener)
    try:
        yield
    finally:
        _LISTENER.reset(token)
