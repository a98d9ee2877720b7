"""``zoo show`` and ``zoo compare``: exact output for errors, the JSON interface, help texts.

Values are checked against docs/theory/equivalence.md, docs/theory/isomorphism.md,
docs/theory/state-counts.md, docs/theory/check-values.md; error messages are pinned in full
because a researcher reads them. Most tests use typer's runner; a few run the installed
console script, which is what users run, to prove that errors end in one line and status 1.
"""

from __future__ import annotations

import json
import subprocess
import sys
from math import comb
from pathlib import Path

import pytest
import typer.main
from typer.testing import CliRunner

from zoo.cli import app
from zoo.cli.app import LIMIT_EXCEEDED, USER_ERROR
from zoo.core import algebra

runner = CliRunner()
ZOO = Path(sys.executable).with_name("zoo")

REQUIRED_SHOW_KEYS = {  # issue 2 §7: other tools read these names
    "params",
    "area",
    "places",
    "tokens",
    "loop",
    "forward_cycles",
    "backward_cycles",
    "processes",
    "regular",
    "states",
    "state_arcs",
    "enabled",
    "semi_enabled",
    "slowness",
    "cycle_time",
    "group",
    "lattice_key",
    "iteration",
    "automorphisms",
    "net_automorphisms",
    "fingerprint",
    "net_fingerprint",
    "id",
}


def show_json(*args: str) -> dict:  # type: ignore[type-arg]
    result = runner.invoke(app, ["show", *args, "--format", "json"])
    assert result.exit_code == 0, result.output
    return json.loads(result.stdout)  # type: ignore[no-any-return]


# --- help -----------------------------------------------------------------------------------------


def test_every_command_has_help_text() -> None:
    group = typer.main.get_command(app)
    commands = group.commands  # type: ignore[attr-defined]
    assert {"show", "compare", "version"} <= set(commands)
    for name, command in commands.items():
        assert (command.help or "").strip(), f"zoo {name} has no help text"
        result = runner.invoke(app, [name, "--help"])
        assert result.exit_code == 0, name
        assert "Usage:" in result.stdout


@pytest.mark.parametrize("command", ["show", "compare"])
def test_help_mentions_options(command: str) -> None:
    result = runner.invoke(app, [command, "--help"], env={"COLUMNS": "200"})
    assert result.exit_code == 0
    for option in ("--format", "--db", "table", "json"):
        assert option in result.stdout


# --- zoo show: values -----------------------------------------------------------------------------


def test_show_json_c4223() -> None:
    report = show_json("4,2,2,3")
    assert REQUIRED_SHOW_KEYS <= set(report)
    # docs/theory/check-values.md table row C(4,2,2,3) [VERIFIED]
    assert report["params"] == {"alpha": 4, "beta": 2, "gamma": 2, "delta": 3}
    assert report["label"] == "C(4,2,2,3)"
    assert report["area"] == 16 and report["places"] == 32 and report["tokens"] == 6
    assert report["loop"] == 5
    assert report["forward_cycles"] == {"count": 1, "length": 16, "tokens": 2}
    assert report["backward_cycles"] == {"count": 2, "length": 8, "tokens": 2}
    assert report["processes"] == 1 and report["regular"] is False
    assert report["states"] == 40 and report["state_arcs"] == 64
    assert report["enabled"] == 2 and report["semi_enabled"] == 2
    # docs/theory/initial-marking.md example
    assert report["enabled_transitions"] == ["t_1_0", "t_3_-1"]
    assert report["semi_enabled_transitions"] == ["t_2_0", "t_4_-1"]
    assert report["slowness"] == "1/3" and report["slowness_float"] == pytest.approx(1 / 3)
    assert report["cycle_time"] == "8/1" and report["cycle_time_float"] == 8.0
    assert report["group"] == [1, 16]
    assert report["lattice_key"] == [16, 1, 6]
    assert report["normal_form_beta_delta"] == "C(10,1,6,1)"
    assert report["normal_form_alpha_gamma"] == "C(2,5,2,3)"
    assert report["swap"] == "C(2,4,3,2)"
    assert report["iteration"] == 1
    # docs/theory/state-counts.md: the typed system has gcd(alpha, beta) = 2 automorphisms, the
    # typed net A
    assert report["automorphisms"] == 2 and report["net_automorphisms"] == 16
    assert report["fingerprint"].startswith("v1:") and len(report["fingerprint"]) == 67
    assert report["net_fingerprint"].startswith("v1:")
    assert report["id"] is None  # no catalog in the test's data directory
    for key in ("area", "loop", "states", "automorphisms"):
        assert type(report[key]) is int


def test_show_forms_agree() -> None:
    # issue 2: 4,2,2,3, '4 2 2 3' (one argument or four) and C(4,2,2,3) are the same input.
    reference = show_json("4,2,2,3")
    assert show_json("4 2 2 3") == reference
    assert show_json("4", "2", "2", "3") == reference
    assert show_json("C(4,2,2,3)") == reference


