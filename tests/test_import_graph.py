"""The package's import graph has no cycles.

The graph is built from the source with :mod:`ast`, not by importing anything: every
``import`` and ``from ... import`` in every module of ``glidetask/``, at module level,
inside functions and methods, and under ``if TYPE_CHECKING:`` alike (a cycle that only
type names close is still two modules that each need the other). An edge goes from a
module to each ``glidetask`` module it names, and to the packages above that module
(Python runs their ``__init__`` first).
"""

from __future__ import annotations

import ast
from pathlib import Path

PACKAGE = Path(__file__).resolve().parents[1] / "glidetask"


def module_name(path: Path) -> str:
    parts = path.relative_to(PACKAGE.parent).with_suffix("").parts
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


def all_modules() -> dict[str, Path]:
    return {module_name(path): path for path in sorted(PACKAGE.rglob("*.py"))}


def _resolve_relative(importer: str, is_package: bool, level: int, module: str | None) -> str:
    base = importer.split(".")
    if not is_package:
        base = base[:-1]
    base = base[: len(base) - (level - 1)] if level > 1 else base
    return ".".join(base + ([module] if module else []))


def imported_modules(name: str, path: Path, known: set[str]) -> set[str]:
    """The ``glidetask`` modules that ``name`` imports anywhere in its source."""
    tree = ast.parse(path.read_text(encoding="utf-8"), filename=str(path))
    targets: set[str] = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            targets.update(alias.name for alias in node.names)
        elif isinstance(node, ast.ImportFrom):
            base = node.module or ""
            if node.level:
                base = _resolve_relative(name, path.name == "__init__.py", node.level, node.module)
            targets.add(base)
            # ``from package import module`` names a module, not only an attribute.
            targets.update(f"{base}.{alias.name}" for alias in node.names if f"{base}.{alias.name}" in known)
    edges: set[str] = set()
    for target in targets:
        if not (target == "glidetask" or target.startswith("glidetask.")):
            continue
        parts = target.split(".")
        for end in range(1, len(parts) + 1):  # the packages above run their __init__ first
            prefix = ".".join(parts[:end])
            if prefix in known and prefix != name:
                edges.add(prefix)
    return edges


def import_graph() -> dict[str, set[str]]:
    modules = all_modules()
    known = set(modules)
    return {name: imported_modules(name, path, known) for name, path in modules.items()}


def find_cycles(graph: dict[str, set[str]]) -> list[list[str]]:
    """Every strongly connected component with more than one module (Tarjan), as a
    sorted list of names; a module that imports itself counts too."""
    index: dict[str, int] = {}
    low: dict[str, int] = {}
    stack: list[str] = []
    on_stack: set[str] = set()
    cycles: list[list[str]] = []
    counter = [0]

    def visit(node: str) -> None:
        index[node] = low[node] = counter[0]
        counter[0] += 1
        stack.append(node)
        on_stack.add(node)
        for other in sorted(graph.get(node, ())):
            if other not in index:
                visit(other)
                low[node] = min(low[node], low[other])
            elif other in on_stack:
                low[node] = min(low[node], index[other])
        if low[node] == index[node]:
            component = []
            while True:
                member = stack.pop()
                on_stack.discard(member)
                component.append(member)
                if member == node:
                    break
            if len(component) > 1 or node in graph.get(node, ()):
                cycles.append(sorted(component))

    for node in sorted(graph):
        if node not in index:
            visit(node)
    return cycles


def test_the_cycle_finder_finds_a_cycle_and_only_a_cycle():
    # The finder itself, on small graphs whose answer is known by inspection.
    assert find_cycles({"a": {"b"}, "b": {"c"}, "c": set()}) == []
    assert find_cycles({"a": {"b"}, "b": {"c"}, "c": {"a"}, "d": {"a"}}) == [["a", "b", "c"]]
    assert find_cycles({"a": {"a"}}) == [["a"]]


def test_the_graph_sees_imports_inside_functions_and_under_type_checking(tmp_path):
    source = tmp_path / "glidetask_probe.py"
    source.write_text(
        "from typing import TYPE_CHECKING\n"
        "if TYPE_CHECKING:\n    from glidetask.engine.task import Task\n"
        "def f():\n    from glidetask.engine import polar\n    import glidetask.units as u\n",
        encoding="utf-8")
    known = {"glidetask", "glidetask.engine", "glidetask.engine.task", "glidetask.engine.polar", "glidetask.units"}
    edges = imported_modules("glidetask.probe", source, known)
    assert edges == {"glidetask", "glidetask.engine", "glidetask.engine.task", "glidetask.engine.polar",
                     "glidetask.units"}


def test_the_graph_covers_the_whole_package():
    graph = import_graph()
    assert {"glidetask.cli", "glidetask.engine.flight", "glidetask.tui.app", "glidetask.commands.export"} <= set(graph)
    assert "glidetask.engine.flight" in graph["glidetask.engine.plan"]


def test_no_import_cycles_in_the_package():
    cycles = find_cycles(import_graph())
    assert cycles == [], "import cycles: " + "; ".join(" <-> ".join(c) for c in cycles)
