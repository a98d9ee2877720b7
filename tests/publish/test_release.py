"""Catalog dumps and releases (zoo.publish.release): complete, streamed, verifiable, tamper-evident.

References: Python's csv and json parsers for the dumps, hashlib's SHA-256 (FIPS 180-4) for the
checksums and, where installed, GNU coreutils' ``sha256sum -c`` reading our SHA256SUMS file.
The catalog is built once per module to area 12 through zoo.catalog.service.Catalog.
"""

from __future__ import annotations

import csv
import hashlib
import io
import itertools
import json
import shutil
import subprocess
from pathlib import Path

import pytest
from typer.testing import CliRunner

from zoo.catalog.build import build_catalog
from zoo.catalog.service import Catalog
from zoo.cli import app
from zoo.errors import CatalogError, FormatError, ZooError
from zoo.publish.cite import catalog_version
from zoo.publish.dictionary import BIG_INTEGER_FIELDS
from zoo.publish.release import (
    CHECKSUMS_NAME,
    MANIFEST_NAME,
    iter_catalog_entries,
    iter_dump_lines,
    make_release,
    read_manifest,
    verify_release,
    write_dump,
)


@pytest.fixture(scope="module")
def class_total(small_catalog: str) -> int:
    with Catalog.open(small_catalog) as catalog:
        return sum(s.classes for s in catalog.stats())


@pytest.fixture
def release_dir(small_catalog: str, tmp_path: Path) -> Path:
    folder = tmp_path / "rel"
    result = CliRunner().invoke(app, ["release", "--output", str(folder), "--db", small_catalog])
    assert result.exit_code == 0, result.output
    return folder


def test_entries_come_by_area_then_rank_in_batches(small_catalog: str, class_total: int) -> None:
    with Catalog.open(small_catalog) as catalog:
        small = [e.id for e in iter_catalog_entries(catalog, batch=5)]
        large = [e.id for e in iter_catalog_entries(catalog)]
    assert small == large and len(small) == class_total == len(set(small))
    keys = [(int(i[2:].split("-")[0]), int(i.split("-")[1])) for i in small]
    assert keys == sorted(keys)


