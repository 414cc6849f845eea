"""DWG reader benchmark (run on demand):

    python tests/benchmarks/bench_dwg.py [SAMPLES_FOLDER]

For each DWG of the shared sample folder (default ``../shared/dwg-samples``
above the clone) with a DXF twin, times in this process, best of five:

* ``ezdwg`` decoding alone (``ezdwg.read`` and the entities the adapter asks for),
* the adapter: decoding plus the in-memory ezdxf document,
* ``read_drawing`` of the DWG (adapter plus dxfcheck's block walk),
* ``read_drawing`` of the DXF twin, full reader and default (``auto``),

and prints the ratios DWG / DXF.  The adapter's share over decoding is the
price of building an ezdxf document instead of the geometry directly.
"""

from __future__ import annotations

import sys
import time
from collections.abc import Callable
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

from dxfcheck.core.config import Config  # noqa: E402
from dxfcheck.read.drawing import _load_dwg, read_drawing  # noqa: E402

REPEAT = 5


def best(fn: Callable[[], Any]) -> float:
    times = []
    for _ in range(REPEAT):
        t = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t)
    return min(times)


def twins(folder: Path) -> list[tuple[Path, Path]]:
    out = []
    for dwg in sorted(folder.glob("*/*.dwg")):
        for name in (dwg.with_suffix(".dxf"), dwg.with_name(dwg.stem + "_ascii.dxf")):
            if name.exists():
                out.append((dwg, name))
        if dwg.name.startswith("synth_"):
            out.append((dwg, dwg.with_name("synth.dxf")))
    return out


def decode(path: Path) -> None:
    import ezdwg

    from dxfcheck.read.dwg import QUERIED_KINDS

    ezdwg.clear_decode_caches()
    doc = ezdwg.read(str(path))
    list(doc.entities().query(QUERIED_KINDS))


def main() -> None:
    default = next(
        (p / "shared" / "dwg-samples" for p in ROOT.parents if (p / "shared" / "dwg-samples").is_dir()), None
    )
    folder = Path(sys.argv[1]) if len(sys.argv) > 1 else default
    if folder is None:
        sys.exit("no sample folder: name one")
    import ezdwg

    print(
        f"{'drawing':34} {'ver':6} {'decode':>8} {'adapter':>8} {'read DWG':>9} {'DXF full':>9} {'DXF auto':>9} ratio"
    )
    for dwg, dxf in twins(folder):

        def adapter(p: Path = dwg) -> None:
            ezdwg.clear_decode_caches()
            _load_dwg(p, Config(), None)

        def read_dwg(p: Path = dwg) -> None:
            ezdwg.clear_decode_caches()
            read_drawing(p)

        t_dec = best(lambda p=dwg: decode(p))
        t_ad = best(adapter)
        t_dwg = best(read_dwg)
        t_full = best(lambda p=dxf: read_drawing(p, reader="full"))
        t_auto = best(lambda p=dxf: read_drawing(p))
        version = _load_dwg(dwg, Config(), None).version
        print(
            f"{dwg.name:34} {version:6} {t_dec:8.3f} {t_ad:8.3f} {t_dwg:9.3f} {t_full:9.3f} {t_auto:9.3f} "
            f"{t_dwg / t_auto:5.2f}"
        )


if __name__ == "__main__":
    main()
