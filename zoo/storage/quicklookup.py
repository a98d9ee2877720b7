"""A light catalog lookup for ``zoo show PARAMS`` and ``zoo compare``: one SQLite query, no ORM.

Importing SQLAlchemy and Alembic costs about half a second, more than the whole answer of
``zoo show``. For the common case, a local SQLite catalog file of the schema this zoo expects
(``SCHEMA_HEAD``), the identifier is one indexed query away: this module asks it with the
standard library's ``sqlite3``, read only. Whenever it cannot be sure (a database URL, an older
or newer schema, a locked or damaged file), it answers ``UNANSWERED`` and the caller takes the
full path (``zoo.catalog.service.lookup_class_id``), which gives the proper error or note.

The query is the one of ``CatalogReader.class_id_for`` (``zoo.storage.repository``);
tests/storage/test_quicklookup.py checks that both paths agree.
"""

from __future__ import annotations

import sqlite3
from pathlib import Path
from typing import Final

from zoo.core.params import ParameterSet
from zoo.storage.schema import SCHEMA_HEAD


class _Unanswered:
    """The light path could not decide; ask the catalog service."""

    def __repr__(self) -> str:
        return "UNANSWERED"


UNANSWERED: Final = _Unanswered()


def quick_class_id(p: ParameterSet, catalog_file: Path) -> str | None | _Unanswered:
    """The class identifier of p in a current SQLite catalog file, None when it does not hold p.

    ``UNANSWERED`` when the file is not a catalog of the current schema or cannot be read.
    """
    try:
        uri = catalog_file.absolute().as_uri() + "?mode=ro"
        connection = sqlite3.connect(uri, uri=True, timeout=5)
    except (sqlite3.Error, ValueError):
        return UNANSWERED
    try:
        versions = connection.execute("SELECT version_num FROM alembic_version").fetchall()
        if versions != [(SCHEMA_HEAD,)]:
            return UNANSWERED
        row = connection.execute(
            "SELECT class_id FROM parameter_sets "
            "WHERE alpha = ? AND beta = ? AND gamma = ? AND delta = ?",
            (p.alpha, p.beta, p.gamma, p.delta),
        ).fetchone()
    except sqlite3.Error:
        return UNANSWERED
    finally:
        connection.close()
    return None if row is None else str(row[0])


__all__ = ["UNANSWERED", "quick_class_id"]
