"""The catalog commands: build, find, show ID, stats, migrate (exact output where it matters)."""

from __future__ import annotations

import csv
import io
import json
import os
import re
from pathlib import Path
from typing import Any

import pytest
from typer.testing import CliRunner

from zoo.catalog.enumeration import cumulative_parameter_set_count
from zoo.cli import app
from zoo.cli.app import NOT_FOUND
from zoo.core import algebra
from zoo.core.params import parse_params

runner = CliRunner()


def invoke(*args: str) -> object:
    return runner.invoke(app, list(args))


@pytest.fixture(scope="module")
def db(tmp_path_factory: pytest.TempPathFactory) -> str:
    location = str(tmp_path_factory.mktemp("cli") / "catalog.sqlite3")
    result = runner.invoke(app, ["build", "--max-area", "16", "--db", location, "--jobs", "2"])
    assert result.exit_code == 0, result.output
    return location


def test_build_reports_what_it_stored_and_then_has_nothing_to_do(db: str) -> None:
    result = invoke("build", "--max-area", "16", "--db", db)
    assert result.exit_code == 0
    assert result.stdout == ("Nothing to do: the catalog is already complete up to area 16.\n")


def test_build_summary(tmp_path: Path) -> None:
    location = str(tmp_path / "small.sqlite3")
    result = invoke("build", "-n", "5", "--db", location, "--jobs", "1")
    assert result.exit_code == 0, result.output
    total = cumulative_parameter_set_count(5)
    assert result.stdout.startswith(f"Stored areas 1..5: {total} parameter sets, ")
    assert result.stdout.rstrip().endswith("The catalog is complete up to area 5.")


def test_find_json_objects_have_id_label_area_members(db: str) -> None:
    result = invoke("find", "area = 8", "--db", db, "--format", "json")
    assert result.exit_code == 0
    objects = json.loads(result.stdout)
    assert [o["id"] for o in objects] == [f"CY8-{r}" for r in range(1, len(objects) + 1)]
    exceptional = next(o for o in objects if "C(2,2,2,2)" in o["members"])
    # docs/theory/isomorphism.md
    assert exceptional["label"] == "C(2,2,1,3)" and exceptional["area"] == 8
    assert exceptional["members"] == ["C(2,2,1,3)", "C(2,2,2,2)", "C(2,2,3,1)"]
    assert "complete up to area 16" in result.stderr


def test_find_jsonl_and_columns(db: str) -> None:
    result = invoke(
        "find",
        "regular and area <= 6",
        "--db",
        db,
        "-f",
        "jsonl",
        "--columns",
        "loop,regular",
        "--sort",
        "-loop",
        "--limit",
        "3",
    )
    assert result.exit_code == 0
    lines = [json.loads(line) for line in result.stdout.splitlines()]
    assert len(lines) == 3
    assert set(lines[0]) == {"id", "label", "area", "members", "loop", "regular"}
    assert [o["loop"] for o in lines] == sorted((o["loop"] for o in lines), reverse=True)
    # Reading-level fields come as the sorted distinct values over the readings; the query
    # asks for a regular reading, so True is among them.
    assert all(o["regular"] in ([True], [False, True]) for o in lines)
    assert "showing 3" in result.stderr


def test_find_csv(db: str) -> None:
    result = invoke("find", "area = 4", "--db", db, "--format", "csv", "--columns", "tokens")
    assert result.exit_code == 0
    rows = list(csv.reader(io.StringIO(result.stdout)))
    assert rows[0] == ["id", "label", "area", "tokens", "members"]
    assert rows[1][:3] == ["CY4-1", "C(1,1,1,3)", "4"]
    assert rows[1][4].split() == ["C(1,1,1,3)", "C(1,1,2,2)", "C(1,1,3,1)"]


