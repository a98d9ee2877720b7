"""Alembic environment and revisions of the catalog schema, installed as ``zoo.migrations``.

How to write a revision: docs/migrations.md.
"""
