"""``zoo find`` on a catalog that ``zoo migrate`` created and nothing filled (issue 8).

It must say that it builds (the same line as for a missing catalog) instead of building
silently; the answer is checked against docs/theory/processes.md as in test_catalog.py.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from typer.testing import CliRunner

from zoo.cli import app

runner = CliRunner()


def test_find_on_an_empty_migrated_catalog_says_it_builds(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    import zoo.catalog.service

    monkeypatch.setattr(zoo.catalog.service, "DEFAULT_MAX_AREA", 6)
    location = tmp_path / "migrated.sqlite3"
    monkeypatch.setenv("ZOO_CATALOG", str(location))
    migrated = runner.invoke(app, ["migrate"])
    assert migrated.exit_code == 0, migrated.output
    result = runner.invoke(app, ["find", "processes = 3 and area <= 6", "--count"])
    assert result.exit_code == 0, result.output
    assert result.stdout == "1\n"  # C(1,3,1,3) only, gcd(beta, delta) = 3
    assert "building areas 1..6" in result.stderr
    again = runner.invoke(app, ["find", "processes = 3 and area <= 6", "--count"])
    assert "building" not in again.stderr and again.stdout == "1\n"
