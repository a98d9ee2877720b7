"""CSV columns, JSON Lines big-integer strings and the data dictionary (zoo.publish.dictionary).

References:
* the cycloid formulas the columns must satisfy, read from the reading's own parameters:
  processes = gcd(β, δ) and regular = β | δ (docs/theory/processes.md, after Valk 2019),
  tokens = α + β and cycle time A / min(α, β) (docs/theory/state-counts.md);
* Frictionless Data Package v1 and Table Schema v1 (https://specs.frictionlessdata.io/): the
  descriptor needs ``resources``; each resource a ``name`` (lower case, ``-._/``) and a
  ``path``; a tabular resource a ``schema`` whose ``fields`` have a ``name`` and a Table Schema
  ``type``; the ``frictionless`` library checks it too where it is installed;
* JavaScript's JSON.parse (ECMA-262: numbers are IEEE doubles) through ``node``, where installed,
  as the common JSON tool that rounds integers beyond 2^53.
"""

from __future__ import annotations

import csv
import hashlib
import io
import json
import math
import re
import shutil
import subprocess
from fractions import Fraction
from pathlib import Path
from typing import Any

import pytest
from typer.testing import CliRunner

from zoo.catalog.service import Catalog
from zoo.cli import app
from zoo.core.params import parse_params
from zoo.publish.dictionary import (
    BIG_INTEGER_FIELDS,
    CSV_COLUMNS,
    fraction_cell,
    table_schema,
)
from zoo.publish.release import iter_catalog_entries, iter_dump_lines, iter_jsonl_lines

TABLE_SCHEMA_TYPES = {
    "string", "number", "integer", "boolean", "object", "array", "date", "time", "datetime",
    "year", "yearmonth", "duration", "geopoint", "geojson", "any",
}  # fmt: skip
NAME = re.compile(r"^[-a-z0-9._/]+$")


@pytest.fixture(scope="module")
def csv_rows(small_catalog: str) -> list[dict[str, str]]:
    with Catalog.open(small_catalog) as catalog:
        text = "".join(iter_dump_lines(iter_catalog_entries(catalog), "csv"))
    return list(csv.DictReader(io.StringIO(text, newline="")))


def test_reading_columns_agree_with_the_formulas(csv_rows: list[dict[str, str]]) -> None:
    assert len(csv_rows) > 60
    for row in csv_rows:
        members = [parse_params(m) for m in row["reading_members"].split(" ")]
        assert str(members[0]) == row["reading_label"]
        for p in members:  # every member of a reading has the reading's α and β
            assert (p.alpha, p.beta) == (int(row["alpha"]), int(row["beta"]))
            assert p.alpha * p.delta + p.beta * p.gamma == int(row["area"])
        p = members[0]
        assert int(row["processes"]) == math.gcd(p.beta, p.delta)
        assert row["regular"] == ("true" if p.delta % p.beta == 0 else "false")
        assert int(row["tokens"]) == p.alpha + p.beta
        assert Fraction(row["cycle_time"]) == Fraction(int(row["area"]), min(p.alpha, p.beta))
        assert Fraction(row["slowness"]) == Fraction(p.alpha - p.beta, p.alpha + p.beta)


def test_cells_are_plain_values(csv_rows: list[dict[str, str]]) -> None:
    """No JSON in a cell; a whole fraction is written as an integer (2, not 2/1)."""
    for row in csv_rows:
        for name, cell in row.items():
            assert not cell.startswith(("[", "{")), (name, cell)
            assert not re.fullmatch(r"-?\d+/1", cell), (name, cell)
    assert any(row["cycle_time"].isdigit() for row in csv_rows)
    assert any("/" in row["slowness"] for row in csv_rows)
    assert fraction_cell("8/1") == "8" and fraction_cell("-9/11") == "-9/11"


def test_every_reading_value_has_a_column(small_catalog: str) -> None:
    """Each value of a JSON record's readings lands in a column of its own."""
    columns = {c.name for c in CSV_COLUMNS}
    flattened = {"label": "reading_label", "members": "reading_members"}
    with Catalog.open(small_catalog) as catalog:
        reading = catalog.get("CY12-3").as_dict()["readings"][0]  # type: ignore[index]
    for key, value in reading.items():
        if isinstance(value, dict):
            assert all(f"{key.split('_')[0]}_{part}" in columns for part in value)
        elif key == "lattice_key":
            assert {"lattice_g", "lattice_r"} <= columns
        else:
            assert flattened.get(key, key) in columns


