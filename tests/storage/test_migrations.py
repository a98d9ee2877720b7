"""Tests of the Alembic revisions in migrations/ (shipped as zoo.migrations) and revision checks.

* from an empty database to head, on SQLite and PostgreSQL, and the models match the revisions;
* from the committed catalog file of revision 0001 (tests/data/catalog-r0001.sqlite3, made by
  tests/data/make_catalog_r0001.py) to head, with every row surviving;
* older and newer catalogs opened by this code: the errors name the fix;
* downgrade and upgrade round trips, no-op upgrades, refusal of foreign databases;
* the conventions of docs/migrations.md: named constraints from the first revision, batch mode
  on SQLite.
"""

from __future__ import annotations

import shutil
import sqlite3
import threading
from argparse import Namespace
from pathlib import Path

import pytest
from alembic import command
from alembic.autogenerate import compare_metadata
from alembic.config import Config
from alembic.runtime.migration import MigrationContext
from sqlalchemy import Engine, MetaData, inspect, select, text

from zoo import __version__
from zoo.core.params import ParameterSet
from zoo.errors import CatalogError
from zoo.storage.database import (
    SchemaChange,
    alembic_config,
    current_revision,
    downgrade,
    head_revision,
    known_revisions,
    migrations_directory,
    open_engine,
    require_current,
    resolve_location,
    sortable_key,
    upgrade,
)
from zoo.storage.models import Base

OLD_CATALOG = Path(__file__).parents[1] / "data" / "catalog-r0001.sqlite3"
CORE_TABLES = ("areas", "catalog_info", "classes", "frames", "parameter_sets", "readings")


#: Columns added by later revisions to tables the committed catalog already holds; they are
#: checked on their own below.
ADDED_COLUMNS = frozenset(
    {
        "automorphisms_key",  # 0002
        "iterates",  # 0004
        "behaviour_key",
        "behaviour_evidence",
        "behaviour_id",
        "behaviour_count",
        "behaviour_done",
    }
)


def table_rows(engine: Engine, tables: tuple[str, ...]) -> dict[str, list[tuple[object, ...]]]:
    """Every row of the given tables, in primary key order, as plain tuples of text."""
    reflected = MetaData()
    reflected.reflect(engine, only=list(tables))
    result: dict[str, list[tuple[object, ...]]] = {}
    with engine.connect() as conn:
        for name in tables:
            table = reflected.tables[name]
            columns = sorted(c.name for c in table.columns if c.name not in ADDED_COLUMNS)
            order = [table.c[c.name] for c in table.primary_key.columns]
            rows = conn.execute(select(*(table.c[c] for c in columns)).order_by(*order))
            result[name] = [tuple(str(v) for v in row) for row in rows]
    return result


@pytest.fixture
def old_catalog(tmp_path: Path) -> str:
    """A copy of the committed revision-0001 catalog file (the original is never written)."""
    copy = tmp_path / "old catalog.sqlite3"
    shutil.copyfile(OLD_CATALOG, copy)
    return resolve_location(str(copy))


# --- the chain of revisions -----------------------------------------------------------------


def test_revisions_form_one_linear_chain() -> None:
    assert known_revisions() == ("0001", "0002", "0003", "0004")
    assert head_revision() == "0004"


def test_the_migrations_are_shipped_inside_the_package() -> None:
    import zoo.migrations

    directory = migrations_directory()
    assert Path(zoo.migrations.__file__).parent == directory
    assert (directory / "env.py").is_file() and (directory / "script.py.mako").is_file()
    assert (directory / "versions" / "0001_core_tables.py").is_file()


# --- from empty to head ---------------------------------------------------------------------


