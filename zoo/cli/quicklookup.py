"""A light catalog lookup for ``zoo show PARAMS`` and ``zoo compare``: one SQLite query, no ORM.

Importing the catalog service (SQLAlchemy and Alembic) costs about half a second, more than the
whole answer of ``zoo show``. For the common case, a local SQLite catalog file whose schema is
the one this zoo expects, the identifier is one indexed query away: this module asks it with
the standard library's ``sqlite3``, read only. Whenever it cannot be sure (a database URL, an
older or newer schema, a locked or damaged file), it answers ``UNANSWERED`` and the caller takes
the full path (``zoo.catalog.service.lookup_class_id``), which gives the proper error or note.

The query is the one of ``zoo.catalog.service.stored_class_id`` on the schema of
docs/architecture.md (``parameter_sets``); tests/cli/test_examine.py checks that both paths agree.
"""

from __future__ import annotations

import re
import sqlite3
from functools import cache
from importlib.resources import files
from pathlib import Path
from typing import Final

from zoo.core.params import ParameterSet


class _Unanswered:
    """The light path could not decide; ask the catalog service."""

    def __repr__(self) -> str:
        return "UNANSWERED"


UNANSWERED: Final = _Unanswered()

_REVISION = re.compile(r'^revision\s*(?::[^=]*)?=\s*["\']([^"\']+)["\']', re.MULTILINE)
_DOWN_REVISION = re.compile(
    r'^down_revision\s*(?::[^=]*)?=\s*(?:None|["\']([^"\']+)["\'])', re.MULTILINE
)


@cache
def head_revision_of_migrations() -> str | None:
    """The newest schema revision shipped in ``zoo.migrations.versions``, read from the files.

    The revision that no other revision names as its ``down_revision`` (Alembic's head), found
    without importing Alembic; None when the files do not show exactly one head.
    """
    revisions: set[str] = set()
    parents: set[str] = set()
    try:
        for item in files("zoo.migrations").joinpath("versions").iterdir():
            if not item.name.endswith(".py") or item.name.startswith("__"):
                continue
            text = item.read_text(encoding="utf-8")
            revision, parent = _REVISION.search(text), _DOWN_REVISION.search(text)
            if revision is None or parent is None:
                return None
            revisions.add(revision.group(1))
            if parent.group(1):
                parents.add(parent.group(1))
    except (OSError, ModuleNotFoundError):
        return None
    heads = revisions - parents
    return heads.pop() if len(heads) == 1 else None


def quick_class_id(p: ParameterSet, catalog_file: Path) -> str | None | _Unanswered:
    """The class identifier of p in a current SQLite catalog file, None when it does not hold p.

    ``UNANSWERED`` when the file is not a catalog of the current schema or cannot be read.
    """
    head = head_revision_of_migrations()
    if head is None:
        return UNANSWERED
    try:
        uri = catalog_file.absolute().as_uri() + "?mode=ro"
        connection = sqlite3.connect(uri, uri=True, timeout=5)
    except (sqlite3.Error, ValueError):
        return UNANSWERED
    try:
        versions = connection.execute("SELECT version_num FROM alembic_version").fetchall()
        if versions != [(head,)]:
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


__all__ = ["UNANSWERED", "head_revision_of_migrations", "quick_class_id"]