def test_swap_gives_the_same_class_level_values() -> None:
    first, second = show_json("4,2,2,3"), show_json("2,4,3,2")
    for key in (
        "area",
        "loop",
        "states",
        "state_arcs",
        "cycle_time",
        "group",
        "iteration",
        "automorphisms",
        "net_automorphisms",
        "fingerprint",
        "net_fingerprint",
    ):
        assert first[key] == second[key], key
    assert first["forward_cycles"] == second["backward_cycles"]
    assert first["slowness"] == "1/3" and second["slowness"] == "-1/3"


def test_show_json_big_integers_are_exact() -> None:
    # C(100,100,1,1): |RG| = C(200,100) (docs/theory/state-counts.md), about 9e58, far beyond 64
    # bits.
    result = runner.invoke(app, ["show", "100,100,1,1", "--format", "json"])
    assert result.exit_code == 0
    assert f'"states": {comb(200, 100)},' in result.stdout
    assert json.loads(result.stdout)["states"] == comb(200, 100)


def test_show_above_the_net_limit() -> None:
    from zoo.core.net import NET_LIMIT

    assert NET_LIMIT == 20_000
    result = runner.invoke(app, ["show", "10001,10000,1,1", "--format", "json"])
    assert result.exit_code == 0
    assert result.stderr == (
        "Note: C(10001,10000,1,1) has area 20,001, above the explicit-net limit 20,000: "
        "automorphisms, fingerprints and transition names are not computed (null); "
        "every algebraic invariant is exact\n"
    )
    report = json.loads(result.stdout)
    for key in (
        "automorphisms",
        "net_automorphisms",
        "fingerprint",
        "net_fingerprint",
        "enabled_transitions",
    ):
        assert report[key] is None
    assert report["loop"] == 2 and report["enabled"] == 10000
    assert report["states"] == 20001 * comb(20001, 10000) // 20001
    # the table also works, with the long numbers shortened
    table = runner.invoke(app, ["show", "10001,10000,1,1"], env={"COLUMNS": "200"})
    assert table.exit_code == 0
    assert "4.49098078e6018 (6,019 digits; exact in --format json)" in table.stdout


def test_show_table() -> None:
    result = runner.invoke(app, ["show", "1,10,1,5"], env={"COLUMNS": "120"})
    assert result.exit_code == 0
    lines = result.stdout.splitlines()
    assert lines[0].strip() == "C(1,10,1,5)"

    def row(name: str) -> list[str]:
        line = next(line for line in lines if line.startswith(f"│ {name} "))
        return [cell.strip() for cell in line.strip("│").split("│")]

    # docs/theory/check-values.md row C(1,10,1,5): cyc = 3 although cyc_1 = 6; 15 states; w = -9/11
    assert row("loop (shortest cycle)") == [
        "loop (shortest cycle)",
        "3 (vector (3,0), 2 tokens)",
        "lattice search; cyc₁ = 6",
    ]
    assert row("reachable states")[1] == "15"
    assert row("slowness")[1] == "-9/11"
    assert row("forward cycles")[1] == "5 × 3 (2 tokens each)"
    # the representative of level 1 in the parallelogram: L(1,-9) = 10 - 9 = 1
    # (docs/theory/initial-marking.md)
    assert row("enabled at M0")[1] == "1: t_1_-9"


# --- zoo show: errors -----------------------------------------------------------------------------

SHOW_ERRORS = [
    (
        ["0,1,1,1"],
        "Error: alpha must be a positive integer, got 0; every cycloid parameter is at least 1\n",
    ),
    (
        ["-1,2,2,3"],
        "Error: alpha must be a positive integer, got -1; every cycloid parameter is at least 1\n",
    ),
    (
        ["4,2,2"],
        "Error: a parameter set has four values (alpha, beta, gamma, delta), got 3 in "
        "'4,2,2'; write it as 4,2,2,3\n",
    ),
    (
        ["4", "2", "2", "3", "1"],
        "Error: a parameter set has four values (alpha, beta, gamma, "
        "delta), got 5 in '4 2 2 3 1'; write it as 4,2,2,3\n",
    ),
    (
        ["4,2,2.5,3"],
        "Error: gamma must be a whole number, got '2.5' in '4,2,2.5,3'; write four "
        "positive integers such as 4,2,2,3\n",
    ),
    (
        ["C(4,2,2,3"],
        "Error: cannot read parameter set 'C(4,2,2,3'; write it as 4,2,2,3 or "
        "'4 2 2 3' or C(4,2,2,3)\n",
    ),
    (
        ["400,1,1,300"],
        "Error: area alpha*delta + beta*gamma = 120,001 of C(400,1,1,300) is over "
        "the limit 100,000; choose smaller parameters\n",
    ),
]