def test_upgrade_from_empty_creates_the_schema_of_the_models(db_url: str) -> None:
    assert upgrade(db_url) == SchemaChange(None, "0004")
    engine = open_engine(db_url)
    require_current(engine)
    with engine.connect() as conn:
        context = MigrationContext.configure(conn, opts={"compare_type": True})
        assert compare_metadata(context, Base.metadata) == []
        info = dict(conn.execute(text("SELECT key, value FROM catalog_info")).all())
    assert set(inspect(engine).get_table_names()) == {*CORE_TABLES, "seeds", "alembic_version"}
    assert info["schema_revision"] == "0004"
    assert info["zoo_version"] == info["created_by"] == __version__
    engine.dispose()


def test_alembic_check_through_env_py_finds_nothing_to_generate(migrated_db_url: str) -> None:
    engine = open_engine(migrated_db_url)
    with engine.connect() as conn:
        command.check(alembic_config(migrated_db_url, conn))  # raises if models != revisions
    engine.dispose()


def test_upgrade_of_a_current_catalog_is_a_no_op(migrated_db_url: str) -> None:
    engine = open_engine(migrated_db_url)
    with engine.begin() as conn:
        conn.execute(text("INSERT INTO catalog_info (key, value) VALUES ('note', 'kept')"))
    before = table_rows(engine, ("catalog_info",))
    change = upgrade(migrated_db_url)
    assert change == SchemaChange("0004", "0004") and not change.changed
    assert table_rows(engine, ("catalog_info",)) == before
    engine.dispose()


def test_two_zoos_upgrading_at_once_do_not_collide(db_url: str) -> None:
    """Migrations hold the write lock (SQLite BEGIN IMMEDIATE, PostgreSQL advisory lock)."""
    results: list[SchemaChange | BaseException] = []

    def run() -> None:
        try:
            results.append(upgrade(db_url))
        except BaseException as exc:  # reported by the assertion below
            results.append(exc)

    threads = [threading.Thread(target=run) for _ in range(2)]
    for thread in threads:
        thread.start()
    for thread in threads:
        thread.join(timeout=60)
    assert len(results) == 2
    assert set(results) == {SchemaChange(None, "0004"), SchemaChange("0004", "0004")}


def test_every_constraint_is_named_by_the_convention(migrated_db_url: str) -> None:
    """Every constraint named from the first revision on (docs/migrations.md)."""
    engine = open_engine(migrated_db_url)
    inspector = inspect(engine)
    for table in (*CORE_TABLES, "seeds"):
        for fk in inspector.get_foreign_keys(table):
            referred = fk["referred_table"]
            assert fk["name"] == f"fk_{table}_{fk['constrained_columns'][0]}_{referred}"
        for unique in inspector.get_unique_constraints(table):
            assert unique["name"] == f"uq_{table}_{'_'.join(unique['column_names'])}"
        for index in inspector.get_indexes(table):
            if index.get("duplicates_constraint"):  # PostgreSQL: the index of a unique key
                continue
            assert index["name"] == f"ix_{table}_{'_'.join(index['column_names'])}"
    checks = {c["name"] for c in inspector.get_check_constraints("parameter_sets")}
    assert "ck_parameter_sets_positive" in checks
    engine.dispose()


def test_env_py_renders_sqlite_changes_in_batch_mode(tmp_path: Path) -> None:
    """Autogenerate through env.py writes batch_alter_table blocks (docs/migrations.md, SQLite)."""
    url = resolve_location(str(tmp_path / "c.sqlite3"))
    upgrade(url)
    engine = open_engine(url)
    with engine.begin() as conn:  # a schema that drifted from the models by one column
        conn.execute(text("DROP VIEW class_summary"))  # it reads that column (revision 0003)
        conn.execute(text("DROP INDEX ix_classes_automorphisms_key"))
        conn.execute(text("ALTER TABLE classes DROP COLUMN automorphisms_key"))
    versions = tmp_path / "versions"
    versions.mkdir()
    with engine.connect() as conn:
        config = alembic_config(url, conn)
        config.set_main_option("path_separator", "newline")
        config.set_main_option(
            "version_locations", f"{migrations_directory() / 'versions'}\n{versions}"
        )
        command.revision(
            config, message="probe", autogenerate=True, rev_id="9999", version_path=str(versions)
        )
    engine.dispose()
    script = next(versions.glob("9999_*.py")).read_text()
    assert "with op.batch_alter_table('classes', schema=None) as batch_op:" in script
    assert "batch_op.add_column(sa.Column('automorphisms_key'" in script
    assert "down_revision: str | None = '0004'" in script


