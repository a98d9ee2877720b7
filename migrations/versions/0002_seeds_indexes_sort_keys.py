"""Seeds table, indexes for the query paths, sortable automorphism keys.

Revision ID: 0002
Revises: 0001
Create Date: 2026-12-01 23:00:00

Adds the ``seeds`` table, the indexes that the query compiler's filters and joins use, and
``automorphisms_key`` on frames and classes so that automorphism orders (exact decimal text) can
be compared and sorted numerically. Existing rows get their key computed here.
"""

from __future__ import annotations

from collections.abc import Sequence

import sqlalchemy as sa
from alembic import op

revision: str = "0002"
down_revision: str | None = "0001"
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None

# (index name, table, columns) of the query paths, created after the tables are rebuilt.
_INDEXES = (
    ("ix_frames_area", "frames", ["area"]),
    ("ix_classes_area", "classes", ["area"]),
    ("ix_classes_loop", "classes", ["loop"]),
    ("ix_classes_frame_id", "classes", ["frame_id"]),
    ("ix_classes_states_key", "classes", ["states_key"]),
    ("ix_classes_automorphisms_key", "classes", ["automorphisms_key"]),
    ("ix_readings_class_id", "readings", ["class_id"]),
    ("ix_parameter_sets_area", "parameter_sets", ["area"]),
    ("ix_parameter_sets_class_id", "parameter_sets", ["class_id"]),
    ("ix_parameter_sets_reading_id", "parameter_sets", ["reading_id"]),
)


def _sortable_key(digits: str) -> str:
    # Frozen copy of zoo.storage.models.sortable_key as of this revision (a revision must not
    # change meaning when application code changes later).
    digits = str(int(digits))
    return f"{len(digits):04d}{digits}"


def _add_automorphisms_key(table_name: str) -> None:
    with op.batch_alter_table(table_name) as batch:
        batch.add_column(sa.Column("automorphisms_key", sa.Text(), nullable=True))
    table = sa.table(
        table_name,
        sa.column("id", sa.Text()),
        sa.column("automorphisms", sa.Text()),
        sa.column("automorphisms_key", sa.Text()),
    )
    bind = op.get_bind()
    rows = bind.execute(sa.select(table.c.id, table.c.automorphisms)).all()
    if rows:
        bind.execute(
            table.update()
            .where(table.c.id == sa.bindparam("row_id"))
            .values(automorphisms_key=sa.bindparam("key")),
            [{"row_id": row.id, "key": _sortable_key(row.automorphisms)} for row in rows],
        )
    with op.batch_alter_table(table_name) as batch:
        batch.alter_column("automorphisms_key", existing_type=sa.Text(), nullable=False)


def upgrade() -> None:
    op.create_table(
        "seeds",
        sa.Column("name", sa.Text(), nullable=False),
        sa.Column("description", sa.Text(), nullable=False),
        sa.Column("alpha", sa.Integer(), nullable=False),
        sa.Column("beta", sa.Integer(), nullable=False),
        sa.Column("gamma", sa.Integer(), nullable=False),
        sa.Column("delta", sa.Integer(), nullable=False),
        sa.Column("class_id", sa.Text(), nullable=True),
        sa.ForeignKeyConstraint(
            ["class_id"], ["classes.id"], name=op.f("fk_seeds_class_id_classes")
        ),
        sa.PrimaryKeyConstraint("name", name=op.f("pk_seeds")),
    )
    op.create_index(op.f("ix_seeds_class_id"), "seeds", ["class_id"])
    _add_automorphisms_key("frames")
    _add_automorphisms_key("classes")
    for name, table_name, columns in _INDEXES:
        op.create_index(op.f(name), table_name, columns)


def downgrade() -> None:
    for name, table_name, _columns in reversed(_INDEXES):
        op.drop_index(op.f(name), table_name=table_name)
    for table_name in ("classes", "frames"):
        with op.batch_alter_table(table_name) as batch:
            batch.drop_column("automorphisms_key")
    op.drop_index(op.f("ix_seeds_class_id"), table_name="seeds")
    op.drop_table("seeds")
