"""Project metadata: LICENSE, CITATION.cff, the landing page in ``zoo cite``, the distribution
name and the optional extras (issue 8).

References: the MIT License text as published by the Open Source Initiative
(https://opensource.org/license/mit); Citation File Format 1.2.0 (https://citation-file-format
.github.io, required keys cff-version, message, title, authors); PEP 621 / PEP 639 pyproject
metadata read with Python's tomllib; BibTeX parsed by pybtex; PyYAML for the CFF file where
installed.
"""

from __future__ import annotations

import re
import tomllib
from pathlib import Path
from typing import Any

from pybtex.database import parse_string
from typer.testing import CliRunner

from zoo.cli import app
from zoo.version import DISTRIBUTION_NAME, HOMEPAGE, __version__

ROOT = Path(__file__).resolve().parents[2]


def _pyproject() -> dict[str, Any]:
    with open(ROOT / "pyproject.toml", "rb") as handle:
        return tomllib.load(handle)


def test_license_is_the_mit_text() -> None:
    project = _pyproject()["project"]
    assert project["license"] == "MIT" and project["license-files"] == ["LICENSE"]
    text = (ROOT / "LICENSE").read_text(encoding="utf-8")
    assert text.startswith("MIT License\n\nCopyright (c) 2026 zoo contributors\n")
    words = " ".join(text.split())
    for phrase in (
        "Permission is hereby granted, free of charge, to any person obtaining a copy",
        "The above copyright notice and this permission notice shall be included in all copies",
        'THE SOFTWARE IS PROVIDED "AS IS", WITHOUT WARRANTY OF ANY KIND',
    ):
        assert phrase in words


def _read_cff() -> dict[str, Any]:
    text = (ROOT / "CITATION.cff").read_text(encoding="utf-8")
    try:
        import yaml
    except ImportError:  # structural reading of the flat keys this file uses
        flat = dict(re.findall(r'^([a-z-]+): "?(.*?)"?$', text, flags=re.M))
        flat["authors"] = re.findall(r'^  - name: "(.*)"$', text, flags=re.M)
        return flat
    loaded = yaml.safe_load(text)
    loaded["authors"] = [a["name"] for a in loaded["authors"]]
    return loaded


def test_citation_cff_is_valid_and_agrees_with_the_package() -> None:
    cff = _read_cff()
    for key in ("cff-version", "message", "title", "authors"):  # required by CFF 1.2.0
        assert cff[key], key
    assert cff["cff-version"] == "1.2.0" and cff["type"] == "software"
    assert cff["authors"] == ["zoo contributors"]
    assert cff["license"] == "MIT" and cff["version"] == __version__
    assert cff["url"] == HOMEPAGE == _pyproject()["project"]["urls"]["Homepage"]


def test_cite_has_the_landing_page_url(small_catalog: str) -> None:
    result = CliRunner().invoke(app, ["cite", "CY12-3", "-f", "bibtex", "--db", small_catalog])
    assert result.exit_code == 0, result.output
    entry = parse_string(result.stdout, "bibtex").entries["zoo:CY12-3"]
    assert entry.fields["url"] == HOMEPAGE
    text = CliRunner().invoke(app, ["cite", "CY12-3", "-f", "text", "--db", small_catalog])
    assert HOMEPAGE in text.stdout


def test_distribution_name_is_our_own() -> None:
    """``zoo`` on the package index is another project: we install as DISTRIBUTION_NAME."""
    project = _pyproject()["project"]
    assert project["name"] == DISTRIBUTION_NAME != "zoo"
    assert project["scripts"] == {"zoo": "zoo.cli:main"}  # the command stays zoo
    for extra, needs in project["optional-dependencies"].items():
        for need in needs:  # extras that name the project itself use the new name
            assert not need.startswith("zoo["), (extra, need)
    for doc in ("README.md", "DEVELOPERS.md"):
        text = (ROOT / doc).read_text(encoding="utf-8")
        assert "pip install zoo" not in text and "pip install 'zoo" not in text
        assert DISTRIBUTION_NAME in text, doc
