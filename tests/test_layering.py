"""The package's folders are the pipeline's stages, and imports only run
downhill: core → read → mechanism → statics → gate → revision → output,
then the top-level modules (pipeline, batch, cli).  This walks the source
with ast (``tests/import_graph.py``), so the layering cannot drift back.  (The project's own convention, stated in
DEVELOPERS.md; no published source.)"""

from __future__ import annotations

import import_graph as imports

GRAPH = imports.arrows()


def test_every_module_has_a_place():
    assert [m for m in GRAPH if imports.rank(m) < 0] == []


def test_no_import_runs_uphill():
    assert imports.uphill(GRAPH) == []


def test_no_cycles():
    assert imports.cycles(GRAPH) == []


def test_local_imports_only_keep_commands_light():
    """A function-local import of the package's own module must not hide a
    cycle (the two tests above count local imports too).  Only the command
    modules (cli, batch, pipeline) import stages inside functions, so that a
    command loads only what it runs; every stage imports at module level."""
    local = sorted(
        (m, d)
        for m, deps in GRAPH.items()
        for d, only_local in deps.items()
        if only_local and m.split(".")[-1] not in ("cli", "batch", "pipeline")
    )
    assert local == []