def test_find_count_prints_the_number_alone(db: str) -> None:
    result = invoke("find", "area <= 3", "--db", db, "--count")
    assert result.exit_code == 0
    # Area 2: C(1,1,1,1). Area 3: {C(1,1,1,2), C(1,1,2,1)} (one reading, a delta-step apart)
    # and {C(1,2,1,1), C(2,1,1,1)} (a swap pair), docs/theory/isomorphism.md,
    # docs/theory/normal-forms.md.
    assert result.stdout == "3\n"
    assert result.stderr == "The catalog is complete up to area 16.\n"


def test_find_table_and_warning_beyond_the_catalog(db: str) -> None:
    result = invoke("find", "area <= 3", "--db", db)
    assert result.exit_code == 0
    lines = result.stdout.splitlines()
    assert lines[0].split() == [
        "id",
        "label",
        "area",
        "loop",
        "tokens",
        "processes",
        "states",
        "frame",
        "members",
    ]
    assert [line.split()[:3] for line in lines[1:-2]] == [
        ["CY2-1", "C(1,1,1,1)", "2"],
        ["CY3-1", "C(1,1,1,2)", "3"],
        ["CY3-2", "C(1,2,1,1)", "3"],
    ]
    assert lines[-2] == "3 classes match."
    assert lines[-1] == "The catalog is complete up to area 16."
    beyond = invoke("find", "processes = 3 and area < 40", "--db", db, "--count")
    assert beyond.exit_code == 0
    assert "Warning: the query reaches area 39" in beyond.stderr
    assert "zoo build --max-area 39" in beyond.stderr


def test_find_by_seed_name(db: str) -> None:
    result = invoke("find", "--seed", "factory", "--db", db, "--format", "json")
    objects = json.loads(result.stdout)
    assert {o["seeds"][0]["name"] for o in objects} == {
        "factory-loop-3-carts-1-bay",
        "factory-loop-2-tracked-carts-2-bays",
        "factory-loop-4-carts-12-bays",
    }


def test_bad_query_is_one_error_line_with_a_caret(db: str) -> None:
    result = invoke("find", "procesess = 3", "--db", db)
    assert result.exit_code == 1
    lines = result.stderr.splitlines()
    assert lines[0].startswith("Error: Unknown field 'procesess' (did you mean 'processes'?)")
    assert lines[1:] == ["procesess = 3", "^"]


