"""Commands of zoo: catalog (filled in by its owner)."""

from zoo.cli.app import app  # noqa: F401
