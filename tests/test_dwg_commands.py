"""Every command on DWG drawings (issue 17), through the real command line.

The brake drawings: dxfcheck has no DWG writer, but ezdwg has one (R2000).
Each demo drawing is written as DWG by ezdwg's writer (``tests/read/
dwg_writer.py``) and read back by ezdwg's reader through our adapter: a round
trip through one library, so it shows that the adapter carries a brake into
the same answers, not that ezdwg reads other programs' files (the twins in
``tests/read/test_dwg.py`` show that).  Each demo is written twice: as drawn,
and wrapped in two nested block references that mirror and rotate it and
undo each other (``R(90°)·S(-1, 1)·R(90°)·S(-1, 1)`` is the identity), so
the inserts' placement must be right for the answers to agree.  The same
answers means the whole JSON document of ``solve`` and of ``check``, forces
with their signs and points of application included.

A real DWG with no brake in it (ACadSharp's dynamic-block sample) goes
through solve, check, annotate and batch: the refusal is the usual "no drum"
finding (M201), exit 2, never a crash.
"""

from __future__ import annotations

import gzip
import json
import os
import shutil
import subprocess
import sys
from pathlib import Path
from typing import Any

import pytest

pytest.importorskip("ezdwg")

from read.dwg_writer import write_dwg  # tests/ is on the path (conftest.py)
from schema_check import output_json

ROOT = Path(__file__).resolve().parents[1]
DEMOS = ("winch_two_shoe", "capstan_band", "conveyor_block")
NO_BRAKE = ROOT / "tests" / "data" / "dwg" / "BLOCKXYPARAMETER.dwg.gz"


def run(*args: str, cwd: Path) -> subprocess.CompletedProcess[str]:
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    return subprocess.run(
        [sys.executable, "-m", "dxfcheck", *args], capture_output=True, text=True, timeout=300, cwd=cwd, env=env
    )


