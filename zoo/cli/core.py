"""Commands of zoo: core (filled in by its owner)."""

from zoo.cli.app import app  # noqa: F401


@app.command("version")
def version() -> None:
    """Print the zoo version."""
    from zoo import __version__

    print(__version__)
