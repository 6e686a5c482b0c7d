"""The package's import graph has no circle: data flows one way (DEVELOPERS.md).

Every import statement counts, including those inside functions, since a circle hidden
in a function still ties two modules together.
"""

from __future__ import annotations

import ast
from pathlib import Path

import networkx as nx

PACKAGE = Path(__file__).resolve().parent.parent / "roles"


def _module_name(path: Path) -> str:
    parts = list(path.relative_to(PACKAGE.parent).with_suffix("").parts)
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


def _modules() -> dict[str, Path]:
    return {_module_name(p): p for p in PACKAGE.rglob("*.py")}


def _without_type_checking(tree: ast.Module) -> ast.Module:
    """The module without its ``if TYPE_CHECKING:`` blocks: imports for annotations only
    never run, so they tie no modules together."""

    class Drop(ast.NodeTransformer):
        def visit_If(self, node: ast.If) -> ast.AST | None:
            test = node.test
            name = test.id if isinstance(test, ast.Name) else getattr(test, "attr", None)
            return None if name == "TYPE_CHECKING" else self.generic_visit(node)

    return Drop().visit(tree)


def import_graph() -> nx.DiGraph:
    """Module -> the package modules it imports (anywhere in its body, functions
    included; ``if TYPE_CHECKING:`` blocks excluded)."""
    modules = _modules()
    graph = nx.DiGraph()
    graph.add_nodes_from(modules)
    for name, path in modules.items():
        package = name if path.name == "__init__.py" else name.rpartition(".")[0]
        tree = ast.parse(path.read_text(encoding="utf-8"))
        for node in ast.walk(_without_type_checking(tree)):
            targets: list[str] = []
            if isinstance(node, ast.Import):
                targets = [a.name for a in node.names]
            elif isinstance(node, ast.ImportFrom):
                base = node.module or ""
                if node.level:
                    anchor = package.split(".")
                    anchor = anchor[: len(anchor) - (node.level - 1)]
                    base = ".".join(anchor + ([base] if base else []))
                # "from pkg import mod" imports the module pkg.mod; "from mod import f" mod.
                targets = [
                    f"{base}.{a.name}" if f"{base}.{a.name}" in modules else base
                    for a in node.names
                ]
            for target in targets:
                # Importing a.b.c first runs a/b/__init__.py: count the sub-packages on
                # the way (not the top package, whose public API the interpreter loads
                # before anything else in it).
                parts = target.split(".")
                for i in range(2, len(parts) + 1):
                    step = ".".join(parts[:i])
                    if step in modules and step != name and not name.startswith(step + "."):
                        graph.add_edge(name, step)
    return graph


def test_the_graph_sees_the_imports() -> None:
    # A check that cannot fail would prove nothing: the pipeline imports the stages,
    # and a function-level import counts (commands imports the pipeline's run).
    graph = import_graph()
    assert graph.has_edge("roles.pipeline", "roles.embedding.cluster")
    assert graph.has_edge("roles.embedding.walks", "roles.embedding.walks.kernel")
    assert graph.number_of_edges() > 50


def test_no_import_circle() -> None:
    cycles = list(nx.simple_cycles(import_graph()))
    assert cycles == [], "import circles: " + "; ".join(" -> ".join(c) for c in cycles[:10])


def test_every_package_folder_is_installed() -> None:
    # pyproject.toml lists the packages by name (no automatic discovery): a folder left
    # out would be missing from an installed copy while the source-tree tests pass.
    import tomllib

    meta = tomllib.loads((PACKAGE.parent / "pyproject.toml").read_text(encoding="utf-8"))
    listed = set(meta["tool"]["setuptools"]["packages"])
    folders = {_module_name(p) for p in PACKAGE.rglob("__init__.py")}
    assert folders <= listed, sorted(folders - listed)