@pytest.mark.parametrize(("args", "stderr"), SHOW_ERRORS, ids=lambda v: str(v)[:20])
def test_show_errors(args: list[str], stderr: str) -> None:
    result = runner.invoke(app, ["show", *args])
    assert result.exit_code == 1
    assert result.stderr == stderr
    assert result.stdout == ""


def test_show_unknown_identifier_in_missing_catalog(tmp_path: Path) -> None:
    missing = tmp_path / "none.sqlite3"
    result = runner.invoke(app, ["show", "CY16-3", "--db", str(missing)])
    assert result.exit_code == 1
    assert result.stderr.startswith("Error: ") and result.stderr.count("\n") == 1
    assert not missing.exists()  # never builds a catalog


def test_unknown_option_is_a_usage_error() -> None:
    # Negative numbers must reach the parser (above), but other dashes are options.
    result = runner.invoke(app, ["show", "4,2,2,3", "--bogus"])
    assert (result.exit_code, result.stderr) == (
        2,
        "Error: no such option: --bogus; see zoo show --help\n",
    )
    result = runner.invoke(app, ["compare", "4,2,2,3", "-x"])
    assert (result.exit_code, result.stderr) == (
        2,
        "Error: no such option: -x; see zoo compare --help\n",
    )


def test_bad_format_is_a_usage_error() -> None:
    result = runner.invoke(app, ["show", "4,2,2,3", "--format", "xml"])
    assert result.exit_code == 2
    assert "xml" in result.stderr and "--format" in result.stderr


@pytest.mark.parametrize(
    ("args", "stderr"),
    [
        (
            ["show", "4,2,x,3"],
            "Error: gamma must be a whole number, got 'x' in '4,2,x,3'; write "
            "four positive integers such as 4,2,2,3\n",
        ),
        (
            ["compare", "4,2,2,3", "0,0,0,0"],
            "Error: alpha must be a positive integer, got 0; "
            "every cycloid parameter is at least 1\n",
        ),
    ],
)
def test_console_script_errors(args: list[str], stderr: str) -> None:
    # What a user sees from the installed command: one line, status 1, no traceback.
    result = subprocess.run([str(ZOO), *args], capture_output=True, text=True, check=False)
    assert (result.returncode, result.stderr, result.stdout) == (1, stderr, "")


# --- zoo show with a catalog ----------------------------------------------------------------------


def test_show_with_catalog(tmp_path: Path) -> None:
    db = str(tmp_path / "catalog.sqlite3")
    built = runner.invoke(app, ["build", "--max-area", "16", "--jobs", "1", "--db", db])
    assert built.exit_code == 0, built.output
    report = show_json("4,2,2,3", "--db", db)
    class_id = report["id"]
    assert class_id is not None and class_id.startswith("CY16-")
    # every member of the class resolves to the same identifier (docs/theory/isomorphism.md swap)
    assert show_json("2,4,3,2", "--db", db)["id"] == class_id
    entry = runner.invoke(app, ["show", class_id, "--db", db])
    assert entry.exit_code == 0, entry.output
    assert class_id in entry.stdout
    # a parameter set beyond the catalog's areas simply has no identifier
    assert show_json("4,2,2,5", "--db", db)["id"] is None
    # explore resolves an identifier to its label; the class has 40 states
    # (docs/theory/check-values.md)
    explored = explore_json(class_id, "--db", db)
    assert explored["label"] == entry_label(class_id, db) and explored["states"] == 40


def entry_label(class_id: str, db: str) -> str:
    from zoo.catalog.service import Catalog

    with Catalog.open(db) as catalog:
        return catalog.get(class_id).label


# --- zoo compare ----------------------------------------------------------------------------------


def compare_json(first: str, second: str) -> dict:  # type: ignore[type-arg]
    result = runner.invoke(app, ["compare", first, second, "--format", "json"])
    assert result.exit_code == 0, result.output
    return json.loads(result.stdout)  # type: ignore[no-any-return]


