"""The summary of `zoo build` names exactly the areas this build stored, and its counts are
theirs: areas another builder stored meanwhile are left out of both (issue 8)."""

from __future__ import annotations

from pathlib import Path

from typer.testing import CliRunner

from zoo.catalog.build import write_area
from zoo.catalog.classify import classify_area
from zoo.catalog.service import Catalog
from zoo.cli import app

runner = CliRunner()


def test_the_summary_leaves_out_areas_stored_by_another_build(tmp_path: Path) -> None:
    db = str(tmp_path / "catalog.sqlite3")
    with Catalog.open(db, create=True) as catalog:
        write_area(catalog, classify_area(5))  # as if a concurrent builder stored area 5 first
    result = runner.invoke(app, ["build", "--max-area", "7", "--jobs", "1", "--db", db])
    assert result.exit_code == 0, result.output
    with Catalog.open(db) as catalog:
        stats = {s.area: s for s in catalog.stats()}
    mine = [1, 2, 3, 4, 6, 7]
    parameter_sets = sum(stats[a].parameter_sets for a in mine)
    classes = sum(stats[a].classes for a in mine)
    assert "Stored areas 1..4, 6..7:" in result.output
    assert f"{parameter_sets:,} parameter sets" in result.output
    assert f"{classes:,} classes" in result.output
    assert "complete up to area 7" in result.output
