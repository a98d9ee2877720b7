"""Dumps of the whole catalog (CSV, JSON Lines) and verifiable catalog releases.

* ``write_dump`` streams every class, with its invariants, readings and members, to CSV or JSON
  Lines (https://jsonlines.org: one JSON object per line, UTF-8). Classes are read from the
  catalog one area at a time, so memory stays bounded by the largest area, not the catalog.
* A CSV dump has one row per reading and one column per value; a JSON Lines record also
  writes each exact big integer as a decimal string; a dump to a file gets its data dictionary
  ``datapackage.json`` beside it (zoo.publish.dictionary).
* ``make_release`` writes both dumps and their ``datapackage.json`` into a new folder together
  with ``manifest.json`` (sizes,
  SHA-256 checksums, zoo and encoding versions, the area up to which the catalog is complete)
  and ``SHA256SUMS`` in the format of GNU coreutils' ``sha256sum``, so a reader can check a
  release with ``zoo release --verify DIR`` or with ``sha256sum -c SHA256SUMS`` alone.
* ``verify_release`` recomputes every size and checksum and lists each mismatch.

The folder is written under a temporary name beside the target and renamed at the end: a
failed release leaves nothing half-written, and an existing folder is never overwritten.
"""

from __future__ import annotations

import csv
import hashlib
import io
import json
import os
import shutil
import sys
import tempfile
from collections.abc import Callable, Iterable, Iterator
from dataclasses import dataclass, field
from datetime import UTC, datetime
from pathlib import Path
from typing import IO, Any, Protocol

from zoo.catalog.identifiers import class_identifier
from zoo.errors import CatalogError, FormatError, ZooError
from zoo.publish.cite import CatalogVersion
from zoo.publish.dictionary import (
    CSV_COLUMNS,
    csv_rows,
    data_package,
    dump_resource,
    with_decimal_twins,
)
from zoo.publish.outfile import (
    OutputNotWritable,
    default_mode,
    not_writable,
    output_target,
    replacing,
    write_output,
)
from zoo.version import DISTRIBUTION_NAME

DUMP_FORMATS = ("csv", "jsonl")
MANIFEST_NAME = "manifest.json"
CHECKSUMS_NAME = "SHA256SUMS"
#: Version of the manifest layout below; a reader refuses a manifest it does not know.
MANIFEST_VERSION = 1
RELEASE_KIND = "zoo-catalog-release"
DUMP_NAMES = {"csv": "classes.csv", "jsonl": "classes.jsonl"}
#: The data dictionary (a Frictionless Data Package descriptor; the spec fixes the name).
PACKAGE_NAME = "datapackage.json"

_CHUNK = 1 << 20


class ClassEntryLike(Protocol):
    """What a dump needs of a catalog entry: zoo.catalog.service.ClassEntry's JSON-ready dict."""

    id: str

    def as_dict(self) -> dict[str, Any]: ...


def catalog_areas(catalog: Any) -> list[int]:
    """The areas a dump of ``catalog`` holds: every completely stored area, ascending."""
    return [stats.area for stats in catalog.stats() if stats.complete and stats.classes]


def iter_catalog_entries(
    catalog: Any, areas: Iterable[int] | None = None, batch: int = 500
) -> Iterator[ClassEntryLike]:
    """Every class of the given areas (default: all complete ones), by area, then rank.

    Streams through ``Catalog.iter_entries``, which reads at most ``batch`` entries at a time, so
    a dump of the whole catalog never holds more than that in memory. Each area must be stored
    completely, and must hold as many classes as its row in ``areas`` says (docs/citing.md:
    identifiers CY{area}-1 .. CY{area}-{classes}); anything else is a damaged catalog.
    """
    counts = {stats.area: stats.classes for stats in catalog.stats() if stats.complete}
    chosen = sorted(counts) if areas is None else list(areas)
    for area in chosen:
        if area not in counts:
            raise CatalogError(
                f"area {area} is not stored completely in catalog {catalog.location}; "
                f"build it first with: zoo build --max-area {area} --db {catalog.location}"
            )
        held = 0
        for entry in catalog.iter_entries([area], batch_size=batch):
            held += 1
            if entry.id != class_identifier(area, held):
                break  # a rank is missing
            yield entry
        else:
            if held == counts[area]:
                continue
        raise CatalogError(
            f"catalog {catalog.location} lists {counts[area]} classes of area {area} but does "
            f"not hold them as CY{area}-1..CY{area}-{counts[area]}; the catalog is damaged: "
            "rebuild that area"
        )


