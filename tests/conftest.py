from __future__ import annotations

import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))


def pytest_terminal_summary(terminalreporter):
    """Report what the bad-drawing tests tried."""
    mod = sys.modules.get("test_bad_drawings")
    tried = getattr(mod, "TRIED", None)
    if tried:
        terminalreporter.write_sep("-", "bad drawings tried")
        for key in sorted(tried):
            terminalreporter.write_line(f"{key}: {tried[key]}")
