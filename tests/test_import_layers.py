"""Imports run one way down the data path.

corpus → tokens → counts → estimator → model file → query → builds, simulator,
learning → sweep → faces (command line, pad).  A module may import its own
stage and the stages below it, never one above; the engine has no import
cycles and no imports tucked inside functions to dodge one (the command line
alone imports lazily, to start fast).  Common practice for a layered library;
the layers are this project's own.
"""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

ENGINE = Path(__file__).resolve().parent.parent / "predictor"

LAYERS: dict[str, int] = {
    "errors": 0,
    "version": 0,
    "arrays": 0,
    "text": 0,
    "outputs": 0,
    "key_neighbours": 0,
    "counting": 1,
    "estimate": 2,
    "modelfile": 3,
    "query": 4,
    "builder": 5,
    "chart": 5,
    "size_chart": 5,
    "stats": 5,
    "demo": 6,
    "simulate": 6,
    "arpa": 6,
    "adapt": 7,
    "study": 7,
    "compare": 7,
    "sweep": 8,
    "cli": 9,
    "browser": 9,
    "service": 9,
    "__main__": 9,
    "__init__": 9,
}
"""The stage of each top-level module or package of the engine (higher imports lower)."""

LAZY_IMPORTS_ALLOWED = {"cli"}
"""Stages that may import inside functions (to keep start-up fast)."""


def module_name(path: Path) -> str:
    parts = list(path.relative_to(ENGINE).with_suffix("").parts)
    if parts[-1] == "__init__" and len(parts) > 1:
        parts.pop()
    return ".".join(parts)


def imported_modules(path: Path) -> list[tuple[str, bool]]:
    """The engine modules a file imports, each with whether the import sits inside a function."""
    name = module_name(path)
    package = name.split(".") if path.name == "__init__.py" else name.split(".")[:-1]
    tree = ast.parse(path.read_text(encoding="utf-8"))
    found: list[tuple[str, bool]] = []

    def visit(node: ast.AST, in_function: bool) -> None:
        for child in ast.iter_child_nodes(node):
            nested = in_function or isinstance(child, (ast.FunctionDef, ast.AsyncFunctionDef))
            if isinstance(child, ast.ImportFrom) and child.level > 0:
                base = package[: len(package) - (child.level - 1)] if child.level > 1 else package
                target = ".".join([*base, *(child.module.split(".") if child.module else [])])
                if target.split(".")[0] in ("tui", "demo_vocab") or not target:
                    continue  # the pad and the demo text are installed beside the engine, not in it
                if child.module is None:
                    found.extend((f"{target}.{alias.name}".strip("."), in_function) for alias in child.names)
                else:
                    found.append((target, in_function))
            elif isinstance(child, ast.If) and _is_type_checking(child):
                continue  # imports for annotations only
            visit(child, nested)

    visit(tree, False)
    return found


def _is_type_checking(node: ast.If) -> bool:
    return isinstance(node.test, ast.Name) and node.test.id == "TYPE_CHECKING"


def engine_files() -> list[Path]:
    return sorted(p for p in ENGINE.rglob("*.py") if "__pycache__" not in p.parts)


def stage(module: str) -> str:
    return module.split(".")[0] if module else "__init__"


def test_every_stage_is_known():
    unknown = {stage(module_name(p)) for p in engine_files()} - set(LAYERS)
    assert not unknown, f"give these a stage in LAYERS: {sorted(unknown)}"


@pytest.mark.parametrize("path", engine_files(), ids=lambda p: str(p.relative_to(ENGINE)))
def test_no_module_imports_a_stage_above_its_own(path: Path):
    here = stage(module_name(path))
    for target, _ in imported_modules(path):
        there = stage(target)
        if there in LAYERS:
            assert LAYERS[there] <= LAYERS[here], f"{module_name(path)} ({here}) imports {target} ({there}), a later stage"


@pytest.mark.parametrize("path", engine_files(), ids=lambda p: str(p.relative_to(ENGINE)))
def test_no_imports_inside_functions_outside_the_faces(path: Path):
    here = stage(module_name(path))
    if here in LAZY_IMPORTS_ALLOWED:
        return
    lazy = [target for target, inside in imported_modules(path) if inside]
    assert not lazy, f"{module_name(path)} imports {lazy} inside a function"


def test_the_engine_has_no_import_cycles():
    graph: dict[str, set[str]] = {}
    files = {module_name(p): p for p in engine_files()}
    for name, path in files.items():
        edges = set()
        for target, inside in imported_modules(path):
            while target and target not in files:
                target = target.rpartition(".")[0]  # `from .x import name` names a module or one of its attributes
            if target and target != name and not inside:
                edges.add(target)
        graph[name] = edges
    state: dict[str, int] = {}

    def walk(node: str, trail: list[str]) -> None:
        state[node] = 1
        for nxt in graph.get(node, ()):
            if nxt.startswith(node + ".") or node == "":
                continue  # a package importing its own modules
            if state.get(nxt) == 1:
                cycle = trail[trail.index(nxt) :] + [nxt] if nxt in trail else [node, nxt]
                raise AssertionError(f"import cycle: {' -> '.join(cycle)}")
            if state.get(nxt) is None:
                walk(nxt, [*trail, nxt])
        state[node] = 2

    for node in graph:
        if state.get(node) is None:
            walk(node, [node])