# --- records ---------------------------------------------------------------------------
#
# A JSON Lines record is what `zoo show ID --format json` prints for the class
# (ClassEntry.as_dict: identity, members, every class invariant, readings, seeds), with each
# exact big integer also as a decimal string (``states_decimal``, ...; zoo.publish.dictionary).
# A CSV row is one reading of a class, one column per value (zoo.publish.dictionary.CSV_COLUMNS).


def iter_csv_lines(records: Iterable[dict[str, Any]]) -> Iterator[str]:
    """CSV text (RFC 4180 quoting, CRLF line ends as Python's csv module writes) line by line:
    a header, then one row per reading of each class."""
    buffer = io.StringIO()
    writer = csv.writer(buffer)
    writer.writerow([column.name for column in CSV_COLUMNS])
    yield buffer.getvalue()
    for record in records:
        buffer.seek(0)
        buffer.truncate()
        try:
            writer.writerows(csv_rows(record))
        except (KeyError, IndexError, TypeError) as exc:
            raise CatalogError(
                f"class {record.get('id')} lacks the value {exc}; the catalog was built by "
                "another zoo version: rebuild it"
            ) from None
        yield buffer.getvalue()


def iter_jsonl_lines(records: Iterable[dict[str, Any]]) -> Iterator[str]:
    """JSON Lines: one compact JSON object per class, exact integers (big ones also as decimal
    strings), UTF-8."""
    for record in records:
        text = json.dumps(with_decimal_twins(record), ensure_ascii=False, separators=(",", ":"))
        yield text + "\n"


def iter_dump_lines(entries: Iterable[ClassEntryLike], fmt: str) -> Iterator[str]:
    """The dump of ``entries`` in ``fmt`` ("csv" or "jsonl"), as lines of text."""
    if fmt not in DUMP_FORMATS:
        raise FormatError(f"unknown dump format {fmt!r}; choose one of {', '.join(DUMP_FORMATS)}")
    sys.set_int_max_str_digits(0)  # state counts pass 4300 digits at large areas
    records = (entry.as_dict() for entry in entries)
    return iter_csv_lines(records) if fmt == "csv" else iter_jsonl_lines(records)


@dataclass(frozen=True)
class DumpSummary:
    """What a dump wrote: its file, format, number of classes, bytes and SHA-256."""

    path: Path
    format: str
    classes: int
    bytes: int
    sha256: str


def write_dump_stream(
    entries: Iterable[ClassEntryLike], fmt: str, out: IO[bytes], path: Path | None = None
) -> DumpSummary:
    """Stream the dump to a binary file object, hashing as it goes."""
    digest = hashlib.sha256()
    size = 0
    counted = _Counter(entries)
    for line in iter_dump_lines(counted, fmt):
        data = line.encode("utf-8")
        out.write(data)
        digest.update(data)
        size += len(data)
    return DumpSummary(path or Path("-"), fmt, counted.count, size, digest.hexdigest())


class _Counter:
    """An iterable wrapper that counts what passes through it."""

    def __init__(self, items: Iterable[Any]) -> None:
        self._items = items
        self.count = 0

    def __iter__(self) -> Iterator[Any]:
        for item in self._items:
            self.count += 1
            yield item


def write_bytes_atomically(path: Path, data: bytes) -> None:
    """Write ``data`` to ``path`` (``zoo.publish.outfile.write_output``)."""
    write_output(path, data)


