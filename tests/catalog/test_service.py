"""The catalog service: builds that resume and never change identifiers, lookups, queries."""

from __future__ import annotations

import os
import signal
import subprocess
import sys
from collections.abc import Iterator
from pathlib import Path
from typing import Any

import pytest
from sqlalchemy import select, text, update

from zoo.catalog.build import build_catalog, write_area
from zoo.catalog.classify import classify_area
from zoo.catalog.enumeration import iter_parameter_sets, parameter_set_count
from zoo.catalog.service import Catalog, lookup_class_id
from zoo.core import invariants
from zoo.core.canonical import net_form, system_form
from zoo.core.params import ParameterSet, parse_params
from zoo.errors import CatalogError, NotInCatalog, ParameterError
from zoo.storage.models import CatalogInfo

TABLES = {
    "frames": "id",
    "classes": "id",
    "readings": "id",
    "parameter_sets": "alpha, beta, gamma, delta",
    "seeds": "name",
}


def dump(location: str) -> dict[str, list[tuple[Any, ...]]]:
    """Every stored row that describes the catalog (timestamps and timings left out)."""
    with Catalog.open(location) as catalog, catalog.engine.connect() as connection:
        rows = {
            table: [
                tuple(r) for r in connection.execute(text(f"SELECT * FROM {table} ORDER BY {key}"))
            ]
            for table, key in TABLES.items()
        }
        rows["areas"] = [
            tuple(r)
            for r in connection.execute(
                text(
                    "SELECT area, complete, parameter_sets, readings, classes, frames FROM areas "
                    "ORDER BY area"
                )
            )
        ]
    return rows


def _build(path: Path, max_area: int, jobs: int = 1) -> str:
    location = str(path)
    with Catalog.open(location, create=True) as catalog:
        build_catalog(catalog, max_area, jobs=jobs)
    return location


@pytest.fixture(scope="module")
def fresh30(tmp_path_factory: pytest.TempPathFactory) -> str:
    return _build(tmp_path_factory.mktemp("fresh30") / "catalog.sqlite3", 30, jobs=2)


@pytest.fixture(scope="module")
def fresh30_rows(fresh30: str) -> dict[str, list[tuple[Any, ...]]]:
    return dump(fresh30)


def test_counts_per_area_match_enumeration_and_classification(fresh30: str) -> None:
    with Catalog.open(fresh30) as catalog:
        stats = catalog.stats()
        assert catalog.complete_to() == 30
    assert [s.area for s in stats] == list(range(1, 31))
    assert (stats[0].parameter_sets, stats[0].classes) == (0, 0)  # area 1: nothing, complete
    for s in stats:
        assert s.parameter_sets == parameter_set_count(s.area)
    for s in stats[:16]:  # nauty on every parameter set, the second, independent way
        fingerprints = {system_form(p).fingerprint for p in iter_parameter_sets(s.area)}
        net_fingerprints = {net_form(p).fingerprint for p in iter_parameter_sets(s.area)}
        assert (s.classes, s.frames) == (len(fingerprints), len(net_fingerprints))
    for s in stats[:20]:
        result = classify_area(s.area)
        assert (s.readings, s.classes, s.frames) == (
            result.reading_count,
            len(result.classes),
            len(result.frames),
        )


def test_stored_typed_nets_per_area_are_sigma_minus_tau(fresh30: str) -> None:
    # docs/theory/lattice-key.md: sigma(A) - tau(A) typed nets (distinct lattices) per area.
    from sympy import divisor_count, divisor_sigma

    with Catalog.open(fresh30) as catalog, catalog.engine.connect() as connection:
        rows = connection.execute(
            text(
                "SELECT area, COUNT(DISTINCT lattice_g || ':' || lattice_r) FROM readings "
                "GROUP BY area ORDER BY area"
            )
        ).all()
    assert [a for a, _ in rows] == list(range(2, 31))
    for area, lattices in rows:
        assert lattices == int(divisor_sigma(area)) - int(divisor_count(area))