# --- from the committed older catalog -------------------------------------------------------


def test_committed_file_is_at_revision_0001_with_data() -> None:
    with sqlite3.connect(f"file:{OLD_CATALOG}?mode=ro", uri=True) as plain:
        assert plain.execute("SELECT version_num FROM alembic_version").fetchall() == [("0001",)]
        assert plain.execute("SELECT count(*) FROM classes").fetchone()[0] > 5
        # Untouched since it was made: a zoo engine would have switched it to WAL.
        assert plain.execute("PRAGMA journal_mode").fetchone() == ("delete",)
    plain.close()


def test_older_catalog_opened_by_newer_code_names_the_migrate_command(old_catalog: str) -> None:
    engine = open_engine(old_catalog)
    assert current_revision(engine) == "0001"
    path = engine.url.database
    with pytest.raises(CatalogError) as caught:
        require_current(engine)
    message = str(caught.value)
    assert message == (
        f"catalog {path} has schema revision 0001, older than 0004 which this zoo needs; "
        f"upgrade it (no data is lost) with: zoo migrate --db '{path}'"
    )
    assert "\n" not in message
    engine.dispose()


def test_upgrade_of_the_committed_catalog_keeps_every_row(old_catalog: str) -> None:
    engine = open_engine(old_catalog)
    before = table_rows(engine, CORE_TABLES)
    assert upgrade(old_catalog) == SchemaChange("0001", "0004")
    require_current(engine)
    after = table_rows(engine, CORE_TABLES)
    changed_info = {"schema_revision", "zoo_version"}
    assert [r for r in after["catalog_info"] if r[0] not in changed_info] == [
        r for r in before["catalog_info"] if r[0] not in changed_info
    ]
    assert ("schema_revision", "0004") in after["catalog_info"]
    for name in CORE_TABLES[1:]:
        if name != "catalog_info":
            assert after[name] == before[name], name
    assert before["areas"] and before["classes"] and before["parameter_sets"]
    with engine.connect() as conn:
        for table in ("classes", "frames"):
            rows = conn.execute(text(f"SELECT automorphisms, automorphisms_key FROM {table}"))
            for automorphisms, key in rows:
                assert key == sortable_key(int(automorphisms))
        # Revision 0004: iteration counts from the labels (the n-fold iterations found by
        # building C(α, β, nγ, nδ), zoo.core.iterations), behaviour left to the next build.
        from zoo.core.iterations import class_iteration_bases

        rows = conn.execute(
            text(
                "SELECT label_alpha, label_beta, label_gamma, label_delta, iterates, "
                "behaviour_id, behaviour_count FROM classes"
            )
        ).all()
        assert any(row[4] for row in rows)
        for *label, iterates, behaviour_id, behaviour_count in rows:
            assert iterates == len(class_iteration_bases(ParameterSet(*label)))
            assert behaviour_id is None and behaviour_count is None
        assert not conn.execute(text("SELECT count(*) FROM areas WHERE behaviour_done")).scalar()
        # The new indexes serve the query paths.
        plan = conn.exec_driver_sql(
            "EXPLAIN QUERY PLAN SELECT id FROM classes WHERE area = 4 AND loop = 2"
        ).all()
    assert any("USING INDEX ix_classes_" in str(row) for row in plan)
    assert [c["name"] for c in inspect(engine).get_columns("seeds")][0] == "name"
    engine.dispose()


