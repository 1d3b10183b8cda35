"""The package's import graph is one-way: no cycles, and no module imports from a layer above
its own (the layering DEVELOPERS.md describes).

Every import statement is read from the sources with ``ast``, at module level and inside
functions alike; only imports under ``if TYPE_CHECKING:`` are skipped, as they never run.
"""

import ast
from pathlib import Path

import pytest

import statewright

PACKAGE = Path(statewright.__file__).resolve().parent

# bottom to top; a module may import from its own layer or below, never from above
LAYERS = {"_core": 0, "_base": 0, "_compute": 1, "_results": 2, "_api": 3}
TOP = 4  # the package's __init__ (re-exports) and the public top-level modules


def module_name(path: Path, root: Path) -> str:
    parts = list(path.relative_to(root.parent).with_suffix("").parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def layer(module: str) -> int:
    parts = module.split(".")
    if len(parts) == 1:
        return TOP
    return LAYERS.get(parts[1], TOP)


def _type_checking_lines(tree: ast.AST) -> set:
    """Line numbers of the statements under ``if TYPE_CHECKING:`` (never executed)."""
    lines = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.If):
            test = node.test
            name = test.id if isinstance(test, ast.Name) else getattr(test, "attr", None)
            if name == "TYPE_CHECKING":
                for stmt in node.body:
                    for sub in ast.walk(stmt):
                        if hasattr(sub, "lineno"):
                            lines.add(sub.lineno)
    return lines


def imports_of(source: str, module: str, is_package: bool, known: set) -> set:
    """The package modules that ``module``'s source imports (resolved to known modules)."""
    tree = ast.parse(source)
    skipped = _type_checking_lines(tree)
    base = module.split(".") if is_package else module.split(".")[:-1]
    found = set()
    for node in ast.walk(tree):
        if getattr(node, "lineno", None) in skipped:
            continue
        targets = []
        if isinstance(node, ast.Import):
            targets = [alias.name for alias in node.names]
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                anchor = base[: len(base) - (node.level - 1)]
                prefix = ".".join(anchor + ([node.module] if node.module else []))
            else:
                prefix = node.module or ""
            # `from x import y` imports the submodule x.y when there is one, else x
            targets = [
                f"{prefix}.{alias.name}" if f"{prefix}.{alias.name}" in known else prefix for alias in node.names
            ]
        for target in targets:
            while target and target not in known:
                target = target.rpartition(".")[0]
            if target and target != module:
                found.add(target)
    return found


def import_graph(root: Path) -> dict:
    files = {module_name(p, root): p for p in root.rglob("*.py")}
    known = set(files) | {f"{root.name}._core"}
    return {name: imports_of(path.read_text(), name, path.name == "__init__.py", known) for name, path in files.items()}


def find_cycle(graph: dict):
    """One cycle as a list of modules, or None (depth-first search, three colours)."""
    colour, stack = {}, []

    def visit(node):
        colour[node] = "grey"
        stack.append(node)
        for nxt in sorted(graph.get(node, ())):
            if colour.get(nxt) == "grey":
                return stack[stack.index(nxt) :] + [nxt]
            if nxt not in colour:
                found = visit(nxt)
                if found:
                    return found
        colour[node] = "black"
        stack.pop()
        return None

    for node in sorted(graph):
        if node not in colour:
            found = visit(node)
            if found:
                return found
    return None


def upward_imports(graph: dict):
    return sorted((m, t) for m, targets in graph.items() for t in targets if layer(t) > layer(m))


def test_the_package_graph_is_complete():
    graph = import_graph(PACKAGE)
    # every area's layers are present, so the checks below see the real package
    for name in ("statewright._base.validate", "statewright._compute.structure", "statewright._results.realization"):
        assert name in graph
    assert "statewright._compute.structure" in graph["statewright._results.realization"]


def test_no_import_cycle():
    cycle = find_cycle(import_graph(PACKAGE))
    assert cycle is None, "import cycle: " + " -> ".join(cycle)


def test_no_import_from_a_layer_above():
    bad = upward_imports(import_graph(PACKAGE))
    assert not bad, "imports from a layer above: " + ", ".join(f"{m} -> {t}" for m, t in bad)


# negative controls: the checks can fail


def test_a_cycle_is_found():
    graph = {"p.a": {"p.b"}, "p.b": {"p.c"}, "p.c": {"p.a"}, "p.d": set()}
    assert find_cycle(graph) == ["p.a", "p.b", "p.c", "p.a"]


@pytest.mark.parametrize(
    "source",
    [
        "from .._api.structure import minimal_realization\n",  # module level
        "def f():\n    from .._api import structure\n    return structure\n",  # inside a function
        "import statewright._api.recover\n",  # absolute
    ],
)
def test_an_upward_import_is_found(source):
    known = {"statewright", "statewright._api", "statewright._api.structure", "statewright._api.recover"}
    found = imports_of(source, "statewright._results.thing", False, known)
    graph = {"statewright._results.thing": found}
    assert upward_imports(graph), found


def test_type_checking_imports_are_skipped():
    source = "from typing import TYPE_CHECKING\nif TYPE_CHECKING:\n    from .realization import Realization\n"
    known = {"statewright", "statewright._results", "statewright._results.realization"}
    assert imports_of(source, "statewright._results.structure", False, known) == set()
