"""Where the catalog lives, how to open it, and which schema revision it has.

A catalog is a SQLite file (the default, in the user's data directory) or a PostgreSQL database
given by a SQLAlchemy URL (architecture.md, "Catalog location"). The schema is created and
upgraded only by the Alembic revisions shipped as the package ``zoo.migrations``, driven here
through a programmatic Alembic configuration, so an installed zoo needs no ``alembic.ini``.

SQLite connections are set up for the catalog's way of working (docs/citing.md, docs/catalog.md):
foreign
keys on (SQLite leaves them off per connection), WAL journal so that a reader can query while a
build writes one transaction per area, a busy timeout instead of an immediate "database is
locked", and explicit ``BEGIN`` so that migrations run as real transactions.
"""

from __future__ import annotations

import shlex
import sqlite3
from collections.abc import Iterator
from contextlib import contextmanager
from dataclasses import dataclass
from functools import partial
from importlib.resources import files
from pathlib import Path
from typing import Any
from urllib.parse import quote

from alembic import command
from alembic.config import Config
from alembic.runtime.migration import MigrationContext
from alembic.script import ScriptDirectory
from sqlalchemy import Connection, Engine, create_engine, event, inspect, text
from sqlalchemy.engine import URL, make_url
from sqlalchemy.exc import ArgumentError, DBAPIError, NoSuchModuleError, OperationalError

from zoo.errors import CatalogError, MissingExtra, extra_advice
from zoo.storage.location import (
    CATALOG_ENV_VAR,
    DEFAULT_FILE_NAME,
    chosen_location,
    default_catalog_path,
    is_url,
)
from zoo.storage.models import sortable_key

#: How long a SQLite connection waits for another writer before giving up, in milliseconds.
SQLITE_BUSY_TIMEOUT_MS = 30_000

_SUPPORTED_BACKENDS = ("sqlite", "postgresql")
#: PostgreSQL advisory lock id held while zoo migrates a catalog ("zoo" in ASCII, then 1).
_LOCK_KEY = 0x7A6F6F01


@dataclass(frozen=True)
class SchemaChange:
    """The schema revisions of a catalog before and after ``upgrade`` or ``downgrade``."""

    before: str | None
    after: str | None

    @property
    def changed(self) -> bool:
        return self.before != self.after


# --- location ------------------------------------------------------------------------------


def resolve_location(location: str | None = None) -> str:
    """The SQLAlchemy URL of the catalog: ``--db`` value, else ``$ZOO_CATALOG``, else the default.

    A value containing ``://`` is a SQLAlchemy URL (``postgresql://`` is read as
    ``postgresql+psycopg://``, the driver zoo ships with); anything else is a file path, with
    ``~`` expanded. The parent directory of a SQLite file is created.

    >>> resolve_location("postgresql://postgres@127.0.0.1/zoo")
    'postgresql+psycopg://postgres@127.0.0.1/zoo'
    """
    value = chosen_location(location)
    if is_url(value):
        url = _normalised_url(value)
        file = _sqlite_file(url)
        if file is not None:
            _create_parent(file, value)
        return url.render_as_string(hide_password=False)
    path = Path(value).expanduser() if value else default_catalog_path()
    if path.is_dir():
        raise CatalogError(
            f"catalog location {value or str(path)!r} is a directory; give a file path such as "
            f"{path / DEFAULT_FILE_NAME}"
        )
    path = path.absolute()
    _create_parent(path, value or str(path))
    return URL.create("sqlite", database=str(path)).render_as_string(hide_password=False)


def _normalised_url(value: str) -> URL:
    try:
        url = make_url(value)
        # A port that is not a number raises here rather than at connect time.
        if url.port is not None and not 0 < url.port < 65536:
            raise ValueError(url.port)
    except (ArgumentError, ValueError) as exc:
        reason = (
            str(exc)
            if isinstance(exc, ArgumentError)
            else "its host or port is malformed (a port is a number; an IPv6 host is written "
            "in brackets, [::1])"
        )
        raise CatalogError(
            f"cannot read database URL {_without_password(value)!r}: {reason}; write it as "
            "postgresql+psycopg://USER@HOST:PORT/DATABASE or give a file path"
        ) from None
    if url.drivername in ("postgresql", "postgres"):
        url = url.set(drivername="postgresql+psycopg")
    backend = url.get_backend_name()
    if backend == "postgresql" and not url.database:
        # libpq would pick a database of its own (the user's name): never build there unasked.
        raise CatalogError(
            f"database URL {_without_password(value)!r} names no database; write it as "
            "postgresql+psycopg://USER@HOST:PORT/DATABASE"
        )
    if backend not in _SUPPORTED_BACKENDS:
        raise CatalogError(
            f"database URL {_display_url(url)!r} uses {backend}; zoo stores catalogs in SQLite "
            "(a file path) or PostgreSQL (postgresql+psycopg://...)"
        )
    return url


