"""Publishing the catalog: citations, dumps and checksummed releases."""
