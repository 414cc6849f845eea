"""Print the package's import structure from the source (ast), no imports run.

    python tests/import_graph.py            # summary: modules, arrows, levels, cycles, uphill imports
    python tests/import_graph.py --longest  # also the ten longest functions

An arrow is one module importing another module of the package (at module
level or inside a function).  A module's level is 0 when it imports nothing
of the package, else 1 + the highest level it imports; with a cycle the
levels are undefined and the cycle is printed.  "Uphill" compares stage
folders by the order in :data:`STAGES` (tests/test_layering.py imports it).
"""

from __future__ import annotations

import ast
import sys
from collections.abc import Iterator
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent  # the repository
PACKAGE = ROOT / "dxfcheck"

#: The stage folders from the bottom up; a module may import only its own
#: folder or folders before it.  Top-level modules come last, in this order.
STAGES = ("core", "read", "infer", "mechanism", "statics", "gate", "revision", "output")
TOP = ("pipeline", "batch", "cli", "__main__", "__init__")

__all__ = ["STAGES", "TOP", "arrows", "cycles", "levels", "longest_functions", "module_name", "rank", "uphill"]


def module_name(path: Path) -> str:
    rel = path.relative_to(ROOT).with_suffix("")
    parts = list(rel.parts)
    if parts[-1] == "__init__":
        parts = parts[:-1]
    return ".".join(parts)


def _modules() -> dict[str, Path]:
    return {module_name(p): p for p in sorted(PACKAGE.rglob("*.py"))}


def _resolve(name: str, mods: dict[str, Path]) -> str | None:
    while name:
        if name in mods:
            return name
        name = name.rpartition(".")[0]
    return None


def _imports(path: Path, me: str, mods: dict[str, Path]) -> Iterator[tuple[str, bool]]:
    """(imported package module, is it inside a function)."""
    tree = ast.parse(path.read_text(encoding="utf-8"))
    pkg = me if path.name == "__init__.py" else me.rpartition(".")[0]

    def walk(node: ast.AST, local: bool) -> Iterator[tuple[str, bool]]:
        for child in ast.iter_child_nodes(node):
            inner = local or isinstance(child, (ast.FunctionDef, ast.AsyncFunctionDef))
            if isinstance(child, ast.If) and "TYPE_CHECKING" in ast.unparse(child.test):
                continue  # type-only imports do not run
            if isinstance(child, ast.Import):
                for a in child.names:
                    if a.name.startswith("dxfcheck"):
                        t = _resolve(a.name, mods)
                        if t:
                            yield t, inner
            elif isinstance(child, ast.ImportFrom):
                base = child.module or ""
                if child.level:
                    up = pkg.split(".")
                    up = up[: len(up) - child.level + 1]
                    base = ".".join([*up, base]) if base else ".".join(up)
                if not base.startswith("dxfcheck"):
                    continue
                for a in child.names:
                    t = _resolve(f"{base}.{a.name}", mods) or _resolve(base, mods)
                    if t:
                        yield t, inner
            else:
                yield from walk(child, inner)

    yield from walk(tree, False)


def arrows() -> dict[str, dict[str, bool]]:
    """module -> {imported module: imported only inside functions}."""
    mods = _modules()
    out: dict[str, dict[str, bool]] = {}
    for name, path in mods.items():
        deps: dict[str, bool] = {}
        for t, local in _imports(path, name, mods):
            if t == name or (name.startswith(t + ".") and mods[t].name == "__init__.py"):
                continue
            deps[t] = deps.get(t, True) and local
        out[name] = deps
    return out


def cycles(graph: dict[str, dict[str, bool]]) -> list[list[str]]:
    """Strongly connected components with more than one module (Tarjan)."""
    index: dict[str, int] = {}
    low: dict[str, int] = {}
    stack: list[str] = []
    on: set[str] = set()
    found: list[list[str]] = []
    sys.setrecursionlimit(10_000)

    def visit(v: str) -> None:
        index[v] = low[v] = len(index)
        stack.append(v)
        on.add(v)
        for w in graph.get(v, {}):
            if w not in index:
                visit(w)
                low[v] = min(low[v], low[w])
            elif w in on:
                low[v] = min(low[v], index[w])
        if low[v] == index[v]:
            comp = []
            while True:
                w = stack.pop()
                on.discard(w)
                comp.append(w)
                if w == v:
                    break
            if len(comp) > 1:
                found.append(sorted(comp))

    for v in graph:
        if v not in index:
            visit(v)
    return found


def levels(graph: dict[str, dict[str, bool]]) -> dict[str, int]:
    memo: dict[str, int] = {}

    def level(v: str, seen: frozenset[str]) -> int:
        if v in memo:
            return memo[v]
        if v in seen:
            return 0
        deps = [level(w, seen | {v}) for w in graph.get(v, {})]
        memo[v] = 1 + max(deps) if deps else 0
        return memo[v]

    return {v: level(v, frozenset()) for v in graph}


def rank(module: str) -> int:
    """Position of a module's stage: folders by :data:`STAGES`, then the
    top-level modules by :data:`TOP`; the package itself is the top."""
    parts = module.split(".")
    if len(parts) == 1:
        return len(STAGES) + len(TOP)
    if parts[1] in STAGES:
        return STAGES.index(parts[1])
    if parts[1] in TOP:
        return len(STAGES) + TOP.index(parts[1])
    return -1  # not placed in the layering


def uphill(graph: dict[str, dict[str, bool]]) -> list[tuple[str, str]]:
    """Imports from a lower stage to a higher one (or of unplaced modules)."""
    bad = []
    for v, deps in graph.items():
        for w in deps:
            if rank(w) > rank(v) or rank(v) < 0 or rank(w) < 0:
                bad.append((v, w))
    return sorted(bad)


def longest_functions(n: int = 10) -> list[tuple[int, str]]:
    out = []
    for path in sorted(PACKAGE.rglob("*.py")):
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)) and node.end_lineno is not None:
                out.append((node.end_lineno - node.lineno + 1, f"{module_name(path)}.{node.name}"))
    return sorted(out, reverse=True)[:n]


def main() -> None:
    graph = arrows()
    n_arrows = sum(len(d) for d in graph.values())
    local = sum(1 for d in graph.values() for is_local in d.values() if is_local)
    lv = levels(graph)
    cyc = cycles(graph)
    up = uphill(graph)
    print(f"modules: {len(graph)}  arrows: {n_arrows} ({local} only inside functions)")
    print(f"import levels: {max(lv.values()) + 1 if lv else 0}")
    print(f"cycles: {len(cyc)}" + "".join(f"\n  {' <-> '.join(c)}" for c in cyc))
    print(f"uphill or unplaced imports: {len(up)}" + "".join(f"\n  {a} -> {b}" for a, b in up[:40]))
    if "--longest" in sys.argv:
        print("longest functions (lines):")
        for k, name in longest_functions():
            print(f"  {k:4d}  {name}")


if __name__ == "__main__":
    main()
