"""The spatial index (shapely STRtree) gives the topology that the search
through every piece gave before it: the same rigid parts, the same answers
of ``parts_at``, on every drawing the tests
build (the catalogue, drafted twins read by inference, the demo drawings)
and on random points near them.  The reference below is the previous
implementation, kept here word for word as the oracle (the project's own
invariant; no published source)."""

from __future__ import annotations

import random
from pathlib import Path

import pytest
from common import CATALOGUE, ROOT

from dxfcheck.core.config import Config, Role
from dxfcheck.core.geometry import dist
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


def test_index_matches_the_search_through_every_piece(tmp_path):
    rng = random.Random(16)
    seen = 0
    for name, path in _drawings(tmp_path):
        drawing = read_skeleton(Path(path), Config())
        tol = default_tolerance(drawing)
        topo, _ = rigid_parts(drawing, tol)
        assert topo.groups == _brute_groups(drawing, tol), name
        points = [q for p in topo.links for q in p.points] + [g.center for g in topo.pin_geoms]
        points += [(x + rng.uniform(-2, 2) * tol, y + rng.uniform(-2, 2) * tol) for x, y in points]
        for p in points:
            brute = [gi for gi, m in enumerate(topo.groups) if any(on_path(p, topo.links[i], tol) for i in m)]
            assert topo.parts_at(p) == brute, (name, p)
        seen += 1
    assert seen >= len(CATALOGUE) + 3


@pytest.mark.parametrize("n", [1, 50])
def test_many_parallel_pieces(tmp_path, n):
    """Pieces stacked within the tolerance of one another: the index must
    propose every one."""
    from dxfcheck.output.sketch import Sketch

    sk = Sketch()
    sk.drum(0, 0, 100)
    for k in range(n):
        sk.link((-300.0, 200.0 + 1e-6 * k), (300.0, 200.0 + 1e-6 * k))
    path = tmp_path / "stack.dxf"
    sk.save(path)
    drawing = read_skeleton(path, Config())
    topo, _ = rigid_parts(drawing, default_tolerance(drawing))
    assert topo.groups == _brute_groups(drawing, default_tolerance(drawing))
    assert topo.parts_at((0.0, 200.0)) == list(range(len(topo.groups)))