def test_stored_labels_and_members_recompute(fresh30: str) -> None:
    with Catalog.open(fresh30) as catalog, catalog.engine.connect() as connection:
        members: dict[str, list[ParameterSet]] = {}
        for a, b, c, d, class_id in connection.execute(
            text("SELECT alpha, beta, gamma, delta, class_id FROM parameter_sets")
        ):
            members.setdefault(class_id, []).append(ParameterSet(a, b, c, d))
        rows = list(
            connection.execute(
                text("SELECT id, area, rank, label, states, member_count FROM classes")
            )
        )
    assert len(rows) == len(members)
    by_area: dict[int, list[tuple[ParameterSet, str]]] = {}
    for class_id, area, rank, label, states, member_count in rows:
        smallest = min(members[class_id])
        assert label == str(smallest)  # label = smallest member, recomputed
        assert class_id == f"CY{area}-{rank}"
        assert member_count == len(members[class_id])
        assert states == str(invariants.reachable_state_count(smallest))  # exact decimal text
        by_area.setdefault(area, []).append((smallest, class_id))
    for area, pairs in by_area.items():  # ranks recomputed from the smallest members
        ordered = sorted(pairs)
        assert [cid for _, cid in ordered] == [f"CY{area}-{r}" for r in range(1, len(pairs) + 1)]


def test_extending_a_build_changes_no_identifier(
    tmp_path: Path, fresh30_rows: dict[str, list[tuple[Any, ...]]]
) -> None:
    location = _build(tmp_path / "grown.sqlite3", 20)
    with Catalog.open(location) as catalog:
        report = build_catalog(catalog, 30, jobs=2)
    assert report.added == tuple(range(21, 31))
    assert dump(location) == fresh30_rows


def test_running_the_same_build_again_does_nothing(
    fresh30: str, fresh30_rows: dict[str, list[tuple[Any, ...]]]
) -> None:
    with Catalog.open(fresh30) as catalog:
        report = build_catalog(catalog, 30)
    assert report.added == () and report.complete_to == 30
    assert dump(fresh30) == fresh30_rows


# The child build prints each area on its own line once the area is stored (committed): the
# test waits on those lines instead of polling the catalog.
_BUILD_SCRIPT = (
    "import sys\n"
    "from zoo.catalog.build import build_catalog\n"
    "from zoo.catalog.service import Catalog\n"
    "class Stored:\n"
    "    def started(self, areas, parameter_sets): pass\n"
    "    def area_done(self, stats): print(stats.area, flush=True)\n"
    "    def finished(self, report): pass\n"
    "build_catalog(Catalog.open(sys.argv[1], create=True), int(sys.argv[2]), jobs=1, "
    "progress=Stored())\n"
)


def _start_build(location: str, max_area: int) -> subprocess.Popen[bytes]:
    return subprocess.Popen(
        [sys.executable, "-c", _BUILD_SCRIPT, location, str(max_area)],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        bufsize=0,  # unbuffered: a line read is never held back from the select below
    )


def _stored_areas(process: subprocess.Popen[bytes], timeout: float = 120) -> Iterator[int]:
    """The areas the child build reports as stored, as it reports them; ends when the child
    closes its output, or after ``timeout`` seconds without a line."""
    from select import select as wait_readable  # sqlalchemy's select is imported above

    assert process.stdout is not None
    while wait_readable([process.stdout], [], [], timeout)[0]:
        line = process.stdout.readline()
        if not line:
            return
        yield int(line)


def test_killed_build_leaves_a_consistent_catalog_and_resumes(
    tmp_path: Path, fresh30_rows: dict[str, list[tuple[Any, ...]]]
) -> None:
    location = str(tmp_path / "killed.sqlite3")
    process = _start_build(location, 60)
    reached = None
    for reached in _stored_areas(process):
        if reached >= 15:
            break
    os.kill(process.pid, signal.SIGKILL)
    process.wait()
    assert reached is not None and 15 <= reached < 60
    with Catalog.open(location) as catalog:
        kept = catalog.complete_to()
        assert kept >= reached
        assert catalog.complete_areas() == list(range(1, kept + 1))  # nothing half-stored
        report = build_catalog(catalog, 30)
    assert report.added == tuple(range(kept + 1, 31))
    rows = dump(location)
    if kept > 30:  # the killed build got further than 30 before the kill landed
        pytest.skip("the killed build passed area 30 before SIGKILL; nothing left to resume")
    assert rows == fresh30_rows


