"""Quantities written as text: dxfcheck's own reader (``core/units.py``)
against pint, on the texts the test suite and the demos use and on the
input cases of the numbers issue (thousands marks, words around the number).

    python tests/benchmarks/bench_units.py

Prints, per reader: the texts read, their agreement with the other reader
(relative difference at most 1e-12) and the texts where they differ, the
time per text (on the texts both read; and on those our tables read, with
pint's fallback off), and the import cost (a fresh interpreter importing the module, median of 5; pint also
building its default registry).  Not collected by pytest.
"""

from __future__ import annotations

import ast
import math
import re
import statistics
import subprocess
import sys
import time
import tomllib
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

from dxfcheck.core import units  # noqa: E402
from dxfcheck.core.units import DIMENSIONS, UnitError, parse_quantity, quantity_in_text  # noqa: E402

#: dxfcheck's internal unit of each dimension, as pint writes it.
PINT_UNIT = {
    "length": "mm",
    "force": "N",
    "torque": "N*m",
    "pressure": "MPa",
    "speed": "rpm",
    "power": "W",
    "area": "mm**2",
    "pv": "MPa*m/s",
}
#: The input cases of the numbers issue and compound units (one dimension each).
ISSUE_CASES = [
    ("1 200 N", "force"),
    ("1\u2009200 N", "force"),
    ("1,200.5 N", "force"),
    ("1.200,5 N", "force"),
    ("1,200,000 N", "force"),
    ("1,5 kN", "force"),
    ("0,250 kN", "force"),
    ("F=1.2kN", "force"),
    ("1.2 kN (set)", "force"),
    ("PRELOAD 1.2 kN T", "force"),
    ("1.2kNT", "force"),
    ("300 lbf*ft", "torque"),
    ("300 ft*lbf", "torque"),
    ("50 kgf*m", "torque"),
    ("2 MPa*m/s", "pv"),
    ("450 N·m", "torque"),
    ("1.5 kN·m", "torque"),
    ("45 daN*m", "torque"),
    ("1200 N*cm", "torque"),
    ("8 kgf/cm^2", "pressure"),
    ("120 N/cm2", "pressure"),
    ("1.2 MPa*ft/min", "pv"),
]
_QUANTITY_LIKE = re.compile(r"^ *[-+]?\d[\d., \u2009]*(?:[eE][-+]?\d+)? *[A-Za-zµ\"][A-Za-z0-9*/·^²]*$")


def suite_texts() -> list[str]:
    """String literals in the tests and the demos' project file that look
    like a number with a unit (``--set`` values included: the part after ``=``)."""
    found: set[str] = set()
    for path in sorted((ROOT / "tests").rglob("*.py")):
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.Constant) and isinstance(node.value, str):
                text = node.value.split("=", 1)[-1] if "=" in node.value else node.value
                if _QUANTITY_LIKE.match(text) and len(text) < 30:
                    found.add(text.strip())
    spec = tomllib.loads((ROOT / "drawings" / "dxfcheck.toml").read_text())

    def walk(d: dict) -> None:
        for v in d.values():
            if isinstance(v, dict):
                walk(v)
            elif isinstance(v, str) and _QUANTITY_LIKE.match(v):
                found.add(v)

    walk(spec)
    return sorted(found)


def ours(text: str, dimension: str | None = None) -> tuple[str, float] | None:
    """(dimension, value in the internal unit), or None."""
    for dim in [dimension] if dimension else list(DIMENSIONS):
        try:
            return dim, parse_quantity(text, dim).value
        except UnitError:
            try:
                return dim, quantity_in_text(text, dim, glued="CTct" if dim == "force" else "").value
            except UnitError:
                continue
    return None


def _tables_only(text: str, dimension: str | None = None) -> tuple[str, float] | None:
    """``ours`` with the pint fallback switched off (the tables alone)."""
    saved = units.pint_factor
    units.pint_factor = lambda unit, dimension: None
    try:
        return ours(text, dimension)
    finally:
        units.pint_factor = saved