@pytest.mark.parametrize(
    ("first", "second", "reading", "same_class", "frame"),
    [
        ("4,2,2,3", "4,2,2,3", True, True, True),
        # delta-step keeps net and M0, docs/theory/normal-forms.md
        ("4,2,2,3", "4,2,6,1", True, True, True),
        ("4,2,2,3", "2,4,3,2", False, True, True),  # swap, docs/theory/isomorphism.md
        ("4,2,2,3", "10,1,6,1", False, False, True),  # NF_betadelta: same net, other marking
        ("2,2,1,3", "2,2,2,2", False, True, True),  # exceptional family, docs/theory/isomorphism.md
        ("2,2,1,5", "2,2,2,4", False, True, True),
        ("1,5,1,3", "2,2,2,2", False, False, True),  # same net only, docs/theory/isomorphism.md
        ("3,2,1,1", "4,1,1,1", False, False, True),  # same net, different systems, §11
        ("3,3,1,3", "3,3,2,2", False, False, False),  # same |RG|, not isomorphic, §10
        ("4,2,2,3", "1,1,1,1", False, False, False),
    ],
)
def test_compare(first: str, second: str, reading: bool, same_class: bool, frame: bool) -> None:
    report = compare_json(first, second)
    assert (report["same_reading"], report["same_class"], report["same_frame"]) == (
        reading,
        same_class,
        frame,
    )
    assert report["evidence"] == {
        "same_reading": "algebra",
        "same_class": "both",
        "same_frame": "both",
    }
    assert report["disagreements"] == []
    assert report["nauty"] == {"same_class": same_class, "same_frame": frame}


def test_compare_table() -> None:
    result = runner.invoke(app, ["compare", "4,2,2,3", "2,4,3,2"], env={"COLUMNS": "160"})
    assert result.exit_code == 0
    lines = result.stdout.splitlines()
    assert lines[0].strip() == "C(4,2,2,3) vs C(2,4,3,2)"
    cells = {
        line.split("│")[1].strip(): [c.strip() for c in line.split("│")[2:4]]
        for line in lines
        if line.startswith("│ same")
    }
    assert cells == {
        "same reading": ["no", "algebra"],
        "same class": ["yes", "both"],
        "same frame": ["yes", "both"],
    }


def test_compare_above_the_net_limit_uses_algebra() -> None:
    result = runner.invoke(
        app, ["compare", "10001,10000,1,1", "10000,10001,1,1", "--format", "json"]
    )
    assert result.exit_code == 0
    report = json.loads(result.stdout)
    assert report["same_class"] is True and report["same_frame"] is True
    assert report["evidence"] == {
        "same_reading": "algebra",
        "same_class": "algebra",
        "same_frame": "algebra",
    }
    assert report["fingerprints"] == [None, None]
    assert result.stderr.count("Note: ") == 2


def test_compare_reports_disagreement_loudly(monkeypatch: pytest.MonkeyPatch) -> None:
    # A deliberately broken algebraic class key must be caught by the nauty cross-check.
    monkeypatch.setattr(algebra, "class_key", lambda p: (p.alpha, p.beta, p.gamma, p.delta))
    result = runner.invoke(app, ["compare", "4,2,2,3", "2,4,3,2", "--format", "json"])
    assert result.exit_code == 1
    report = json.loads(result.stdout)
    assert report["same_class"] is True  # nauty decides
    assert report["evidence"]["same_class"] == "nauty"
    assert report["disagreements"] == ["same_class"]
    assert result.stderr == (
        "Error: algebra and nauty disagree for C(4,2,2,3) and C(2,4,3,2) (same_class: algebra "
        "says False, nauty says True); this is a bug in zoo, please report it with this "
        "command line\n"
    )


def test_compare_errors() -> None:
    result = runner.invoke(app, ["compare", "4,2,2,3"])
    assert result.exit_code == 2
    assert "Missing argument 'P2'" in result.stderr
    result = runner.invoke(app, ["compare", "4,2,2,3", "4;2;2;3"])
    assert result.exit_code == 1
    assert result.stderr == (
        "Error: a parameter set has four values (alpha, beta, gamma, delta), "
        "got 1 in '4;2;2;3'; write it as 4,2,2,3\n"
    )


# --- zoo explore ----------------------------------------------------------------------------------

EXPLORE_KEYS = {
    "params",
    "label",
    "area",
    "places",
    "tokens",
    "state_limit",
    "states",
    "arcs",
    "formula_states",
    "formula_arcs",
    "states_agree",
    "arcs_agree",
    "live",
    "one_safe",
    "reversible",
    "dead_transitions",
    "bound",
    "seconds",
}


def explore_json(*args: str) -> dict:  # type: ignore[type-arg]
    result = runner.invoke(app, ["explore", *args, "--format", "json"])
    assert result.exit_code == 0, result.output
    return json.loads(result.stdout)  # type: ignore[no-any-return]


def test_explore_json_c4223() -> None:
    report = explore_json("4,2,2,3")
    assert set(report) == EXPLORE_KEYS  # docs/explore.md lists these keys
    # docs/theory/check-values.md table row C(4,2,2,3) [VERIFIED]: 40 states, 64 edges
    assert (report["states"], report["arcs"]) == (40, 64)
    assert (report["formula_states"], report["formula_arcs"]) == (40, 64)
    assert report["states_agree"] is True and report["arcs_agree"] is True
    # docs/theory/cycles-and-tokens.md: cycloid systems are live, 1-safe and reversible [VERIFIED]
    assert (report["live"], report["one_safe"], report["reversible"]) == (True, True, True)
    assert report["dead_transitions"] == [] and report["bound"] == 1
    assert report["params"] == {"alpha": 4, "beta": 2, "gamma": 2, "delta": 3}
    assert (report["area"], report["places"], report["tokens"]) == (16, 32, 6)
    from zoo.core.reachability import DEFAULT_STATE_LIMIT

    assert report["state_limit"] == DEFAULT_STATE_LIMIT
    assert isinstance(report["seconds"], float) and report["seconds"] >= 0