def test_reader_queries_while_a_build_writes(tmp_path: Path, fresh30: str) -> None:
    with Catalog.open(fresh30) as reference:
        classes_per_area = {s.area: s.classes for s in reference.stats()}
    location = str(tmp_path / "busy.sqlite3")
    process = _start_build(location, 24)
    seen: set[int] = set()
    try:
        for _stored in _stored_areas(process):  # read after each area the writer commits
            with Catalog.open(location) as catalog:
                bound = catalog.complete_to()
                if 1 <= bound <= 24:
                    counted = catalog.count(f"area <= {bound}")
                    assert counted == sum(classes_per_area[a] for a in range(1, bound + 1))
                    found = catalog.find(f"area = {bound}")
                    assert len(found.entries) == classes_per_area[bound]
                    seen.add(bound)
    finally:
        process.wait(timeout=120)
    assert process.returncode == 0, process.stderr.read() if process.stderr else ""
    assert len(seen) >= 3  # the reader really overlapped the writer


def test_get_by_identifier_label_member_and_fingerprint(fresh30: str) -> None:
    with Catalog.open(fresh30) as catalog:
        entry = catalog.get("C(4,2,2,3)")  # docs/theory/equivalence.md running example, A = 16
        assert ParameterSet(2, 4, 3, 2) in entry.members  # its swap, docs/theory/isomorphism.md
        assert catalog.get(entry.id) == entry
        assert catalog.get(entry.label) == entry
        assert catalog.get(entry.id.lower()) == entry
        assert catalog.class_for_fingerprint(entry.fingerprint) == entry
        assert (entry.invariants["loop"], entry.invariants["states"]) == (5, 40)
        frame = catalog.frame(entry.frame_id)
        assert entry.id in frame.class_ids
        exceptional = catalog.get("C(2,2,2,2)")
        assert exceptional.label == "C(2,2,1,3)"  # docs/theory/isomorphism.md exceptional family
        assert len(exceptional.readings) == 2
        assert catalog.class_for_params(parse_params("C(20,1,1,11)")) is None  # area 31
        with pytest.raises(NotInCatalog, match="area 41, beyond the catalog"):
            catalog.get("C(1,1,1,40)")
        with pytest.raises(NotInCatalog, match=r"CY16-999 does not exist: area 16 has \d+ classes"):
            catalog.get("CY16-999")
        with pytest.raises(NotInCatalog, match="beyond the catalog"):
            catalog.get("CY50-1")
        with pytest.raises(NotInCatalog, match="is a frame identifier"):
            catalog.get("FR16-1")
        with pytest.raises(NotInCatalog, match="neither a catalog identifier"):
            catalog.get("banana")


def test_lookup_class_id_never_builds(tmp_path: Path, fresh30: str) -> None:
    missing = tmp_path / "none.sqlite3"
    assert lookup_class_id(ParameterSet(4, 2, 2, 3), str(missing)) is None
    assert not missing.exists()
    found = lookup_class_id(ParameterSet(4, 2, 2, 3), fresh30)
    with Catalog.open(fresh30) as catalog:
        assert found == catalog.get("C(2,4,3,2)").id
    assert lookup_class_id(ParameterSet(1, 1, 1, 40), fresh30) is None


def test_open_without_create_names_the_build_command(tmp_path: Path) -> None:
    with pytest.raises(CatalogError, match="zoo build"):
        Catalog.open(str(tmp_path / "absent.sqlite3"))


