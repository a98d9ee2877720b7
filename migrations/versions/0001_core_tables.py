"""Core tables: catalog_info, areas, frames, classes, readings, parameter_sets.

Revision ID: 0001
Revises:
Create Date: 2026-12-01 22:50:00

The first revision fixes the constraint naming convention of ``zoo.storage.models`` (every
constraint below is named explicitly in that convention), so later revisions can alter them.
"""

from __future__ import annotations

from collections.abc import Sequence
from datetime import UTC, datetime

import sqlalchemy as sa
from alembic import op

from zoo.version import __version__

revision: str = "0001"
down_revision: str | None = None
branch_labels: str | Sequence[str] | None = None
depends_on: str | Sequence[str] | None = None


def upgrade() -> None:
    catalog_info = op.create_table(
        "catalog_info",
        sa.Column("key", sa.Text(), nullable=False),
        sa.Column("value", sa.Text(), nullable=False),
        sa.PrimaryKeyConstraint("key", name=op.f("pk_catalog_info")),
    )
    op.create_table(
        "areas",
        sa.Column("area", sa.Integer(), autoincrement=False, nullable=False),
        sa.Column("complete", sa.Boolean(), nullable=False),
        sa.Column("parameter_sets", sa.Integer(), nullable=False),
        sa.Column("readings", sa.Integer(), nullable=False),
        sa.Column("classes", sa.Integer(), nullable=False),
        sa.Column("frames", sa.Integer(), nullable=False),
        sa.Column("built_at", sa.DateTime(timezone=True), nullable=True),
        sa.Column("seconds", sa.Float(), nullable=True),
        sa.CheckConstraint("area >= 1", name=op.f("ck_areas_area_positive")),
        sa.PrimaryKeyConstraint("area", name=op.f("pk_areas")),
    )
    op.create_table(
        "frames",
        sa.Column("id", sa.Text(), nullable=False),
        sa.Column("area", sa.Integer(), nullable=False),
        sa.Column("rank", sa.Integer(), nullable=False),
        sa.Column("label", sa.Text(), nullable=False),
        sa.Column("fingerprint", sa.Text(), nullable=False),
        sa.Column("automorphisms", sa.Text(), nullable=False),
        sa.Column("lattice_g", sa.Integer(), nullable=False),
        sa.Column("lattice_r", sa.Integer(), nullable=False),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_frames")),
        sa.UniqueConstraint("area", "rank", name=op.f("uq_frames_area_rank")),
        sa.UniqueConstraint("fingerprint", name=op.f("uq_frames_fingerprint")),
    )
    op.create_table(
        "classes",
        sa.Column("id", sa.Text(), nullable=False),
        sa.Column("area", sa.Integer(), nullable=False),
        sa.Column("rank", sa.Integer(), nullable=False),
        sa.Column("label", sa.Text(), nullable=False),
        sa.Column("label_alpha", sa.Integer(), nullable=False),
        sa.Column("label_beta", sa.Integer(), nullable=False),
        sa.Column("label_gamma", sa.Integer(), nullable=False),
        sa.Column("label_delta", sa.Integer(), nullable=False),
        sa.Column("frame_id", sa.Text(), nullable=False),
        sa.Column("fingerprint", sa.Text(), nullable=False),
        sa.Column("loop", sa.Integer(), nullable=False),
        sa.Column("states", sa.Text(), nullable=False),
        sa.Column("states_key", sa.Text(), nullable=False),
        sa.Column("state_arcs", sa.Text(), nullable=False),
        sa.Column("state_arcs_key", sa.Text(), nullable=False),
        sa.Column("automorphisms", sa.Text(), nullable=False),
        sa.Column("tokens", sa.Integer(), nullable=False),
        sa.Column("enabled", sa.Integer(), nullable=False),
        sa.Column("semi_enabled", sa.Integer(), nullable=False),
        sa.Column("cycle_time_num", sa.Integer(), nullable=False),
        sa.Column("cycle_time_den", sa.Integer(), nullable=False),
        sa.Column("group_d1", sa.Integer(), nullable=False),
        sa.Column("cyclic", sa.Boolean(), nullable=False),
        sa.Column("iteration", sa.Integer(), nullable=False),
        sa.Column("reading_count", sa.Integer(), nullable=False),
        sa.Column("member_count", sa.Integer(), nullable=False),
        sa.ForeignKeyConstraint(
            ["frame_id"], ["frames.id"], name=op.f("fk_classes_frame_id_frames")
        ),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_classes")),
        sa.UniqueConstraint("area", "rank", name=op.f("uq_classes_area_rank")),
        sa.UniqueConstraint("fingerprint", name=op.f("uq_classes_fingerprint")),
    )
    op.create_table(
        "readings",
        sa.Column("id", sa.Integer(), nullable=False),
        sa.Column("class_id", sa.Text(), nullable=False),
        sa.Column("area", sa.Integer(), nullable=False),
        sa.Column("alpha", sa.Integer(), nullable=False),
        sa.Column("beta", sa.Integer(), nullable=False),
        sa.Column("lattice_g", sa.Integer(), nullable=False),
        sa.Column("lattice_r", sa.Integer(), nullable=False),
        sa.Column("processes", sa.Integer(), nullable=False),
        sa.Column("regular", sa.Boolean(), nullable=False),
        sa.Column("slowness_num", sa.Integer(), nullable=False),
        sa.Column("slowness_den", sa.Integer(), nullable=False),
        sa.Column("forward_count", sa.Integer(), nullable=False),
        sa.Column("forward_length", sa.Integer(), nullable=False),
        sa.Column("forward_tokens", sa.Integer(), nullable=False),
        sa.Column("backward_count", sa.Integer(), nullable=False),
        sa.Column("backward_length", sa.Integer(), nullable=False),
        sa.Column("backward_tokens", sa.Integer(), nullable=False),
        sa.Column("nf_beta_delta", sa.Text(), nullable=False),
        sa.Column("nf_alpha_gamma", sa.Text(), nullable=False),
        sa.ForeignKeyConstraint(
            ["class_id"], ["classes.id"], name=op.f("fk_readings_class_id_classes")
        ),
        sa.PrimaryKeyConstraint("id", name=op.f("pk_readings")),
    )
    op.create_table(
        "parameter_sets",
        sa.Column("alpha", sa.Integer(), autoincrement=False, nullable=False),
        sa.Column("beta", sa.Integer(), autoincrement=False, nullable=False),
        sa.Column("gamma", sa.Integer(), autoincrement=False, nullable=False),
        sa.Column("delta", sa.Integer(), autoincrement=False, nullable=False),
        sa.Column("area", sa.Integer(), nullable=False),
        sa.Column("reading_id", sa.Integer(), nullable=False),
        sa.Column("class_id", sa.Text(), nullable=False),
        sa.CheckConstraint(
            "alpha >= 1 AND beta >= 1 AND gamma >= 1 AND delta >= 1",
            name=op.f("ck_parameter_sets_positive"),
        ),
        sa.ForeignKeyConstraint(
            ["class_id"], ["classes.id"], name=op.f("fk_parameter_sets_class_id_classes")
        ),
        sa.ForeignKeyConstraint(
            ["reading_id"], ["readings.id"], name=op.f("fk_parameter_sets_reading_id_readings")
        ),
        sa.PrimaryKeyConstraint(
            "alpha", "beta", "gamma", "delta", name=op.f("pk_parameter_sets")
        ),
    )
    # When and by which zoo the catalog was made; later runs keep schema_revision and
    # zoo_version current (migrations/env.py).
    op.bulk_insert(
        catalog_info,
        [
            {"key": "created_at", "value": datetime.now(UTC).isoformat(timespec="seconds")},
            {"key": "created_by", "value": __version__},
        ],
    )


def downgrade() -> None:
    op.drop_table("parameter_sets")
    op.drop_table("readings")
    op.drop_table("classes")
    op.drop_table("frames")
    op.drop_table("areas")
    op.drop_table("catalog_info")