def _without_password(value: str) -> str:
    """A URL as text with any password replaced by ***, for messages."""
    scheme, sep, rest = value.partition("://")
    credentials, at, host = rest.rpartition("@")
    if not sep or not at or ":" not in credentials:
        return value
    return f"{scheme}://{credentials.split(':', 1)[0]}:***@{host}"


def _sqlite_file(url: URL) -> Path | None:
    """The file of a SQLite URL (also of a ``file:`` URI database), None for memory or others."""
    if url.get_backend_name() != "sqlite":
        return None
    database = url.database or ""
    if database.startswith("file:"):
        database = database[len("file:") :].split("?", 1)[0]
        if database.startswith("///"):
            database = database[2:]
    if database in ("", ":memory:"):
        return None
    return Path(database).expanduser()


def sqlite_file(url: str | URL) -> Path | None:
    """The file of a SQLite catalog URL, None for memory databases and other backends."""
    return _sqlite_file(make_url(url) if isinstance(url, str) else url)


def _create_parent(path: Path, shown: str) -> None:
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise CatalogError(
            f"cannot create the directory {path.parent} for catalog {shown!r}: {exc.strerror}; "
            "choose another location with --db or ZOO_CATALOG"
        ) from None


def _display_url(url: URL) -> str:
    return url.render_as_string(hide_password=True)


def display_location(url: str | URL) -> str:
    """How to name a catalog to the user: the file path for SQLite, else the URL sans password."""
    parsed = make_url(url) if isinstance(url, str) else url
    file = _sqlite_file(parsed)
    if file is not None and not (parsed.database or "").startswith("file:"):
        return str(file)
    return _display_url(parsed)


def is_default_location(url: str | URL) -> bool:
    """Whether ``url`` is the catalog zoo opens when no ``--db`` is given ($ZOO_CATALOG, else
    the default file), so that a suggested command needs no ``--db``. Creates nothing."""
    try:
        value = chosen_location(None)
        if is_url(value):
            default = _normalised_url(value)
        else:
            path = Path(value).expanduser() if value else default_catalog_path()
            default = URL.create("sqlite", database=str(path.absolute()))
    except CatalogError:
        return False
    parsed = make_url(url) if isinstance(url, str) else url
    return display_location(parsed) == display_location(default)


def db_option(url: str | URL) -> str:
    """`` --db LOCATION`` (shell-quoted) for a command about the catalog at ``url``; empty
    when ``url`` is the catalog zoo opens anyway."""
    if is_default_location(url):
        return ""
    return f" --db {shlex.quote(display_location(url))}"


def migrate_command(url: str | URL) -> str:
    """The exact shell command that upgrades the catalog at ``url``: ``zoo migrate --db ...``."""
    return f"zoo migrate --db {shlex.quote(display_location(url))}"


# --- engines -------------------------------------------------------------------------------


def open_engine(url: str, *, migrating: bool = False, read_only: bool = False) -> Engine:
    """An engine for the catalog at ``url`` (from ``resolve_location``), checked to connect.

    SQLite: foreign keys on per connection, WAL journal, busy timeout, explicit BEGIN (module
    docstring). ``migrating=True`` is for schema migrations only: foreign keys off, because
    rebuilding a table in SQLite batch mode drops it, which live foreign keys would refuse or
    cascade (``upgrade`` checks every key before committing instead), and ``BEGIN IMMEDIATE``,
    so that the migration holds the write lock from its first statement. ``read_only=True``
    makes every connection refuse writes (SQLite ``query_only``, PostgreSQL read-only
    transactions). Raises ``CatalogError`` when the database cannot be reached.
    """
    parsed = _normalised_url(url)
    try:
        if parsed.get_backend_name() == "sqlite":
            engine = create_engine(parsed, connect_args={"timeout": SQLITE_BUSY_TIMEOUT_MS / 1000})
            _configure_sqlite(engine, migrating=migrating)
        else:
            engine = create_engine(parsed, pool_pre_ping=True)
    except (NoSuchModuleError, ModuleNotFoundError) as exc:
        if parsed.get_backend_name() == "postgresql" and getattr(exc, "name", "") == "psycopg":
            raise MissingExtra(
                extra_advice("psycopg", "postgres", "a PostgreSQL catalog")
            ) from None
        raise CatalogError(
            f"no database driver for {_display_url(parsed)!r} ({exc}); use "
            "postgresql+psycopg://... (psycopg comes with the postgres extra)"
        ) from None
    if read_only:
        _refuse_writes(engine)
    try:
        _check_readable(engine)
    except DBAPIError as exc:
        engine.dispose()
        fallback = None if migrating else _read_only_engine(parsed, exc)
        if fallback is not None:
            return fallback
        raise CatalogError(
            f"cannot open catalog database {display_location(parsed)!r}: {_first_line(exc)}; "
            "check the path or URL given by --db or ZOO_CATALOG"
        ) from None
    return engine


