"""Tests of zoo.storage: catalog location, engines, typed models, constraints, transactions.

Every test that touches a database runs on a fresh SQLite file and on a fresh schema of the
machine's PostgreSQL server (the ``db_url`` fixtures of conftest.py).
"""

from __future__ import annotations

import sqlite3
import threading
from fractions import Fraction
from math import comb
from pathlib import Path

import pytest
from sqlalchemy import func, insert, select, text
from sqlalchemy.engine import make_url
from sqlalchemy.exc import IntegrityError, OperationalError
from sqlalchemy.orm import Session

from zoo.core import algebra, invariants
from zoo.core.iterations import class_iteration_bases
from zoo.core.params import ParameterSet
from zoo.errors import CatalogError
from zoo.storage.database import (
    SQLITE_BUSY_TIMEOUT_MS,
    catalog_exists,
    display_location,
    migrate_command,
    open_engine,
    require_current,
    resolve_location,
    sortable_key,
    upgrade,
)
from zoo.storage.models import (
    AreaRecord,
    CatalogInfo,
    ClassRecord,
    FrameRecord,
    ParameterSetRecord,
    ReadingRecord,
    SeedRecord,
)

# --- records computed from the parameters (zoo.core.algebra, zoo.core.invariants)
# --------------------


def frame_row(p: ParameterSet, rank: int) -> FrameRecord:
    key = algebra.lattice_key(p)
    return FrameRecord(
        id=f"FR{p.area}-{rank}",
        area=p.area,
        rank=rank,
        label=str(p),
        fingerprint=f"test-frame:{p}",  # storage tests only need distinct fingerprints
        automorphisms=str(p.area),  # the A translations (docs/theory/state-counts.md)
        lattice_g=key.g,
        lattice_r=key.r,
    )


def class_row(p: ParameterSet, rank: int, frame_id: str) -> ClassRecord:
    cycle_time = invariants.cycle_time(p)
    return ClassRecord(
        id=f"CY{p.area}-{rank}",
        area=p.area,
        rank=rank,
        label=str(p),
        label_alpha=p.alpha,
        label_beta=p.beta,
        label_gamma=p.gamma,
        label_delta=p.delta,
        frame_id=frame_id,
        fingerprint=f"test-class:{p}",
        loop=invariants.minimal_cycle_length(p),
        states=str(invariants.reachable_state_count(p)),
        state_arcs=str(invariants.state_arc_count(p)),
        automorphisms=str(algebra.transition_group(p)[0]),
        tokens=p.alpha + p.beta,
        enabled=invariants.enabled_count(p),
        semi_enabled=invariants.semi_enabled_count(p),
        cycle_time_num=cycle_time.numerator,
        cycle_time_den=cycle_time.denominator,
        group_d1=algebra.transition_group(p)[0],
        iteration=algebra.iteration_depth(p),
        iterates=len(class_iteration_bases(p)),
        reading_count=1,
        member_count=1,
    )


def reading_row(p: ParameterSet, class_id: str) -> ReadingRecord:
    key = algebra.lattice_key(p)
    forward, backward = invariants.forward_cycles(p), invariants.backward_cycles(p)
    w = invariants.slowness(p)
    return ReadingRecord(
        class_id=class_id,
        area=p.area,
        alpha=p.alpha,
        beta=p.beta,
        lattice_g=key.g,
        lattice_r=key.r,
        processes=invariants.process_count(p),
        regular=invariants.is_regular(p),
        slowness_num=w.numerator,
        slowness_den=w.denominator,
        forward_count=forward.count,
        forward_length=forward.length,
        forward_tokens=forward.tokens,
        backward_count=backward.count,
        backward_length=backward.length,
        backward_tokens=backward.tokens,
        nf_beta_delta=str(algebra.normal_form_beta_delta(p)),
        nf_alpha_gamma=str(algebra.normal_form_alpha_gamma(p)),
    )


def store(session: Session, p: ParameterSet, rank: int = 1) -> ClassRecord:
    """Add frame, class, reading and parameter set rows of C(p) to the session and flush."""
    frame = frame_row(p, rank)
    entry = class_row(p, rank, frame.id)
    reading = reading_row(p, entry.id)
    session.add_all([frame, entry, reading])
    session.flush()
    session.add(
        ParameterSetRecord(
            alpha=p.alpha,
            beta=p.beta,
            gamma=p.gamma,
            delta=p.delta,
            area=p.area,
            reading_id=reading.id,
            class_id=entry.id,
        )
    )
    session.flush()
    return entry


# --- location --------------------------------------------------------------------------------


