"""Every usage line promises only what its command does (issue 8).

POSIX utility conventions (common practice): an operand in capitals, ``[X]`` when optional,
``X...`` when it may be repeated; braces mean a choice, so a plain required operand has none.
Each ``...`` is checked by giving two values; each single operand by giving two and expecting
one clear error line.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
from typer.main import get_command
from typer.testing import CliRunner

from zoo.cli import app

runner = CliRunner()
DATA = Path(__file__).resolve().parents[1] / "data" / "pnml"
COMMANDS = sorted(get_command(app).commands)  # type: ignore[attr-defined]


def _usage(command: str) -> str:
    result = runner.invoke(app, [command, "--help"], env={"COLUMNS": "200"})
    assert result.exit_code == 0, result.output
    line = next(line for line in result.stdout.splitlines() if "Usage:" in line)
    return line.split(f" {command} ", 1)[1].strip()


@pytest.mark.parametrize("command", COMMANDS)
def test_usage_line_is_in_posix_form(command: str) -> None:
    usage = _usage(command)
    assert usage.startswith("[OPTIONS]")
    operands = usage.removeprefix("[OPTIONS]").split()
    for operand in operands:
        assert "{" not in operand and "}" not in operand, usage
        assert not operand.endswith("......"), usage
        bare = operand.strip("[]").removesuffix("...")
        assert re.fullmatch(r"[A-Z0-9|]+", bare), usage


def test_every_repeatable_operand_takes_several() -> None:
    usages = {name: _usage(name) for name in COMMANDS}
    repeatable = {name: usage for name, usage in usages.items() if "..." in usage}
    assert set(repeatable) == {"identify"}, repeatable  # a new one needs a check below
    files = [str(DATA / "pipeline-ring.pnml"), str(DATA / "pipeline-ring.mgraph")]
    result = runner.invoke(app, ["identify", *files, "--no-catalog"])
    assert result.exit_code == 0, result.output
    assert [line.split(":")[0] for line in result.stdout.splitlines()] == files


@pytest.mark.parametrize("command", ["show", "explore", "export", "draw", "cite"])
def test_a_single_reference_operand_refuses_two_with_one_line(command: str) -> None:
    assert not _usage(command).endswith("..."), _usage(command)
    result = runner.invoke(app, [command, "CY16-3", "CY16-4", "--db", "/nonexistent/x.sqlite3"])
    assert result.exit_code != 0
    assert "Traceback" not in result.output
    errors = [line for line in result.stderr.splitlines() if line.startswith("Error: ")]
    assert len(errors) == 1, result.stderr
    assert "'CY16-3 CY16-4'" in errors[0], errors[0]