def _refuse_writes(engine: Engine) -> None:
    backend = engine.url.get_backend_name()

    @event.listens_for(engine, "connect")
    def _read_only(dbapi_connection: Any, _record: Any) -> None:
        cursor = dbapi_connection.cursor()
        try:
            if backend == "sqlite":
                cursor.execute("PRAGMA query_only = ON")
            else:
                cursor.execute("SET default_transaction_read_only = on")
        finally:
            cursor.close()
        if backend != "sqlite":
            dbapi_connection.commit()  # psycopg opened a transaction for the SET


def _check_readable(engine: Engine) -> None:
    with engine.connect() as connection:
        if connection.dialect.name == "sqlite":
            # A WAL catalog in a read-only directory connects, then fails at its first read
            # (the -shm side file cannot be made): read once here to find out.
            connection.exec_driver_sql("SELECT count(*) FROM sqlite_master").scalar()


def _read_only_engine(parsed: URL, exc: BaseException) -> Engine | None:
    """A read-only engine for a SQLite catalog that cannot be opened for writing, or None.

    A catalog file without write permission, or in a directory where the WAL side files
    cannot be created, is opened with ``mode=ro``, else as ``immutable`` (no side files at
    all: nobody can write there, so nothing changes under the reader). Writes then fail and
    ``write_transaction`` says so in one line.
    """
    file = _sqlite_file(parsed)
    reason = _first_line(exc).lower()
    if file is None or not file.is_file():
        return None
    if "unable to open" not in reason and "readonly" not in reason and "read-only" not in reason:
        return None
    base = "file:" + quote(str(file.absolute()))
    for query in ("mode=ro", "immutable=1"):
        uri = f"{base}?{query}"
        engine = create_engine(
            parsed,
            creator=partial(sqlite3.connect, uri, uri=True, timeout=SQLITE_BUSY_TIMEOUT_MS / 1000),
        )
        _configure_sqlite(engine, migrating=False)
        try:
            _check_readable(engine)
        except DBAPIError:
            engine.dispose()
            continue
        return engine
    return None


def _configure_sqlite(engine: Engine, *, migrating: bool) -> None:
    begin = "BEGIN IMMEDIATE" if migrating else "BEGIN"

    @event.listens_for(engine, "connect")
    def _on_connect(dbapi_connection: Any, _record: Any) -> None:
        # Autocommit at the driver level: pysqlite's own implicit BEGIN skips DDL, so we emit
        # BEGIN ourselves (below) and every transaction, migrations included, is a real one.
        dbapi_connection.isolation_level = None
        cursor = dbapi_connection.cursor()
        try:
            cursor.execute(f"PRAGMA foreign_keys = {'OFF' if migrating else 'ON'}")
            cursor.execute(f"PRAGMA busy_timeout = {SQLITE_BUSY_TIMEOUT_MS}")
            try:
                cursor.execute("PRAGMA journal_mode = WAL")
            except sqlite3.OperationalError:
                # A read-only catalog (file permissions or ?mode=ro) keeps its journal mode;
                # it is only read, so no writer needs to be let past.
                pass
        finally:
            cursor.close()

    @event.listens_for(engine, "begin")
    def _on_begin(connection: Connection) -> None:
        writing = connection.get_execution_options().get(_WRITE_OPTION, False)
        connection.exec_driver_sql("BEGIN IMMEDIATE" if writing else begin)


#: Execution option that marks a connection whose transactions write (see write_transaction).
_WRITE_OPTION = "zoo_write"


