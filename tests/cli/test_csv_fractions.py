"""``zoo find --format csv`` writes a whole fraction as an integer (``6``, not ``6/1``), as the
CSV dumps do (issue 8). Reference: cycle time A / min(α, β) (docs/theory/state-counts.md) and
slowness (α − β)/(α + β), recomputed with Python's fractions from the class label.
"""

from __future__ import annotations

import csv
import io
import re
from fractions import Fraction

from typer.testing import CliRunner

from zoo.cli import app
from zoo.core.params import parse_params


def test_whole_fractions_are_integers_in_find_csv(small_catalog: str) -> None:
    result = CliRunner().invoke(
        app,
        ["find", "area = 6", "--db", small_catalog, "-f", "csv", "-c", "cycle_time,slowness"],
    )
    assert result.exit_code == 0, result.output
    rows = list(csv.DictReader(io.StringIO(result.stdout, newline="")))
    assert rows
    for row in rows:
        p = parse_params(row["label"])
        assert Fraction(row["cycle_time"]) == Fraction(
            p.alpha * p.delta + p.beta * p.gamma, min(p.alpha, p.beta)
        )
        assert not re.search(r"(^|\D)-?\d+/1(\D|$)", row["cycle_time"] + row["slowness"])
    assert any(row["cycle_time"].isdigit() for row in rows)
    assert any('"0"' in row["slowness"] for row in rows)  # slowness 0/1 written 0
