"""``zoo find`` on a terminal shows a screenful and the total; pipes and machine formats get all.

Run in a real subprocess whose standard output is a pseudo-terminal (``pty``), the way a person
types the README's first query; the pipe cases are what scripts rely on (issue 8).
"""

from __future__ import annotations

import json
import os
import pty
import re
import subprocess
import sys
from pathlib import Path

import pytest

from zoo.cli.catalog import TERMINAL_LIMIT

ROOT = Path(__file__).resolve().parents[2]
ZOO = [sys.executable, "-c", "from zoo.cli import main; main()"]
ROW = re.compile(r"^CY\d+-\d+\s", re.MULTILINE)


def _env() -> dict[str, str]:
    env = dict(os.environ, PYTHONPATH=str(ROOT), COLUMNS="200")
    env.pop("NO_COLOR", None)
    return env


def _on_terminal(*args: str) -> str:
    """Run zoo with stdout on a pseudo-terminal; return what the terminal received."""
    leader, follower = pty.openpty()
    try:
        process = subprocess.Popen(
            [*ZOO, *args], stdout=follower, stderr=subprocess.PIPE, env=_env(), cwd=ROOT
        )
    finally:
        os.close(follower)
    chunks: list[bytes] = []
    while True:
        try:
            chunk = os.read(leader, 65536)
        except OSError:  # EIO: the child closed its end of the terminal
            break
        if not chunk:
            break
        chunks.append(chunk)
    os.close(leader)
    _, stderr = process.communicate(timeout=60)
    assert process.returncode == 0, stderr.decode()
    text = b"".join(chunks).decode()
    return re.sub(r"\x1b\[[0-9;]*m", "", text).replace("\r\n", "\n")


def _piped(*args: str) -> subprocess.CompletedProcess[str]:
    result = subprocess.run(
        [*ZOO, *args], capture_output=True, text=True, env=_env(), cwd=ROOT, check=False
    )
    assert result.returncode == 0, result.stderr
    return result


@pytest.fixture(scope="module")
def total(small_catalog: str) -> int:
    number = int(_piped("find", "", "--db", small_catalog, "--count").stdout)
    assert number > TERMINAL_LIMIT  # else nothing here could be cut
    return number


def test_a_terminal_gets_the_default_limit_and_how_to_see_all(
    small_catalog: str, total: int
) -> None:
    shown = _on_terminal("find", "", "--db", small_catalog)
    assert len(ROW.findall(shown)) == TERMINAL_LIMIT
    assert f"{total:,} classes match; showing {TERMINAL_LIMIT:,}." in shown
    assert "--all" in shown


def test_all_on_a_terminal_prints_every_class(small_catalog: str, total: int) -> None:
    shown = _on_terminal("find", "", "--db", small_catalog, "--all")
    assert len(ROW.findall(shown)) == total
    assert f"{total:,} classes match." in shown


def test_an_explicit_limit_on_a_terminal_is_kept(small_catalog: str, total: int) -> None:
    shown = _on_terminal("find", "", "--db", small_catalog, "--limit", "7")
    assert len(ROW.findall(shown)) == 7
    assert "--all" not in shown  # the user chose the cut and knows how to change it


def test_a_pipe_gets_every_row(small_catalog: str, total: int) -> None:
    result = _piped("find", "", "--db", small_catalog)
    assert len(ROW.findall(result.stdout)) == total
    assert f"{total:,} classes match." in result.stdout


@pytest.mark.parametrize("fmt", ["json", "csv"])
def test_machine_formats_on_a_terminal_keep_everything(
    small_catalog: str, total: int, fmt: str
) -> None:
    shown = _on_terminal("find", "", "--db", small_catalog, "--format", fmt)
    if fmt == "json":
        assert len(json.loads(shown)) == total
    else:
        assert len(shown.strip().splitlines()) == total + 1  # and the heading


def test_all_with_limit_is_one_clear_line(small_catalog: str) -> None:
    result = subprocess.run(
        [*ZOO, "find", "", "--db", small_catalog, "--all", "--limit", "3"],
        capture_output=True,
        text=True,
        env=_env(),
        cwd=ROOT,
        check=False,
    )
    assert result.returncode == 2
    assert result.stderr.strip().splitlines() == [
        "Error: --all and --limit contradict each other: give one of them."
    ]