@pytest.fixture(scope="module")
def folder(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """The demos as DXF and as DWG (plain and wrapped), with the project
    file's spec tables for the DWG names too."""
    out = tmp_path_factory.mktemp("dwg-demos")
    toml = (ROOT / "drawings" / "dxfcheck.toml").read_text(encoding="utf-8")
    for name in DEMOS:
        shutil.copy(ROOT / "drawings" / f"{name}.dxf", out / f"{name}.dxf")
        write_dwg(out / f"{name}.dxf", out / f"{name}.dwg")
        write_dwg(out / f"{name}.dxf", out / f"{name}_w.dwg", wrap=True)
    tables = _spec_tables(toml)
    extra = tables.replace('.dxf"', '.dwg"') + tables.replace('.dxf"', '_w.dwg"')
    (out / "dxfcheck.toml").write_text(toml + "\n" + extra, encoding="utf-8")
    return out


def _spec_tables(text: str) -> str:
    """Only the ``[spec."NAME"...]`` tables of a project file's text."""
    keep: list[str] = []
    on = False
    for line in text.splitlines():
        if line.startswith("["):
            on = line.startswith('[spec."')
        if on:
            keep.append(line)
    return "\n".join(keep) + "\n"


def _answers(text: str, name: str) -> dict[str, Any]:
    """The JSON document (validated against its schema) with the drawing's
    name (also in the spec's sources, ``[spec."NAME"]``), its bytes' hash
    and the time of the run left out."""
    output_json(text)
    doc = json.loads(text.replace(name, "DRAWING"))
    for key in ("drawing", "config", "drawing_sha256", "run_at"):
        doc.get("solution", doc).pop(key, None)
        doc.pop(key, None)
    return doc


@pytest.mark.parametrize("suffix", ["", "_w"], ids=["as drawn", "in mirrored, rotated blocks"])
@pytest.mark.parametrize("name", DEMOS)
@pytest.mark.parametrize("command", ["solve", "check"])
def test_demo_written_as_dwg_answers_alike(
    folder: Path,
    name: str,
    suffix: str,
    command: str,
    capsys: pytest.CaptureFixture[str],
    monkeypatch: pytest.MonkeyPatch,
) -> None:
    """The command's own entry point in this process (the subprocess runs
    below cover the command line itself)."""
    from dxfcheck.cli import main

    monkeypatch.chdir(folder)
    code_a = main([command, "--json", f"{name}.dxf"])
    a = capsys.readouterr().out
    code_b = main([command, "--json", f"{name}{suffix}.dwg"])
    b = capsys.readouterr().out
    assert code_a == code_b
    assert _answers(a, f"{name}.dxf") == _answers(b, f"{name}{suffix}.dwg")
    if command == "solve":  # the unit came from the DWG header, not an assumption
        assert output_json(b)["units"] == {"name": "mm", "mm_per_unit": 1.0, "source": "$INSUNITS"}


def test_annotate_writes_dxf_and_leaves_the_dwg(folder: Path) -> None:
    src = folder / "winch_two_shoe_w.dwg"
    before = src.read_bytes()
    r = run("annotate", src.name, cwd=folder)
    assert r.returncode == 0, r.stderr
    out = folder / "winch_two_shoe_w-forces.dxf"
    assert "as DXF" in r.stdout and out.name in r.stdout
    assert src.read_bytes() == before
    import ezdxf

    doc = ezdxf.readfile(str(out))
    assert len(doc.modelspace().query('*[layer=="DXFCHECK_FORCES"]')) > 0
    assert int(doc.header["$INSUNITS"]) == 4
    # the copy holds the drawing's skeleton where the DXF has it
    from dxfcheck.read.drawing import read_drawing

    copy, dxf = read_drawing(out), read_drawing(folder / "winch_two_shoe.dxf")
    assert sorted((c.role, c.center, c.radius_mm) for c in copy.circles) == sorted(
        (c.role, c.center, c.radius_mm) for c in dxf.circles
    )
    r = run("annotate", src.name, "-o", "marked.dwg", cwd=folder)
    assert r.returncode == 2 and "name it .dxf" in r.stderr
    assert not (folder / "marked.dwg").exists()


def test_compare_dwg_against_dxf(folder: Path) -> None:
    """A DWG revision against a DXF one: the same brake, no change."""
    r = run("compare", "--json", "winch_two_shoe.dxf", "winch_two_shoe_w.dwg", cwd=folder)
    assert r.returncode == 0, r.stderr
    doc = output_json(r.stdout)
    text = json.dumps(doc)
    assert "winch_two_shoe_w.dwg" in text
    # the newer revision, a DWG, marked up: as DXF, and never under a .dwg name
    r = run("compare", "winch_two_shoe.dxf", "winch_two_shoe_w.dwg", "--annotate", "rev.dwg", cwd=folder)
    assert r.returncode == 2 and "name it .dxf" in r.stderr and not (folder / "rev.dwg").exists()
    r = run("compare", "winch_two_shoe.dxf", "winch_two_shoe_w.dwg", "--annotate", "rev.dxf", cwd=folder)
    assert r.returncode == 0, r.stderr
    assert ezdxf_layers(folder / "rev.dxf") >= {"DXFCHECK_FORCES", "DXFCHECK_NOTES"}


def ezdxf_layers(path: Path) -> set[str]:
    import ezdxf

    return {e.dxf.layer for e in ezdxf.readfile(str(path)).modelspace()}


def test_batch_finds_dwg_and_caches_them(folder: Path, tmp_path: Path) -> None:
    work = tmp_path / "work"
    work.mkdir()
    for name in ("conveyor_block.dxf", "conveyor_block.dwg", "dxfcheck.toml"):
        shutil.copy(folder / name, work / name)
    (work / "sub").mkdir()
    shutil.copy(folder / "capstan_band_w.dwg", work / "sub" / "capstan_band_w.dwg")
    cache = tmp_path / "cache"
    first = run("batch", "--json", "--jobs", "1", "--cache-dir", str(cache), str(work), cwd=work)
    second = run("batch", "--json", "--jobs", "1", "--cache-dir", str(cache), str(work), cwd=work)
    rows = {Path(r["drawing"]).name: r for r in output_json(first.stdout)["results"]}
    assert set(rows) == {"conveyor_block.dxf", "conveyor_block.dwg", "capstan_band_w.dwg"}
    assert rows["conveyor_block.dwg"]["status"] == rows["conveyor_block.dxf"]["status"]
    again = {Path(r["drawing"]).name: r for r in output_json(second.stdout)["results"]}
    assert all(r["cached"] for r in again.values())
    # the cache is keyed on the DWG's bytes: a changed DWG is checked again
    data = (work / "conveyor_block.dwg").read_bytes()
    write_dwg(ROOT / "drawings" / "capstan_band.dxf", work / "conveyor_block.dwg")
    assert (work / "conveyor_block.dwg").read_bytes() != data
    third = run("batch", "--json", "--jobs", "1", "--cache-dir", str(cache), str(work), cwd=work)
    rows3 = {Path(r["drawing"]).name: r for r in output_json(third.stdout)["results"]}
    assert not rows3["conveyor_block.dwg"]["cached"] and rows3["conveyor_block.dxf"]["cached"]


@pytest.fixture(scope="module")
def no_brake(tmp_path_factory: pytest.TempPathFactory) -> Path:
    p = tmp_path_factory.mktemp("no-brake") / "dynamic_blocks.dwg"
    p.write_bytes(gzip.decompress(NO_BRAKE.read_bytes()))
    return p


@pytest.mark.parametrize("command", ["solve", "check", "annotate"])
def test_real_dwg_without_a_brake_is_the_usual_no_drum(no_brake: Path, command: str) -> None:
    r = run(command, no_brake.name, cwd=no_brake.parent)
    assert r.returncode == 2, r.stderr
    assert "M201" in r.stderr and "no drum" in r.stderr and no_brake.name in r.stderr
    assert "Traceback" not in r.stderr and "internal" not in r.stderr.lower()
    assert not list(no_brake.parent.glob("*-forces.*"))


def test_real_dwg_without_a_brake_in_batch(no_brake: Path) -> None:
    r = run("batch", "--json", "--no-cache", "--jobs", "1", str(no_brake.parent), cwd=no_brake.parent)
    rows = output_json(r.stdout)["results"]
    assert [(Path(x["drawing"]).name, x["status"]) for x in rows] == [(no_brake.name, "error")]
    assert "M201" in json.dumps(rows)


def _identity_rows(html: str) -> dict[str, tuple[str, str]]:
    """The record's identity table: item -> (value, read from)."""
    from html.parser import HTMLParser

    class Rows(HTMLParser):
        def __init__(self) -> None:
            super().__init__(convert_charrefs=True)
            self.rows: list[list[str]] = []
            self.on = False
            self.cell: list[str] | None = None

        def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
            if tag == "table":
                self.on = "identity" in (dict(attrs).get("class") or "").split()
            elif tag == "tr" and self.on:
                self.rows.append([])
            elif tag == "td" and self.on:
                self.cell = []

        def handle_endtag(self, tag: str) -> None:
            if tag == "td" and self.cell is not None:
                self.rows[-1].append("".join(self.cell).strip())
                self.cell = None
            elif tag == "table":
                self.on = False

        def handle_data(self, data: str) -> None:
            if self.cell is not None:
                self.cell.append(data)

    p = Rows()
    p.feed(html)
    return {r[0]: (r[1], r[2]) for r in p.rows if len(r) == 3}


def test_record_of_a_dwg_reads_its_title_block(folder: Path) -> None:
    """The record of the winch demo written as DWG shows the title block's
    drawing number, title and revision (the ATTRIBs of the title block's
    reference, carried through the DWG adapter), each saying where it was
    read: the block, the tag, the DWG's own handle of the reference and its
    layer (drawings/build.py writes TQ-W2-BR-201, revision C)."""
    import ezdwg

    r = run("check", "winch_two_shoe.dwg", "--record", "winch-dwg.html", cwd=folder)
    assert r.returncode == 1, r.stderr  # the winch fails its gate, as its DXF does
    rows = _identity_rows((folder / "winch-dwg.html").read_text(encoding="utf-8"))
    owner = next(iter(ezdwg.read(str(folder / "winch_two_shoe.dwg")).entities().query("ATTRIB"))).dxf["owner_handle"]
    assert rows["file"][0] == "winch_two_shoe.dwg"
    assert rows["drawing number"] == (
        "TQ-W2-BR-201",
        f"block attribute: block DXFCHECK_DEMO_TITLE, tag DRAWING_NO, handle {int(owner):X}, layer TITLE",
    )
    assert rows["title"][0] == "Incline winch holding brake, two shoes"
    assert rows["revision"][0] == "C"
    assert "tag REV," in rows["revision"][1] and f"handle {int(owner):X}," in rows["revision"][1]