def write_dump(entries: Iterable[ClassEntryLike], fmt: str, path: Path) -> DumpSummary:
    """Write the dump to ``path`` through a temporary file renamed at the end.

    An existing file at ``path`` is replaced only once the new dump is complete.
    """
    path = Path(path)
    with replacing(path, "the dump") as out:
        summary = write_dump_stream(entries, fmt, out)
    return DumpSummary(path, fmt, summary.classes, summary.bytes, summary.sha256)


def package_path(dump_path: Path) -> Path:
    """Where the data dictionary of a dump written to ``dump_path`` goes: ``datapackage.json``
    in the folder of the file (of the link's target, for a link)."""
    return output_target(Path(dump_path)).parent / PACKAGE_NAME


def _read_own_package(path: Path) -> dict[str, Any] | None:
    """The zoo-written descriptor at ``path``, None if there is none; a foreign one is refused
    (it describes other data, and a dump never overwrites what it did not write)."""
    if not path.exists() and not path.is_symlink():
        return None
    try:
        package = json.loads(path.read_text(encoding="utf-8"))
    except (OSError, UnicodeDecodeError, json.JSONDecodeError):
        package = None
    if not isinstance(package, dict) or not str(package.get("x-written-by", "")).startswith(
        DISTRIBUTION_NAME
    ):
        raise ZooError(
            f"{str(path)!r} exists and was not written by zoo, so the dump's data dictionary "
            "cannot go beside it; write the dump into another folder"
        )
    return package


def check_package_slot(dump_path: Path) -> None:
    """Refuse, before anything is written, a dump whose data dictionary could not be written."""
    _read_own_package(package_path(dump_path))


def write_dump_package(summary: DumpSummary, complete_to: int | None) -> Path:
    """Write or update ``datapackage.json`` beside a dump file, describing it.

    Other dumps that an earlier zoo run described in the same folder keep their resource while
    their file is still there, so a CSV and a JSON Lines dump side by side share one descriptor.
    """
    path = package_path(summary.path)
    folder = path.parent
    name = output_target(summary.path).name
    earlier = _read_own_package(path) or {}
    resources = [
        r
        for r in earlier.get("resources", [])
        if isinstance(r, dict) and r.get("path") != name and (folder / str(r.get("path"))).is_file()
    ]
    resources.append(dump_resource(name, summary.format, summary.bytes, summary.sha256))
    package = data_package(resources, complete_to)
    write_output(path, (json.dumps(package, indent=2, ensure_ascii=False) + "\n").encode())
    return path


# --- releases --------------------------------------------------------------------------


def file_sha256(path: Path) -> tuple[int, str]:
    """(size in bytes, SHA-256 hex digest) of a file, read in 1 MiB chunks."""
    digest = hashlib.sha256()
    size = 0
    with open(path, "rb") as handle:
        while chunk := handle.read(_CHUNK):
            digest.update(chunk)
            size += len(chunk)
    return size, digest.hexdigest()


@dataclass(frozen=True)
class ReleaseSummary:
    """What ``make_release`` wrote."""

    folder: Path
    version: CatalogVersion
    classes: int
    files: tuple[DumpSummary, ...]


