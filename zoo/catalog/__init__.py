"""The catalog: enumeration, classification, the build, the read service, identifiers, seeds.

Modules are imported one by one (``zoo.catalog.service``, ``zoo.catalog.build``), so that
enumerating parameter sets does not load the database layer.
"""
