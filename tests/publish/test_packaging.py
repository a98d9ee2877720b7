"""Project metadata: LICENSE, CITATION.cff, the landing page in ``zoo cite``, the distribution
name and the optional extras (issue 8).

References: the MIT License text as published by the Open Source Initiative
(https://opensource.org/license/mit); Citation File Format 1.2.0 (https://citation-file-format
.github.io, required keys cff-version, message, title, authors); PEP 621 / PEP 639 pyproject
metadata read with Python's tomllib; BibTeX parsed by pybtex; PyYAML for the CFF file where
installed.
"""

from __future__ import annotations

import os
import re
import subprocess
import sys
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


def _without(modules: tuple[str, ...], *args: str, cwd: Path) -> subprocess.CompletedProcess[str]:
    """Run the command line in a fresh interpreter where ``modules`` cannot be imported
    (``sys.modules[name] = None`` makes ``import name`` raise ModuleNotFoundError)."""
    blocked = "".join(f"sys.modules[{m!r}] = None; " for m in modules)
    code = f"import sys; {blocked}from zoo.cli import main; sys.argv[0] = 'zoo'; main()"
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    return subprocess.run(
        [sys.executable, "-c", code, *args],
        capture_output=True, text=True, cwd=cwd, env=env, check=False, timeout=120,
    )  # fmt: skip


def test_core_runs_without_the_optional_extras(tmp_path: Path) -> None:
    """The README's first command path: SQLite and text output need neither extra."""
    optional = ("psycopg", "matplotlib")
    db = str(tmp_path / "c.sqlite3")
    built = _without(optional, "build", "--max-area", "6", "--db", db, cwd=tmp_path)
    assert built.returncode == 0, built.stderr
    found = _without(optional, "find", "processes = 2 and area < 7", "--db", db, cwd=tmp_path)
    assert found.returncode == 0, found.stderr
    assert "C(1,2,1,4)" in found.stdout  # gcd(β, δ) = gcd(2, 4) = 2 processes
    exported = _without(optional, "export", "4,2,2,3", "--format", "dot", cwd=tmp_path)
    assert exported.returncode == 0 and "digraph" in exported.stdout


def test_missing_extra_is_one_line_naming_it(tmp_path: Path) -> None:
    cases = [
        (("matplotlib",), ["draw", "4,2,2,3", "--output", "x.svg"], "plots", "x.svg"),
        (("matplotlib",), ["stats", "--plot", "s.png", "--db", "c.sqlite3"], "plots", "s.png"),
        (("psycopg",), ["find", "area < 4", "--db", "postgresql://u@127.0.0.1:5432/x"],
         "postgres", None),
    ]  # fmt: skip
    built = _without((), "build", "--max-area", "4", "--db", "c.sqlite3", cwd=tmp_path)
    assert built.returncode == 0, built.stderr
    for modules, args, extra, output in cases:
        done = _without(modules, *args, cwd=tmp_path)
        assert done.returncode == 1, (args, done.stderr)
        assert "Traceback" not in done.stderr
        lines = done.stderr.strip().splitlines()
        assert len(lines) == 1 and lines[0].startswith("Error: "), done.stderr
        assert lines[0].endswith(f"install it with: pip install '{DISTRIBUTION_NAME}[{extra}]'")
        assert output is None or not (tmp_path / output).exists()