def make_release(
    entries_factory: Callable[[], Iterable[ClassEntryLike]],
    version: CatalogVersion,
    folder: Path,
    *,
    created_at: datetime | None = None,
) -> ReleaseSummary:
    """Write a release folder: both dumps, ``manifest.json`` and ``SHA256SUMS``.

    ``entries_factory`` is called once per dump and must yield the same classes each time
    (the catalog, read twice). ``folder`` must not exist yet (or be an empty folder).
    """
    folder = Path(folder)
    if folder.exists() and (not folder.is_dir() or any(folder.iterdir())):
        raise ZooError(
            f"release folder {str(folder)!r} already exists and is not empty; "
            "choose a new folder (a release is never written over another)"
        )
    parent = folder.resolve().parent
    if not parent.is_dir():
        raise ZooError(f"folder {str(parent)!r} for the release does not exist; create it first")
    try:
        staging = Path(tempfile.mkdtemp(prefix=f".{folder.name}.", dir=parent))
    except OSError as exc:
        raise not_writable(folder, exc) from None
    try:
        dumps = []
        for fmt in DUMP_FORMATS:
            dumps.append(write_dump(entries_factory(), fmt, staging / DUMP_NAMES[fmt]))
        counts = {d.classes for d in dumps}
        if len(counts) != 1:
            raise CatalogError(
                f"the catalog changed while the release was written ({sorted(counts)} classes); "
                "write the release again when no build is running"
            )
        package = data_package(
            [dump_resource(d.path.name, d.format, d.bytes, d.sha256) for d in dumps],
            version.complete_to,
        )
        package_bytes = (json.dumps(package, indent=2, ensure_ascii=False) + "\n").encode()
        write_output(staging / PACKAGE_NAME, package_bytes)
        described = DumpSummary(
            staging / PACKAGE_NAME,
            "datapackage",
            dumps[0].classes,
            len(package_bytes),
            hashlib.sha256(package_bytes).hexdigest(),
        )
        stamp = (created_at or datetime.now(UTC)).replace(microsecond=0)
        manifest = {
            "kind": RELEASE_KIND,
            "manifest_version": MANIFEST_VERSION,
            "created_at": stamp.isoformat().replace("+00:00", "Z"),
            "catalog": {**version.as_dict(), "classes": dumps[0].classes},
            "files": [
                {"name": d.path.name, "format": d.format, "bytes": d.bytes, "sha256": d.sha256}
                for d in (*dumps, described)
            ],
        }
        (staging / MANIFEST_NAME).write_text(
            json.dumps(manifest, indent=2, ensure_ascii=False) + "\n", encoding="utf-8"
        )
        # sha256sum's text format: digest, two spaces (text mode), file name.
        lines = [f"{d.sha256}  {d.path.name}\n" for d in (*dumps, described)]
        size, digest = file_sha256(staging / MANIFEST_NAME)
        lines.append(f"{digest}  {MANIFEST_NAME}\n")
        (staging / CHECKSUMS_NAME).write_text("".join(lines), encoding="utf-8")
        for name in (MANIFEST_NAME, CHECKSUMS_NAME):
            os.chmod(staging / name, default_mode())
        os.chmod(staging, default_mode(directory=True))
        if folder.exists():
            folder.rmdir()  # empty, checked above
        os.replace(staging, folder)
    except OSError as exc:
        shutil.rmtree(staging, ignore_errors=True)
        if isinstance(exc, OutputNotWritable):
            raise
        raise not_writable(folder, exc) from None
    except BaseException:
        shutil.rmtree(staging, ignore_errors=True)
        raise
    files = tuple(
        DumpSummary(folder / d.path.name, d.format, d.classes, d.bytes, d.sha256) for d in dumps
    )
    return ReleaseSummary(folder, version, dumps[0].classes, files)


@dataclass(frozen=True)
class VerifyReport:
    """The result of checking a release folder; ``problems`` is empty when it verifies."""

    folder: Path
    manifest: dict[str, Any]
    checked: tuple[str, ...]
    problems: tuple[str, ...] = field(default=())

    @property
    def ok(self) -> bool:
        return not self.problems


def release_catalog(catalog: Any, folder: Path) -> ReleaseSummary:
    """Write a release of an open zoo.catalog.service.Catalog (``zoo release --output``).

    The areas are fixed up front, so that both dumps hold the same classes even while a build
    adds areas; the version is the catalog's (zoo.publish.cite.catalog_version).
    """
    from zoo.publish.cite import catalog_version

    version = catalog_version(catalog)
    areas = catalog_areas(catalog)
    return make_release(lambda: iter_catalog_entries(catalog, areas), version, folder)


