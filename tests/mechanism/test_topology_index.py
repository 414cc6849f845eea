"""The spatial index (shapely STRtree) gives the topology that the search
through every piece gave before it: the same rigid parts, the same answers
of ``parts_at``, on every drawing the tests
build (the catalogue, drafted twins read by inference, the demo drawings)
and on random points near them.  The reference below is the previous
implementation, kept here word for word as the oracle (the project's own
invariant; no published source)."""

from __future__ import annotations

import itertools
import os
import random
import subprocess
import sys
from pathlib import Path

import pytest
from common import CATALOGUE, ROOT

from dxfcheck.core.config import Config, Role
from dxfcheck.core.geometry import dist
from dxfcheck.mechanism import topology
from dxfcheck.mechanism.topology import default_tolerance, on_path, path_ends, rigid_parts
from dxfcheck.output.drafting import save_drafted
from dxfcheck.pipeline import read_skeleton


def _brute_groups(drawing, tol):
    """The previous rigid_parts: every end against every piece."""
    links = drawing.paths_of(Role.LINK)
    pins = (*drawing.circles_of(Role.PIVOT), *drawing.circles_of(Role.PIN))
    parent = list(range(len(links)))

    def find(i):
        while parent[i] != i:
            i = parent[i]
        return i

    for i, path in enumerate(links):
        if len(path.points) > 2 and path.points[0] == path.points[-1]:
            continue
        for end in path_ends(path):
            if any(dist(end, g.center) <= tol for g in pins):
                continue
            for j, other in enumerate(links):
                if j != i and on_path(end, other, tol):
                    ri, rj = find(i), find(j)
                    if ri != rj:
                        parent[max(ri, rj)] = min(ri, rj)
    groups: dict[int, list[int]] = {}
    for i in range(len(links)):
        groups.setdefault(find(i), []).append(i)
    return tuple(tuple(groups[k]) for k in sorted(groups))


def _drawings(tmp_path):
    for name, (make, _) in CATALOGUE.items():
        path = tmp_path / f"{len(list(tmp_path.iterdir()))}.dxf"
        make().save(path)
        yield name, path
    for style in ("centrelines", "outlines", "blocks"):
        path = tmp_path / f"winch-{style}.dxf"
        save_drafted(CATALOGUE["winch two-shoe (pivoted shoes, floating crank)"][0](), path, style)
        yield f"winch drafted as {style}", path
    for path in sorted((ROOT / "drawings").glob("*.dxf")):
        yield path.name, path


#: Thresholds that force each way of answering: the STRtrees for every
#: drawing, and the search through every piece for every drawing.
PATHS = {"tree": 0, "scan": sys.maxsize}


@pytest.mark.parametrize("way", sorted(PATHS))
def test_index_matches_the_search_through_every_piece(tmp_path, monkeypatch, way):
    monkeypatch.setattr(topology, "INDEX_MIN_PIECES", PATHS[way])
    rng = random.Random(16)
    seen = 0
    for name, path in _drawings(tmp_path):
        drawing = read_skeleton(Path(path), Config())
        tol = default_tolerance(drawing)
        topo, _ = rigid_parts(drawing, tol)
        assert topo.index.uses_tree is (way == "tree")
        assert topo.groups == _brute_groups(drawing, tol), name
        points = [q for p in topo.links for q in p.points] + [g.center for g in topo.pin_geoms]
        points += [(x + rng.uniform(-2, 2) * tol, y + rng.uniform(-2, 2) * tol) for x, y in points]
        for p in points:
            brute = [gi for gi, m in enumerate(topo.groups) if any(on_path(p, topo.links[i], tol) for i in m)]
            assert topo.parts_at(p) == brute, (name, p)
        seen += 1
    assert seen >= len(CATALOGUE) + 3


@pytest.mark.parametrize("n", [1, 50, topology.INDEX_MIN_PIECES - 1, topology.INDEX_MIN_PIECES])
def test_many_parallel_pieces(tmp_path, n):
    """Pieces stacked within the tolerance of one another: the index must
    propose every one, on both sides of the threshold where the STRtree
    takes over from the search through every piece."""
    from dxfcheck.output.sketch import Sketch

    sk = Sketch()
    sk.drum(0, 0, 100)
    for k in range(n):
        sk.link((-300.0, 200.0 + 1e-6 * k), (300.0, 200.0 + 1e-6 * k))
    path = tmp_path / "stack.dxf"
    sk.save(path)
    drawing = read_skeleton(path, Config())
    topo, _ = rigid_parts(drawing, default_tolerance(drawing))
    assert topo.index.uses_tree is (n >= topology.INDEX_MIN_PIECES)
    assert topo.groups == _brute_groups(drawing, default_tolerance(drawing))
    assert topo.parts_at((0.0, 200.0)) == list(range(len(topo.groups)))


#: Builds the topology of the drawing argv[1] and prints whether the tree
#: answered and whether shapely is loaded.
_SHAPELY_LOADED = (
    "import sys\n"
    "from dxfcheck.core.config import Config\n"
    "from dxfcheck.pipeline import read_skeleton\n"
    "from dxfcheck.mechanism.topology import default_tolerance, rigid_parts\n"
    "d = read_skeleton(sys.argv[1], Config())\n"
    "topo, _ = rigid_parts(d, default_tolerance(d))\n"
    "topo.parts_at((0.0, 0.0))\n"
    "print(len(topo.links), topo.index.uses_tree, 'shapely' in sys.modules)\n"
)


@pytest.mark.parametrize("below", [True, False])
def test_shapely_loaded_only_from_the_threshold_on(tmp_path, below):
    """A chain of pieces just below the threshold is answered by the search
    through every piece without loading shapely; at the threshold, by the
    STRtree; both give the groups of the search through every piece."""
    from dxfcheck.output.sketch import Sketch

    n = topology.INDEX_MIN_PIECES - 1 if below else topology.INDEX_MIN_PIECES
    sk = Sketch()
    sk.drum(0, 0, 100)
    pts = [(300.0 + 40.0 * k, 10.0 * (k % 2)) for k in range(n + 1)]
    sk.pin(*pts[0])
    sk.pin(*pts[-1])
    for a, b in itertools.pairwise(pts):
        sk.link(a, b)
    path = tmp_path / "chain.dxf"
    sk.save(path)
    r = subprocess.run(
        [sys.executable, "-c", _SHAPELY_LOADED, str(path)],
        capture_output=True,
        text=True,
        timeout=120,
        env={**os.environ, "PYTHONPATH": str(ROOT)},
    )
    assert r.stdout.split() == [str(n), str(not below), str(not below)], r.stderr
    drawing = read_skeleton(path, Config())
    topo, _ = rigid_parts(drawing, default_tolerance(drawing))
    assert topo.groups == _brute_groups(drawing, default_tolerance(drawing)) == (tuple(range(n)),)
