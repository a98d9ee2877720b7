"""Storage of the catalog: SQLAlchemy models, engines, schema revisions, query-to-SQL.

``models`` holds the typed ORM classes, ``database`` the engine handling (SQLite and
PostgreSQL) and the Alembic revision checks, ``querysql`` the translation of query ASTs to SQL.
The schema is created and changed only by the Alembic revisions shipped as ``zoo.migrations``.
"""