def pint_read(ureg, text: str, dimension: str | None = None) -> tuple[str, float] | None:
    import pint

    try:
        q = ureg.Quantity(text.replace("·", "*"))
    except (pint.errors.PintError, ValueError, TypeError, AttributeError, SyntaxError, KeyError, AssertionError):
        return None
    if not isinstance(q, pint.Quantity):
        return None
    for dim in [dimension] if dimension else list(PINT_UNIT):
        try:
            return dim, float(q.to(PINT_UNIT[dim]).magnitude)
        except pint.errors.DimensionalityError:
            continue
    return None


def _import_s(code: str) -> float:
    runs = []
    for _ in range(5):
        t0 = time.perf_counter()
        subprocess.run([sys.executable, "-c", code], check=True, cwd=ROOT)
        runs.append(time.perf_counter() - t0)
    return statistics.median(runs)


def _self_import_us(module: str) -> float:
    """The module's own import time [µs] as ``-X importtime`` reports it."""
    err = subprocess.run(
        [sys.executable, "-X", "importtime", "-c", f"import {module}"], capture_output=True, text=True, cwd=ROOT
    ).stderr
    line = next(x for x in err.splitlines() if x.rstrip().endswith(f"| {module}"))
    return float(line.split("|")[0].split(":")[1])


def _per_text_us(fn, cases, repeat: int = 20) -> float:
    t0 = time.perf_counter()
    for _ in range(repeat):
        for text, dim in cases:
            fn(text, dim)
    return (time.perf_counter() - t0) / (repeat * len(cases)) * 1e6


def _agree(a, b) -> bool:
    return a is not None and b is not None and a[0] == b[0] and math.isclose(a[1], b[1], rel_tol=1e-12)


def main() -> None:
    import pint

    t0 = time.perf_counter()
    ureg = pint.UnitRegistry()
    registry_s = time.perf_counter() - t0
    groups = {
        "suite": [(t, None) for t in suite_texts()],
        "issue": ISSUE_CASES,
    }
    for name, cases in groups.items():
        o = [ours(t, d) for t, d in cases]
        p = [pint_read(ureg, t, d) for t, d in cases]
        both = sum(a is not None and b is not None for a, b in zip(o, p, strict=True))
        agree = sum(_agree(a, b) for a, b in zip(o, p, strict=True))
        read = sum(x is not None for x in o), sum(x is not None for x in p)
        print(f"{name}: {len(cases)} texts; ours read {read[0]}, pint {read[1]},")
        print(f"  both {both}, agreeing (rel 1e-12) {agree}")
        for (text, _), a, b in zip(cases, o, p, strict=True):
            if not _agree(a, b):
                print(f"    {text!r:26} ours {a}  pint {b}")
        # timed with the dimension known, as every caller knows it
        common = [(c[0], a[0]) for c, a, b in zip(cases, o, p, strict=True) if a is not None and b is not None]
        tables = [c for c in common if _tables_only(*c) is not None]
        print(
            f"  per text, on the {len(common)} both read: ours {_per_text_us(ours, common):.1f} µs, "
            f"pint {_per_text_us(lambda t, d: pint_read(ureg, t, d), common):.1f} µs; on the {len(tables)} "
            f"of them in our tables: ours without pint {_per_text_us(_tables_only, tables):.1f} µs, "
            f"pint {_per_text_us(lambda t, d: pint_read(ureg, t, d), tables):.1f} µs"
        )
    base = _import_s("pass")
    print(f"import (fresh interpreter, median of 5, minus an empty one of {base * 1e3:.0f} ms):")
    print(f"  dxfcheck.core.units itself {_self_import_us('dxfcheck.core.units') / 1e3:.2f} ms (python -X importtime)")
    print(f"  dxfcheck (the package, which every command loads) {(_import_s('import dxfcheck') - base) * 1e3:.0f} ms")
    print(f"  pint {(_import_s('import pint') - base) * 1e3:.0f} ms")
    print(f"  pint + UnitRegistry() {(_import_s('import pint; pint.UnitRegistry()') - base) * 1e3:.0f} ms")
    print(f"  (UnitRegistry() in this process: {registry_s * 1e3:.0f} ms)")


if __name__ == "__main__":
    main()