def test_jsonl_dump_is_the_catalog(small_catalog: str, tmp_path: Path, class_total: int) -> None:
    out = tmp_path / "all.jsonl"
    with Catalog.open(small_catalog) as catalog:
        summary = write_dump(iter_catalog_entries(catalog), "jsonl", out)
        records = [json.loads(line) for line in out.read_text(encoding="utf-8").splitlines()]
        assert len(records) == summary.classes == class_total
        for record in records[:: max(1, len(records) // 15)]:
            shown = catalog.get(record["id"]).as_dict()  # same as `zoo show ID` json ...
            twins = {k: v for k, v in record.items() if k.endswith("_decimal")}
            assert {k: v for k, v in record.items() if k not in twins} == shown
            # ... with each exact big integer also as a decimal string (issue 8)
            assert twins == {f"{k}_decimal": str(shown[k]) for k in BIG_INTEGER_FIELDS}
    assert summary.sha256 == hashlib.sha256(out.read_bytes()).hexdigest()
    assert summary.bytes == out.stat().st_size
    # Members and invariants are in every record (issue 7).
    assert all(r["members"] and "loop" in r and r["readings"] for r in records)


def test_csv_dump_parses_with_one_row_per_reading(small_catalog: str, class_total: int) -> None:
    """One row per reading, one column per value (issue 8: no JSON blob in a cell)."""
    with Catalog.open(small_catalog) as catalog:
        text = "".join(iter_dump_lines(iter_catalog_entries(catalog), "csv"))
        rows = list(csv.DictReader(io.StringIO(text, newline="")))
        assert len({row["id"] for row in rows}) == class_total
        entry = catalog.get(rows[-1]["id"])
    mine = [row for row in rows if row["id"] == entry.id]
    assert len(mine) == len(entry.readings) == entry.invariants["reading_count"]
    row = mine[-1]
    assert row["label"] == entry.label and row["fingerprint"] == entry.fingerprint
    assert int(row["states"]) == entry.invariants["states"]
    members = sorted(m for r in mine for m in r["reading_members"].split(" "))
    assert members == sorted(str(m) for m in entry.members)
    assert not any(cell.startswith(("[", "{")) for r in rows for cell in r.values())


def test_dump_is_streamed(small_catalog: str) -> None:
    """Lines come out while the entries are still being produced: an endless source works."""
    with Catalog.open(small_catalog) as catalog:
        some = list(itertools.islice(iter_catalog_entries(catalog), 10))
    endless = itertools.cycle(some)
    for fmt in ("csv", "jsonl"):
        first = list(itertools.islice(iter_dump_lines(endless, fmt), 2_000))
        assert len(first) == 2_000


def test_release_verifies(release_dir: Path, class_total: int, small_catalog: str) -> None:
    report = verify_release(release_dir)
    assert report.ok, report.problems
    manifest = read_manifest(release_dir)
    with Catalog.open(small_catalog) as catalog:
        version = catalog_version(catalog)
    assert manifest["catalog"]["complete_to"] == 12 == version.complete_to
    assert manifest["catalog"]["zoo_version"] == version.zoo_version
    assert manifest["catalog"]["encoding"] == version.encoding
    assert manifest["catalog"]["classes"] == class_total
    for item in manifest["files"]:
        data = (release_dir / item["name"]).read_bytes()
        assert item["bytes"] == len(data)
        assert item["sha256"] == hashlib.sha256(data).hexdigest()


@pytest.mark.skipif(shutil.which("sha256sum") is None, reason="GNU coreutils sha256sum missing")
def test_release_checks_with_sha256sum(release_dir: Path) -> None:
    done = subprocess.run(
        ["sha256sum", "-c", CHECKSUMS_NAME],
        cwd=release_dir,
        capture_output=True,
        text=True,
        check=False,
    )
    assert done.returncode == 0, done.stdout + done.stderr
    assert done.stdout.count(": OK") == 4  # both dumps, datapackage.json, manifest.json


def test_tampered_dump_is_detected(release_dir: Path) -> None:
    target = release_dir / "classes.jsonl"
    data = bytearray(target.read_bytes())
    data[100] = ord("7") if data[100] != ord("7") else ord("8")  # same size, other content
    target.write_bytes(bytes(data))
    report = verify_release(release_dir)
    assert not report.ok
    assert any(p.startswith("classes.jsonl: SHA-256") for p in report.problems)
    assert not any("size" in p for p in report.problems)
    result = CliRunner().invoke(app, ["release", "--verify", str(release_dir)])
    assert result.exit_code == 1
    assert "MISMATCH classes.jsonl: SHA-256" in result.stderr
    assert "does not verify" in result.stderr


def test_tampered_manifest_is_detected(release_dir: Path) -> None:
    path = release_dir / MANIFEST_NAME
    manifest = json.loads(path.read_text())
    manifest["catalog"]["complete_to"] = 40
    path.write_text(json.dumps(manifest, indent=2) + "\n")
    report = verify_release(release_dir)
    assert [p for p in report.problems if p.startswith(f"{MANIFEST_NAME}: SHA-256")]


def test_missing_and_extra_files_are_named(release_dir: Path) -> None:
    (release_dir / "classes.csv").unlink()
    (release_dir / "notes.txt").write_text("added later")
    problems = verify_release(release_dir).problems
    assert "classes.csv: missing (the manifest lists it)" in problems
    assert "notes.txt: in the folder but in no checksum list" in problems


def test_release_never_overwrites(release_dir: Path, small_catalog: str) -> None:
    before = {p.name: p.read_bytes() for p in release_dir.iterdir()}
    result = CliRunner().invoke(app, ["release", "-o", str(release_dir), "--db", small_catalog])
    assert result.exit_code == 1
    assert "already exists and is not empty" in result.stderr
    assert {p.name: p.read_bytes() for p in release_dir.iterdir()} == before


def test_failed_release_leaves_nothing(tmp_path: Path, small_catalog: str) -> None:
    def broken() -> object:
        raise ZooError("simulated failure while reading the catalog")

    from zoo.publish.cite import CatalogVersion

    with pytest.raises(ZooError, match="simulated"):
        make_release(broken, CatalogVersion("0", "v1", 1), tmp_path / "new")  # type: ignore[arg-type]
    assert list(tmp_path.iterdir()) == []


def test_not_a_release(tmp_path: Path) -> None:
    with pytest.raises(FormatError, match="is missing"):
        verify_release(tmp_path)
    (tmp_path / MANIFEST_NAME).write_text('{"kind": "something else"}')
    with pytest.raises(FormatError, match="not a zoo release manifest"):
        verify_release(tmp_path)


def test_cli_dump_formats(small_catalog: str, tmp_path: Path, class_total: int) -> None:
    runner = CliRunner()
    out = tmp_path / "classes.csv"
    result = runner.invoke(app, ["dump", "--output", str(out), "--db", small_catalog])
    assert result.exit_code == 0, result.output
    assert len({row["id"] for row in csv.DictReader(out.open(newline=""))}) == class_total
    result = runner.invoke(app, ["dump", "--format", "jsonl", "--db", small_catalog])
    assert result.exit_code == 0
    assert len(result.stdout.splitlines()) == class_total
    result = runner.invoke(app, ["dump", "--db", small_catalog])
    assert result.exit_code == 1 and "dump format not given" in result.stderr


def test_cli_release_needs_one_mode() -> None:
    result = CliRunner().invoke(app, ["release"])
    assert result.exit_code == 1
    assert "exactly one of --output DIR" in result.stderr


def test_dump_from_each_database(db_url: str, tmp_path: Path) -> None:
    """The dump reads SQLite and PostgreSQL catalogs alike (architecture.md, catalog location)."""
    with Catalog.open(db_url, create=True) as catalog:
        build_catalog(catalog, 6)
        total = sum(s.classes for s in catalog.stats())
        lines = list(iter_dump_lines(iter_catalog_entries(catalog), "jsonl"))
    assert len(lines) == total > 0


def test_missing_or_damaged_areas_are_refused(small_catalog: str, tmp_path: Path) -> None:
    import sqlite3

    with Catalog.open(small_catalog) as catalog:
        with pytest.raises(CatalogError, match="area 13 is not stored completely"):
            list(iter_catalog_entries(catalog, [13]))
    damaged = tmp_path / "damaged.sqlite3"
    shutil.copy(small_catalog, damaged)
    with sqlite3.connect(damaged) as connection:  # remove one class of area 12 by hand
        for table in ("parameter_sets", "readings"):
            connection.execute(f"DELETE FROM {table} WHERE class_id = 'CY12-2'")
        connection.execute("UPDATE seeds SET class_id = NULL WHERE class_id = 'CY12-2'")
        connection.execute("DELETE FROM classes WHERE id = 'CY12-2'")
    with Catalog.open(str(damaged)) as catalog:
        entries = iter_catalog_entries(catalog, [12], batch=1)
        assert next(entries).id == "CY12-1"
        with pytest.raises(CatalogError, match="classes of area 12 .* damaged"):
            list(entries)


@pytest.mark.parametrize(
    "command",
    [
        ["dump", "--format", "csv", "--output", "/proc/zoo-x.csv"],
        ["release", "--output", "/proc/zoo-rel"],
        ["draw", "4,2,2,3", "--output", "/proc/zoo-x.svg"],
    ],
)
def test_unwritable_output_is_one_error_line(command: list[str], small_catalog: str) -> None:
    """/proc accepts no new files (Linux procfs, common practice): an error, not a traceback."""
    extra = [] if command[0] == "draw" else ["--db", small_catalog]
    result = CliRunner().invoke(app, [*command, *extra])
    assert result.exit_code == 1, result.output
    assert result.exception is None or isinstance(result.exception, SystemExit)
    target = command[command.index("--output") + 1]
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1
    assert lines[0].startswith(f"Error: cannot write '{target}': ")
    assert lines[0].endswith("; choose a writable location")


def test_unwritable_output_from_the_library(tmp_path: Path) -> None:
    from zoo.publish.release import OutputNotWritable, write_bytes_atomically

    with pytest.raises(OutputNotWritable, match="cannot write '/proc/zoo-y.txt'"):
        write_bytes_atomically(Path("/proc/zoo-y.txt"), b"x")
    assert isinstance(OutputNotWritable("x"), ZooError)