@pytest.mark.parametrize(
    ("params", "states", "arcs"),
    [  # docs/theory/check-values.md table, RG states and edges [VERIFIED by explicit BFS]
        ("3,3,1,3", 40, 72),
        ("2,5,1,5", 45, 75),
        ("1,10,1,5", 15, 15),
        ("3,4,2,4", 100, 200),
        ("12,4,1,1", 1820, 5824),
    ],
)
def test_explore_matches_the_published_table(params: str, states: int, arcs: int) -> None:
    report = explore_json(params)
    assert (report["states"], report["arcs"]) == (states, arcs)
    assert report["states_agree"] and report["arcs_agree"]
    assert report["live"] and report["one_safe"] and report["reversible"]


def test_explore_state_limit_is_exact() -> None:
    # C(12,4,1,1) has exactly 1,820 reachable states (docs/theory/check-values.md [VERIFIED]).
    assert explore_json("12,4,1,1", "--state-limit", "1820")["states"] == 1820
    result = runner.invoke(app, ["explore", "12,4,1,1", "--state-limit", "1819"])
    assert (result.exit_code, result.stdout) == (LIMIT_EXCEEDED, "")
    assert result.stderr == (
        "Error: reachability graph of C(12,4,1,1) has more than 1,819 states; raise "
        "--state-limit or choose a smaller system (the closed formula predicts 1,820 states)\n"
    )


def test_explore_limit_from_the_console_script() -> None:
    result = subprocess.run(
        [str(ZOO), "explore", "100,100,1,1", "--state-limit", "1000"],
        capture_output=True,
        text=True,
        check=False,
    )
    # C(100,100,1,1): |RG| = C(200,100) ≈ 9.05e58 (docs/theory/state-counts.md)
    assert (result.returncode, result.stdout) == (LIMIT_EXCEEDED, "")
    assert result.stderr == (
        "Error: reachability graph of C(100,100,1,1) has more than 1,000 states; raise "
        "--state-limit or choose a smaller system (the closed formula predicts about 10^58 "
        "states)\n"
    )


def test_explore_table() -> None:
    result = runner.invoke(app, ["explore", "2,2,1,3"], env={"COLUMNS": "160"})
    assert result.exit_code == 0, result.output
    lines = result.stdout.splitlines()
    assert lines[0].strip() == "C(2,2,1,3): explicit reachability graph (area 8, 4 tokens)"

    def row(name: str) -> list[str]:
        line = next(line for line in lines if line.startswith(f"│ {name} "))
        return [cell.strip() for cell in line.strip("│").split("│")]

    # docs/theory/check-values.md row C(2,2,1,3): 12 states, 16 edges [VERIFIED]
    assert row("reachable states") == ["reachable states", "12", "formula 12: agree"]
    assert row("reachability arcs") == ["reachability arcs", "16", "formula 16: agree"]
    assert row("live")[1] == row("1-safe")[1] == row("reversible")[1] == "yes"
    assert row("dead transitions")[1] == "none"
    assert row("largest place bound")[1] == "1"
    assert row("search time")[2] == "state limit 200,000"


def test_explore_reports_a_formula_disagreement(monkeypatch: pytest.MonkeyPatch) -> None:
    # A deliberately wrong closed formula must be caught by the explicit search.
    import zoo.core.invariants

    monkeypatch.setattr(zoo.core.invariants, "reachable_state_count", lambda p: 41)
    result = runner.invoke(app, ["explore", "4,2,2,3", "--format", "json"])
    assert result.exit_code == 1
    assert json.loads(result.stdout)["states_agree"] is False
    assert result.stderr == (
        "Error: the explicit search of C(4,2,2,3) disagrees with the closed formulas (states 40 "
        "vs 41, arcs 64 vs 64); this is a bug in zoo, please report it with this command line\n"
    )


@pytest.mark.parametrize(
    ("args", "stderr"),
    [
        (
            ["4,2,2"],
            "Error: a parameter set has four values (alpha, beta, gamma, delta), got 3 "
            "in '4,2,2'; write it as 4,2,2,3\n",
        ),
        (
            ["FR16-2"],
            "Error: FR16-2 is a frame (an unmarked net, no initial marking); give a "
            "class such as CY16-1 or a parameter set\n",
        ),
        (
            ["30000,1,1,1"],
            "Error: the net of C(30000,1,1,1) has 30,001 transitions, more than "
            "the explicit-net limit 20,000; choose a smaller system or use the "
            "closed formulas\n",
        ),
    ],
)
def test_explore_errors(args: list[str], stderr: str) -> None:
    result = runner.invoke(app, ["explore", *args])
    # A size limit has its own exit status; every other input error is 1.
    status = LIMIT_EXCEEDED if "limit" in stderr else USER_ERROR
    assert (result.exit_code, result.stderr, result.stdout) == (status, stderr, "")


