"""Citations (zoo.publish.cite): the right fields, valid BibTeX, a stable key, the catalog's
version.

BibTeX structure is checked with pybtex's parser (an independent BibTeX implementation); the
fields against the catalog itself (zoo.catalog.service, built once for this module to area 12).
"""

from __future__ import annotations

import json
import re

import pytest
from pybtex.database import parse_string
from typer.testing import CliRunner

from zoo import __version__
from zoo.catalog.service import Catalog
from zoo.cli import app
from zoo.cli.app import NOT_FOUND
from zoo.core.canonical import ENCODING_VERSION
from zoo.errors import CatalogError, NotInCatalog
from zoo.publish.cite import CatalogVersion, Citation, bibtex_key, catalog_version, cite


def test_catalog_version_is_read_from_the_catalog(small_catalog: str) -> None:
    from zoo.core.canonical import ENCODING_VERSION

    with Catalog.open(small_catalog) as catalog:
        version = catalog_version(catalog)
        assert version == CatalogVersion(__version__, ENCODING_VERSION, 12)
        assert catalog.complete_to() == 12
    assert str(version) == f"zoo {__version__}/{ENCODING_VERSION}/A<=12"


def test_bibtex_fields(small_catalog: str) -> None:
    with Catalog.open(small_catalog) as catalog:
        entry = catalog.get("C(3,3,1,3)")  # docs/theory/check-values.md: A = 12
        citation = cite(catalog, "C(3,3,1,3)")
    assert citation.identifier == entry.id and citation.label == entry.label
    data = parse_string(citation.bibtex(), "bibtex")
    (key,) = data.entries.keys()
    assert key == f"zoo:{entry.id}"
    bib = data.entries[key]
    assert bib.type == "misc"
    assert entry.id in bib.fields["title"] and entry.label in bib.fields["title"]
    note = bib.fields["note"]
    for part in (entry.id, entry.label, entry.fingerprint, __version__, "complete to area 12"):
        assert part in note
    assert bib.fields["version"] == citation.version.describe()
    assert bib.fields["version"] == (
        f"zoo {__version__}, canonical encoding {ENCODING_VERSION}, complete to area 12"
    )
    assert re.fullmatch(r"\d{4}", bib.fields["year"])


def test_plain_text_citation(small_catalog: str) -> None:
    with Catalog.open(small_catalog) as catalog:
        citation = cite(catalog, "CY12-1")
        entry = catalog.get("CY12-1")
    text = citation.text()
    assert "\n" not in text
    for part in (
        "CY12-1",
        entry.label,
        entry.fingerprint,
        f"zoo {__version__}",
        "complete to area 12",
    ):
        assert part in text


def test_key_is_stable_and_derived_from_the_identifier(small_catalog: str) -> None:
    assert bibtex_key("CY16-3") == "zoo:CY16-3"
    assert bibtex_key("cy16-3") == "zoo:CY16-3"
    with pytest.raises(NotInCatalog):
        bibtex_key("C(4,2,2,3)")
    # The same identifier gets the same key whatever the catalog version.
    one = Citation("CY12-4", "class", "C(1,1,1,11)", "v1:ab", CatalogVersion("0.1.0", "v1", 12))
    two = Citation("CY12-4", "class", "C(1,1,1,11)", "v1:ab", CatalogVersion("0.2.0", "v1", 40))
    assert one.key == two.key
    assert one.bibtex() != two.bibtex()


def test_special_characters_are_escaped() -> None:
    odd = Citation("CY12-4", "class", "C(1,1,1,11)", "v1:a_b%c{d", CatalogVersion("1_0", "v1", 3))
    (entry,) = parse_string(odd.bibtex(), "bibtex").entries.values()
    assert "\\_" in entry.fields["note"] and "\\%" in entry.fields["note"]


def test_frame_citation(small_catalog: str) -> None:
    with Catalog.open(small_catalog) as catalog:
        frame_id = catalog.get("CY12-1").frame_id
        citation = cite(catalog, frame_id)
    assert citation.kind == "frame" and citation.key == f"zoo:{frame_id}"
    parse_string(citation.bibtex(), "bibtex")


def test_unbuilt_catalog_cannot_be_cited(tmp_path) -> None:  # type: ignore[no-untyped-def]
    path = tmp_path / "empty.sqlite3"
    with Catalog.open(str(path), create=True) as catalog:
        with pytest.raises(CatalogError, match="never built"):
            catalog_version(catalog)


def test_cli_cite_both_and_json(small_catalog: str) -> None:
    runner = CliRunner()
    result = runner.invoke(app, ["cite", "CY12-2", "--db", small_catalog])
    assert result.exit_code == 0, result.output
    assert result.stdout.startswith("@misc{zoo:CY12-2,")
    parse_string(result.stdout.split("\n\n")[0], "bibtex")
    result = runner.invoke(app, ["cite", "CY12-2", "--db", small_catalog, "--format", "json"])
    data = json.loads(result.stdout)
    assert data["id"] == "CY12-2" and data["bibtex_key"] == "zoo:CY12-2"
    assert data["catalog_version"]["complete_to"] == 12


def test_cli_cite_unknown_entry(small_catalog: str) -> None:
    result = CliRunner().invoke(app, ["cite", "CY12-999", "--db", small_catalog])
    assert result.exit_code == NOT_FOUND
    assert result.stderr.startswith("Error: ")
    assert len(result.stderr.strip().splitlines()) == 1


def test_bibtex_has_no_characters_that_ot1_misprints(small_catalog: str) -> None:
    """LaTeX's OT1 text encoding has no < or > glyph (it prints ¡ and ¿), common practice."""
    with Catalog.open(small_catalog) as catalog:
        citation = cite(catalog, "CY12-1")
    bibtex = citation.bibtex()
    assert "<" not in bibtex and ">" not in bibtex
    (entry,) = parse_string(bibtex, "bibtex").entries.values()
    assert "complete to area 12" in entry.fields["howpublished"]
    assert citation.version.describe() in citation.text()  # the same words in both forms