def test_seeds_are_attached_to_their_classes(fresh30: str) -> None:
    with Catalog.open(fresh30) as catalog:
        seeds = {s.name: s for s in catalog.seeds()}
        ring = seeds["pipeline-ring-3-frames-2-slots"]
        assert ring.class_id == catalog.get(str(ring.params)).id
        assert seeds["pipeline-ring-8-tracked-frames-8-slots"].class_id is None  # area 128
        entry = catalog.get(ring.class_id)
        assert [s.name for s in entry.seeds] == ["pipeline-ring-3-frames-2-slots"]
        found = catalog.find("", seed="RING")
        attached = sorted({s.class_id for s in seeds.values() if "ring" in s.name and s.class_id})
        assert sorted(e.id for e in found.entries) == attached


def test_find_sorts_limits_and_states_its_completeness(fresh30: str) -> None:
    with Catalog.open(fresh30) as catalog:
        result = catalog.find("processes = 3 and area < 100", sort="-states", limit=4)
        assert result.total == catalog.count("processes = 3 and area < 100")
        assert len(result.entries) == 4
        states = [e.invariants["states"] for e in result.entries]
        assert states == sorted(states, reverse=True)
        assert all(
            any(r["processes"] == 3 for r in e.readings) and e.area < 100 for e in result.entries
        )
        assert result.complete_to == 30 and result.area_bound == 99 and result.reaches_beyond
        assert "complete up to area 30" in result.completeness_note()
        assert "Warning" in result.completeness_note()
        inside = catalog.find("area <= 12")
        assert not inside.reaches_beyond and "Warning" not in inside.completeness_note()


def test_big_numbers_are_exact_and_range_queries_compare_them(tmp_path: Path) -> None:
    location = _build(tmp_path / "big.sqlite3", 4)
    with Catalog.open(location) as catalog:
        # Store area 70 alone (an area is independent of the others): C(35,35,1,1) has
        # C(70,35) = 112186277816662845432 > 2^63 reachable states (docs/theory/state-counts.md
        # formula).
        write_area(catalog, classify_area(70), [])
        assert catalog.complete_to() == 4  # areas 5..69 are missing
        entry = catalog.get("C(35,35,1,1)")
        assert entry.invariants["states"] == 112186277816662845432
        big = catalog.find("states > 10^20")
        assert entry.id in {e.id for e in big.entries}
        assert all(int(str(e.invariants["states"])) > 10**20 for e in big.entries)
        exact = catalog.find("states = 112186277816662845432")
        assert [e.id for e in exact.entries] == [entry.id]
        small = catalog.find("states <= 6 and area <= 4")
        assert all(int(str(e.invariants["states"])) <= 6 for e in small.entries)


def test_a_catalog_of_another_encoding_is_not_mixed(tmp_path: Path) -> None:
    location = _build(tmp_path / "old.sqlite3", 3)
    with Catalog.open(location) as catalog:
        with catalog.engine.begin() as connection:
            connection.execute(
                update(CatalogInfo).where(CatalogInfo.key == "encoding").values(value="v0")
            )
        with pytest.raises(CatalogError, match="encoding v0"):
            build_catalog(catalog, 5)
        assert catalog.complete_to() == 3
        with catalog.engine.connect() as connection:
            assert (
                connection.execute(
                    select(CatalogInfo.value).where(CatalogInfo.key == "encoding")
                ).scalar_one()
                == "v0"
            )


@pytest.fixture(scope="module")
def fresh12_rows(tmp_path_factory: pytest.TempPathFactory) -> dict[str, list[tuple[Any, ...]]]:
    return dump(_build(tmp_path_factory.mktemp("fresh12") / "catalog.sqlite3", 12))


def test_the_same_build_on_every_backend(
    db_url: str, fresh12_rows: dict[str, list[tuple[Any, ...]]]
) -> None:
    with Catalog.open(db_url, create=True) as catalog:
        build_catalog(catalog, 12, jobs=2)
    rows = dump(db_url)
    assert rows == fresh12_rows