def test_explore_usage_errors() -> None:
    result = runner.invoke(app, ["explore", "4,2,2,3", "--state-limit", "0"])
    assert result.exit_code == 2 and "--state-limit" in result.stderr
    result = runner.invoke(app, ["explore", "4,2,2,3", "--bogus"])
    assert (result.exit_code, result.stderr) == (
        2,
        "Error: no such option: --bogus; see zoo explore --help\n",
    )


def test_state_limit_defaults() -> None:
    import inspect

    from zoo.cli.rings import RING_STATE_LIMIT
    from zoo.core.reachability import DEFAULT_STATE_LIMIT
    from zoo.core.rings import simulation_report

    ring_default = inspect.signature(simulation_report).parameters["max_states"].default
    assert RING_STATE_LIMIT == ring_default
    for command, default in (("explore", DEFAULT_STATE_LIMIT), ("ring", RING_STATE_LIMIT)):
        result = runner.invoke(app, [command, "--help"], env={"COLUMNS": "200"})
        assert result.exit_code == 0
        line = next(line for line in result.stdout.splitlines() if "--state-limit  " in line)
        assert f"[default: {default}]" in line, line


def test_ring_simulation_takes_the_state_limit() -> None:
    # docs/theory/ring-designs.md: 2 anonymous items, 3 slots is C(3,2,1,1), 10 states and 15 arcs
    # (§11).
    ok = runner.invoke(
        app, ["ring", "-c", "2", "-g", "3", "--simulate", "--state-limit", "10", "--format", "json"]
    )
    assert ok.exit_code == 0, ok.output
    assert json.loads(ok.stdout)["simulation"]["states"] == 10
    result = runner.invoke(app, ["ring", "-c", "2", "-g", "3", "--simulate", "--state-limit", "9"])
    assert (result.exit_code, result.stdout) == (LIMIT_EXCEEDED, "")
    assert result.stderr == (
        "Error: the simulated ring of 2 items and 3 slots (anonymous) has more than 9 states; "
        "simulate a smaller ring or raise the state limit\n"
    )


# --- references: identifiers everywhere, clear refusals (user audit) ------------------------------


@pytest.fixture(scope="module")
def area16_catalog(tmp_path_factory: pytest.TempPathFactory) -> str:
    db = str(tmp_path_factory.mktemp("catalog16") / "catalog.sqlite3")
    built = runner.invoke(app, ["build", "--max-area", "16", "--jobs", "1", "--db", db])
    assert built.exit_code == 0, built.output
    return db


def test_compare_accepts_identifiers_like_show(area16_catalog: str) -> None:
    first = entry_label("CY16-3", area16_catalog)
    second = entry_label("CY16-4", area16_catalog)
    result = runner.invoke(
        app, ["compare", "CY16-3", "CY16-4", "--db", area16_catalog, "--format", "json"]
    )
    assert result.exit_code == 0, result.output
    report = json.loads(result.stdout)
    assert report["ids"] == ["CY16-3", "CY16-4"]
    # two different catalog classes are never the same class (docs/architecture.md, identifiers)
    assert report["same_class"] is False
    assert report == compare_json(first, second) | {"ids": ["CY16-3", "CY16-4"]}


@pytest.mark.parametrize("command", ["show", "compare", "draw", "export", "explore", "cite"])
@pytest.mark.parametrize("text", ["XY16-3", "CY16--1"])
def test_text_that_is_no_reference_says_so(command: str, text: str) -> None:
    args = [command, text] + (["4,2,2,3"] if command == "compare" else [])
    result = runner.invoke(app, args)
    assert result.exit_code == 1
    assert result.stderr == (
        f"Error: '{text}' is neither a parameter set (4,2,2,3 or C(4,2,2,3)) nor a catalog "
        "identifier (CY16-3, FR16-2)\n"
    )


def test_cite_takes_four_separate_values_like_show(area16_catalog: str) -> None:
    joined = runner.invoke(app, ["cite", "4,2,2,3", "--db", area16_catalog, "--format", "json"])
    assert joined.exit_code == 0, joined.output
    apart = runner.invoke(
        app, ["cite", "4", "2", "2", "3", "--db", area16_catalog, "--format", "json"]
    )
    assert apart.exit_code == 0, apart.output
    assert apart.stdout == joined.stdout
    by_id = runner.invoke(app, ["cite", "CY16-3", "--db", area16_catalog, "--format", "text"])
    assert by_id.exit_code == 0, by_id.output
    assert "CY16-3" in by_id.stdout


