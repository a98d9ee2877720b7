"""Where the catalog is: the one resolver of ``--db``, ``$ZOO_CATALOG`` and the default file.

Light on purpose (standard library and platformdirs only): the quick lookup of ``zoo show``
and the faces use it before, or instead of, loading SQLAlchemy. ``zoo.storage.database``
turns the same choice into a database URL.
"""

from __future__ import annotations

import os
from pathlib import Path

import platformdirs

from zoo.errors import CatalogError

#: The environment variable naming the catalog when ``--db`` is not given.
CATALOG_ENV_VAR = "ZOO_CATALOG"
#: File name of the default catalog inside ``platformdirs.user_data_dir("zoo")``.
DEFAULT_FILE_NAME = "catalog.sqlite3"


def default_catalog_path() -> Path:
    """The default catalog file: ``platformdirs.user_data_dir("zoo") / "catalog.sqlite3"``."""
    return Path(platformdirs.user_data_dir("zoo")) / DEFAULT_FILE_NAME


def chosen_location(location: str | None = None) -> str:
    """The location as given: the ``--db`` value, else ``$ZOO_CATALOG``, else "" (the
    default file). Surrounding spaces are ignored; a value that is not valid text (bytes that
    the file system encoding cannot decode) is refused with one line."""
    value = (location or "").strip() or os.environ.get(CATALOG_ENV_VAR, "").strip()
    try:
        value.encode("utf-8")
    except UnicodeEncodeError:
        shown = value.encode("utf-8", "surrogateescape").decode("utf-8", "replace")
        raise CatalogError(
            f"catalog location {shown!r} is not valid text (undecodable bytes); give a path or "
            f"URL in UTF-8 with --db or {CATALOG_ENV_VAR}"
        ) from None
    return value


def is_url(value: str) -> bool:
    """Whether a location names a database by URL (``postgresql://...``) rather than a file."""
    return "://" in value


def catalog_file(location: str | None = None) -> Path | None:
    """The SQLite file the location names (absolute, ``~`` expanded), None for a URL.
    Creates nothing."""
    value = chosen_location(location)
    if is_url(value):
        return None
    return (Path(value).expanduser() if value else default_catalog_path()).absolute()
