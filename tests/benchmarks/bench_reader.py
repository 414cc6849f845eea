"""Reader benchmark (run on demand, takes a few minutes):

    python tests/benchmarks/bench_reader.py [CLUTTER_ENTITIES] [--file BIG.dxf]
    python tests/benchmarks/bench_reader.py --small [RUNS]   # the demos only

Writes a vendor-style drawing: the winch skeleton (31 entities) inside a
block placed once, among CLUTTER_ENTITIES (default 300 000) lines, circles,
texts and hatches on other layers (or reads BIG.dxf, written before with
``--make BIG.dxf N``), then times in fresh processes, on the same file:

* ``ezdxf.readfile`` (the full reader everything else is compared with),
* ``dxfcheck solve --json`` (the fast reader, the topology, both directions),

with each process's peak memory (VmHWM), and prints the ratios against the
targets: the solve in at most 0.03x the time of ``ezdxf.readfile`` and at
most 60 MB peak.  Then, on each demo drawing, the whole command
``python -m dxfcheck solve --json`` against ``python -c "import ezdxf"``
(target: at most 0.6x; medians of interleaved runs).

The children run with byte-code caching on (``PYTHONPYCACHEPREFIX`` in a
temporary folder, warmed first), as from a regular install: a source tree
run with ``PYTHONDONTWRITEBYTECODE`` compiles dxfcheck on every start while
ezdxf's installed byte code is cached, which is no fair comparison.
"""

from __future__ import annotations

import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT / "drawings"))

# peak memory from /proc/self/status VmHWM: unlike ru_maxrss it is not
# inflated by the parent's pages the child held between fork and exec; CPU
# seconds besides wall seconds, for a machine shared with other work
PROBE = (
    "import resource, sys, time\n"
    "t = time.perf_counter()\n"
    "{body}\n"
    "hwm = next(l.split()[1] for l in open('/proc/self/status') if l.startswith('VmHWM'))\n"
    "ru = resource.getrusage(resource.RUSAGE_SELF)\n"
    "sys.stderr.write(f'@@ {{time.perf_counter() - t}} {{hwm}} {{ru.ru_utime + ru.ru_stime}}\\n')\n"
)


#: The children's environment: byte code cached, as from a regular install.
ENV = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}


def _run(body: str, *args: str) -> tuple[float, float, float, float]:
    """(wall time of the whole process [s], time inside [s], peak RSS [MB],
    CPU time of the whole process [s])."""
    t0 = time.perf_counter()
    r = subprocess.run(
        [sys.executable, "-c", PROBE.format(body=body), *args],
        capture_output=True,
        text=True,
        check=True,
        cwd=ROOT,
        env=ENV,
    )
    wall = time.perf_counter() - t0
    line = next(x for x in r.stderr.splitlines() if x.startswith("@@"))
    _, inner, rss_kb, cpu = line.split()
    return wall, float(inner), float(rss_kb) / 1024, float(cpu)


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


#: The whole command, as ``python -m dxfcheck`` runs it, inside the probe.
COMMAND = (
    "import runpy\n"
    "sys.argv = ['dxfcheck', 'solve', '--json', sys.argv[1]]\n"
    "try:\n"
    "    runpy.run_module('dxfcheck', run_name='__main__', alter_sys=True)\n"
    "except SystemExit:\n"
    "    pass"
)


def _small(name: str, runs: int = 9) -> tuple[float, float, float, float]:
    """Median wall times [s] of ``import ezdxf`` and of the whole command on
    one demo, the two interleaved, and their median CPU times [s]."""
    path = str(ROOT / "drawings" / name)
    imports, cmds = [], []
    for _ in range(runs):
        imports.append(_run("import ezdxf"))
        cmds.append(_run(COMMAND, path))
    med = statistics.median
    return med(r[0] for r in imports), med(r[0] for r in cmds), med(r[3] for r in imports), med(r[3] for r in cmds)


def main() -> None:
    if len(sys.argv) > 1 and sys.argv[1] == "--make":
        make_big(Path(sys.argv[2]), int(sys.argv[3]))
        return
    args = sys.argv[1:]
    if args and args[0] == "--small":
        with tempfile.TemporaryDirectory() as tmp:
            ENV["PYTHONPYCACHEPREFIX"] = str(Path(tmp) / "pycache")
            _run("import dxfcheck.cli, dxfcheck.pipeline, dxfcheck.output.json")  # warm the byte-code cache
            _report_small(int(args[1]) if len(args) > 1 else 9)
        return
    given = Path(args[args.index("--file") + 1]) if "--file" in args else None
    clutter = int(args[0]) if args and args[0] != "--file" else 300_000
    with tempfile.TemporaryDirectory() as tmp:
        ENV["PYTHONPYCACHEPREFIX"] = str(Path(tmp) / "pycache")
        _run("import dxfcheck.cli, dxfcheck.pipeline, dxfcheck.output.json")  # warm the byte-code cache
        big = given or Path(tmp) / "vendor.dxf"
        if given is None:
            t0 = time.perf_counter()
            # in a child process, so that this one stays small
            subprocess.run([sys.executable, __file__, "--make", str(big), str(clutter)], check=True)
            print(
                f"wrote {big.stat().st_size / 1e6:.1f} MB, {clutter} clutter entities, "
                f"in {time.perf_counter() - t0:.0f} s"
            )
        _, t_read, m_read, c_read = _run("import ezdxf; ezdxf.readfile(sys.argv[1])", str(big))
        _, t_solve, m_solve, c_solve = _run(
            "from dxfcheck.cli import main; main(['solve', sys.argv[1], '--json', '--timeout', '3600'])", str(big)
        )
        print(f"ezdxf.readfile      : {t_read:7.2f} s ({c_read:.2f} s CPU), peak {m_read:7.1f} MB")
        print(f"dxfcheck solve      : {t_solve:7.2f} s ({c_solve:.2f} s CPU), peak {m_solve:7.1f} MB")
        print(
            f"time ratio          : {t_solve / t_read:7.3f} wall, {c_solve / c_read:.3f} CPU "
            f"(target <= 0.03: {'met' if t_solve <= 0.03 * t_read else 'NOT met'} on wall time)"
        )
        print(f"peak memory         : {m_solve:7.1f} MB (target <= 60: {'met' if m_solve <= 60 else 'NOT met'})")
        _report_small()


def _report_small(runs: int = 9) -> None:
    for name in sorted(p.name for p in (ROOT / "drawings").glob("*.dxf")):
        wi, wc, ci, cc = _small(name, runs)
        print(
            f"small drawing {name}: python -c 'import ezdxf' {wi:.3f} s ({ci:.3f} s CPU), "
            f"dxfcheck solve --json {wc:.3f} s ({cc:.3f} s CPU), ratio {wc / wi:.2f} wall, {cc / ci:.2f} CPU "
            f"(target <= 0.6: {'met' if wc <= 0.6 * wi else 'NOT met'} on wall time)"
        )


if __name__ == "__main__":
    main()