def test_draw_refuses_unknown_suffixes(tmp_path: Path) -> None:
    target = tmp_path / "x.jpg"
    result = runner.invoke(app, ["draw", "4,2,2,3", "-o", str(target)])
    assert result.exit_code == 1
    assert result.stderr == (
        f"Error: cannot tell the picture format from the suffix '.jpg' of {target}; name the "
        "file .svg, .png, .pdf, .tex, .tikz, .dot, .gv or give --format svg, png, pdf, tikz "
        "or dot\n"
    )
    assert not target.exists()
    svg = tmp_path / "x.svg"
    assert runner.invoke(app, ["draw", "4,2,2,3", "-o", str(svg)]).exit_code == 0
    assert svg.read_text().lstrip().startswith("<")


# --- the light catalog lookup of zoo show (user audit: start-up time) -----------------------------


def test_quick_lookup_agrees_with_the_catalog_service(area16_catalog: str) -> None:
    from zoo.catalog.enumeration import iter_parameter_sets
    from zoo.catalog.service import Catalog, lookup_class_id
    from zoo.core.params import ParameterSet
    from zoo.storage.database import head_revision
    from zoo.storage.quicklookup import quick_class_id
    from zoo.storage.schema import SCHEMA_HEAD

    assert SCHEMA_HEAD == head_revision()  # the committed head is Alembic's own answer
    catalog_file = Path(area16_catalog)
    with Catalog.open(area16_catalog) as catalog:
        for area in range(1, 18):  # area 17 is not stored: both say None
            for p in iter_parameter_sets(area):
                entry = catalog.class_for_params(p)
                expected = None if entry is None else entry.id
                assert quick_class_id(p, catalog_file) == expected, p
    p = ParameterSet(4, 2, 2, 3)
    assert quick_class_id(p, catalog_file) == lookup_class_id(p, area16_catalog) is not None


def test_quick_lookup_leaves_an_outdated_catalog_to_the_service(tmp_path: Path) -> None:
    import shutil
    import sqlite3

    from zoo.core.params import ParameterSet
    from zoo.storage.quicklookup import UNANSWERED, quick_class_id

    db = tmp_path / "old.sqlite3"
    built = runner.invoke(app, ["build", "--max-area", "4", "--jobs", "1", "--db", str(db)])
    assert built.exit_code == 0, built.output
    with sqlite3.connect(db) as connection:
        connection.execute("UPDATE alembic_version SET version_num = '0001'")
    assert quick_class_id(ParameterSet(1, 1, 1, 1), db) is UNANSWERED
    result = runner.invoke(app, ["show", "1,1,1,1", "--db", str(db), "--format", "json"])
    assert result.exit_code == 0
    assert json.loads(result.stdout)["id"] is None
    assert result.stderr.startswith("Note: no catalog identifier: catalog ")
    assert "zoo migrate" in result.stderr
    garbage = tmp_path / "garbage.sqlite3"
    shutil.copyfile(Path(__file__), garbage)
    assert quick_class_id(ParameterSet(1, 1, 1, 1), garbage) is UNANSWERED


@pytest.mark.parametrize("with_catalog", [False, True])
def test_show_json_imports_no_database_or_table_library(
    with_catalog: bool, area16_catalog: str, tmp_path: Path
) -> None:
    db = area16_catalog if with_catalog else str(tmp_path / "none.sqlite3")
    code = (
        "import sys; sys.argv = ['zoo', 'show', '4,2,2,3', '--format', 'json', '--db', "
        f"{db!r}]; from zoo.cli import main; main()"
    )
    result = subprocess.run(
        [sys.executable, "-X", "importtime", "-c", code],
        capture_output=True,
        text=True,
        check=False,
    )
    assert result.returncode == 0, result.stderr[-2000:]
    from zoo.catalog.service import lookup_class_id
    from zoo.core.params import ParameterSet

    expected = lookup_class_id(ParameterSet(4, 2, 2, 3), db) if with_catalog else None
    assert json.loads(result.stdout)["id"] == expected
    imported = {
        line.rsplit("|", 1)[-1].strip()
        for line in result.stderr.splitlines()
        if line.startswith("import time:")
    }
    assert not {"sqlalchemy", "alembic", "rich", "networkx"} & imported