def test_find_builds_the_default_catalog_when_there_is_none(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    import zoo.catalog.service

    monkeypatch.setattr(zoo.catalog.service, "DEFAULT_MAX_AREA", 6)  # the real default is 100
    import platformdirs

    # Only the default location is built on first use (issue 8); conftest isolates it.
    location = Path(platformdirs.user_data_dir("zoo")) / "catalog.sqlite3"
    result = invoke("find", "processes = 3 and area < 100", "--count")
    assert result.exit_code == 0, result.output
    # processes = gcd(beta, delta) = 3 needs 3 | beta and 3 | delta: in area <= 6 only
    # C(1,3,1,3) (with its swap C(3,1,3,1)), docs/theory/processes.md.
    assert result.stdout == "1\n"
    assert "No catalog at" in result.stderr and "building areas 1..6" in result.stderr
    assert "Warning: the query reaches area 99" in result.stderr
    assert location.is_file()
    again = invoke("find", "processes = 3 and area < 100", "--count")
    assert "No catalog" not in again.stderr and again.stdout == "1\n"


def test_show_class_entry_json(db: str) -> None:
    result = invoke("show", "CY8-8", "--db", db, "--format", "json")
    assert result.exit_code == 0, result.output
    entry = json.loads(result.stdout)
    assert entry["id"] == "CY8-8" and entry["label"] == "C(2,2,1,3)"
    assert entry["members"] == ["C(2,2,1,3)", "C(2,2,2,2)", "C(2,2,3,1)"]
    assert [r["label"] for r in entry["readings"]] == ["C(2,2,1,3)", "C(2,2,2,2)"]
    # docs/theory/check-values.md
    assert (entry["loop"], entry["states"], entry["state_arcs"]) == (4, 12, 16)
    assert entry["frame"]["id"] == entry["frame_id"]
    assert entry["frame"]["other_classes"]
    assert entry["seeds"][0]["name"] == "factory-loop-2-tracked-carts-2-bays"
    assert "CY8-8" in entry["citation"] and entry["fingerprint"] in entry["citation"]


def test_show_class_and_frame_tables(db: str) -> None:
    result = invoke("show", "CY8-8", "--db", db)
    assert result.exit_code == 0, result.output
    out = result.stdout
    assert out.startswith("CY8-8  C(2,2,1,3)  (area 8)\n")
    for text in (
        "Members (3): C(2,2,1,3), C(2,2,2,2), C(2,2,3,1)",
        "Readings",
        "Frame FR8-",
        "factory-loop-2-tracked-carts-2-bays",
        "Cite as:",
    ):
        assert text in out
    frame = invoke("show", "FR8-5", "--db", db)
    assert frame.exit_code == 0, frame.output
    assert "Classes on this frame" in frame.stdout and "CY8-8" in frame.stdout


def test_show_unknown_identifier(db: str) -> None:
    result = invoke("show", "CY8-99", "--db", db)
    assert result.exit_code == NOT_FOUND
    assert result.stderr.startswith("Error: CY8-99 does not exist: area 8 has 13 classes")


def test_stats_json_and_plots(db: str, tmp_path: Path) -> None:
    result = invoke("stats", "--db", db, "--format", "json")
    rows = json.loads(result.stdout)
    assert [r["area"] for r in rows] == list(range(1, 17))
    assert set(rows[0]) == {"area", "parameter_sets", "readings", "classes", "frames"}
    assert sum(r["parameter_sets"] for r in rows) == cumulative_parameter_set_count(16)
    # Area 8: 37 parameter sets (OEIS A055507, n = 7); the other counts as in test_classify.
    assert rows[7] == {"area": 8, "parameter_sets": 37, "readings": 24, "classes": 13, "frames": 7}
    png, svg = tmp_path / "s.png", tmp_path / "s.svg"
    assert invoke("stats", "--db", db, "--plot", str(png)).exit_code == 0
    assert png.read_bytes().startswith(b"\x89PNG")
    assert invoke("stats", "--db", db, "--plot", str(svg)).exit_code == 0
    assert b"<svg" in svg.read_bytes()[:500]
    bad = invoke("stats", "--db", db, "--plot", str(tmp_path / "s.gif"))
    assert bad.exit_code == 1 and "write to a .png, .svg or .pdf file" in bad.stderr


def test_stats_table_total(db: str) -> None:
    result = invoke("stats", "--db", db)
    assert result.exit_code == 0
    total = result.stdout.splitlines()[-2].split()
    assert total[0] == "total" and total[1] == f"{cumulative_parameter_set_count(16):,}"


def test_migrate_creates_then_reports_current(tmp_path: Path) -> None:
    location = str(tmp_path / "m.sqlite3")
    first = invoke("migrate", "--db", location)
    assert first.exit_code == 0 and "schema revision none -> " in first.stdout
    second = invoke("migrate", "--db", location)
    assert second.exit_code == 0 and "is current; nothing to do" in second.stdout


def test_show_without_catalog_says_how_to_build(tmp_path: Path) -> None:
    result = invoke("show", "CY16-3", "--db", str(tmp_path / "none.sqlite3"))
    assert result.exit_code == 1 and "zoo build" in result.stderr


@pytest.mark.parametrize("command", ["build", "find", "stats", "migrate"])
def test_every_command_has_help(command: str) -> None:
    result = invoke(command, "--help")
    assert result.exit_code == 0 and "Example:" in result.stdout


#: Prepended to a child's script: after each area the build stores (and commits), the child
#: writes the area on a line to the file descriptor in ZOO_TEST_AREAS_FD, so that a test waits
#: on that line instead of polling the catalog. The command under test runs unchanged.
_REPORT_STORED_AREAS = (
    "import os\n"
    "import zoo.catalog.build as _build\n"
    "_stored = os.fdopen(int(os.environ['ZOO_TEST_AREAS_FD']), 'w', buffering=1)\n"
    "_write_area = _build.write_area\n"
    "def _reporting_write_area(catalog, result, seeds):\n"
    "    wrote = _write_area(catalog, result, seeds)\n"
    "    _stored.write(f'{result.area}\\n')\n"
    "    return wrote\n"
    "_build.write_area = _reporting_write_area\n"
)


def _start_reporting(command: list[str], **options: Any) -> tuple[Any, int]:
    """Start a child whose script begins with _REPORT_STORED_AREAS; returns it and the read end
    of its report pipe."""
    import subprocess

    read_end, write_end = os.pipe()
    env = {**options.pop("env", os.environ), "ZOO_TEST_AREAS_FD": str(write_end)}
    try:
        child = subprocess.Popen(command, env=env, pass_fds=(write_end,), **options)
    finally:
        os.close(write_end)  # the child holds the only write end: its exit closes the pipe
    return child, read_end


def _wait_for_area(read_end: int, area: int, timeout: float = 120) -> int:
    """Block until the child reports an area >= ``area`` (or closes the pipe, or ``timeout``
    seconds pass without a report); the last area reported, 0 for none."""
    import select

    reached, pending = 0, b""
    while reached < area and select.select([read_end], [], [], timeout)[0]:
        chunk = os.read(read_end, 4096)
        if not chunk:
            break
        pending += chunk
        *lines, pending = pending.split(b"\n")
        reached = max([reached, *(int(line) for line in lines if line)])
    return reached


def test_ctrl_c_keeps_complete_areas_and_the_next_build_resumes(tmp_path: Path) -> None:
    import signal
    import subprocess
    import sys

    location = str(tmp_path / "interrupted.sqlite3")
    # The Typer app in standalone mode, as a console script runs it.
    script = (
        _REPORT_STORED_AREAS + "import sys; from zoo.cli import app; sys.argv[0] = 'zoo'; app()"
    )
    process, stored = _start_reporting(
        [sys.executable, "-c", script, "build", "-n", "60", "--db", location, "--jobs", "2"],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
    )
    from zoo.catalog.service import Catalog

    _wait_for_area(stored, 6)
    process.send_signal(signal.SIGINT)
    _, err = process.communicate(timeout=60)
    os.close(stored)  # only now: a child writing to a closed pipe would fail
    assert process.returncode == 130
    assert "Every area stored so far is complete and kept" in err.decode()
    with Catalog.open(location) as catalog:
        kept = catalog.complete_to()
        assert 6 <= kept < 60 and catalog.complete_areas() == list(range(1, kept + 1))
    result = invoke("build", "-n", str(kept + 2), "--db", location, "--jobs", "1")
    assert result.exit_code == 0
    assert result.stdout.startswith(f"Stored areas {kept + 1}..{kept + 2}: ")


@pytest.mark.parametrize("bound", ["0", "5000"])
def test_rejected_build_leaves_no_catalog_file(tmp_path: Path, bound: str) -> None:
    location = tmp_path / "x.db"
    result = invoke("build", "--max-area", bound, "--db", str(location))
    assert result.exit_code == 1
    assert result.stderr.startswith("Error: --max-area ")
    assert list(tmp_path.iterdir()) == []  # no x.db, no -wal or -shm beside it


def test_rejected_build_keeps_an_existing_catalog(db: str) -> None:
    result = invoke("build", "--max-area", "0", "--db", db)
    assert result.exit_code == 1
    assert Path(db).is_file()
    assert invoke("find", "area <= 3", "--db", db, "--count").stdout == "3\n"


def test_suggested_build_names_the_catalog_given_by_db(db: str) -> None:
    import shlex

    quoted = shlex.quote(db)
    result = invoke("find", "area < 30", "--db", db, "--format", "json")
    assert result.exit_code == 0
    assert f"(extend with: zoo build --max-area 29 --db {quoted})." in result.stderr
    shown = invoke("show", "CY25-1", "--db", db)
    assert shown.exit_code == NOT_FOUND
    assert shown.stderr.rstrip().endswith(f"extend it with: zoo build --max-area 25 --db {quoted}")


def test_suggested_build_needs_no_db_for_the_catalog_zoo_opens_anyway(
    db: str, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.setenv("ZOO_CATALOG", db)
    result = invoke("find", "area < 30")
    assert "(extend with: zoo build --max-area 29)." in result.stdout


def test_suggested_build_stays_within_the_build_limit(db: str) -> None:
    from zoo.catalog.build import MAX_BUILD_AREA

    result = invoke("find", "area = 99999999999999999999999", "--db", db, "--format", "jsonl")
    assert result.exit_code == 0, result.output
    assert f"zoo build --max-area {MAX_BUILD_AREA} --db " in result.stderr
    assert f"areas above the build limit {MAX_BUILD_AREA:,} cannot be built" in result.stderr
    assert "--max-area 99999999999999999999999" not in result.stderr


_FIND_WITH_SMALL_DEFAULT = (
    "import sys\n"
    "import zoo.catalog.service\n"
    "zoo.catalog.service.DEFAULT_MAX_AREA = 40  # the real default is 100: keep the test short\n"
    "from zoo.cli import main\n"
    "sys.argv = ['zoo', 'find', 'processes = 3 and area < 100', '--count', '--jobs', '1']\n"
    "main()\n"
)


def test_interrupted_default_build_resumes_on_the_next_find(tmp_path: Path) -> None:
    """Ctrl-C (a real SIGINT) during the first `zoo find`, then `zoo find` again: it finishes
    the default build before answering."""
    import signal
    import subprocess
    import sys

    from zoo.catalog.service import Catalog

    # The default location (only it is built on first use, issue 8), in a home of its own.
    location = tmp_path / "zoo" / "catalog.sqlite3"
    env = {**os.environ, "XDG_DATA_HOME": str(tmp_path)}
    env.pop("ZOO_CATALOG", None)
    command = [sys.executable, "-c", _FIND_WITH_SMALL_DEFAULT]
    first, stored = _start_reporting(
        [sys.executable, "-c", _REPORT_STORED_AREAS + _FIND_WITH_SMALL_DEFAULT],
        env=env,
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
    )
    _wait_for_area(stored, 12)
    first.send_signal(signal.SIGINT)
    _out, err = first.communicate(timeout=60)
    os.close(stored)  # only now: a child writing to a closed pipe would fail
    assert first.returncode == 130, err
    with Catalog.open(str(location)) as catalog:
        stopped = catalog.complete_to()
    assert 12 <= stopped < 40
    second = subprocess.run(command, env=env, capture_output=True, text=True, timeout=180)
    assert second.returncode == 0, second.stderr
    assert "The catalog is complete up to area 40." in second.stderr
    with Catalog.open(str(location)) as catalog:
        assert catalog.complete_to() == 40
        # processes = gcd(beta, delta) (docs/theory/processes.md): count those classes of area < 41
        # directly
        # from the stored classes, which an uninterrupted build would have given
        expected = catalog.count("processes = 3 and area <= 40")
    assert second.stdout == f"{expected}\n"


def test_show_id_links_iterations_both_ways(tmp_path: Path) -> None:
    # C(4,3,3,3) is the 3-fold temporal iteration C(α, β, 3γ, 3δ) of C(4,3,1,1) (a ring of 3
    # individually named items and 4 free slots over the anonymous ring;
    # docs/theory/iterations.md, docs/theory/ring-designs.md).
    from zoo.catalog.build import build_catalog
    from zoo.catalog.service import Catalog

    location = str(tmp_path / "c21.sqlite3")
    with Catalog.open(location, create=True) as catalog:
        build_catalog(catalog, 21)
        base = catalog.get("4,3,1,1").id
        twice = catalog.get("4,3,2,2").id
        thrice = catalog.get("4,3,3,3").id
    shown = json.loads(invoke("show", thrice, "--db", location, "--format", "json").stdout)
    assert shown["iteration_of"] == [{"id": base, "n": 3}]
    assert shown["iterations"] == []  # 63 > 21: beyond the catalog
    shown = json.loads(invoke("show", base, "--db", location, "--format", "json").stdout)
    assert shown["iteration_of"] == []
    assert shown["iterations"] == [{"id": twice, "n": 2}, {"id": thrice, "n": 3}]


# --- zoo show ID: every per-reading value belongs to its reading (issue 8) -------------------


@pytest.fixture(scope="module")
def area8(tmp_path_factory: pytest.TempPathFactory) -> str:
    location = str(tmp_path_factory.mktemp("area8") / "catalog.sqlite3")
    result = runner.invoke(app, ["build", "--max-area", "8", "--db", location, "--jobs", "1"])
    assert result.exit_code == 0, result.output
    return location


def _reading_rows(out: str) -> dict[str, dict[str, str]]:
    """The readings table of ``zoo show ID``: reading label -> cells, keyed by heading."""
    lines = out.splitlines()
    start = next(i for i, line in enumerate(lines) if line.startswith("reading "))
    headings = re.split(r"\s{2,}", lines[start].strip())
    rows = {}
    for line in lines[start + 1 :]:
        if not line.startswith("C("):
            break
        cells = re.split(r"\s{2,}", line.strip())
        rows[cells[0]] = dict(zip(headings, cells, strict=False))
    return rows


def test_show_entry_prints_each_readings_own_group_and_iteration(area8: str) -> None:
    # CY8-8 joins the readings C(2,2,1,3) and C(2,2,2,2) (the exceptional family of
    # docs/theory/isomorphism.md). Their transition groups are Z_8 and Z_2 x Z_4 (Smith normal
    # form, docs/theory/lattice-key.md) and only C(2,2,2,2) = iterate(C(2,2,1,1), 2) is an
    # iteration (docs/theory/iterations.md); the label C(2,2,1,3) must not be shown with the
    # other reading's values.
    result = invoke("show", "CY8-8", "--db", area8)
    assert result.exit_code == 0, result.output
    rows = _reading_rows(result.stdout)
    assert rows["C(2,2,1,3)"]["transition group"] == "Z_8"
    assert rows["C(2,2,1,3)"]["iteration depth"] == "1"
    assert rows["C(2,2,2,2)"]["transition group"] == "Z_2 × Z_4"
    assert rows["C(2,2,2,2)"]["iteration depth"] == "2"
    # The class rows say they are the class's value, made from every reading.
    assert "transition group (class: largest over the readings)  Z_2 × Z_4" in result.stdout
    assert "iteration depth (class: largest over the readings)   2" in result.stdout
    entry = json.loads(invoke("show", "CY8-8", "--db", area8, "--format", "json").stdout)
    own = {r["label"]: (r["group"], r["iteration"], r["cyclic"]) for r in entry["readings"]}
    assert own == {"C(2,2,1,3)": ([1, 8], 1, True), "C(2,2,2,2)": ([2, 4], 2, False)}
    assert (entry["group"], entry["iteration"], entry["cyclic"]) == ([2, 4], 2, False)


def test_one_group_notation_in_show_params_and_show_id(area8: str) -> None:
    # Every class of area 8: each reading's group in zoo show ID is Z_n when cyclic, never
    # Z_1 x Z_n (Smith normal form of the reading's label, docs/theory/lattice-key.md), and
    # zoo show PARAMS writes the groups of CY8-8's two readings the same way.
    for rank in range(1, 14):
        shown = invoke("show", f"CY8-{rank}", "--db", area8)
        assert shown.exit_code == 0, shown.output
        assert "Z_1 " not in shown.stdout and " x Z_" not in shown.stdout
        for label, cells in _reading_rows(shown.stdout).items():
            d1, order = algebra.transition_group(parse_params(label))
            expected = f"Z_{order}" if d1 == 1 else f"Z_{d1} × Z_{order}"
            assert cells["transition group"] == expected, (rank, label)
            if rank == 8:
                params = invoke("show", label)
                lines = params.stdout.splitlines()
                row = next(line for line in lines if "transition group" in line)
                assert row.split("│")[2].strip().split(" (class")[0] == expected
