"""Relations between entries: iteration counts and behaviour classes.

Revision ID: 0004
Revises: 0003
Create Date: 2026-12-05 19:30:00

Adds to ``classes``: ``iterates`` (how many classes this one is an n-fold temporal iteration
of, computed here from each class's label, docs/theory/iterations.md), and the behaviour
columns (docs/theory/behaviour.md): ``behaviour_key``, ``behaviour_evidence``,
``behaviour_id`` and ``behaviour_count``, empty until a build fills them. ``areas`` gains
``behaviour_done``: false for every stored area, so that the next ``zoo build`` computes the
behaviour of the classes already stored (nothing else is rebuilt). The view
``class_summary`` is made again with the new columns.
"""

from __future__ import annotations

import importlib.util
from collections.abc import Sequence
from pathlib import Path
from typing import Any

import sqlalchemy as sa
from alembic import op

revision: str = "0004"
down_revision: str | None = "0003"
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None


def _revision_0003() -> Any:
    """Revision 0003's module, for its view definitions (its file name starts with a digit)."""
    path = Path(__file__).with_name("0003_catalog_views.py")
    spec = importlib.util.spec_from_file_location("zoo_migration_0003", path)
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def _views_0003() -> tuple[tuple[str, str], ...]:
    return tuple(_revision_0003().VIEWS)


def _comment_sort_keys() -> None:
    """The PostgreSQL column comments of revision 0003 (a view made again loses them)."""
    if op.get_bind().dialect.name != "postgresql":
        return
    note_template = _revision_0003()._SORT_NOTE
    for column in ("states", "state_arcs", "automorphisms", "net_automorphisms"):
        note = note_template.format(column=column).replace("'", "''")
        op.execute(f"COMMENT ON COLUMN class_summary.{column} IS '{note}'")


_NEW_SUMMARY_COLUMNS = """
               c.iterates AS iterates,
               c.behaviour_id AS behaviour_id,
               c.behaviour_count AS behaviour_count,
               c.fingerprint AS fingerprint"""


def _summary_with_relations(select: str) -> str:
    old = "\n               c.fingerprint AS fingerprint"
    if old not in select:
        raise RuntimeError("revision 0003's class_summary changed; update revision 0004")
    return select.replace(old, _NEW_SUMMARY_COLUMNS)


def upgrade() -> None:
    from zoo.core.iterations import class_iteration_bases
    from zoo.core.params import ParameterSet

    views = dict(_views_0003())
    op.execute("DROP VIEW IF EXISTS class_summary")
    op.add_column(
        "classes", sa.Column("iterates", sa.Integer(), nullable=False, server_default="0")
    )
    op.add_column("classes", sa.Column("behaviour_count", sa.Integer(), nullable=True))
    op.add_column("classes", sa.Column("behaviour_key", sa.Text(), nullable=True))
    op.add_column("classes", sa.Column("behaviour_evidence", sa.Text(), nullable=True))
    op.add_column("classes", sa.Column("behaviour_id", sa.Text(), nullable=True))
    op.create_index(op.f("ix_classes_behaviour_key"), "classes", ["behaviour_key"])
    op.create_index(op.f("ix_classes_behaviour_id"), "classes", ["behaviour_id"])
    op.add_column(
        "areas",
        sa.Column("behaviour_done", sa.Boolean(), nullable=False, server_default=sa.false()),
    )
    bind = op.get_bind()
    classes = sa.table(
        "classes",
        sa.column("id", sa.Text()),
        sa.column("label_alpha", sa.Integer()),
        sa.column("label_beta", sa.Integer()),
        sa.column("label_gamma", sa.Integer()),
        sa.column("label_delta", sa.Integer()),
        sa.column("iterates", sa.Integer()),
    )
    rows = bind.execute(
        sa.select(
            classes.c.id,
            classes.c.label_alpha,
            classes.c.label_beta,
            classes.c.label_gamma,
            classes.c.label_delta,
        )
    ).all()
    updates = [
        {"class_id": row[0], "count": len(class_iteration_bases(ParameterSet(*row[1:])))}
        for row in rows
    ]
    updates = [u for u in updates if u["count"]]
    if updates:
        bind.execute(
            classes.update()
            .where(classes.c.id == sa.bindparam("class_id"))
            .values(iterates=sa.bindparam("count")),
            updates,
        )
    op.execute(
        f"CREATE VIEW class_summary AS {_summary_with_relations(views['class_summary']).strip()}"
    )
    _comment_sort_keys()


def downgrade() -> None:
    # SQLite rebuilds the tables in batch mode and checks the views while it renames them:
    # drop both views first and make them again afterwards (revision 0003's note).
    views = _views_0003()
    for name, _ in reversed(views):
        op.execute(f"DROP VIEW IF EXISTS {name}")
    op.drop_index(op.f("ix_classes_behaviour_id"), table_name="classes")
    op.drop_index(op.f("ix_classes_behaviour_key"), table_name="classes")
    with op.batch_alter_table("areas") as batch:
        batch.drop_column("behaviour_done")
    with op.batch_alter_table("classes") as batch:
        for column in ("behaviour_id", "behaviour_evidence", "behaviour_key", "behaviour_count"):
            batch.drop_column(column)
        batch.drop_column("iterates")
    for name, select in views:
        op.execute(f"CREATE VIEW {name} AS {select.strip()}")
    _comment_sort_keys()