def test_committed_catalog_holds_real_values(old_catalog: str) -> None:
    """The file's rows are the mathematics, not filler (checked after the upgrade)."""
    upgrade(old_catalog)
    engine = open_engine(old_catalog)
    with engine.connect() as conn:
        states = dict(conn.execute(text("SELECT label, states FROM classes")).all())
        lattices = conn.execute(
            text(
                "SELECT area, count(DISTINCT lattice_g * 1000 + lattice_r) FROM readings "
                "GROUP BY area ORDER BY area"
            )
        ).all()
        members = conn.execute(
            text(
                "SELECT a.area, a.parameter_sets, count(*) FROM areas a "
                "JOIN parameter_sets p ON p.area = a.area GROUP BY a.area, a.parameter_sets"
            )
        ).all()
    # docs/theory/check-values.md table [VERIFIED]: RG states of C(1,1,1,1), C(2,2,1,1), C(2,3,1,1).
    assert (states["C(1,1,1,1)"], states["C(2,2,1,1)"], states["C(2,3,1,1)"]) == ("2", "6", "10")
    # docs/theory/lattice-key.md [VERIFIED A <= 24]: sigma(A) - tau(A) distinct folding lattices of
    # area A.
    assert [tuple(row) for row in lattices] == [(2, 1), (3, 2), (4, 4), (5, 4)]
    assert all(recorded == stored for _area, recorded, stored in members)
    engine.dispose()


def test_a_failing_upgrade_leaves_the_catalog_as_it_was(old_catalog: str) -> None:
    """All revisions run in one transaction, DDL included (explicit BEGIN on SQLite)."""
    engine = open_engine(old_catalog)
    with engine.begin() as conn:  # data that 0002's sortable-key step cannot read
        conn.execute(text("UPDATE classes SET automorphisms = 'many' WHERE id = 'CY5-5'"))
    before = table_rows(engine, CORE_TABLES)
    with pytest.raises(CatalogError, match="failed, nothing was changed: ValueError"):
        upgrade(old_catalog)
    assert current_revision(engine) == "0001"
    assert "seeds" not in inspect(engine).get_table_names()
    assert "automorphisms_key" not in {c["name"] for c in inspect(engine).get_columns("frames")}
    assert table_rows(engine, CORE_TABLES) == before
    engine.dispose()


@pytest.mark.postgres
def test_old_data_upgrades_on_postgresql_too(old_catalog: str, postgres_url: str) -> None:
    """The same revision-0001 rows, copied into a PostgreSQL schema at 0001, survive 0002."""
    upgrade(postgres_url, "0001")
    source, target = open_engine(old_catalog), open_engine(postgres_url)
    old, new = MetaData(), MetaData()
    old.reflect(source)
    new.reflect(target)
    with source.connect() as read, target.begin() as write:
        write.execute(text("DELETE FROM catalog_info"))
        for name in ("catalog_info", "frames", "classes", "readings", "parameter_sets", "areas"):
            rows = [dict(r._mapping) for r in read.execute(select(old.tables[name]))]
            write.execute(new.tables[name].insert(), rows)
    before = table_rows(target, CORE_TABLES)
    assert upgrade(postgres_url) == SchemaChange("0001", "0004")
    after = table_rows(target, CORE_TABLES)
    for name in ("areas", "frames", "classes", "readings", "parameter_sets"):
        assert after[name] == before[name], name
    with target.connect() as conn:
        keys = conn.execute(text("SELECT automorphisms, automorphisms_key FROM classes")).all()
    assert keys and all(key == sortable_key(int(value)) for value, key in keys)
    source.dispose()
    target.dispose()


# --- newer, foreign and round trips ---------------------------------------------------------


