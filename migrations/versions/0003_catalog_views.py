"""SQL views for reading the catalog with plain SQL: class summary, parameter-set lookup.

Revision ID: 0003
Revises: 0002
Create Date: 2026-12-05 17:00:00

``class_summary`` is one row per class with readable column names (the query language's field
names); ``parameter_set_lookup`` is one row per parameter set with its label and class.
Exact big integers (``states``, ``state_arcs``, ``automorphisms``) are decimal text, which
sorts as text (``"10" < "9"``); each comes with a ``*_sort_key`` column whose text order is
numeric order on SQLite and PostgreSQL alike: ``ORDER BY states_sort_key``. docs/catalog.md
("Reading the file with SQL") documents them.

A later revision that rebuilds ``classes``, ``frames`` or ``parameter_sets`` in SQLite batch
mode must drop these views first and create them again afterwards (SQLite checks views when a
table is renamed); ``VIEWS`` below holds their definitions for that.
"""

from __future__ import annotations

from collections.abc import Sequence

from alembic import op

revision: str = "0003"
down_revision: str | None = "0002"
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None

#: (name, SELECT) of every view, in creation order. Plain SQL that SQLite and PostgreSQL read
#: alike (``||`` joins text and integers on both).
VIEWS: tuple[tuple[str, str], ...] = (
    (
        "class_summary",
        """
        SELECT c.id AS class_id,
               c.area AS area,
               c.rank AS rank,
               c.label AS label,
               c.frame_id AS frame_id,
               c.loop AS loop,
               c.tokens AS tokens,
               c.states AS states,
               c.states_key AS states_sort_key,
               c.state_arcs AS state_arcs,
               c.state_arcs_key AS state_arcs_sort_key,
               c.automorphisms AS automorphisms,
               c.automorphisms_key AS automorphisms_sort_key,
               f.automorphisms AS net_automorphisms,
               f.automorphisms_key AS net_automorphisms_sort_key,
               c.enabled AS enabled,
               c.semi_enabled AS semi_enabled,
               c.cycle_time_num || '/' || c.cycle_time_den AS cycle_time,
               c.cycle_time_num AS cycle_time_numerator,
               c.cycle_time_den AS cycle_time_denominator,
               c.cyclic AS cyclic,
               c.iteration AS iteration,
               c.reading_count AS reading_count,
               c.member_count AS member_count,
               c.fingerprint AS fingerprint
        FROM classes AS c JOIN frames AS f ON f.id = c.frame_id
        """,
    ),
    (
        "parameter_set_lookup",
        """
        SELECT p.alpha AS alpha,
               p.beta AS beta,
               p.gamma AS gamma,
               p.delta AS delta,
               p.area AS area,
               'C(' || p.alpha || ',' || p.beta || ',' || p.gamma || ',' || p.delta || ')'
                   AS parameters,
               p.class_id AS class_id,
               c.label AS class_label,
               c.frame_id AS frame_id,
               p.reading_id AS reading_id
        FROM parameter_sets AS p JOIN classes AS c ON c.id = p.class_id
        """,
    ),
)

#: Column comments (PostgreSQL keeps them; SQLite has no comments, docs/catalog.md says it).
_SORT_NOTE = (
    "{column} is exact decimal text, which sorts as text; ORDER BY {column}_sort_key sorts "
    "numerically (four digits of length, then the digits)"
)


def upgrade() -> None:
    for name, select in VIEWS:
        op.execute(f"CREATE VIEW {name} AS {select.strip()}")
    if op.get_bind().dialect.name == "postgresql":
        for column in ("states", "state_arcs", "automorphisms", "net_automorphisms"):
            note = _SORT_NOTE.format(column=column).replace("'", "''")
            op.execute(f"COMMENT ON COLUMN class_summary.{column} IS '{note}'")


def downgrade() -> None:
    for name, _ in reversed(VIEWS):
        op.execute(f"DROP VIEW IF EXISTS {name}")
