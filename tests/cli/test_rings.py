"""``zoo ring`` names the catalog entries its designed system iterates (issue 10, item 2).

docs/theory/ring-designs.md: a ring of C named items and G slots is C(G, C, C, C), which is
C(G, C, 1, 1) (the anonymous ring) with gamma and delta multiplied by C: by the definition of
the n-fold temporal iteration C(alpha, beta, n*gamma, n*delta) (docs/theory/iterations.md), its
C-fold iteration. The expected entry is found by the catalog's own parameter-set lookup.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from typer.testing import CliRunner

from zoo.catalog.service import lookup_class_id
from zoo.cli import app
from zoo.core.params import ParameterSet

runner = CliRunner()


@pytest.fixture(scope="module")
def catalog12(tmp_path_factory: pytest.TempPathFactory) -> str:
    db = str(tmp_path_factory.mktemp("rings") / "catalog.sqlite3")
    built = runner.invoke(app, ["build", "--max-area", "12", "--jobs", "1", "--db", db])
    assert built.exit_code == 0, built.output
    return db


def test_named_items_name_the_anonymous_ring_they_iterate(catalog12: str) -> None:
    # 2 frames, 3 free slots, frames told apart: C(3,2,2,2), area 10, the 2-fold iteration of
    # C(3,2,1,1), the anonymous ring of area 5.
    result = runner.invoke(
        app, ["ring", "-c", "2", "-g", "3", "--individual-items", "--db", catalog12, "-f", "json"]
    )
    assert result.exit_code == 0, result.output
    report = json.loads(result.stdout)
    base = ParameterSet(3, 2, 1, 1)
    assert report["params"] == "C(3,2,2,2)"
    expected = lookup_class_id(base, catalog12)
    assert expected is not None
    assert report["iterates"] == [{"id": expected, "n": 2}]
    table = runner.invoke(
        app, ["ring", "-c", "2", "-g", "3", "--individual-items", "--db", catalog12]
    )
    assert table.exit_code == 0
    assert f"{expected} (2-fold)" in table.stdout


def test_an_anonymous_ring_of_prime_size_iterates_nothing(catalog12: str) -> None:
    # C(3,2,1,1) has area 5, a prime: an n-fold iteration has area n times its base's.
    result = runner.invoke(app, ["ring", "-c", "2", "-g", "3", "--db", catalog12, "-f", "json"])
    assert result.exit_code == 0, result.output
    assert json.loads(result.stdout)["iterates"] == []


def test_without_a_catalog_the_ring_still_answers(tmp_path: Path) -> None:
    missing = tmp_path / "none.sqlite3"
    result = runner.invoke(
        app,
        ["ring", "-c", "2", "-g", "3", "--individual-items", "--db", str(missing), "-f", "json"],
    )
    assert result.exit_code == 0, result.output
    assert json.loads(result.stdout)["iterates"] == []
    assert not missing.exists()
