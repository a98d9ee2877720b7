"""``zoo stats --plot`` as a PDF for a paper (ISO 32000-1 §7.5.2 header ``%PDF-``, §7.5.5
trailer ``%%EOF``); the same catalog gives the same file (no creation date)."""

from __future__ import annotations

from pathlib import Path

from typer.testing import CliRunner

from zoo.catalog.build import build_catalog
from zoo.catalog.service import Catalog
from zoo.cli import app


def test_stats_plot_writes_a_reproducible_pdf(tmp_path: Path) -> None:
    db = tmp_path / "catalog.sqlite3"
    with Catalog.open(str(db), create=True) as catalog:
        build_catalog(catalog, 6)
    first, second = tmp_path / "counts.pdf", tmp_path / "again.pdf"
    for path in (first, second):
        result = CliRunner().invoke(app, ["stats", "--db", str(db), "--plot", str(path)])
        assert result.exit_code == 0, result.output
    data = first.read_bytes()
    assert data.startswith(b"%PDF-") and data.rstrip().endswith(b"%%EOF")
    assert second.read_bytes() == data
    result = CliRunner().invoke(app, ["stats", "--db", str(db), "--plot", str(tmp_path / "c.eps")])
    assert result.exit_code != 0 and ".pdf" in result.output and "Traceback" not in result.output
