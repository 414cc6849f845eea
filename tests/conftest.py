from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parent))


@pytest.fixture
def output_json():
    """Parse a JSON document dxfcheck printed and validate it against its
    published schema (:func:`schema_check.output_json`)."""
    from schema_check import output_json

    return output_json


#: Counts gathered from the xdist workers (``-n auto``), merged by name.
_FROM_WORKERS: dict[str, dict[str, int]] = {"tried": {}, "validated": {}}


def _counts() -> dict[str, dict[str, int]]:
    """What this process counted: the bad drawings tried, the JSON
    documents validated against their schemas."""
    tried = getattr(sys.modules.get("test_bad_drawings"), "TRIED", None) or {}
    validated = getattr(sys.modules.get("schema_check"), "VALIDATED", None) or {}
    return {"tried": {str(k): int(v) for k, v in tried.items()}, "validated": dict(validated)}


def pytest_sessionfinish(session):
    """A worker hands its counts to the controller."""
    out = getattr(session.config, "workeroutput", None)
    if out is not None:
        out["dxfcheck_counts"] = _counts()


def pytest_testnodedown(node, error):
    """The controller adds up each worker's counts."""
    counts = getattr(node, "workeroutput", {}).get("dxfcheck_counts", {})
    for kind, table in counts.items():
        merged = _FROM_WORKERS.setdefault(kind, {})
        for key, n in table.items():
            merged[key] = merged.get(key, 0) + n


def pytest_terminal_summary(terminalreporter):
    """Report what the bad-drawing tests tried and the JSON documents
    validated against their schemas (in this process and in the workers)."""
    mine = _counts()
    for kind, title in (
        ("tried", "bad drawings tried"),
        ("validated", "JSON documents validated against their schemas"),
    ):
        table = dict(_FROM_WORKERS.get(kind, {}))
        for key, n in mine[kind].items():
            table[key] = table.get(key, 0) + n
        if table:
            terminalreporter.write_sep("-", title)
            for key in sorted(table):
                terminalreporter.write_line(f"{key}: {table[key]}")
