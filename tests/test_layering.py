"""The core imports neither the storage layer nor the command line (design.md §4).

Each module is imported in a fresh interpreter, and sys.modules is inspected afterwards, so an
indirect import (a core module importing something that imports SQLAlchemy) is caught too.
"""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

CORE_MODULES = [
    "zoo.params",
    "zoo.algebra",
    "zoo.invariants",
    "zoo.net",
    "zoo.canonical",
    "zoo.behaviour",
    "zoo.report",
    "zoo.synthesis",
    "zoo.ring",
    "zoo.identify",
    "zoo.formats.pnml",
    "zoo.formats.nettext",
]
FORBIDDEN = [
    "sqlalchemy", "alembic", "typer", "zoo.storage", "zoo.cli", "zoo.catalog", "zoo.build",
]

PROBE = """
import importlib, json, sys
importlib.import_module(sys.argv[1])
print(json.dumps(sorted(m for m in sys.modules if m.split(".")[0] in {"sqlalchemy", "alembic",
      "typer"} or m.startswith(("zoo.storage", "zoo.cli", "zoo.catalog", "zoo.build")))))
"""


@pytest.mark.parametrize("module", CORE_MODULES)
def test_core_module_imports_no_storage_or_cli(module: str) -> None:
    result = subprocess.run(
        [sys.executable, "-c", PROBE, module], capture_output=True, text=True, check=False
    )
    assert result.returncode == 0, result.stderr
    loaded = json.loads(result.stdout)
    assert loaded == [], f"{module} pulls in {', '.join(loaded)} (forbidden: {FORBIDDEN})"


def test_report_needs_no_catalog() -> None:
    # zoo.report computes everything zoo show prints except the identifier, without storage.
    code = (
        "import sys; from zoo.report import invariant_report; from zoo.params import "
        "ParameterSet; r = invariant_report(ParameterSet(4, 2, 2, 3)); "
        "assert r['fingerprint'].startswith('v1:'); "
        "assert not any(m.startswith('sqlalchemy') for m in sys.modules)"
    )
    result = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True)
    assert result.returncode == 0, result.stderr
