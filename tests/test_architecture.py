"""The package layout stays as designed: stages in one direction, no import cycles, one digraph module.

The import graph is read from the source with the standard ``ast`` module (imports inside
functions and under ``TYPE_CHECKING`` included, since either can hide a cycle) and searched with
networkx.
"""

from __future__ import annotations

import ast
import importlib
from pathlib import Path

import networkx as nx
import pytest

import bracegrid

SRC = Path(bracegrid.__file__).resolve().parent

#: The stages in data-flow order; a module may import only from its own stage or earlier ones.
STAGES = (
    "errors", "units", "_version", "model", "io", "analysis", "mechanics", "optimize", "compare", "outputs", "web",
    "cli",
    "__main__",
)  # fmt: skip

#: Every name ``from bracegrid import ...`` offered before the package was split (it must keep working).
PUBLIC_BEFORE = {
    "Bom", "BraceGridError", "CostCatalogue", "CostRate", "Diagonal", "DrawnSheet", "ExportError", "Frame",
    "FrameSolution", "InfeasibleError", "InputError", "LoosePart", "Member", "MemberKind", "Opening",
    "PreviewFormat", "ProgressEvent", "Project", "ProjectSolution", "Racking", "SolveOptions", "SolveStatus",
    "SolverLimitError", "Supports", "Verdict", "__version__", "blocked_bays", "build_bom", "build_drawing",
    "check_frame", "check_layout", "find_critical_members", "is_stable", "load_project", "optimize_frame",
    "optimize_project", "parse_member_refs", "parse_project", "render_bom_csv", "render_preview",
    "render_project", "save_project", "write_dxf", "write_preview",
}  # fmt: skip


def _module_name(path: Path) -> str:
    parts = ["bracegrid", *path.relative_to(SRC).with_suffix("").parts]
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


def _modules() -> dict[str, Path]:
    return {_module_name(p): p for p in SRC.rglob("*.py")}


def _imports(path: Path, name: str) -> list[tuple[str, bool]]:
    """(imported bracegrid module, inside a function?) for every import in a module."""
    tree = ast.parse(path.read_text(encoding="utf-8"))
    package = name if path.name == "__init__.py" else name.rpartition(".")[0]
    nested: set[int] = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.FunctionDef | ast.AsyncFunctionDef):
            nested.update(id(n) for n in ast.walk(node) if n is not node)
    found: list[tuple[str, bool]] = []
    for node in ast.walk(tree):
        targets: list[str] = []
        if isinstance(node, ast.Import):
            targets = [a.name for a in node.names]
        elif isinstance(node, ast.ImportFrom):
            base = node.module or ""
            if node.level:
                anchor = package.rsplit(".", node.level - 1)[0] if node.level > 1 else package
                base = f"{anchor}.{base}" if base else anchor
            targets = [base, *(f"{base}.{a.name}" for a in node.names)]
        found.extend((t, id(node) in nested) for t in targets if t == "bracegrid" or t.startswith("bracegrid."))
    return found


def _graph() -> nx.DiGraph:
    mods = _modules()
    g: nx.DiGraph = nx.DiGraph()
    g.add_nodes_from(mods)
    for name, path in mods.items():
        for target, _ in _imports(path, name):
            if target in mods and target != name:
                g.add_edge(name, target)
    return g


def test_no_import_cycles() -> None:
    cycles = list(nx.simple_cycles(_graph()))
    assert cycles == [], f"import cycles: {cycles[:5]}"


def test_no_bracegrid_import_inside_a_function() -> None:
    # A lazy import of one of our own modules is how a cycle hides; lazy third-party imports
    # (ortools, ezdxf, matplotlib: start-up time) are allowed and not seen here.
    lazy = [
        f"{name} -> {target}" for name, path in _modules().items() for target, inside in _imports(path, name) if inside
    ]
    assert lazy == []


def _stage(module: str) -> int:
    top = module.split(".")[1] if module.count(".") else ""
    return STAGES.index(top) if top in STAGES else -1


def test_dependencies_point_down_the_stages() -> None:
    upward = [
        f"{a} -> {b}"
        for a, b in _graph().edges
        if a != "bracegrid" and _stage(b) > _stage(a)  # the top package re-exports everything
    ]
    assert upward == []


def test_digraph_searches_live_in_one_module() -> None:
    # Node numbering and "sparse matrix, then strong components / max flow" belong to analysis/digraph.py.
    searches = ("connected_components(", "maximum_flow(", 'connection="strong"')
    offenders = [
        str(path.relative_to(SRC))
        for name, path in _modules().items()
        if name != "bracegrid.analysis.digraph" and any(s in path.read_text(encoding="utf-8") for s in searches)
    ]
    assert offenders == []


def test_public_api_keeps_every_name() -> None:
    assert set(bracegrid.__all__) >= PUBLIC_BEFORE
    for name in bracegrid.__all__:
        assert hasattr(bracegrid, name), name


@pytest.mark.parametrize("package", ["model", "io", "analysis", "mechanics", "optimize", "compare", "outputs", "web"])
def test_each_stage_declares_its_api(package: str) -> None:
    module = importlib.import_module(f"bracegrid.{package}")
    assert module.__all__, package
    for name in module.__all__:
        assert hasattr(module, name), f"bracegrid.{package}.{name}"


def test_every_module_says_what_it_holds() -> None:
    missing = [name for name, path in _modules().items() if not ast.get_docstring(ast.parse(path.read_text("utf-8")))]
    assert missing == []