def test_iter_entries_streams_every_class_by_area_then_rank(fresh30: str) -> None:
    with Catalog.open(fresh30) as catalog:
        classes = {s.area: s.classes for s in catalog.stats()}
        every = list(catalog.iter_entries())
        # docs/citing.md: ranks 1..n per area, areas ascending.
        expected = [f"CY{a}-{r}" for a in sorted(classes) for r in range(1, classes[a] + 1)]
        assert [e.id for e in every] == expected
        assert [e.id for e in catalog.iter_entries(batch_size=7)] == expected  # across batches
        some = list(catalog.iter_entries([16, 12], batch_size=3))
        assert [e.id for e in some] == [i for i in expected if i.startswith("CY16-")] + [
            i for i in expected if i.startswith("CY12-")
        ]
        assert some[0] == catalog.get("CY16-1")  # the same entry as the single lookup
        assert list(catalog.iter_entries([31])) == []  # not stored: nothing
        with pytest.raises(ParameterError, match="batch_size"):
            next(catalog.iter_entries(batch_size=0))


def test_completeness_note_names_the_catalog(fresh30: str) -> None:
    import shlex

    with Catalog.open(fresh30) as catalog:
        note = catalog.completeness_note("processes = 3 and area < 40")
    assert note == (
        "The catalog is complete up to area 30. Warning: the query reaches area 39; classes of "
        f"areas 31..39 are missing (extend with: zoo build --max-area 39 --db "
        f"{shlex.quote(fresh30)})."
    )


def test_missing_area_message_quotes_an_odd_location(tmp_path: Path) -> None:
    location = str(tmp_path / "my catalog.sqlite3")
    _build(Path(location), 3)
    with Catalog.open(location) as catalog:
        with pytest.raises(NotInCatalog) as info:
            catalog.get("CY9-1")
    assert str(info.value).endswith(f"extend it with: zoo build --max-area 9 --db '{location}'")


