"""The registry of invariants drives every place an invariant is spelled (issue 7, item 3).

Each test walks ``zoo.core.registry.INVARIANTS`` and fails when one invariant is missing from a
place the registry drives: the ORM columns, the schema at the migrations' head, the query
fields, the JSON of ``zoo show PARAMS`` and of catalog entries, the table labels of
``zoo show ID`` and the field table of docs/catalog.md. Values are checked too: the JSON value of
each invariant equals its registry formula, itself checked against published values in
tests/core/test_invariants.py.
"""

from __future__ import annotations

import json
import re
from fractions import Fraction
from pathlib import Path

import pytest
from sqlalchemy import inspect
from typer.testing import CliRunner

from zoo.core import registry
from zoo.core.params import ParameterSet
from zoo.core.registry import INVARIANTS, Level, ValueType

DOCS = Path(__file__).resolve().parents[2] / "docs" / "catalog.md"
runner = CliRunner()


@pytest.fixture(scope="module")
def catalog_file(tmp_path_factory: pytest.TempPathFactory) -> str:
    """A real catalog of areas 1..8, built as a user builds one."""
    from zoo.cli import app

    location = str(tmp_path_factory.mktemp("registry") / "catalog.sqlite3")
    result = runner.invoke(app, ["build", "--max-area", "8", "--db", location, "--jobs", "1"])
    assert result.exit_code == 0, result.output
    return location


def test_names_keys_and_spellings_are_unique() -> None:
    names = [inv.name for inv in INVARIANTS]
    assert len(names) == len(set(names))
    keys = [(inv.level is Level.READING, inv.key) for inv in INVARIANTS]
    assert len(keys) == len(set(keys))
    spellings = [s for inv in INVARIANTS if inv.query for s in (inv.field_name, *inv.aliases)]
    assert len(spellings) == len(set(spellings))


def test_every_invariant_says_what_it_means_and_where_it_comes_from() -> None:
    for inv in INVARIANTS:
        assert inv.label and inv.meaning and inv.source, inv.name
        assert inv.compute is not None or "nauty" in inv.source or "counted" in inv.source
        if inv.query:
            assert inv.example, inv.name


def test_every_invariant_has_its_orm_columns() -> None:
    from zoo.storage.models import Base

    for inv in INVARIANTS:
        table = Base.metadata.tables[inv.table]
        for column in inv.columns:
            assert column in table.c, f"{inv.name}: no column {inv.table}.{column} in the models"


def test_every_invariant_has_its_columns_at_the_migrations_head(tmp_path: Path) -> None:
    from zoo.storage.database import open_engine, upgrade

    url = f"sqlite:///{tmp_path / 'head.sqlite3'}"
    upgrade(url)
    engine = open_engine(url)
    try:
        inspector = inspect(engine)
        stored = {
            t: {c["name"] for c in inspector.get_columns(t)} for t in registry.LEVEL_TABLES.values()
        }
    finally:
        engine.dispose()
    for inv in INVARIANTS:
        for column in inv.columns:
            assert column in stored[inv.table], (
                f"{inv.name}: {inv.table}.{column} is not in the schema at the migrations' head; "
                "add a migration (DEVELOPERS.md, 'Adding an invariant')"
            )


def test_every_queryable_invariant_is_a_query_field_on_its_columns() -> None:
    from zoo.query.fields import FIELDS, field_named

    for inv in INVARIANTS:
        field = field_named(inv.field_name)
        if not inv.query:
            assert field is None, inv.name
            continue
        assert field is not None, f"{inv.name}: no query field {inv.field_name}"
        assert field.columns == tuple(f"{inv.table}.{c}" for c in inv.columns)
        assert field.description == inv.meaning and set(inv.aliases) <= set(field.aliases)
    assert {f.name for f in FIELDS} == {inv.field_name for inv in INVARIANTS if inv.query}


def _expected_json(inv: registry.Invariant, p: ParameterSet) -> object:
    assert inv.compute is not None
    return registry.json_value(inv, inv.compute(p), p.area)


@pytest.mark.parametrize("params", [(4, 2, 2, 3), (2, 2, 1, 3), (2, 2, 2, 2), (1, 6, 1, 3)])
def test_zoo_show_params_reports_every_formula(params: tuple[int, int, int, int]) -> None:
    from zoo.core.report import invariant_report

    p = ParameterSet(*params)
    report = invariant_report(p)
    for inv in INVARIANTS:
        if inv.compute is None:  # nauty orders: compared with networkx in test_invariants.py
            assert inv.level in (Level.CLASS, Level.FRAME) and (
                inv.key in report or "count" in inv.name
            ), inv.name
            continue
        if inv.level is Level.PARAMETER_SET or inv.structural:
            continue  # the parameters themselves, under "params"
        assert registry.value_in(report, inv) == _expected_json(inv, p), inv.name