def test_location_from_option_is_an_absolute_sqlite_url_with_parents_created(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.chdir(tmp_path)
    url = resolve_location("nested/dir/my.sqlite3")
    assert url == f"sqlite:///{tmp_path}/nested/dir/my.sqlite3"
    assert (tmp_path / "nested" / "dir").is_dir()
    assert not (tmp_path / "nested" / "dir" / "my.sqlite3").exists()


def test_location_option_beats_environment_which_beats_default(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.setenv("XDG_DATA_HOME", str(tmp_path / "xdg"))
    assert resolve_location(None) == f"sqlite:///{tmp_path}/xdg/zoo/catalog.sqlite3"
    monkeypatch.setenv("ZOO_CATALOG", str(tmp_path / "env.sqlite3"))
    assert resolve_location(None) == f"sqlite:///{tmp_path}/env.sqlite3"
    assert resolve_location("") == f"sqlite:///{tmp_path}/env.sqlite3"
    assert resolve_location(str(tmp_path / "opt.sqlite3")) == f"sqlite:///{tmp_path}/opt.sqlite3"


def test_location_expands_home(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setenv("HOME", str(tmp_path))
    assert resolve_location("~/cats/c.sqlite3") == f"sqlite:///{tmp_path}/cats/c.sqlite3"


def test_location_urls_pass_through_and_postgresql_gets_the_shipped_driver() -> None:
    assert resolve_location("postgresql://me@db.example:5433/zoo") == (
        "postgresql+psycopg://me@db.example:5433/zoo"
    )
    assert resolve_location("postgresql+psycopg://me@h/zoo") == "postgresql+psycopg://me@h/zoo"
    assert resolve_location("sqlite://") == "sqlite://"


@pytest.mark.parametrize(
    ("value", "fragment"),
    [
        ("mysql://me@h/zoo", "uses mysql; zoo stores catalogs in SQLite"),
        ("not a url://x", "cannot read database URL"),
    ],
)
def test_location_refuses_other_backends_and_bad_urls(value: str, fragment: str) -> None:
    with pytest.raises(CatalogError, match=fragment):
        resolve_location(value)


def test_location_that_is_a_directory_is_refused(tmp_path: Path) -> None:
    with pytest.raises(CatalogError, match="is a directory; give a file path"):
        resolve_location(str(tmp_path))


def test_migrate_command_names_the_file_or_the_url_without_password(tmp_path: Path) -> None:
    path = tmp_path / "with space.sqlite3"
    assert migrate_command(resolve_location(str(path))) == f"zoo migrate --db '{path}'"
    url = "postgresql+psycopg://me:secret@h:5432/zoo"
    assert display_location(url) == "postgresql+psycopg://me:***@h:5432/zoo"
    assert "secret" not in migrate_command(url)


# --- sortable keys -----------------------------------------------------------------------------


def test_sortable_key_layout() -> None:
    # architecture.md: four digits of length, then the digits.
    assert sortable_key(0) == "00010"
    assert sortable_key(40) == "000240"
    assert sortable_key(10**58) == "0059" + "1" + "0" * 58


def test_sortable_key_text_order_is_numeric_order() -> None:
    values = [0, 1, 9, 10, 99, 100, 1820, 10**18, 2**63, 2**64 + 1, comb(200, 100), 10**60]
    shuffled = sorted(values, key=str)  # plain text order is wrong: "10" < "9"
    assert shuffled != values
    assert sorted(shuffled, key=sortable_key) == values


@pytest.mark.parametrize("bad", [-1, True, 2.0])
def test_sortable_key_refuses_negative_and_non_integers(bad: object) -> None:
    with pytest.raises((ValueError, TypeError)):
        sortable_key(bad)  # type: ignore[arg-type]


# --- engines ---------------------------------------------------------------------------------


def test_sqlite_engine_switches_on_foreign_keys_wal_and_busy_timeout(tmp_path: Path) -> None:
    engine = open_engine(resolve_location(str(tmp_path / "c.sqlite3")))
    with engine.connect() as conn:
        assert conn.exec_driver_sql("PRAGMA foreign_keys").scalar() == 1
        assert conn.exec_driver_sql("PRAGMA journal_mode").scalar() == "wal"
        assert conn.exec_driver_sql("PRAGMA busy_timeout").scalar() == SQLITE_BUSY_TIMEOUT_MS
    engine.dispose()


def test_a_read_only_catalog_can_be_opened_and_read(tmp_path: Path) -> None:
    path = tmp_path / "shared.sqlite3"
    upgrade(resolve_location(str(path)))
    url = f"sqlite:///file:{path}?mode=ro&uri=true"
    url = resolve_location(url)
    assert make_url(url).database == f"file:{path}"
    assert catalog_exists(url)
    engine = open_engine(url)
    require_current(engine)
    with engine.connect() as conn:
        assert conn.execute(select(func.count()).select_from(ClassRecord)).scalar() == 0
    with pytest.raises(OperationalError, match="readonly"), engine.begin() as conn:
        conn.execute(text("INSERT INTO catalog_info (key, value) VALUES ('x', 'y')"))
    engine.dispose()
    assert not (tmp_path / "file:").exists()


def test_open_engine_on_a_file_that_is_not_a_database(tmp_path: Path) -> None:
    path = tmp_path / "notes.sqlite3"
    path.write_text("These are notes about carts on the factory loop, not a database.\n" * 50)
    with pytest.raises(CatalogError, match="cannot open catalog database .*notes.sqlite3"):
        open_engine(resolve_location(str(path)))
    assert path.read_text().startswith("These are notes")


def test_open_engine_on_an_unreachable_server() -> None:
    with pytest.raises(CatalogError, match="cannot open catalog database"):
        open_engine("postgresql+psycopg://postgres@127.0.0.1:1/zoo?connect_timeout=2")


def test_catalog_exists_never_creates_anything(tmp_path: Path) -> None:
    path = tmp_path / "absent.sqlite3"
    url = resolve_location(str(path))
    assert not catalog_exists(url)
    assert not path.exists()
    open_engine(url).dispose()  # an empty database file is not a catalog either
    assert not catalog_exists(url)
    upgrade(url)
    assert catalog_exists(url)


def test_catalog_exists_refuses_to_guess_about_unreadable_databases(tmp_path: Path) -> None:
    path = tmp_path / "notes.sqlite3"
    path.write_text("Slot plan of the ring buffer, not a database.\n" * 50)
    with pytest.raises(CatalogError, match="cannot open catalog database"):
        catalog_exists(resolve_location(str(path)))
    with pytest.raises(CatalogError, match="cannot open catalog database"):
        catalog_exists("postgresql+psycopg://postgres@127.0.0.1:1/zoo?connect_timeout=2")


def test_catalog_exists_on_both_backends(db_url: str) -> None:
    assert not catalog_exists(db_url)
    upgrade(db_url)
    assert catalog_exists(db_url)


# --- models on both backends -----------------------------------------------------------------


def test_records_round_trip_with_values_of_c4223(migrated_db_url: str) -> None:
    engine = open_engine(migrated_db_url)
    require_current(engine)
    p = ParameterSet(4, 2, 2, 3)
    with Session(engine) as session, session.begin():
        store(session, p)
    with Session(engine) as session:
        entry = session.scalars(select(ClassRecord)).one()
        reading = session.scalars(select(ReadingRecord)).one()
        member = session.scalars(select(ParameterSetRecord)).one()
        frame = session.get(FrameRecord, "FR16-1")
    # docs/theory/check-values.md table, row C(4,2,2,3) [VERIFIED]: A 16, cyc 5, RG 40 states / 64
    # edges,
    # en/semi 2/2, fwd 1x16 (2), bwd 2x8 (2), NF_bd C(10,1,6,1), NF_ag C(2,5,2,3), w 1/3.
    assert (entry.id, entry.area, entry.loop) == ("CY16-1", 16, 5)
    assert (entry.states, entry.state_arcs) == ("40", "64")
    assert (entry.enabled, entry.semi_enabled, entry.tokens) == (2, 2, 6)
    assert Fraction(entry.cycle_time_num, entry.cycle_time_den) == Fraction(16, 2)
    assert (reading.forward_count, reading.forward_length, reading.forward_tokens) == (1, 16, 2)
    assert (reading.backward_count, reading.backward_length, reading.backward_tokens) == (2, 8, 2)
    assert (reading.nf_beta_delta, reading.nf_alpha_gamma) == ("C(10,1,6,1)", "C(2,5,2,3)")
    assert Fraction(reading.slowness_num, reading.slowness_den) == Fraction(1, 3)
    assert reading.regular is False
    assert (member.reading_id, member.class_id, member.area) == (reading.id, "CY16-1", 16)
    assert frame is not None and (frame.lattice_g, frame.lattice_r) == (1, 6)  # algebra doctest
    # Insert defaults fill the sortable keys and the cyclic flag (SNF (1,16): cyclic).
    assert (entry.states_key, entry.state_arcs_key) == ("000240", "000264")
    assert entry.automorphisms_key == sortable_key(int(entry.automorphisms))
    assert frame.automorphisms_key == "000216"
    assert entry.cyclic is True
    engine.dispose()


def test_core_executemany_inserts_get_the_defaults_too(migrated_db_url: str) -> None:
    engine = open_engine(migrated_db_url)
    ps = [ParameterSet(2, 2, 2, 2), ParameterSet(2, 2, 1, 3)]  # SNF (2,4) and (1,8), §11 table
    frames = [frame_row(p, rank) for rank, p in enumerate(ps, 1)]
    classes = [class_row(p, rank, f"FR8-{rank}") for rank, p in enumerate(ps, 1)]

    def as_dict(record: object, skip: set[str]) -> dict[str, object]:
        table = record.__table__  # type: ignore[attr-defined]
        return {c.name: getattr(record, c.name) for c in table.columns if c.name not in skip}

    keys = {"states_key", "state_arcs_key", "automorphisms_key", "cyclic"}
    with engine.begin() as conn:
        conn.execute(insert(FrameRecord), [as_dict(f, keys) for f in frames])
        conn.execute(insert(ClassRecord), [as_dict(c, keys) for c in classes])
    with engine.connect() as conn:
        rows = conn.execute(
            select(ClassRecord.id, ClassRecord.cyclic, ClassRecord.states_key).order_by(
                ClassRecord.id
            )
        ).all()
    # C(2,2,2,2) has d1 = 2 (not cyclic), C(2,2,1,3) d1 = 1; both have 12 states (§11 table).
    assert [tuple(r) for r in rows] == [("CY8-1", False, "000212"), ("CY8-2", True, "000212")]
    engine.dispose()


def test_exact_big_integers_survive_and_sort_numerically(migrated_db_url: str) -> None:
    engine = open_engine(migrated_db_url)
    # Reachable-state counts |RG| = A*C(a+b, a)/(a+b) (docs/theory/state-counts.md) from 3 to about
    # 9e58.
    ps = [
        ParameterSet(100, 100, 1, 1),
        ParameterSet(12, 4, 1, 1),
        ParameterSet(2, 1, 1, 1),
        ParameterSet(30, 30, 1, 1),
        ParameterSet(3, 3, 1, 3),
    ]
    with Session(engine) as session, session.begin():
        for p in ps:
            store(session, p, rank=1)
    with Session(engine) as session:
        states = session.scalars(select(ClassRecord.states).order_by(ClassRecord.states_key))
        ordered = [int(s) for s in states]
        bigger = session.scalar(
            select(func.count())
            .select_from(ClassRecord)
            .where(ClassRecord.states_key > sortable_key(2**64))
        )
    expected = sorted(invariants.reachable_state_count(p) for p in ps)
    assert ordered == expected
    assert ordered[-1] == comb(200, 100)  # C(100,100,1,1): A = 200, |RG| = C(200,100)
    assert ordered[:2] == [3, 40]  # §11 table: C(2,1,1,1) 3 states, C(3,3,1,3) 40 states
    assert bigger == 1  # C(30,30,1,1) has C(60,30) ~ 1.2e17 < 2^64 states; only C(200,100) passes
    engine.dispose()


def test_foreign_keys_are_enforced(migrated_db_url: str) -> None:
    engine = open_engine(migrated_db_url)
    p = ParameterSet(2, 1, 1, 1)
    with pytest.raises(IntegrityError), Session(engine) as session, session.begin():
        session.add(class_row(p, 1, frame_id="FR3-99"))  # no such frame
    with Session(engine) as session:
        assert session.scalar(select(func.count()).select_from(ClassRecord)) == 0
    engine.dispose()


def test_fingerprints_and_ranks_are_unique(migrated_db_url: str) -> None:
    engine = open_engine(migrated_db_url)
    p, q = ParameterSet(3, 2, 1, 1), ParameterSet(2, 3, 1, 1)  # §11: same net, A = 5
    with Session(engine) as session, session.begin():
        store(session, p)
    twin = frame_row(q, rank=2)
    twin.fingerprint = f"test-frame:{p}"
    with pytest.raises(IntegrityError), Session(engine) as session, session.begin():
        session.add(twin)
    same_rank = frame_row(q, rank=1)
    same_rank.id = "FR5-7"
    with pytest.raises(IntegrityError), Session(engine) as session, session.begin():
        session.add(same_rank)
    engine.dispose()


def test_parameters_must_be_positive(migrated_db_url: str) -> None:
    engine = open_engine(migrated_db_url)
    with Session(engine) as session, session.begin():
        store(session, ParameterSet(1, 1, 1, 1))
    with pytest.raises(IntegrityError), engine.begin() as conn:
        conn.execute(
            insert(ParameterSetRecord).values(
                alpha=0, beta=1, gamma=1, delta=1, area=1, reading_id=1, class_id="CY2-1"
            )
        )
    engine.dispose()


def test_an_area_is_stored_completely_or_not_at_all(migrated_db_url: str) -> None:
    """One transaction per area (docs/citing.md): a failure inside an area leaves no trace of it."""
    engine = open_engine(migrated_db_url)
    with Session(engine) as session, session.begin():
        store(session, ParameterSet(2, 1, 1, 1), rank=1)
        session.add(
            AreaRecord(area=3, complete=True, parameter_sets=2, readings=2, classes=1, frames=1)
        )
    with pytest.raises(IntegrityError), Session(engine) as session, session.begin():
        store(session, ParameterSet(2, 2, 1, 1), rank=1)  # area 4, first class: fine
        session.add(
            AreaRecord(area=4, complete=True, parameter_sets=3, readings=3, classes=2, frames=2)
        )
        session.flush()
        duplicate = frame_row(ParameterSet(3, 1, 1, 1), rank=1)  # (area 4, rank 1) again
        duplicate.id = "FR4-2"
        session.add(duplicate)
    with Session(engine) as session:
        assert session.scalars(select(AreaRecord.area)).all() == [3]
        assert session.scalars(select(ClassRecord.id)).all() == ["CY3-1"]
        assert session.scalar(select(func.count()).select_from(ParameterSetRecord)) == 1
    engine.dispose()


def test_seeds_link_to_classes(migrated_db_url: str) -> None:
    engine = open_engine(migrated_db_url)
    with Session(engine) as session, session.begin():
        entry = store(session, ParameterSet(3, 3, 1, 3))
        session.add(
            SeedRecord(
                name="press-line",
                description="demo: three carts, three gaps",
                alpha=3,
                beta=3,
                gamma=1,
                delta=3,
                class_id=entry.id,
            )
        )
        session.add(
            SeedRecord(
                name="unbuilt",
                description="demo: not in the catalog yet",
                alpha=9,
                beta=9,
                gamma=9,
                delta=9,
                class_id=None,
            )
        )
    with Session(engine) as session:
        linked = session.scalars(
            select(SeedRecord.name).join(ClassRecord).where(ClassRecord.states == "40")
        ).all()
    assert linked == ["press-line"]  # §11 table: C(3,3,1,3) has 40 states
    engine.dispose()


def test_catalog_info_holds_versions_and_creation_time(migrated_db_url: str) -> None:
    engine = open_engine(migrated_db_url)
    with Session(engine) as session:
        info = {row.key: row.value for row in session.scalars(select(CatalogInfo))}
    assert {"created_at", "created_by", "zoo_version", "schema_revision"} <= set(info)
    assert info["created_at"].endswith("+00:00")
    engine.dispose()


# --- concurrency (SQLite WAL) ----------------------------------------------------------------


def test_a_reader_queries_while_a_build_writes(tmp_path: Path) -> None:
    """WAL: a reader's snapshot stays valid while a writer commits an area (docs/citing.md)."""
    url = resolve_location(str(tmp_path / "c.sqlite3"))
    upgrade(url)
    writer_engine, reader_engine = open_engine(url), open_engine(url)
    with Session(writer_engine) as session, session.begin():
        store(session, ParameterSet(2, 1, 1, 1))
    with reader_engine.connect() as reader:
        reader.begin()
        before = reader.execute(text("SELECT count(*) FROM classes")).scalar()
        done = threading.Event()

        def write_next_area() -> None:
            with Session(writer_engine) as session, session.begin():
                store(session, ParameterSet(2, 2, 1, 1))
            done.set()

        thread = threading.Thread(target=write_next_area)
        thread.start()
        thread.join(timeout=10)
        assert done.is_set(), "the writer was blocked by an open reader"
        still = reader.execute(text("SELECT count(*) FROM classes")).scalar()
        reader.rollback()
        after = reader.execute(text("SELECT count(*) FROM classes")).scalar()
    assert (before, still, after) == (1, 1, 2)
    # An ordinary sqlite3 client sees the committed data too (the WAL is checkpointed or read).
    with sqlite3.connect(tmp_path / "c.sqlite3") as plain:
        assert plain.execute("SELECT count(*) FROM classes").fetchone() == (2,)
    writer_engine.dispose()
    reader_engine.dispose()
