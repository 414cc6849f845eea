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


def pytest_terminal_summary(terminalreporter):
    """Report what the bad-drawing tests tried and the JSON documents
    validated against their schemas."""
    mod = sys.modules.get("test_bad_drawings")
    tried = getattr(mod, "TRIED", None)
    if tried:
        terminalreporter.write_sep("-", "bad drawings tried")
        for key in sorted(tried):
            terminalreporter.write_line(f"{key}: {tried[key]}")
    validated = getattr(sys.modules.get("schema_check"), "VALIDATED", None)
    if validated:
        terminalreporter.write_sep("-", "JSON documents validated against their schemas")
        for key in sorted(validated):
            terminalreporter.write_line(f"{key}: {validated[key]}")