@contextmanager
def write_transaction(engine: Engine) -> Iterator[Connection]:
    """A transaction that will write: committed at the end of the block, rolled back on error.

    On SQLite it starts with ``BEGIN IMMEDIATE``, taking the write lock at once. A plain
    ``BEGIN`` starts as a reader, and a reader that later writes while another connection holds
    the write lock fails at once with "database is locked" (SQLite cannot wait there without
    risking a deadlock, https://sqlite.org/lang_transaction.html); taking the lock first lets
    the busy timeout make the second writer wait instead. Other databases begin as usual.
    A writer still locked out after the busy timeout raises ``CatalogBusy``.
    """
    with engine.connect() as connection:
        connection.execution_options(**{_WRITE_OPTION: True})
        try:
            with connection.begin():
                yield connection
        except OperationalError as exc:
            if is_busy(exc):
                raise busy_error(display_location(engine.url)) from None
            if is_read_only(exc):
                raise CatalogError(
                    f"catalog {display_location(engine.url)} is read-only here "
                    f"({_first_line(exc)}); it can be read but not built or changed: copy it "
                    "to a writable folder, or build with --db pointing at one"
                ) from None
            raise


def is_read_only(exc: BaseException) -> bool:
    """Whether a database error says that the catalog cannot be written here."""
    text = str(getattr(exc, "orig", exc)).lower()
    return "readonly database" in text or "read-only" in text or "unable to open database" in text


def is_busy(exc: BaseException) -> bool:
    """Whether a database error says that another connection holds the lock."""
    text = str(getattr(exc, "orig", exc)).lower()
    return "database is locked" in text or "database table is locked" in text


def busy_error(shown: str) -> CatalogBusy:
    """The one-line error for a catalog that another zoo is writing."""
    return CatalogBusy(
        f"catalog {shown} is busy: another zoo is writing it (waited "
        f"{SQLITE_BUSY_TIMEOUT_MS / 1000:g} s for its lock); try again when it finishes"
    )


class CatalogBusy(CatalogError):
    """Another process holds the catalog's write lock for longer than the busy timeout."""


def _first_line(exc: BaseException) -> str:
    original = getattr(exc, "orig", None) or exc
    text = str(original).strip().splitlines()
    return text[0] if text else type(original).__name__


# --- revisions -----------------------------------------------------------------------------


def migrations_directory() -> Path:
    """The directory of the installed package ``zoo.migrations`` (Alembic script location)."""
    return Path(str(files("zoo.migrations")))


def alembic_config(url: str, connection: Connection | None = None) -> Config:
    """A programmatic Alembic configuration for ``url``; ``connection`` is reused if given."""
    config = Config()
    config.set_main_option("script_location", str(migrations_directory()))
    config.set_main_option("path_separator", "os")
    config.set_main_option("sqlalchemy.url", url.replace("%", "%%"))
    config.attributes["connection"] = connection
    return config


def _script_directory() -> ScriptDirectory:
    return ScriptDirectory(str(migrations_directory()))


def head_revision() -> str:
    """The newest schema revision this zoo knows."""
    head = _script_directory().get_current_head()
    if head is None:  # pragma: no cover - the package always ships revisions
        raise CatalogError("zoo.migrations holds no revisions; reinstall zoo")
    return head


def known_revisions() -> tuple[str, ...]:
    """Every schema revision this zoo knows, oldest first."""
    return tuple(reversed([s.revision for s in _script_directory().walk_revisions()]))


def _revision_of(connection: Connection) -> str | None:
    return MigrationContext.configure(connection).get_current_revision()


def current_revision(engine: Engine) -> str | None:
    """The schema revision recorded in the catalog, or None for a database without one."""
    with engine.connect() as connection:
        return _revision_of(connection)


def require_current(engine: Engine) -> None:
    """Check that the catalog's schema is the one this zoo's code expects.

    Raises ``CatalogError`` naming the exact ``zoo migrate --db ...`` command when the catalog
    is older (or has no schema yet), and asking for a newer zoo when the catalog was written by
    one whose revision this zoo does not know.
    """
    current = current_revision(engine)
    head = head_revision()
    if current == head:
        return
    shown = display_location(engine.url)
    if current is None:
        raise CatalogError(
            f"{shown} holds no zoo catalog schema (no schema revision recorded, this zoo needs "
            f"{head}); create it with: {migrate_command(engine.url)}"
        )
    if current not in known_revisions():
        raise CatalogError(_newer_message(shown, current, head))
    raise CatalogError(
        f"catalog {shown} has schema revision {current}, older than {head} which this zoo "
        f"needs; upgrade it (no data is lost) with: {migrate_command(engine.url)}"
    )


def _newer_message(shown: str, current: str, head: str) -> str:
    from zoo.version import __version__

    return (
        f"catalog {shown} has schema revision {current}, which zoo {__version__} does not know "
        f"(its newest is {head}); it was written by a newer zoo: upgrade zoo "
        "(pip install -U zoo) to use it"
    )