def test_two_builds_of_one_new_catalog_at_once(
    tmp_path: Path, fresh30_rows: dict[str, list[tuple[Any, ...]]]
) -> None:
    """Two real processes build one fresh SQLite file: both finish, the catalog is whole."""
    location = str(tmp_path / "twice.sqlite3")
    zoo = Path(sys.executable).with_name("zoo")
    command = [str(zoo), "build", "--max-area", "30", "--db", location, "--jobs", "1"]
    processes = [
        subprocess.Popen(command, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
        for _ in range(2)
    ]
    outputs = [process.communicate(timeout=180) for process in processes]
    for process, (stdout, stderr) in zip(processes, outputs, strict=True):
        assert process.returncode == 0, stderr
        assert "Traceback" not in stderr
        # A build that starts after the other finished has nothing left to store.
        assert stdout.rstrip().endswith(
            ("The catalog is complete up to area 30.", "already complete up to area 30.")
        ), stdout
    assert dump(location) == fresh30_rows


def test_a_writer_locked_out_too_long_gets_one_line(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    import sqlite3

    from zoo.storage import database

    location = tmp_path / "held.sqlite3"
    _build(location, 3)
    monkeypatch.setattr(database, "SQLITE_BUSY_TIMEOUT_MS", 200)
    holder = sqlite3.connect(location, isolation_level=None)
    holder.execute("BEGIN IMMEDIATE")  # another zoo in the middle of writing an area
    try:
        with Catalog.open(str(location)) as catalog:
            with pytest.raises(database.CatalogBusy) as info:
                build_catalog(catalog, 5)
    finally:
        holder.execute("ROLLBACK")
        holder.close()
    assert str(info.value) == (
        f"catalog {location} is busy: another zoo is writing it (waited 0.2 s for its lock); "
        "try again when it finishes"
    )
    assert isinstance(info.value, CatalogError)
    with Catalog.open(str(location)) as catalog:
        assert catalog.complete_to() == 3  # nothing half-written


class _StopAfter:
    """A build progress that presses Ctrl-C once a given area is stored."""

    def __init__(self, area: int) -> None:
        self.area = area

    def started(self, areas: Any, parameter_sets: int) -> None:
        pass

    def area_done(self, stats: Any) -> None:
        if stats.area >= self.area:
            raise KeyboardInterrupt

    def finished(self, report: Any) -> None:
        pass


def test_ensure_catalog_resumes_only_its_own_interrupted_build(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    import zoo.catalog.service
    from zoo.catalog.build import ensure_catalog

    monkeypatch.setattr(zoo.catalog.service, "DEFAULT_MAX_AREA", 14)
    # Only the default location is built on first use (issue 8); conftest isolates it.
    location = None
    with pytest.raises(KeyboardInterrupt):
        ensure_catalog(location, jobs=1, progress=_StopAfter(8))
    with Catalog.open(location) as catalog:
        assert catalog.complete_to() == 8
        assert catalog.info()["build_target"] == "14"
    catalog, report = ensure_catalog(location, jobs=1)
    with catalog:
        assert report is not None and report.added == tuple(range(9, 15))
        assert catalog.complete_to() == 14
    catalog, report = ensure_catalog(location, jobs=1)
    catalog.close()
    assert report is None  # complete: nothing more to do

    # A catalog built to 10 on purpose is the user's choice: never extended behind their back.
    chosen = str(tmp_path / "chosen.sqlite3")
    _build(Path(chosen), 10)
    catalog, report = ensure_catalog(chosen, jobs=1)
    with catalog:
        assert report is None and catalog.complete_to() == 10
    # Nor is one whose latest build, to another bound, was interrupted.
    with Catalog.open(chosen) as catalog:
        with pytest.raises(KeyboardInterrupt):
            build_catalog(catalog, 13, progress=_StopAfter(11))
    catalog, report = ensure_catalog(chosen, jobs=1)
    with catalog:
        assert report is None and catalog.complete_to() == 11


def test_find_columns_come_back_typed_for_machine_formats(fresh30: str) -> None:
    """FindResult.values: class fields as JSON values, member fields as sorted value lists."""
    import math
    from fractions import Fraction

    from zoo.catalog.service import column_cell

    asked = ["regular,processes,slowness", "gamma,states,cycle_time,cyclic,loop"]
    with Catalog.open(fresh30) as catalog:
        result = catalog.find("area in 8..12", columns=asked)
    assert len(result.values) == len(result.entries) > 0
    mixed = 0
    for entry, values in zip(result.entries, result.values, strict=True):
        members = [parse_params(m) for m in entry.as_dict()["members"]]  # type: ignore[union-attr]
        # processes = gcd(beta, delta) and regular = (beta | delta), docs/theory/processes.md
        assert values["processes"] == sorted({math.gcd(p.beta, p.delta) for p in members})
        assert values["regular"] == sorted({p.delta % p.beta == 0 for p in members})
        # slowness (alpha - beta) / (alpha + beta), docs/theory/state-counts.md, written num/den
        slowness = sorted({Fraction(p.alpha - p.beta, p.alpha + p.beta) for p in members})
        assert values["slowness"] == [f"{s.numerator}/{s.denominator}" for s in slowness]
        assert values["gamma"] == sorted({p.gamma for p in members})
        assert values["states"] == entry.invariants["states"]
        assert isinstance(values["states"], int) and not isinstance(values["states"], bool)
        assert values["cycle_time"] == entry.invariants["cycle_time"]
        assert values["cyclic"] is entry.invariants["cyclic"]
        assert values["loop"] == entry.invariants["loop"]
        mixed += len(values["processes"]) > 1  # type: ignore[arg-type]
    assert mixed > 0  # some class mixes 1 and 2 processes: the list really is a list
    first = result.values[0]
    assert column_cell(first["regular"]) in ("[true]", "[false]", "[false,true]")
    assert column_cell(True) == "true" and column_cell(None) == ""
    assert column_cell(["-1/3", "1/3"]) == '["-1/3","1/3"]'
    assert result.cell(0, "loop") == str(first["loop"])
