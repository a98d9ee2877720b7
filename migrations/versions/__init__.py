"""The revisions of the catalog schema, one file each, oldest first (``0001_...``)."""
