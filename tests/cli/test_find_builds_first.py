"""A query that must build first says so before it starts (issue 8).

An empty catalog made by ``zoo migrate`` used to make ``zoo find`` build for a minute with no
word (off a terminal even the progress bar shows only at the end).
"""

from __future__ import annotations

from pathlib import Path

import pytest
from typer.testing import CliRunner

from zoo.cli import app

runner = CliRunner()


def test_find_on_an_empty_migrated_catalog_announces_the_build(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    import zoo.catalog.service

    monkeypatch.setattr(zoo.catalog.service, "DEFAULT_MAX_AREA", 8)  # a small default catalog
    location = str(tmp_path / "migrated.sqlite3")
    created = runner.invoke(app, ["migrate", "--db", location])
    assert created.exit_code == 0, created.output
    first = runner.invoke(app, ["find", "area < 5", "--db", location, "--jobs", "1"])
    assert first.exit_code == 0, first.output
    # An empty schema counts as no catalog yet: the build is announced before it starts.
    lines = first.stderr.splitlines()
    assert lines[0] == (
        f"No catalog at {location} yet: building areas 1..8 once (later queries answer at "
        "once; `zoo build` adds the behaviour classes)."
    )
    again = runner.invoke(app, ["find", "area < 5", "--db", location])
    assert again.exit_code == 0, again.output
    assert "building" not in again.stderr
    assert again.stdout == first.stdout
    # The first answer left behaviour for later; `zoo build` names it without rebuilding.
    pending = runner.invoke(app, ["find", "behaviour_count >= 1", "--db", location, "--count"])
    assert pending.stdout.strip() == "0"
    assert "named up to area 0" in pending.stderr
    named = runner.invoke(app, ["build", "--max-area", "8", "--db", location, "--jobs", "2"])
    assert named.exit_code == 0, named.output
    assert "Named the behaviour classes of areas 1..8" in named.stdout
    after = runner.invoke(app, ["find", "behaviour_count >= 1", "--db", location, "--count"])
    assert int(after.stdout) == int(
        runner.invoke(app, ["find", "", "--db", location, "--count"]).stdout
    )  # every class of area <= 8 has at most 10^4 states
