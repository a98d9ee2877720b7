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
    migrated = runner.invoke(app, ["migrate"])  # the default location (isolated by conftest)
    assert migrated.exit_code == 0, migrated.output
    result = runner.invoke(app, ["find", "processes = 3 and area <= 6", "--count"])
    assert result.exit_code == 0, result.output
    assert result.stdout == "1\n"  # C(1,3,1,3) only, gcd(beta, delta) = 3
    assert "building areas 1..6" in result.stderr
    again = runner.invoke(app, ["find", "processes = 3 and area <= 6", "--count"])
    assert "building" not in again.stderr and again.stdout == "1\n"


@pytest.mark.parametrize(
    ("args", "env", "fragment"),
    [
        (["--db", "{missing}"], {}, "no catalog at {missing}; a named catalog"),
        ([], {"ZOO_CATALOG": "{missing}"}, "no catalog at {missing}; a named catalog"),
        (["--db", ""], {}, "--db is empty"),
        (["--db", "  "], {}, "--db is empty"),
        (["--db", "postgresql://"], {}, "names no database"),
        ([], {"ZOO_CATALOG": "postgresql://"}, "names no database"),
    ],
)
def test_find_never_builds_a_named_catalog_that_is_not_there(
    tmp_path: Path,
    monkeypatch: pytest.MonkeyPatch,
    args: list[str],
    env: dict[str, str],
    fragment: str,
) -> None:
    missing = str(tmp_path / "mistyped.sqlite3")
    for key, value in env.items():
        monkeypatch.setenv(key, value.format(missing=missing))
    result = runner.invoke(app, ["find", "area < 4", *(a.format(missing=missing) for a in args)])
    assert result.exit_code == 1
    assert result.stderr.count("\n") == 1 and fragment.format(missing=missing) in result.stderr
    assert "zoo build" in result.stderr or "no catalog" not in fragment
    assert not Path(missing).exists()
    assert list(tmp_path.iterdir()) == []
