"""Reader benchmark (run on demand, takes a few minutes):

    python tests/benchmarks/bench_reader.py [CLUTTER_ENTITIES]

Writes a vendor-style drawing: the winch skeleton (about 30 entities) among
CLUTTER_ENTITIES (default 300 000) lines, circles, texts and hatches on other
layers, then times in fresh processes, on the same file:

* ``ezdxf.readfile`` (the full reader everything else is compared with),
* ``dxfcheck solve --json`` (the fast reader, the topology, both directions),

with each process's peak memory (ru_maxrss), and prints the ratios against
the targets: the solve in at most 0.2x the time of ``ezdxf.readfile`` and at
most 100 MB peak.  Then, on a small drawing, the whole command against
``python -c "import ezdxf"`` (target: within 1.3x).  Run it from a regular
install (``pip install .``): an editable install puts a path finder in front
of every import, which costs the small-drawing command about 0.1 s.
"""

from __future__ import annotations

import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT / "drawings"))

# peak memory from /proc/self/status VmHWM: unlike ru_maxrss it is not
# inflated by the parent's pages the child held between fork and exec
PROBE = (
    "import sys, time\n"
    "t = time.perf_counter()\n"
    "{body}\n"
    "hwm = next(l.split()[1] for l in open('/proc/self/status') if l.startswith('VmHWM'))\n"
    "sys.stderr.write(f'@@ {{time.perf_counter() - t}} {{hwm}}\\n')\n"
)


def _run(body: str, *args: str) -> tuple[float, float, float]:
    """(wall time of the whole process [s], time inside [s], peak RSS [MB])."""
    t0 = time.perf_counter()
    r = subprocess.run(
        [sys.executable, "-c", PROBE.format(body=body), *args], capture_output=True, text=True, check=True, cwd=ROOT
    )
    wall = time.perf_counter() - t0
    line = next(x for x in r.stderr.splitlines() if x.startswith("@@"))
    _, inner, rss_kb = line.split()
    return wall, float(inner), float(rss_kb) / 1024


def make_big(path: Path, clutter: int) -> None:
    from build import winch_two_shoe

    from dxfcheck.output.sketch import BlockWrap

    # the skeleton inside a block placed once, as vendor drawings hold it
    doc = winch_two_shoe().to_doc(wraps=(BlockWrap((150.0, -40.0), 15.0),))
    msp = doc.modelspace()
    for name in ("OUTLINE", "HATCH-AREA", "DIMS", "TITLE"):
        doc.layers.add(name)
    for k in range(clutter):
        x, y = (k % 900) * 3.0 - 1300, (k // 900) * 3.0 - 1200
        kind = k % 4
        if kind == 0:
            msp.add_line((x, y), (x + 2.5, y + 1.0), dxfattribs={"layer": "OUTLINE"})
        elif kind == 1:
            msp.add_circle((x, y), 1.2, dxfattribs={"layer": "OUTLINE"})
        elif kind == 2:
            msp.add_text(f"P{k}", height=1.0, dxfattribs={"layer": "TITLE", "insert": (x, y)})
        else:
            h = msp.add_hatch(dxfattribs={"layer": "HATCH-AREA"})
            h.paths.add_polyline_path([(x, y), (x + 2, y), (x + 2, y + 2), (x, y + 2)], is_closed=True)
    doc.saveas(path)


def main() -> None:
    if len(sys.argv) > 1 and sys.argv[1] == "--make":
        make_big(Path(sys.argv[2]), int(sys.argv[3]))
        return
    clutter = int(sys.argv[1]) if len(sys.argv) > 1 else 300_000
    with tempfile.TemporaryDirectory() as tmp:
        big = Path(tmp) / "vendor.dxf"
        t0 = time.perf_counter()
        # in a child process, so that this one stays small
        subprocess.run([sys.executable, __file__, "--make", str(big), str(clutter)], check=True)
        print(
            f"wrote {big.stat().st_size / 1e6:.1f} MB, {clutter} clutter entities, in {time.perf_counter() - t0:.0f} s"
        )
        _, t_read, m_read = _run("import ezdxf; ezdxf.readfile(sys.argv[1])", str(big))
        _, t_solve, m_solve = _run(
            "from dxfcheck.cli import main; main(['solve', sys.argv[1], '--json', '--timeout', '0'])", str(big)
        )
    print(f"ezdxf.readfile      : {t_read:7.2f} s, peak {m_read:7.1f} MB")
    print(f"dxfcheck solve      : {t_solve:7.2f} s, peak {m_solve:7.1f} MB")
    print(
        f"time ratio          : {t_solve / t_read:7.3f} "
        f"(target <= 0.2: {'met' if t_solve <= 0.2 * t_read else 'NOT met'})"
    )
    print(f"peak memory         : {m_solve:7.1f} MB (target <= 100: {'met' if m_solve <= 100 else 'NOT met'})")
    small = str(ROOT / "drawings" / "conveyor_block.dxf")
    walls_import, walls_cmd = [], []
    for _ in range(7):
        walls_import.append(_run("import ezdxf")[0])
        walls_cmd.append(_run("from dxfcheck.cli import main; main(['solve', sys.argv[1], '--json'])", small)[0])
    wi, wc = statistics.median(walls_import), statistics.median(walls_cmd)
    print(
        f"small drawing: python -c 'import ezdxf' {wi:.3f} s, dxfcheck solve --json {wc:.3f} s, "
        f"ratio {wc / wi:.2f} (target <= 1.3: {'met' if wc <= 1.3 * wi else 'NOT met'})"
    )


if __name__ == "__main__":
    main()
