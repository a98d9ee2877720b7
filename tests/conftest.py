"""Shared fixtures: fresh catalog databases on SQLite and on the machine's PostgreSQL server.

* ``db_url``: the URL of a fresh, empty database, once as a SQLite file and once as a fresh
  PostgreSQL schema (parametrised ``sqlite`` / ``postgresql``, the latter marked ``postgres``).
* ``migrated_db_url``: the same, upgraded to the newest schema revision.
* ``postgres_database``: the URL of a database created for this test session on the server at
  127.0.0.1:5432 (``CREATE DATABASE`` through the ``test`` database, dropped at the end).

PostgreSQL is never mocked. When the server cannot be reached the PostgreSQL tests fail if the
environment variable ``CI`` is set, and are skipped with the reason otherwise.
``ZOO_TEST_POSTGRES`` overrides the server URL (default
``postgresql://postgres@127.0.0.1:5432/test``).

Every test runs with ``ZOO_CATALOG`` unset and ``XDG_DATA_HOME`` in a temporary directory, so no
test can read or write the user's real catalog.
"""

from __future__ import annotations

import itertools
import os
import uuid
from collections.abc import Iterator
from pathlib import Path
from typing import Any

import pytest
from sqlalchemy.engine import make_url

from zoo.catalog.build import build_catalog

ADMIN_URL = os.environ.get("ZOO_TEST_POSTGRES", "postgresql://postgres@127.0.0.1:5432/test")

_schema_numbers = itertools.count(1)


@pytest.fixture(autouse=True)
def _isolated_catalog_home(
    monkeypatch: pytest.MonkeyPatch, tmp_path_factory: pytest.TempPathFactory
) -> None:
    """Keep every test away from the user's own catalog and environment."""
    monkeypatch.delenv("ZOO_CATALOG", raising=False)
    monkeypatch.setenv("XDG_DATA_HOME", str(tmp_path_factory.mktemp("data-home")))


def _admin_conninfo() -> str:
    url = make_url(ADMIN_URL)
    parts = {
        "host": url.host or "127.0.0.1",
        "port": str(url.port or 5432),
        "dbname": url.database or "test",
        "user": url.username or "postgres",
    }
    if url.password:
        parts["password"] = str(url.password)
    return " ".join(f"{key}={value}" for key, value in parts.items())


def _unreachable(reason: str) -> None:
    message = f"PostgreSQL at {make_url(ADMIN_URL).render_as_string()} is unreachable: {reason}"
    if os.environ.get("CI", "").strip().lower() not in ("", "0", "false", "no"):
        pytest.fail(f"{message}; CI must run the PostgreSQL tests", pytrace=False)
    pytest.skip(f"{message} (set CI=1 to make this a failure)")


def _is_running(pid: int) -> bool:
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:
        return True
    return True


def _drop_leftovers(admin: Any) -> None:
    """Drop the databases of earlier test sessions on this machine that were killed mid-run."""
    rows = admin.execute(
        "SELECT datname FROM pg_database WHERE datname LIKE 'zoo\\_test\\_%'"
    ).fetchall()
    for (datname,) in rows:
        parts = datname.split("_")
        if len(parts) == 4 and parts[2].isdigit() and not _is_running(int(parts[2])):
            admin.execute(f'DROP DATABASE IF EXISTS "{datname}" WITH (FORCE)')


@pytest.fixture(scope="session")
def postgres_database() -> Iterator[str]:
    """A uniquely named database on the PostgreSQL server for this session, dropped at the end."""
    import psycopg

    name = f"zoo_test_{os.getpid()}_{uuid.uuid4().hex[:8]}"
    failure = ""
    try:
        admin = psycopg.connect(_admin_conninfo(), autocommit=True, connect_timeout=5)
    except psycopg.OperationalError as exc:
        failure = str(exc).strip().splitlines()[0] if str(exc).strip() else repr(exc)
    if failure:
        _unreachable(failure)  # fails in CI, skips elsewhere
    with admin:
        _drop_leftovers(admin)
        admin.execute(f'CREATE DATABASE "{name}"')
        try:
            url = make_url(ADMIN_URL).set(drivername="postgresql+psycopg", database=name)
            yield url.render_as_string(hide_password=False)
        finally:
            admin.execute(f'DROP DATABASE IF EXISTS "{name}" WITH (FORCE)')


@pytest.fixture
def postgres_url(postgres_database: str) -> Iterator[str]:
    """A fresh, empty schema in the session database, as the URL's default search path."""
    import psycopg

    schema = f"t{next(_schema_numbers)}_{uuid.uuid4().hex[:6]}"
    conninfo = make_url(postgres_database).set(drivername="postgresql")
    with psycopg.connect(conninfo.render_as_string(hide_password=False), autocommit=True) as conn:
        conn.execute(f'CREATE SCHEMA "{schema}"')
    url = make_url(postgres_database).update_query_dict({"options": f"-csearch_path={schema}"})
    yield url.render_as_string(hide_password=False)
    with psycopg.connect(conninfo.render_as_string(hide_password=False), autocommit=True) as conn:
        # A test that leaked an open transaction must not hang the run; the whole database is
        # dropped with FORCE at the end of the session anyway.
        conn.execute("SET lock_timeout = '5s'")
        try:
            conn.execute(f'DROP SCHEMA "{schema}" CASCADE')
        except psycopg.errors.LockNotAvailable:
            pass


@pytest.fixture(
    params=["sqlite", pytest.param("postgresql", marks=pytest.mark.postgres)],
)
def db_url(request: pytest.FixtureRequest, tmp_path: Path) -> str:
    """The URL of a fresh, empty catalog database: a SQLite file, then a PostgreSQL schema."""
    if request.param == "sqlite":
        from zoo.storage.database import resolve_location

        return resolve_location(str(tmp_path / "catalog.sqlite3"))
    url: str = request.getfixturevalue("postgres_url")
    return url


@pytest.fixture
def migrated_db_url(db_url: str) -> str:
    """``db_url`` with the schema upgraded to the newest revision."""
    from zoo.storage.database import upgrade

    upgrade(db_url)
    return db_url


@pytest.fixture(scope="session")
def small_catalog(tmp_path_factory: pytest.TempPathFactory) -> str:
    """A catalog of every area up to 12, built once per session; tests only read it."""
    from zoo.catalog.service import Catalog

    path = tmp_path_factory.mktemp("small-catalog") / "catalog.sqlite3"
    with Catalog.open(str(path), create=True) as catalog:
        build_catalog(catalog, 12)
    return str(path)
