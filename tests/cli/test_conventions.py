"""Command-line conventions: --version, shell completion, exit statuses, quiet closed pipes.

What a shell user expects of any command (common practice of Unix tools): ``--version``, a
completion script for the shell, an exit status that a script can tell apart, and no
traceback when a reader such as ``head`` stops reading early.
"""

from __future__ import annotations

import os
import subprocess
import sys
from importlib.metadata import packages_distributions
from importlib.metadata import version as installed_version
from pathlib import Path

import pytest
from typer.testing import CliRunner

from zoo.cli import app
from zoo.cli.app import (
    EXIT_STATUSES,
    INTERRUPTED,
    LIMIT_EXCEEDED,
    NOT_A_CYCLOID,
    NOT_FOUND,
    USAGE_ERROR,
    USER_ERROR,
)

runner = CliRunner()
ZOO = Path(sys.executable).with_name("zoo")
ROOT = Path(__file__).resolve().parents[2]
PNML = ROOT / "tests" / "data" / "pnml"


@pytest.fixture(scope="module")
def db(tmp_path_factory: pytest.TempPathFactory) -> str:
    location = str(tmp_path_factory.mktemp("conventions") / "catalog.sqlite3")
    result = runner.invoke(app, ["build", "--max-area", "16", "--db", location, "--jobs", "1"])
    assert result.exit_code == 0, result.output
    return location


def test_version_is_the_installed_distribution_version() -> None:
    result = subprocess.run([str(ZOO), "--version"], capture_output=True, text=True, check=False)
    assert (result.returncode, result.stderr) == (0, "")
    # The package metadata pip installed, not a constant of the code under test; found through
    # the import package, since the distribution is named cycloid-zoo (older installs: zoo).
    (distribution,) = set(packages_distributions()["zoo"])
    assert result.stdout == f"zoo {installed_version(distribution)}\n"


def test_completion_is_offered_and_completes_commands_and_options() -> None:
    help_text = runner.invoke(app, ["--help"]).stdout
    assert "--install-completion" in help_text and "--show-completion" in help_text
    script = runner.invoke(app, ["--show-completion", "bash"])
    assert script.exit_code == 0 and "_ZOO_COMPLETE=complete_bash" in script.stdout
    # What bash asks the program when the user presses Tab (the script above does the same).
    env = {
        **os.environ,
        "_ZOO_COMPLETE": "complete_bash",
        "COMP_WORDS": "zoo fi",
        "COMP_CWORD": "1",
    }
    words = subprocess.run([str(ZOO)], env=env, capture_output=True, text=True, check=False)
    assert words.stdout.split() == ["find"]
    env.update(COMP_WORDS="zoo find --for", COMP_CWORD="2")
    words = subprocess.run([str(ZOO)], env=env, capture_output=True, text=True, check=False)
    assert words.stdout.split() == ["--format"]


def test_exit_statuses_are_distinct_and_documented() -> None:
    codes = [code for code, _ in EXIT_STATUSES]
    assert len(set(codes)) == len(codes)
    assert {USER_ERROR, USAGE_ERROR, INTERRUPTED} == {1, 2, 130}  # common practice
    epilog = " ".join(runner.invoke(app, ["--help"]).stdout.split())
    find_help = " ".join(runner.invoke(app, ["find", "--help"]).stdout.split())
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    page = (ROOT / "docs" / "catalog.md").read_text(encoding="utf-8")
    for code, meaning in EXIT_STATUSES:
        assert f"{code} {meaning}" in epilog and f"{code} {meaning}" in find_help
        assert f"| {code} | {meaning} |" in readme and f"| {code} | {meaning} |" in page


def test_not_found_has_its_own_status(db: str) -> None:
    for args in (["show", "CY8-99"], ["show", "CY40-1"], ["cite", "CY8-99"], ["draw", "CY8-99"]):
        result = runner.invoke(app, [*args, "--db", db])
        assert result.exit_code == NOT_FOUND, (args, result.output)
        assert result.stderr.startswith("Error: ") and result.stdout == ""


def test_limit_exceeded_has_its_own_status() -> None:
    # C(12,4,1,1) has 1,820 reachable states (docs/theory/check-values.md [VERIFIED]).
    result = subprocess.run(
        [str(ZOO), "explore", "12,4,1,1", "--state-limit", "100"],
        capture_output=True,
        text=True,
        check=False,
    )
    assert (result.returncode, result.stdout) == (LIMIT_EXCEEDED, "")
    assert result.stderr.startswith("Error: ") and "Traceback" not in result.stderr


def test_not_a_cycloid_has_its_own_status() -> None:
    # A place with two output transitions: no marked graph (Commoner, Holt, Even and Pnueli,
    # "Marked directed graphs", J. Comput. Syst. Sci. 5 (1971): one input, one output per place).
    result = runner.invoke(app, ["identify", str(PNML / "not-marked-graph.pnml"), "--no-catalog"])
    assert result.exit_code == NOT_A_CYCLOID, result.output
    cycloid = runner.invoke(app, ["identify", str(PNML / "pipeline-ring.pnml"), "--no-catalog"])
    assert cycloid.exit_code == 0, cycloid.output


def test_usage_and_input_errors_keep_their_statuses() -> None:
    assert runner.invoke(app, ["show", "4,2,2,3", "--frobnicate"]).exit_code == USAGE_ERROR
    assert runner.invoke(app, ["show", "4,2,x,3"]).exit_code == USER_ERROR


@pytest.mark.parametrize("fmt", ["table", "csv", "json", "jsonl"])
def test_a_reader_that_stops_early_ends_the_command_quietly(db: str, fmt: str) -> None:
    # Far more than a pipe buffer (64 KiB on Linux) must be written for the pipe to break.
    process = subprocess.Popen(
        [str(ZOO), "find", "", "--db", db, "--format", fmt],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
    )
    assert process.stdout is not None and process.stderr is not None
    process.stdout.readline()
    process.stdout.close()  # what `head -1` does after its line
    stderr = process.stderr.read().decode()
    assert process.wait(timeout=120) == 0
    assert "Traceback" not in stderr and "BrokenPipe" not in stderr and "Error" not in stderr


def test_one_reference_is_promised_where_one_is_read() -> None:
    # The argument reads one parameter set, possibly as four words ('4 2 2 3').
    for command in ("show", "explore", "draw", "export", "cite"):
        usage = runner.invoke(app, [command, "--help"]).stdout
        line = next(line for line in usage.splitlines() if "Usage:" in line)
        assert "..." not in line, line
    assert runner.invoke(app, ["show", "4", "2", "2", "3", "--format", "json"]).exit_code == 0
