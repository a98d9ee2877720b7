"""The schema revision this zoo reads and writes.

Committed as a constant so that light readers (``zoo.storage.quicklookup``) need neither
Alembic nor the migration files to know it; ``tests/storage/test_schema.py`` checks that it is
Alembic's head of ``migrations/versions``. A new migration updates it (DEVELOPERS.md, "Making a
migration").
"""

SCHEMA_HEAD = "0004"
