"""Command line of zoo: a thin layer over the core and the catalog service.

Each module below registers its commands on ``zoo.cli.app.app``; none builds queries or nets.
"""

from zoo.cli import catalog, core, design, interchange  # noqa: F401  (command registration)
from zoo.cli.app import app, main

__all__ = ["app", "main"]
