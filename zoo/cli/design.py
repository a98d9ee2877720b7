"""Commands of zoo: design (filled in by its owner)."""

from zoo.cli.app import app  # noqa: F401