def read_manifest(folder: Path) -> dict[str, Any]:
    """The manifest of a release folder, checked for kind, version and shape."""
    path = Path(folder) / MANIFEST_NAME
    if not Path(folder).is_dir():
        raise FormatError(
            f"release folder {str(folder)!r} does not exist; give the folder "
            "that `zoo release --output` wrote"
        )
    if not path.is_file():
        raise FormatError(
            f"{str(path)!r} is missing, so {str(folder)!r} is not a zoo release; "
            "give the folder that `zoo release --output` wrote"
        )
    try:
        manifest = json.loads(path.read_text(encoding="utf-8"))
    except (UnicodeDecodeError, json.JSONDecodeError) as exc:
        raise FormatError(
            f"{str(path)!r} is not valid JSON ({exc}); the release is damaged"
        ) from None
    if not isinstance(manifest, dict) or manifest.get("kind") != RELEASE_KIND:
        raise FormatError(
            f"{str(path)!r} is not a zoo release manifest (kind must be "
            f"{RELEASE_KIND!r}); give the folder that `zoo release` wrote"
        )
    if manifest.get("manifest_version") != MANIFEST_VERSION:
        raise FormatError(
            f"{str(path)!r} has manifest version {manifest.get('manifest_version')!r}, this zoo "
            f"reads version {MANIFEST_VERSION}; verify it with the zoo that wrote it"
        )
    files = manifest.get("files")
    if not isinstance(files, list) or not all(
        isinstance(f, dict)
        and isinstance(f.get("name"), str)
        and isinstance(f.get("bytes"), int)
        and isinstance(f.get("sha256"), str)
        for f in files
    ):
        raise FormatError(
            f"{str(path)!r} has no valid file list (name, bytes, sha256 per file); "
            "the release is damaged"
        )
    return manifest


def verify_release(folder: Path) -> VerifyReport:
    """Recompute every listed file's size and SHA-256 and compare with the manifest.

    Also checks ``SHA256SUMS`` against the same files (including the manifest itself), so that
    a tampered manifest is caught too, and names files in the folder that no list mentions.
    """
    folder = Path(folder)
    manifest = read_manifest(folder)
    problems: list[str] = []
    checked: list[str] = []
    actual: dict[str, str] = {}
    for item in manifest["files"]:
        name = item["name"]
        if Path(name).name != name:
            problems.append(f"{name}: the manifest names a file outside the release folder")
            continue
        path = folder / name
        if not path.is_file():
            problems.append(f"{name}: missing (the manifest lists it)")
            continue
        size, digest = file_sha256(path)
        actual[name] = digest
        checked.append(name)
        if size != item["bytes"]:
            problems.append(f"{name}: size {size:,} bytes, the manifest says {item['bytes']:,}")
        if digest != item["sha256"]:
            problems.append(f"{name}: SHA-256 {digest}, the manifest says {item['sha256']}")
    sums = folder / CHECKSUMS_NAME
    listed = {item["name"] for item in manifest["files"]} | {MANIFEST_NAME, CHECKSUMS_NAME}
    if not sums.is_file():
        problems.append(f"{CHECKSUMS_NAME}: missing")
    else:
        for number, line in enumerate(sums.read_text(encoding="utf-8").splitlines(), start=1):
            parts = line.split(None, 1)
            if len(parts) != 2 or len(parts[0]) != 64:
                problems.append(f"{CHECKSUMS_NAME} line {number}: not 'digest  name'")
                continue
            expected, name = parts[0].lower(), parts[1].lstrip("*").strip()
            if name == MANIFEST_NAME:
                actual[name] = file_sha256(folder / MANIFEST_NAME)[1]
            if name not in actual:
                problems.append(f"{CHECKSUMS_NAME} line {number}: {name} is not a listed file")
            elif actual[name] != expected:
                problems.append(f"{name}: SHA-256 {actual[name]}, {CHECKSUMS_NAME} says {expected}")
        checked.append(MANIFEST_NAME)
    for path in sorted(folder.iterdir()):
        if path.name not in listed:
            problems.append(f"{path.name}: in the folder but in no checksum list")
    return VerifyReport(folder, manifest, tuple(checked), tuple(problems))
