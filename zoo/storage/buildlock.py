"""Whether a build is writing a catalog right now, so that a reader never builds it too.

A build holds a shared lock for as long as it runs; a reader asks for the exclusive lock
without waiting and lets go at once: refused means some build holds it. Several builds can run
at once (they share the lock and each area is one transaction), and a build that dies releases
its lock with its process, so no marker is ever left stale.

* SQLite: ``flock`` on the side file ``CATALOG-buildlock`` beside the catalog file (created
  by the build and left in place, like SQLite's own side files). A catalog in a read-only
  directory cannot be built, so it has no build lock and no build in progress.
* PostgreSQL: a session advisory lock of the catalog's schema (``pg_advisory_lock_shared``).
"""

from __future__ import annotations

import fcntl
import os
from collections.abc import Iterator
from contextlib import contextmanager, suppress
from pathlib import Path

from sqlalchemy import Engine, text

from zoo.storage.database import sqlite_file

#: First key of the PostgreSQL advisory lock ("zoo" in ASCII, then 2); the second is the schema.
_PG_BUILD_KEY = 0x7A6F6F02
_PG_KEY_SQL = "hashtext(current_schema())"


def _lock_file(engine: Engine) -> Path | None:
    file = sqlite_file(engine.url)
    return None if file is None else Path(f"{file}-buildlock")


@contextmanager
def build_lock(engine: Engine) -> Iterator[None]:
    """Hold the catalog's build lock (shared with other builds) for the block."""
    if engine.dialect.name == "postgresql":
        with engine.connect() as connection:
            connection.execute(
                text(f"SELECT pg_advisory_lock_shared(:key, {_PG_KEY_SQL})"),
                {"key": _PG_BUILD_KEY},
            )
            connection.commit()
            try:
                yield
            finally:
                connection.execute(
                    text(f"SELECT pg_advisory_unlock_shared(:key, {_PG_KEY_SQL})"),
                    {"key": _PG_BUILD_KEY},
                )
                connection.commit()
        return
    path = _lock_file(engine)
    descriptor = None
    if path is not None:
        with suppress(OSError):  # a read-only folder: the build will fail at its first write
            descriptor = os.open(path, os.O_RDWR | os.O_CREAT, 0o644)
            fcntl.flock(descriptor, fcntl.LOCK_SH)
    try:
        yield
    finally:
        if descriptor is not None:
            # The side file stays: removing it could let a build that opened it just before
            # hold its lock on a file no reader can find any more.
            os.close(descriptor)


def build_in_progress(engine: Engine) -> bool:
    """Whether some process holds the catalog's build lock now; never waits, never writes."""
    if engine.dialect.name == "postgresql":
        with engine.connect() as connection:
            got = connection.execute(
                text(f"SELECT pg_try_advisory_lock(:key, {_PG_KEY_SQL})"), {"key": _PG_BUILD_KEY}
            ).scalar()
            if got:
                connection.execute(
                    text(f"SELECT pg_advisory_unlock(:key, {_PG_KEY_SQL})"),
                    {"key": _PG_BUILD_KEY},
                )
            connection.rollback()
            return not got
    path = _lock_file(engine)
    if path is None:
        return False
    try:
        descriptor = os.open(path, os.O_RDONLY)
    except OSError:
        return False
    try:
        return not _try_exclusive(descriptor)
    finally:
        os.close(descriptor)


def _try_exclusive(descriptor: int) -> bool:
    try:
        fcntl.flock(descriptor, fcntl.LOCK_EX | fcntl.LOCK_NB)
    except OSError:
        return False
    fcntl.flock(descriptor, fcntl.LOCK_UN)
    return True


__all__ = ["build_in_progress", "build_lock"]
