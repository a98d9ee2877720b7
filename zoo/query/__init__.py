"""The query language: the field registry, the parser and its generated documentation.

Pure: no database code. ``zoo.storage.querysql`` compiles the parsed trees to SQL.
"""