def _check_package(package: dict[str, Any], folder: Path) -> None:
    """Required keys of Data Package and Table Schema v1, and the files it describes."""
    assert isinstance(package["resources"], list) and package["resources"]
    for resource in package["resources"]:
        assert NAME.match(resource["name"]) and isinstance(resource["path"], str)
        data = (folder / resource["path"]).read_bytes()
        assert resource["bytes"] == len(data)
        assert resource["hash"] == "sha256:" + hashlib.sha256(data).hexdigest()
        if resource["format"] != "csv":
            continue
        assert resource["profile"] == "tabular-data-resource"
        fields = resource["schema"]["fields"]
        header = data.decode().splitlines()[0].split(",")
        assert [f["name"] for f in fields] == header
        for field in fields:
            assert field["type"] in TABLE_SCHEMA_TYPES
            assert field["description"] and field["unit"] and field["source"]
    names = [r["name"] for r in package["resources"]]
    assert len(names) == len(set(names))
    try:
        from frictionless import Package  # type: ignore[import-not-found]
    except ImportError:
        return
    report = Package(str(folder / "datapackage.json")).validate()
    assert report.valid, report.flatten(["type", "note"])


def test_release_ships_a_data_package(small_catalog: str, tmp_path: Path) -> None:
    folder = tmp_path / "rel"
    result = CliRunner().invoke(app, ["release", "--output", str(folder), "--db", small_catalog])
    assert result.exit_code == 0, result.output
    package = json.loads((folder / "datapackage.json").read_text(encoding="utf-8"))
    assert {r["path"] for r in package["resources"]} == {"classes.csv", "classes.jsonl"}
    _check_package(package, folder)
    verify = CliRunner().invoke(app, ["release", "--verify", str(folder)])
    assert verify.exit_code == 0, verify.output  # the descriptor is checksummed too
    assert "datapackage.json" in (folder / "SHA256SUMS").read_text()


def test_dump_ships_a_data_package(small_catalog: str, tmp_path: Path) -> None:
    runner = CliRunner()
    for name in ("all.csv", "all.jsonl"):
        result = runner.invoke(app, ["dump", "-o", str(tmp_path / name), "--db", small_catalog])
        assert result.exit_code == 0, result.output
        assert "datapackage.json" in result.stderr
    package = json.loads((tmp_path / "datapackage.json").read_text(encoding="utf-8"))
    assert sorted(r["path"] for r in package["resources"]) == ["all.csv", "all.jsonl"]
    _check_package(package, tmp_path)


def test_foreign_data_package_is_never_overwritten(small_catalog: str, tmp_path: Path) -> None:
    (tmp_path / "datapackage.json").write_text('{"resources": []}')
    out = tmp_path / "all.csv"
    result = CliRunner().invoke(app, ["dump", "-o", str(out), "--db", small_catalog])
    assert result.exit_code == 1 and len(result.stderr.strip().splitlines()) == 1
    assert "was not written by zoo" in result.stderr
    assert not out.exists() and (tmp_path / "datapackage.json").read_text() == '{"resources": []}'


def test_schema_describes_every_column() -> None:
    schema = table_schema()
    assert [f["name"] for f in schema["fields"]] == [c.name for c in CSV_COLUMNS]
    assert len({c.name for c in CSV_COLUMNS}) == len(CSV_COLUMNS)


def test_big_integers_survive_common_json_tools() -> None:
    """A state count beyond 2^53 is rounded by a double-based parser; its string twin is not."""
    big = 2**64 + 1  # not representable as an IEEE double
    record = {"id": "CY1-1", "states": big, "state_arcs": 3, "readings": []}
    line = "".join(iter_jsonl_lines([record]))
    parsed = json.loads(line)
    assert parsed["states"] == big and parsed["states_decimal"] == str(big)
    assert set(BIG_INTEGER_FIELDS) >= {"states", "state_arcs"}
    as_double = json.loads(line, parse_int=float)  # what JSON.parse does
    assert int(as_double["states"]) != big and int(as_double["states_decimal"]) == big
    node = shutil.which("node")
    if node is None:
        return
    script = (
        "const r = JSON.parse(require('fs').readFileSync(0, 'utf8'));"
        "console.log(r.states_decimal, String(r.states))"
    )
    out = subprocess.run([node, "-e", script], input=line, capture_output=True, text=True)
    decimal, number = out.stdout.split()
    assert decimal == str(big) and number != str(big)
