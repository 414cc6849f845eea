"""The run's time limit (``--timeout``): one deadline for every stage.

:func:`limit` sets the deadline and arms an alarm (POSIX ``SIGALRM``, main
thread only) that interrupts Python code when it passes.  An alarm cannot
interrupt a long call into C (a numpy solve, a blocking read), so the stages
also call :func:`check` between steps and in their loops, and wait for
threads with :func:`remaining` as their timeout.

The exception, :class:`TimeLimitExceeded`, derives from ``BaseException``
(like ``KeyboardInterrupt``): the ``except Exception`` handlers that turn a
damaged entity or an unreadable file into a finding cannot swallow it, so a
run that hits its limit ends with its own message (exit 2), never with part
of the drawing silently dropped.
"""

from __future__ import annotations

import math
import threading
import time
from collections.abc import Iterator
from contextlib import contextmanager

__all__ = ["TimeLimitExceeded", "check", "limit", "limit_seconds", "remaining"]

_state: dict[str, float | None] = {"deadline": None, "seconds": None}


class TimeLimitExceeded(BaseException):
    """The run's time limit passed.

    Attributes
    ----------
    seconds : float
        The limit [s].
    stage : str
        What was running when it was noticed (may be empty).
    """

    def __init__(self, seconds: float, stage: str = "") -> None:
        super().__init__(f"took longer than {seconds:g} s")
        self.seconds = seconds
        self.stage = stage


def check(stage: str = "") -> None:
    """Raise :class:`TimeLimitExceeded` if the deadline has passed.

    Cheap enough for inner loops (one clock read)."""
    deadline = _state["deadline"]
    if deadline is not None and time.monotonic() > deadline:
        raise TimeLimitExceeded(_state["seconds"] or 0.0, stage)


def remaining() -> float | None:
    """Seconds left before the deadline (at least 0), or None without one."""
    deadline = _state["deadline"]
    return None if deadline is None else max(0.0, deadline - time.monotonic())


def limit_seconds() -> float | None:
    """The limit in force [s], or None."""
    return _state["seconds"]


@contextmanager
def limit(seconds: float | None) -> Iterator[None]:
    """Run the block within ``seconds`` (None: no limit).

    Raises
    ------
    ValueError
        For a limit that is not a finite number above 0.
    TimeLimitExceeded
        From inside the block, when the time is up.
    """
    if seconds is None:
        yield
        return
    if not (isinstance(seconds, int | float) and math.isfinite(seconds) and seconds > 0):
        raise ValueError(f"a time limit must be a finite number of seconds above 0, got {seconds!r}")
    import signal

    previous = dict(_state)
    try:  # the alarm may fire at once: everything set inside, undone in finally
        _state["deadline"] = time.monotonic() + seconds
        _state["seconds"] = float(seconds)
        _arm(seconds)
        yield
    finally:
        if hasattr(signal, "SIGALRM") and threading.current_thread() is threading.main_thread():
            signal.setitimer(signal.ITIMER_REAL, 0)
        _state.update(previous)


def _arm(seconds: float) -> None:
    """Arm SIGALRM to raise at the deadline, where that is possible."""
    import signal

    if not hasattr(signal, "SIGALRM") or threading.current_thread() is not threading.main_thread():
        return

    def _expired(signum: int, frame: object) -> None:
        raise TimeLimitExceeded(seconds, "")

    signal.signal(signal.SIGALRM, _expired)
    signal.setitimer(signal.ITIMER_REAL, seconds)