def upgrade(url: str, revision: str = "head") -> SchemaChange:
    """Create or upgrade the catalog schema at ``url`` to ``revision`` (default: the newest).

    Safe on an up-to-date catalog (nothing is done) and on a catalog written by a newer zoo
    (refused with ``CatalogError``). All revisions run in one transaction, so a failure leaves
    the catalog as it was. Refuses a non-empty database that is not a zoo catalog.
    """
    return _migrate(url, revision, downgrading=False)


def downgrade(url: str, revision: str) -> SchemaChange:
    """Take the catalog schema at ``url`` back to ``revision`` (``"base"`` drops every table).

    For developers testing a revision; a downgrade may drop data that only newer revisions hold.
    """
    return _migrate(url, revision, downgrading=True)


def _migrate(url: str, revision: str, *, downgrading: bool) -> SchemaChange:
    engine = open_engine(url, migrating=True)
    shown = display_location(engine.url)
    try:
        with engine.connect() as connection:
            if connection.dialect.name == "postgresql":
                # One migrating zoo at a time per database; released at commit or rollback.
                connection.execute(text("SELECT pg_advisory_xact_lock(:key)"), {"key": _LOCK_KEY})
            before = _revision_of(connection)
            if before is not None and before not in known_revisions():
                raise CatalogError(_newer_message(shown, before, head_revision()))
            if before is None and not downgrading:
                _refuse_foreign_tables(connection, shown)
            target = head_revision() if revision == "head" else revision
            if target != "base" and target not in known_revisions():
                raise CatalogError(
                    f"schema revision {revision!r} is unknown; known revisions are "
                    f"{', '.join(known_revisions())}"
                )
            if before == (None if target == "base" else target):
                return SchemaChange(before, before)
            config = alembic_config(url, connection)
            if downgrading:
                command.downgrade(config, target)
            else:
                command.upgrade(config, target)
            _check_foreign_keys(connection, shown)
            after = _revision_of(connection)
            connection.commit()
    except CatalogError:
        raise
    except DBAPIError as exc:
        raise CatalogError(
            f"migrating catalog {shown} failed, nothing was changed: {_first_line(exc)}"
        ) from None
    except Exception as exc:  # a revision's data step met data it cannot handle
        raise CatalogError(
            f"migrating catalog {shown} failed, nothing was changed: "
            f"{type(exc).__name__}: {_first_line(exc)}; please report this with the catalog"
        ) from exc
    finally:
        engine.dispose()
    return SchemaChange(before, after)


def _refuse_foreign_tables(connection: Connection, shown: str) -> None:
    tables = sorted(set(inspect(connection).get_table_names()) - {"alembic_version"})
    if tables:
        listed = ", ".join(tables[:5]) + (", ..." if len(tables) > 5 else "")
        raise CatalogError(
            f"{shown} already holds tables ({listed}) but no zoo schema revision, so it is not a "
            "zoo catalog; give an empty database or a new file with --db"
        )


def _check_foreign_keys(connection: Connection, shown: str) -> None:
    # Migrations on SQLite run with foreign keys off (see open_engine); check them all before
    # committing so that a migration can never leave dangling references behind.
    if connection.dialect.name != "sqlite":
        return
    problems = connection.exec_driver_sql("PRAGMA foreign_key_check").fetchall()
    if problems:
        table, rowid, parent = problems[0][0], problems[0][1], problems[0][2]
        connection.rollback()
        raise CatalogError(
            f"migrating catalog {shown} would leave {len(problems)} broken reference(s), first "
            f"in table {table} row {rowid} to {parent}; nothing was changed, please report this"
        )


def catalog_exists(url: str) -> bool:
    """Whether a catalog schema exists at ``url``; never creates a file or a table.

    False for a missing SQLite file and for a reachable database without a schema revision.
    A database that cannot be opened (server down, a file that is not a database) raises
    ``CatalogError``: saying "no catalog" there would invite building over it.
    """
    parsed = _normalised_url(url)
    if parsed.get_backend_name() == "sqlite":
        file = _sqlite_file(parsed)
        if file is None or not file.is_file():
            return False
    engine = open_engine(url)
    try:
        return current_revision(engine) is not None
    finally:
        engine.dispose()


__all__ = [
    "Engine",
    "CATALOG_ENV_VAR",
    "CatalogBusy",
    "busy_error",
    "is_busy",
    "write_transaction",
    "DEFAULT_FILE_NAME",
    "SchemaChange",
    "alembic_config",
    "catalog_exists",
    "current_revision",
    "db_option",
    "default_catalog_path",
    "display_location",
    "downgrade",
    "head_revision",
    "is_default_location",
    "known_revisions",
    "migrate_command",
    "migrations_directory",
    "open_engine",
    "require_current",
    "resolve_location",
    "sortable_key",
    "sqlite_file",
    "upgrade",
]