# --- wording of usage errors and tables (user audit) ----------------------------------------------


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (["show", "4,2,2,3", "--format", "xml"], "--format must be one of table, json; got 'xml'"),
        (
            ["draw", "4,2,2,3", "--view", "side"],
            "--view must be one of parallelogram, net, processes, states; got 'side'",
        ),
        (["explore", "4,2,2,3", "--state-limit", "0"], "--state-limit must be at least 1; got '0'"),
        (
            ["explore", "4,2,2,3", "--state-limit", "many"],
            "--state-limit must be a whole number; got 'many'",
        ),
    ],
)
def test_bad_option_values_are_said_plainly(args: list[str], message: str) -> None:
    result = runner.invoke(app, args, env={"COLUMNS": "120"})
    assert result.exit_code == 2
    # typer's runner frames the message in a box; the words are the same
    assert message in [line.strip("│ ") for line in result.stderr.splitlines()]
    assert "Value error" not in result.stderr and "Input should" not in result.stderr
    # the installed command prints it as one line (the non-standalone path of zoo.cli.app.main)
    installed = subprocess.run([str(ZOO), *args], capture_output=True, text=True, check=False)
    assert installed.returncode == 2
    assert installed.stderr.splitlines()[-1] == f"Error: {message}"


def test_help_shows_no_bool_type_and_no_docstring_line_breaks() -> None:
    group = typer.main.get_group(app)
    for name in [*group.commands, None]:
        args = [name, "--help"] if name else ["--help"]
        result = runner.invoke(app, args, env={"COLUMNS": "200"})
        assert result.exit_code == 0, name
        assert "<bool>" not in result.stdout, name
    build = runner.invoke(app, ["build", "--help"], env={"COLUMNS": "200"}).stdout
    assert "so an interrupted build keeps every area it finished." in build
    assert "Example: zoo build --max-area 60 --jobs 2" in build


def test_show_table_keeps_fingerprints_whole_and_whole_fractions_plain() -> None:
    report = show_json("4,2,2,3")
    result = runner.invoke(app, ["show", "4,2,2,3"], env={"COLUMNS": "60"})
    assert result.exit_code == 0
    lines = result.stdout.splitlines()
    assert f"fingerprint (system): {report['fingerprint']}" in lines
    assert f"fingerprint (net): {report['net_fingerprint']}" in lines
    # cycle time A/min(alpha, beta) = 16/2 = 8 (docs/theory/state-counts.md); JSON keeps num/den
    assert report["cycle_time"] == "8/1"
    cycle = next(line for line in lines if line.startswith("│ cycle time"))
    assert cycle.split("│")[2].strip() == "8"


def test_catalog_entry_table_prints_whole_fractions_and_whole_fingerprints(
    area16_catalog: str,
) -> None:
    entry = runner.invoke(app, ["show", "C(1,1,1,15)", "--db", area16_catalog, "--format", "json"])
    assert entry.exit_code == 0, entry.output
    report = json.loads(entry.stdout)
    class_id = report["id"]
    table = runner.invoke(app, ["show", class_id, "--db", area16_catalog], env={"COLUMNS": "60"})
    assert table.exit_code == 0, table.output
    lines = table.stdout.splitlines()
    # C(1,1,1,15): cycle time A/min(alpha, beta) = 16/1 (docs/theory/state-counts.md), slowness 0/2
    # = 0
    cycle = next(line for line in lines if line.startswith("cycle time"))
    assert cycle.split()[-1] == "16"
    assert "16/1" not in table.stdout
    assert f"fingerprint: {report['fingerprint']}" in lines


def test_exploration_report_lives_in_the_core() -> None:
    import zoo.cli.examine
    from zoo.core.params import ParameterSet
    from zoo.core.report import exploration_report

    assert not hasattr(zoo.cli.examine, "exploration_report")  # the CLI only prints it
    report = exploration_report(ParameterSet(4, 2, 2, 3), 1000)
    # docs/theory/check-values.md: C(4,2,2,3) has 40 reachable states and 64 arcs
    assert (report["states"], report["arcs"]) == (40, 64)
    printed = explore_json("4,2,2,3", "--state-limit", "1000")
    assert {k: v for k, v in printed.items() if k != "seconds"} == {
        k: v for k, v in report.items() if k != "seconds"
    }


def test_compare_answers_same_behaviour_with_evidence() -> None:
    # Different classes (3 and 4 tokens) with the same behaviour: both reachability graphs are
    # one directed cycle through the 5 markings (docs/theory/behaviour.md); networkx agrees
    # (tests/core/test_behaviour.py).
    report = compare_json("1,2,1,3", "1,3,1,2")
    assert report["same_class"] is False and report["same_behaviour"] is True
    assert report["behaviour"]["state_map"] == [0, 1, 2, 3, 4]
    # Same state and arc counts (40 and 72), different behaviour: the split names its evidence.
    report = compare_json("3,3,1,3", "3,3,2,2")
    assert report["same_behaviour"] is False
    assert report["behaviour"]["evidence"] == (
        "the nets synthesized from the state graphs are not isomorphic"
    )
    assert compare_json("4,2,2,3", "2,4,3,2")["same_behaviour"] is True  # same class
