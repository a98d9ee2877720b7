"""What ``zoo find`` prints: one column per field, any --limit, a grammatical summary (issue 8)."""

from __future__ import annotations

import csv
import io
import json

import pytest
from typer.testing import CliRunner

from zoo.cli import app

runner = CliRunner()


@pytest.fixture(scope="module")
def db(tmp_path_factory: pytest.TempPathFactory) -> str:
    location = str(tmp_path_factory.mktemp("find") / "catalog.sqlite3")
    result = runner.invoke(app, ["build", "--max-area", "16", "--db", location, "--jobs", "1"])
    assert result.exit_code == 0, result.output
    return location


@pytest.mark.parametrize(
    ("columns", "field"),
    [("loop,loop", "loop"), ("loop,cyc", "loop"), ("α,alpha", "alpha"), ("β,beta,β", "beta")],
)
def test_a_field_named_twice_is_one_column(db: str, columns: str, field: str) -> None:
    result = runner.invoke(app, ["find", "area = 16", "--db", db, "--columns", columns])
    assert result.exit_code == 0, result.output
    header = result.stdout.splitlines()[0].split()
    assert header == ["id", "label", "area", field, "members"]
    rows = list(
        csv.reader(
            io.StringIO(
                runner.invoke(
                    app, ["find", "area = 16", "--db", db, "-f", "csv", "-c", columns]
                ).stdout
            )
        )
    )
    assert rows[0] == ["id", "label", "area", field, "members"]


def test_members_among_the_columns_shifts_nothing(db: str) -> None:
    # Area 16, loop 5: every class's states column must hold its own state count, which the
    # JSON answer (whole entries) gives independently.
    query = "area = 16 and loop = 5"
    table = runner.invoke(
        app, ["find", query, "--db", db, "--columns", "processes,members,states"]
    ).stdout.splitlines()
    header = table[0].split()
    assert header.count("members") == 1 and header.index("states") < header.index("members")
    entries = json.loads(runner.invoke(app, ["find", query, "--db", db, "-f", "json"]).stdout)
    states = {e["id"]: e["states"] for e in entries}
    column = header.index("states")
    for line in table[1 : 1 + len(entries)]:
        cells = line.split()
        assert int(cells[column]) == states[cells[0]]


def test_a_limit_beyond_any_catalog_means_all(db: str) -> None:
    every = runner.invoke(app, ["find", "area = 16", "--db", db, "-f", "json"])
    huge = runner.invoke(
        app, ["find", "area = 16", "--db", db, "-f", "json", "--limit", "99999999999999999999"]
    )
    assert huge.exit_code == 0, huge.output
    assert json.loads(huge.stdout) == json.loads(every.stdout)


def test_one_class_is_singular(db: str) -> None:
    # Area 2 has one parameter set, C(1,1,1,1) (OEIS A055507: 1 at n = 2).
    result = runner.invoke(app, ["find", "area = 2", "--db", db])
    assert "1 class matches." in result.stdout and "1 classes" not in result.stdout
    many = runner.invoke(app, ["find", "area = 3", "--db", db])
    assert "2 classes match." in many.stdout


# --- one vocabulary (issue 8): `members`/`readings` are lists, their numbers *_count --------


def test_members_is_the_list_of_labels_in_every_format(db: str) -> None:
    query = "area = 8"
    entries = json.loads(runner.invoke(app, ["find", query, "--db", db, "-f", "json"]).stdout)
    listed = {e["id"]: e["members"] for e in entries}
    for e in entries:
        assert e["member_count"] == len(e["members"]) and e["reading_count"] == len(e["readings"])
        assert all(isinstance(r["members"], list) for r in e["readings"])
    rows = list(
        csv.DictReader(
            io.StringIO(runner.invoke(app, ["find", query, "--db", db, "-f", "csv"]).stdout)
        )
    )
    assert {r["id"]: r["members"].split(" ") for r in rows} == listed
    table = runner.invoke(app, ["find", query, "--db", db]).stdout.splitlines()
    assert table[0].split()[-1] == "members"
    for line in table[1 : 1 + len(entries)]:
        class_id = line.split()[0]
        assert line.rstrip().endswith(", ".join(listed[class_id])), line


def test_the_counts_are_member_count_and_reading_count(db: str) -> None:
    query = "area = 8"
    for spelling in ("member_count", "members"):  # the old spelling is a documented alias
        result = runner.invoke(app, ["find", query, "--db", db, "-f", "csv", "-c", spelling])
        rows = list(csv.DictReader(io.StringIO(result.stdout)))
        assert list(rows[0])[3:] == ["member_count", "members"]
        assert all(int(r["member_count"]) == len(r["members"].split(" ")) for r in rows)
    counts = {
        q: runner.invoke(app, ["find", q, "--db", db, "--count"]).stdout
        for q in ("member_count > 1", "members > 1", "reading_count = 2", "readings = 2")
    }
    assert counts["member_count > 1"] == counts["members > 1"]
    assert counts["reading_count = 2"] == counts["readings = 2"]
    jsonl = runner.invoke(app, ["find", query, "--db", db, "-f", "jsonl", "-c", "readings"])
    for line in jsonl.stdout.splitlines():
        item = json.loads(line)
        assert isinstance(item["members"], list) and isinstance(item["reading_count"], int)


def test_processes_show_a_set_and_the_matched_reading_is_named(db: str) -> None:
    # C(1,3,1,3): its readings have gcd(beta, delta) = 3 and 1 processes (docs/theory/processes.md);
    # '1..3' would read as a range in the query language, so the column lists the set.
    result = runner.invoke(app, ["find", "processes = 3 and area <= 6", "--db", db])
    assert result.exit_code == 0, result.output
    lines = result.stdout.splitlines()
    assert "matched reading" in lines[0]
    (row,) = [line for line in lines if "C(1,3,1,3)" in line or "C(3,1,3,1)" in line]
    assert " 1,3 " in row and ".." not in row
    # the matched reading is the one with 3 processes: beta = 3 forward tokens, delta = 3
    assert row.rstrip().endswith("C(1,3,1,3)")
    # a query on class fields alone names no reading
    plain = runner.invoke(app, ["find", "area = 6", "--db", db]).stdout.splitlines()
    assert "matched reading" not in plain[0]
