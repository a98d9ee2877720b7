"""The API reference (docs/api/, mkdocs with mkdocstrings) builds from the docstrings without a
warning, and documents every name at the top of the package."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import zoo

ROOT = Path(__file__).resolve().parents[1]


def test_the_api_reference_builds_strictly_and_covers_the_interface(tmp_path: Path) -> None:
    site = tmp_path / "site"
    done = subprocess.run(
        [sys.executable, "-m", "mkdocs", "build", "--strict", "-q", "-d", str(site)],
        cwd=ROOT,
        capture_output=True,
        text=True,
        timeout=180,
    )
    assert done.returncode == 0, done.stderr
    pages = "".join(p.read_text(encoding="utf-8") for p in site.rglob("index.html"))
    overview = (ROOT / "docs" / "api" / "index.md").read_text(encoding="utf-8")
    for name in zoo.__all__:
        if name.startswith("__"):
            continue
        assert f"zoo.{name}" in overview, f"docs/api/index.md does not name zoo.{name}"
    for name in zoo.__all__:
        if name.startswith("__") or name == "ZooError":
            continue
        value = getattr(zoo, name)
        anchor = f'id="{value.__module__}.{value.__qualname__}"'
        assert anchor in pages, f"the reference has no section for zoo.{name} ({anchor})"
    for method in ("FindResult.to_pandas", "Catalog.find", "ParameterSet.to_networkx"):
        assert f'.{method}"' in pages, method
