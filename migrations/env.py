"""Alembic environment of the zoo catalog (installed as the package ``zoo.migrations``).

zoo drives it through ``zoo.storage.database`` (``upgrade``, ``downgrade``), which passes an open
connection in ``config.attributes["connection"]``. Developers can also run the ``alembic``
command with ``migrations/alembic.ini`` and ``-x db=PATH_OR_URL`` (docs/migrations.md).

Every run renders SQLite changes in batch mode (SQLite cannot alter most of a table in place),
compares column types when autogenerating, and records the resulting revision and the zoo
version in ``catalog_info``.
"""

from __future__ import annotations

from alembic import context
from sqlalchemy import Connection, inspect, text

from zoo.storage.database import open_engine, resolve_location
from zoo.storage.models import Base
from zoo.version import __version__

config = context.config
target_metadata = Base.metadata


def _location() -> str:
    """The database for a command-line run: ``-x db=...``, else the main option, else default."""
    given = context.get_x_argument(as_dictionary=True).get("db")
    if given:
        return resolve_location(given)
    configured = config.get_main_option("sqlalchemy.url")
    return resolve_location(configured or None)


def _record_revision(connection: Connection) -> None:
    """Write the revision now in force and the migrating zoo's version into catalog_info."""
    if not inspect(connection).has_table("catalog_info"):
        return  # downgraded to base: nothing left to describe
    revision = context.get_context().get_current_revision() or ""
    facts = {"schema_revision": revision, "zoo_version": __version__}
    connection.execute(
        text("DELETE FROM catalog_info WHERE key IN ('schema_revision', 'zoo_version')")
    )
    connection.execute(
        text("INSERT INTO catalog_info (key, value) VALUES (:key, :value)"),
        [{"key": key, "value": value} for key, value in facts.items()],
    )


def _run(connection: Connection) -> None:
    applied: list[str] = []
    context.configure(
        connection=connection,
        target_metadata=target_metadata,
        render_as_batch=True,
        compare_type=True,
        on_version_apply=lambda **step: applied.append(str(step["step"])),
    )
    with context.begin_transaction():
        context.run_migrations()
        if applied:  # not for autogenerate, check or a no-op run
            _record_revision(connection)


def run_migrations_offline() -> None:
    """Print the SQL of the migrations instead of running it (``alembic upgrade --sql``)."""
    context.configure(
        url=_location(),
        target_metadata=target_metadata,
        render_as_batch=True,
        literal_binds=True,
        dialect_opts={"paramstyle": "named"},
    )
    with context.begin_transaction():
        context.run_migrations()


def run_migrations_online() -> None:
    connection = config.attributes.get("connection")
    if connection is not None:
        _run(connection)
        return
    # Command-line run: our own engine, foreign keys off while tables are rebuilt.
    engine = open_engine(_location(), migrating=True)
    try:
        with engine.connect() as fresh:
            _run(fresh)
            fresh.commit()
    finally:
        engine.dispose()


if context.is_offline_mode():
    run_migrations_offline()
else:
    run_migrations_online()