def test_catalog_entries_carry_every_invariant(catalog_file: str) -> None:
    from zoo.catalog.enumeration import parameter_set_count
    from zoo.catalog.service import Catalog
    from zoo.core.params import parse_params

    with Catalog.open(catalog_file) as catalog:
        entries = list(catalog.iter_entries())
    # Every parameter set of areas 1..8 is a member once (counts: OEIS A055507, checked in
    # tests/catalog/test_enumeration.py).
    assert sum(len(e.members) for e in entries) == sum(parameter_set_count(a) for a in range(1, 9))
    for entry in entries:
        data = json.loads(json.dumps(entry.as_dict()))
        labels = tuple(parse_params(r["label"]) for r in data["readings"])
        assert labels[0] == parse_params(data["label"])
        for inv in INVARIANTS:
            if inv.level in (Level.CLASS, Level.FRAME):
                value = registry.value_in(data, inv)
                if inv.compute is not None:
                    expected = inv.of_class(labels)
                    assert value == registry.json_value(inv, expected, entry.area), inv.name
            elif inv.level is Level.READING:
                for reading, label in zip(data["readings"], labels, strict=True):
                    assert registry.value_in(reading, inv) == _expected_json(inv, label), inv.name


def test_the_entry_table_labels_every_invariant(catalog_file: str) -> None:
    from zoo.cli import app

    result = runner.invoke(app, ["show", "CY8-8", "--db", catalog_file])
    assert result.exit_code == 0, result.output
    lines = result.stdout.splitlines()
    header = next(i for i, line in enumerate(lines) if line.startswith("reading "))
    for inv in INVARIANTS:
        if inv.structural or inv.level is Level.PARAMETER_SET:
            continue
        if inv.level is Level.READING:
            assert inv.label in lines[header], inv.name
        else:
            assert any(line.startswith(inv.label) for line in lines[:header]), inv.name


def test_docs_hold_the_generated_field_table() -> None:
    text = DOCS.read_text(encoding="utf-8")
    match = re.search(r"<!-- invariants:start -->\n(.*?)<!-- invariants:end -->", text, re.S)
    assert match, "docs/catalog.md lost its invariants markers"
    assert match.group(1).strip() == registry.render_invariant_table(), (
        "docs/catalog.md is stale: paste the output of python -m zoo.core.registry"
    )


def test_class_values_follow_the_rule_over_readings() -> None:
    # docs/theory/isomorphism.md: C(2,2,1,3) and C(2,2,2,2) are one class (the exceptional
    # family); their transition groups are Z_8 and Z_2 x Z_4 (docs/theory/lattice-key.md), and
    # C(2,2,2,2) is the 2-fold iteration of C(2,2,1,1) (docs/theory/iterations.md).
    readings = (ParameterSet(2, 2, 1, 3), ParameterSet(2, 2, 2, 2))
    assert registry.invariant("group_d1").of_class(readings) == 2
    assert registry.invariant("cyclic").of_class(readings) is False
    assert registry.invariant("iteration").of_class(readings) == 2
    assert registry.invariant("loop").of_class(readings) == 4  # docs/theory/check-values.md
    assert registry.invariant("slowness").compute is not None
    assert registry.invariant("slowness").compute(readings[0]) == Fraction(0)


def test_value_types_match_the_stored_columns() -> None:
    for inv in INVARIANTS:
        expected = {ValueType.BIG_INTEGER: 2, ValueType.FRACTION: 2}.get(inv.type, 1)
        assert len(inv.columns) == expected, inv.name


def test_one_vocabulary_lists_and_counts() -> None:
    # issue 8: `members` and `readings` are always the lists; their numbers are *_count.
    keys = {inv.key for inv in INVARIANTS} | {inv.name for inv in INVARIANTS}
    assert not keys & {"members", "readings"}
    assert registry.invariant("member_count").aliases == ("members",)
    assert registry.invariant("reading_count").aliases == ("readings",)


def test_cycle_family_entries_agree_with_the_checked_formulas() -> None:
    # The registry spells the forward and backward cycle families as three numbers each; they
    # must be zoo.core.invariants.forward_cycles/backward_cycles, which tests/core/
    # test_invariants.py checks against the explicit nets (docs/theory/processes.md).
    from zoo.catalog.enumeration import iter_parameter_sets
    from zoo.core import invariants

    for area in range(1, 25):
        for p in iter_parameter_sets(area):
            for side, family in (
                ("forward", invariants.forward_cycles(p)),
                ("backward", invariants.backward_cycles(p)),
            ):
                got = tuple(
                    registry.invariant(f"{side}_{part}").of_params(p)
                    for part in ("count", "length", "tokens")
                )
                assert got == (family.count, family.length, family.tokens), p
