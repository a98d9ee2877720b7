"""Imports run one way, down the layers (docs/architecture.md, "Layers").

Every ``import`` statement of every module is read from its source, including those inside
functions and under ``if TYPE_CHECKING``, so an import that runs only on one code path is
held to the same rule as one at the top of a module. A second check imports the lower layers
in a fresh interpreter and looks at ``sys.modules``, which also catches a forbidden module
pulled in indirectly through a third-party package.
"""

from __future__ import annotations

import ast
import json
import re
import subprocess
import sys
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parents[1] / "zoo"

#: The layer of each top-level module or sub-package of zoo, and what it may import.
#: ``base`` holds the modules every layer may use (errors, version).
ALLOWED: dict[str, set[str]] = {
    "base": {"base"},
    "core": {"base", "core"},
    "query": {"base", "core", "query"},
    "storage": {"base", "core", "query", "storage"},
    "catalog": {"base", "core", "query", "storage", "catalog"},
    "pictures": {"base", "core", "pictures"},
    "interchange": {"base", "core", "pictures", "interchange"},
    "publish": {"base", "core", "query", "catalog", "pictures", "interchange", "publish"},
    # The faces reach the data only through the catalog service, never the storage layer.
    # ``zoo serve`` (zoo/cli/serve.py) starts the web face, so the command line may import it.
    "cli": {"base", "core", "query", "catalog", "pictures", "interchange", "publish", "web", "cli"},
    "web": {"base", "core", "query", "catalog", "pictures", "interchange", "publish", "web"},
    # The package's public interface re-exports from every layer but the faces.
    "interface": {"base", "core", "query", "catalog", "pictures", "interchange", "publish"},
}
BASE_MODULES = {"zoo.errors", "zoo.version"}

#: Database packages: only the storage layer speaks SQL (a repository owns every statement).
DATABASE_PACKAGES = {"sqlalchemy", "alembic", "sqlite3", "psycopg"}
#: Third-party packages a layer must not import at all.
FORBIDDEN_PACKAGES: dict[str, set[str]] = {
    "core": DATABASE_PACKAGES | {"typer", "rich", "matplotlib", "starlette", "uvicorn"},
    "query": DATABASE_PACKAGES | {"typer", "rich", "pynauty"},
    "pictures": DATABASE_PACKAGES | {"typer"},
    "interchange": DATABASE_PACKAGES | {"typer"},
    "catalog": DATABASE_PACKAGES | {"typer", "rich", "starlette", "uvicorn"},
    "publish": DATABASE_PACKAGES,
    "cli": DATABASE_PACKAGES,
    "web": DATABASE_PACKAGES,
    "interface": DATABASE_PACKAGES,
    "base": DATABASE_PACKAGES,
    "storage": {"typer", "rich", "pynauty"},
}


def module_name(path: Path) -> str:
    parts = list(path.relative_to(PACKAGE.parent).with_suffix("").parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def layer_of(module: str) -> str:
    if module in BASE_MODULES:
        return "base"
    if module == "zoo":
        return "interface"
    return module.split(".")[1]


def imported_modules(path: Path) -> list[tuple[int, str]]:
    """(line, absolute module name) of every import in the file, wherever it stands."""
    module = module_name(path)
    package = module if path.name == "__init__.py" else module.rpartition(".")[0]
    found: list[tuple[int, str]] = []
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.Import):
            found.extend((node.lineno, alias.name) for alias in node.names)
        elif isinstance(node, ast.ImportFrom):
            base = node.module or ""
            if node.level:
                parts = package.split(".")
                parts = parts[: len(parts) - node.level + 1]
                base = ".".join([*parts, base] if base else parts)
            for alias in node.names:
                # ``from zoo.core import algebra`` imports the module zoo.core.algebra.
                candidate = f"{base}.{alias.name}"
                is_module = (PACKAGE.parent / (candidate.replace(".", "/") + ".py")).exists()
                found.append((node.lineno, candidate if is_module else base))
    return found


SOURCES = sorted(PACKAGE.rglob("*.py"))


def test_every_module_belongs_to_a_known_layer() -> None:
    unknown = {module_name(p) for p in SOURCES if layer_of(module_name(p)) not in ALLOWED}
    assert not unknown, f"modules outside every layer (add the layer to ALLOWED): {unknown}"


@pytest.mark.parametrize("path", SOURCES, ids=lambda p: module_name(p))
def test_imports_run_down_the_layers(path: Path) -> None:
    module = module_name(path)
    layer = layer_of(module)
    wrong = []
    for line, target in imported_modules(path):
        top = target.split(".")[0]
        if top == "zoo":
            if target == "zoo":
                wrong.append(f"line {line}: imports the package interface 'zoo'")
            elif layer_of(target) not in ALLOWED[layer]:
                wrong.append(f"line {line}: {target} ({layer_of(target)} layer)")
        elif top in FORBIDDEN_PACKAGES.get(layer, set()):
            wrong.append(f"line {line}: {target} (forbidden in the {layer} layer)")
    assert not wrong, f"{module} ({layer} layer) imports against the layering: {wrong}"


