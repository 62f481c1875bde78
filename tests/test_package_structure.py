"""The whole package's import graph: no cycle between modules or subpackages.

Function-level imports count: a cycle hidden inside a function is still a cycle
in the design. Edges are explicit imports only (importing ``a.b`` is not counted
as importing ``a``'s ``__init__``). The layers above the analyses have their own
test (tests/report/test_layering.py); this one covers every package, including
the library below them and packages added later.
"""

import ast
from pathlib import Path

import pytest

import simheat

PACKAGE_ROOT = Path(simheat.__file__).parent


def _module_name(path: Path) -> str:
    parts = path.relative_to(PACKAGE_ROOT.parent).with_suffix("").parts
    if parts[-1] == "__init__":
        parts = parts[:-1]
    return ".".join(parts)


def _modules() -> dict[str, Path]:
    return {_module_name(p): p for p in sorted(PACKAGE_ROOT.rglob("*.py"))}


MODULES = _modules()


def _resolve_relative(module: str, is_package: bool, level: int, name: str | None):
    base = module.split(".")
    if not is_package:
        base = base[:-1]
    base = base[: len(base) - (level - 1)] if level > 1 else base
    return ".".join(base + ([name] if name else []))


def _imports(module: str) -> set[str]:
    path = MODULES[module]
    tree = ast.parse(path.read_text(encoding="utf-8"))
    is_package = path.name == "__init__.py"
    found: set[str] = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            targets = [alias.name for alias in node.names]
        elif isinstance(node, ast.ImportFrom):
            base = (
                _resolve_relative(module, is_package, node.level, node.module)
                if node.level
                else node.module
            )
            targets = [f"{base}.{alias.name}" for alias in node.names] + [base]
        else:
            continue
        for target in targets:
            # the longest prefix that is one of our modules
            parts = target.split(".")
            while parts and ".".join(parts) not in MODULES:
                parts.pop()
            if parts and ".".join(parts) != module:
                found.add(".".join(parts))
    # "from simheat.x import y" names both simheat.x and simheat.x.y when y is a
    # module: it imports y, not the package's __init__
    return {m for m in found if not any(o.startswith(m + ".") for o in found)}


GRAPH = {module: _imports(module) for module in MODULES}


def _cycles(graph: dict[str, set[str]]) -> list[list[str]]:
    """Strongly connected components with more than one node (Tarjan)."""
    index, low, stack, on_stack, result = {}, {}, [], set(), []
    counter = [0]

    def visit(v):
        index[v] = low[v] = counter[0]
        counter[0] += 1
        stack.append(v)
        on_stack.add(v)
        for w in graph.get(v, ()):
            if w not in index:
                visit(w)
                low[v] = min(low[v], low[w])
            elif w in on_stack:
                low[v] = min(low[v], index[w])
        if low[v] == index[v]:
            component = []
            while True:
                w = stack.pop()
                on_stack.discard(w)
                component.append(w)
                if w == v:
                    break
            if len(component) > 1:
                result.append(sorted(component))

    for v in graph:
        if v not in index:
            visit(v)
    return result


def _subpackage(module: str) -> str:
    parts = module.split(".")
    return ".".join(parts[:2])


def test_graph_sees_function_level_imports():
    # guards the parser itself: the CLI imports its analysis inside the command
    assert "simheat.analysis.flows" in GRAPH["simheat.cli.flows"]


def test_cycle_finder_reports_a_planted_cycle():
    graph = {"a": {"b"}, "b": {"c"}, "c": {"a"}, "d": {"a"}}
    assert _cycles(graph) == [["a", "b", "c"]]


def test_no_import_cycle_between_modules():
    assert _cycles(GRAPH) == []


def test_no_import_cycle_between_subpackages():
    packages: dict[str, set[str]] = {}
    for module, targets in GRAPH.items():
        source = _subpackage(module)
        packages.setdefault(source, set()).update(
            _subpackage(t) for t in targets if _subpackage(t) != source
        )
    assert _cycles(packages) == []


@pytest.mark.parametrize(
    ("low", "high"),
    [
        ("simheat.physics", "simheat.scenario"),
        ("simheat.scenario", "simheat.resolve"),
        ("simheat.scenario", "simheat.hydraulics"),
        ("simheat.resolve", "simheat.hydraulics"),
        ("simheat.hydraulics", "simheat.dynamics"),
        ("simheat.runs", "simheat.analysis"),
    ],
)
def test_lower_layer_never_imports_a_higher_one(low, high):
    offenders = sorted(
        f"{m} -> {t}"
        for m, targets in GRAPH.items()
        if m == low or m.startswith(low + ".")
        for t in targets
        if t == high or t.startswith(high + ".")
    )
    assert offenders == []
