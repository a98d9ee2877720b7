"""The committed schema head is the head of the migration scripts, as Alembic reads them."""

from __future__ import annotations

from alembic.script import ScriptDirectory

from zoo.storage.database import alembic_config, head_revision
from zoo.storage.schema import SCHEMA_HEAD


def test_the_committed_schema_head_is_alembics_head() -> None:
    script = ScriptDirectory.from_config(alembic_config("sqlite://"))
    assert script.get_heads() == [SCHEMA_HEAD]
    assert head_revision() == SCHEMA_HEAD