def test_catalog_from_a_newer_zoo_is_refused_clearly(migrated_db_url: str) -> None:
    engine = open_engine(migrated_db_url)
    with engine.begin() as conn:
        conn.execute(text("UPDATE alembic_version SET version_num = '0042'"))
    expected = (
        f"has schema revision 0042, which zoo {__version__} does not know (its newest is 0004); "
        "it was written by a newer zoo: upgrade zoo (pip install -U zoo) to use it"
    )
    with pytest.raises(CatalogError, match=expected.replace("(", r"\(").replace(")", r"\)")):
        require_current(engine)
    with pytest.raises(CatalogError, match="written by a newer zoo"):
        upgrade(migrated_db_url)
    with pytest.raises(CatalogError, match="written by a newer zoo"):
        downgrade(migrated_db_url, "0001")
    assert current_revision(engine) == "0042"
    assert "seeds" in inspect(engine).get_table_names()
    engine.dispose()


def test_empty_database_names_the_command_that_creates_the_schema(tmp_path: Path) -> None:
    url = resolve_location(str(tmp_path / "fresh.sqlite3"))
    engine = open_engine(url)
    with pytest.raises(CatalogError, match=r"holds no zoo catalog schema .* zoo migrate --db /"):
        require_current(engine)
    engine.dispose()


def test_a_database_that_is_not_a_catalog_is_left_alone(db_url: str) -> None:
    engine = open_engine(db_url)
    with engine.begin() as conn:
        conn.execute(text("CREATE TABLE carts (slot INTEGER PRIMARY KEY, load TEXT)"))
        conn.execute(text("INSERT INTO carts VALUES (1, 'pallet')"))
    with pytest.raises(CatalogError, match=r"already holds tables \(carts\) .* not a zoo catalog"):
        upgrade(db_url)
    assert set(inspect(engine).get_table_names()) == {"carts"}
    engine.dispose()


def test_unknown_target_revision_is_refused(migrated_db_url: str) -> None:
    with pytest.raises(CatalogError, match="schema revision 'nope' is unknown"):
        downgrade(migrated_db_url, "nope")


@pytest.mark.postgres
def test_downgrade_and_upgrade_round_trip(old_catalog: str, postgres_url: str) -> None:
    for url in (old_catalog, postgres_url):
        upgrade(url)
        engine = open_engine(url)
        with engine.begin() as conn:
            conn.execute(
                text(
                    "INSERT INTO seeds (name, description, alpha, beta, gamma, delta, class_id) "
                    "VALUES ('loop-demo', 'demo: two carts on a loop of four slots', 2, 2, 1, 1, "
                    "NULL)"
                )
            )
        core = table_rows(engine, CORE_TABLES[:1] + CORE_TABLES[2:])
        assert downgrade(url, "0001") == SchemaChange("0004", "0001")
        assert "seeds" not in inspect(engine).get_table_names()
        columns = {c["name"] for c in inspect(engine).get_columns("classes")}
        assert "automorphisms_key" not in columns
        assert upgrade(url) == SchemaChange("0001", "0004")
        assert table_rows(engine, CORE_TABLES[:1] + CORE_TABLES[2:]) == core
        assert downgrade(url, "base") == SchemaChange("0004", None)
        assert set(inspect(engine).get_table_names()) <= {"alembic_version"}
        assert upgrade(url) == SchemaChange(None, "0004")
        require_current(engine)
        engine.dispose()


def test_developers_alembic_ini_drives_the_same_environment(tmp_path: Path) -> None:
    """docs/migrations.md: ``alembic -c migrations/alembic.ini -x db=PATH upgrade head``."""
    path = tmp_path / "dev.sqlite3"
    config = Config(
        str(migrations_directory() / "alembic.ini"), cmd_opts=Namespace(x=[f"db={path}"])
    )
    command.upgrade(config, "head")
    engine = open_engine(resolve_location(str(path)))
    assert current_revision(engine) == "0004"
    with engine.connect() as conn:
        info = dict(conn.execute(text("SELECT key, value FROM catalog_info")).all())
    assert info["schema_revision"] == "0004"
    engine.dispose()
