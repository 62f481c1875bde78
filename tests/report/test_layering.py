"""The layers above the analyses import downwards only, and without cycles.

cli -> report -> plots -> analysis -> (hydraulics, dynamics, runs, scenario, ...).
Every import counts, at any depth of the code (function-level imports and
``TYPE_CHECKING`` blocks too).
"""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

import simheat

PACKAGE_DIR = Path(simheat.__file__).parent
# Rank of each layer: a module may import only modules of its own rank or lower;
# each rank above 0 is one package. The library below is rank 0. Packages in
# neither list (added by other work) are left to the whole-package import test.
RANKS = {"analysis": 1, "plots": 2, "report": 3, "cli": 4, "__main__": 5}
LIBRARY = {"physics", "hydraulics", "dynamics", "runs", "scenario", "errors", "schemes"}


def module_name(path: Path) -> str:
    parts = path.relative_to(PACKAGE_DIR.parent).with_suffix("").parts
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


MODULES = {module_name(p): p for p in PACKAGE_DIR.rglob("*.py")}


def rank(module: str) -> int | None:
    """Layer rank of a simheat module; None for a package outside the layers."""
    parts = module.split(".")
    if len(parts) == 1 or parts[1] in LIBRARY:
        return 0
    return RANKS.get(parts[1])


def imports_of(module: str) -> set[str]:
    """simheat modules imported by ``module`` (a ``from`` import of a submodule
    counts as that submodule)."""
    tree = ast.parse(MODULES[module].read_text(encoding="utf-8"))
    found = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            names = [alias.name for alias in node.names]
        elif isinstance(node, ast.ImportFrom) and node.module and node.level == 0:
            names = [node.module]
            names += [f"{node.module}.{alias.name}" for alias in node.names]
        else:
            continue
        found.update(n for n in names if n in MODULES and n != module)
    return found


GRAPH = {m: imports_of(m) for m in MODULES}


def test_imports_go_down_the_layers():
    ranked = {m for m in MODULES if rank(m) is not None}
    upward = {
        module: sorted(o for o in GRAPH[module] & ranked if rank(o) > rank(module))
        for module in ranked
    }
    assert {m: up for m, up in upward.items() if up} == {}


def test_analyses_never_import_the_report_layer():
    # The report may read analysis results and constants, never the reverse.
    for module, imported in GRAPH.items():
        if rank(module) == RANKS["analysis"]:
            assert not any(rank(m) == RANKS["report"] for m in imported), module


def test_layers_have_no_import_cycle():
    # Depth-first search over the modules of the layers above the analyses.
    layered = {m for m in MODULES if rank(m)}
    state: dict[str, int] = {}  # 1: on the current path, 2: done

    def visit(module: str, path: list[str]) -> None:
        state[module] = 1
        for other in sorted(GRAPH[module] & layered):
            if state.get(other) == 1:
                cycle = path[path.index(other) :] + [other]
                pytest.fail("import cycle: " + " -> ".join(cycle))
            if other not in state:
                visit(other, [*path, other])
        state[module] = 2

    for module in sorted(layered):
        if module not in state:
            visit(module, [module])


def test_the_graph_sees_function_level_imports():
    # cli commands import the library inside the function: the walk must see it.
    assert "simheat.analysis.flows" in GRAPH["simheat.cli.flows"]
