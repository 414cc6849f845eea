"""Refusals show the cause, not only the consequence.

Every demo drawing is cut open at each pin in turn: one centreline end
pulled back 0.5 mm from the pin it should reach (a drafting slip seen in
practice).  Each refusal must exit 2, print the near miss with its gap and
the tolerance, and, where the statics refuses with a free motion, name the
near miss as the probable cause.  With ``--json`` a refusal is still one JSON
document.  (Common practice for what a checker needs to see; no published
source.)
"""

from __future__ import annotations

import math
import subprocess
import sys

import ezdxf
import pytest
from common import ROOT, capstan_band, conveyor_block, winch_two_shoe
from schema_check import output_json

GAP_MM = 0.5


def _gap_variants(build, folder):
    """(path, pin centre) for each centreline end that lies on a pin, with
    that end pulled back GAP_MM along its line."""
    src = folder / "src.dxf"
    build().save(src)
    doc = ezdxf.readfile(src)
    pins = [
        (e.dxf.center.x, e.dxf.center.y)
        for e in doc.modelspace()
        if e.dxftype() == "CIRCLE" and e.dxf.layer in ("PIN", "PIVOT")
    ]
    ends = []
    for e in doc.modelspace().query("LINE LWPOLYLINE[layer=='LINK']"):
        pts = (
            [(e.dxf.start.x, e.dxf.start.y), (e.dxf.end.x, e.dxf.end.y)]
            if e.dxftype() == "LINE"
            else [(p[0], p[1]) for p in e.get_points()]
        )
        for k, nxt in ((0, 1), (len(pts) - 1, len(pts) - 2)):
            pin = next((c for c in pins if math.dist(c, pts[k]) < 1e-9), None)
            if pin is not None:
                p, q = pts[k], pts[nxt]
                d = math.dist(p, q)
                ends.append(
                    (e.dxf.handle, k, (p[0] + GAP_MM * (q[0] - p[0]) / d, p[1] + GAP_MM * (q[1] - p[1]) / d), pin)
                )
    out = []
    for i, (handle, k, new, pin) in enumerate(ends):
        d2 = ezdxf.readfile(src)
        e = d2.entitydb[handle]
        if e.dxftype() == "LINE":
            setattr(e.dxf, "start" if k == 0 else "end", new)
        else:
            pts = list(e.get_points())
            pts[k] = (new[0], new[1], *pts[k][2:])
            e.set_points(pts)
        path = folder / f"gap{i}.dxf"
        d2.saveas(path)
        out.append((path, pin))
    return out


@pytest.mark.parametrize("build", [winch_two_shoe, conveyor_block, capstan_band], ids=lambda b: b.__name__)
def test_a_gap_at_any_pin_is_named_as_the_cause(tmp_path, build):
    variants = _gap_variants(build, tmp_path)
    assert variants
    for path, pin in variants:
        r = subprocess.run(
            [sys.executable, "-m", "dxfcheck", "solve", str(path)], capture_output=True, text=True, timeout=120
        )
        assert r.returncode == 2, (path, r.stdout)
        lines = r.stderr.splitlines()
        # the near miss, with the gap, the pin's place and the tolerance
        miss = [ln for ln in lines if "near miss" in ln]
        assert miss, r.stderr
        assert any(f"{GAP_MM:.2f} mm from" in ln for ln in miss)
        assert any(f"({pin[0]:.6g}, {pin[1]:.6g})" in ln for ln in lines), r.stderr
        assert all("tolerance" in ln for ln in miss)
        # errors first, then the warnings
        severities = [("error" in ln.split(": ", 2)[-1][:20]) for ln in lines]
        assert severities == sorted(severities, reverse=True)
        free = [ln for ln in lines if "S301" in ln]
        if free:
            assert all("probable cause: M203 open-end" in ln for ln in free)


def test_json_refusal_is_one_document(tmp_path):
    path, _ = _gap_variants(winch_two_shoe, tmp_path)[1]
    r = subprocess.run(
        [sys.executable, "-m", "dxfcheck", "solve", str(path), "--json"], capture_output=True, text=True, timeout=120
    )
    assert r.returncode == 2
    doc = output_json(r.stdout)
    assert doc["schema"] == "dxfcheck.solve/2" and doc["drawing"] == str(path)
    assert doc["error"]["kind"] == "unusable"
    codes = [f["code"] for f in doc["findings"]]
    assert "S301" in codes and "M203" in codes and "M204" in codes
    assert doc["findings"][0]["severity"] == "error"
    r = subprocess.run(
        [sys.executable, "-m", "dxfcheck", "check", str(path), "--json"], capture_output=True, text=True, timeout=120
    )
    assert r.returncode == 2 and output_json(r.stdout)["schema"] == "dxfcheck.check/2"


def test_json_refusal_of_compare_is_one_document(tmp_path):
    """Two unrelated drawings: compare refuses (exit 2) and --json still
    prints one compare document with the error."""
    r = subprocess.run(
        [
            sys.executable,
            "-m",
            "dxfcheck",
            "compare",
            str(ROOT / "drawings" / "winch_two_shoe.dxf"),
            str(ROOT / "drawings" / "capstan_band.dxf"),
            "--json",
        ],
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert r.returncode == 2
    doc = output_json(r.stdout)
    assert doc["schema"] == "dxfcheck.revision.compare/2" and doc["error"]["kind"] == "unusable"
