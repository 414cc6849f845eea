"""Run code when a module is first imported (a post-import hook).

Some set-up matters only once a library is loaded: routing ezdxf's log
records (the reader makes them findings, the command line notes) needs
``logging``, and ``logging`` costs a few milliseconds that ``solve --json``
on a drawing the fast reader reads, which never loads ezdxf, need not pay.
:func:`when_imported` runs its callback at once when the module is loaded
already, and otherwise just before the module is first imported, from a
finder on ``sys.meta_path`` that finds nothing itself (PEP 451: the
finders after it load the module).  The finder stays in place once added,
so that no finder is skipped while the import system walks the list.
"""

from __future__ import annotations

import sys
import threading
from collections.abc import Callable

__all__ = ["when_imported"]

#: Callbacks waiting for their module's first import, by module name.
_PENDING: dict[str, list[Callable[[], None]]] = {}
_LOCK = threading.Lock()


class _Watcher:
    """The finder that runs the waiting callbacks of a module being imported."""

    def find_spec(self, name: str, path: object = None, target: object = None) -> None:
        with _LOCK:
            waiting = _PENDING.pop(name, [])
        for callback in waiting:  # each runs once, in the order given
            callback()


def when_imported(name: str, callback: Callable[[], None]) -> Callable[[], None]:
    """Run ``callback`` now if module ``name`` is loaded, else just before
    it is first imported.  Returns a function that cancels a callback that
    has not run yet (and does nothing once it has)."""
    if name in sys.modules:
        callback()
        return lambda: None
    with _LOCK:
        if not any(isinstance(f, _Watcher) for f in sys.meta_path):
            sys.meta_path.insert(0, _Watcher())
        _PENDING.setdefault(name, []).append(callback)

    def cancel() -> None:
        with _LOCK:
            waiting = _PENDING.get(name, [])
            if callback in waiting:
                waiting.remove(callback)

    return cancel