def test_no_import_cycles_between_modules() -> None:
    graph: dict[str, set[str]] = {}
    for path in SOURCES:
        module = module_name(path)
        graph[module] = {
            t for _, t in imported_modules(path) if t.startswith("zoo.") and t != module
        }
    # Tarjan's strongly connected components; any component of two or more is a cycle.
    index: dict[str, int] = {}
    low: dict[str, int] = {}
    stack: list[str] = []
    on_stack: set[str] = set()
    cycles: list[list[str]] = []

    def visit(node: str) -> None:
        index[node] = low[node] = len(index)
        stack.append(node)
        on_stack.add(node)
        for nxt in graph.get(node, ()):
            if nxt not in graph:
                continue
            if nxt not in index:
                visit(nxt)
                low[node] = min(low[node], low[nxt])
            elif nxt in on_stack:
                low[node] = min(low[node], index[nxt])
        if low[node] == index[node]:
            component = []
            while True:
                item = stack.pop()
                on_stack.discard(item)
                component.append(item)
                if item == node:
                    break
            if len(component) > 1:
                cycles.append(sorted(component))

    for node in sorted(graph):
        if node not in index:
            visit(node)
    assert not cycles, f"import cycles: {cycles}"


PROBE = """
import importlib, json, sys
importlib.import_module(sys.argv[1])
print(json.dumps(sorted(m for m in sys.modules if m.split(".")[0] in {"sqlalchemy", "alembic",
      "typer"} or m.startswith(("zoo.storage", "zoo.cli", "zoo.catalog.service",
      "zoo.catalog.build")))))
"""

LIGHT_MODULES = [
    "zoo",
    "zoo.core.report",
    "zoo.core.rings",
    "zoo.interchange.identify",
    "zoo.interchange.pnml",
    "zoo.interchange.nettext",
    "zoo.pictures.views",
]


@pytest.mark.parametrize("module", LIGHT_MODULES)
def test_lower_layers_load_no_database_or_cli_code(module: str) -> None:
    result = subprocess.run(
        [sys.executable, "-c", PROBE, module], capture_output=True, text=True, check=False
    )
    assert result.returncode == 0, result.stderr
    loaded = json.loads(result.stdout)
    assert loaded == [], f"importing {module} pulls in {', '.join(loaded)}"


def test_report_needs_no_catalog() -> None:
    # zoo.core.report computes everything zoo show prints except the identifier, without storage.
    code = (
        "import sys; from zoo.core.report import invariant_report; from zoo.core.params import "
        "ParameterSet; r = invariant_report(ParameterSet(4, 2, 2, 3)); "
        "assert r['fingerprint'].startswith('v1:'); "
        "assert not any(m.startswith('sqlalchemy') for m in sys.modules)"
    )
    result = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True)
    assert result.returncode == 0, result.stderr


def test_identifying_a_net_without_a_catalog_loads_no_database_code() -> None:
    code = (
        "import sys; from zoo.core.net import build_net; from zoo.core.params import "
        "ParameterSet; from zoo.interchange.pnml import parse_pnml, pnml_document; "
        "from zoo.interchange.identify import identify_net; "
        "net = parse_pnml(pnml_document(build_net(ParameterSet(4, 2, 2, 3))).encode()); "
        "answer = identify_net(net); assert answer.cycloid; "
        "assert not any(m.startswith('sqlalchemy') for m in sys.modules), 'sqlalchemy loaded'"
    )
    result = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True)
    assert result.returncode == 0, result.stderr


_SQL = re.compile(
    r"\b(SELECT\s|INSERT\s+INTO|DELETE\s+FROM|UPDATE\s+\w+\s+SET|PRAGMA\s|CREATE\s+TABLE)"
)


@pytest.mark.parametrize(
    "path", [p for p in SOURCES if not module_name(p).startswith("zoo.storage")], ids=module_name
)
def test_no_sql_text_above_the_storage_layer(path: Path) -> None:
    tree = ast.parse(path.read_text(encoding="utf-8"))
    docstrings = {
        id(node.body[0].value)
        for node in ast.walk(tree)
        if isinstance(node, (ast.Module, ast.ClassDef, ast.FunctionDef, ast.AsyncFunctionDef))
        and node.body
        and isinstance(node.body[0], ast.Expr)
    }
    found = [
        f"line {node.lineno}: {node.value[:60]!r}"
        for node in ast.walk(tree)
        if isinstance(node, ast.Constant)
        and isinstance(node.value, str)
        and id(node) not in docstrings
        and _SQL.search(node.value)
    ]
    assert not found, f"{module_name(path)} holds SQL (it belongs in zoo/storage): {found}"
