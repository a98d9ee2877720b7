"""Safe input (docs/pnml.md, "Safe input"): hostile and broken files get one clear line.

Each file in tests/data/pnml is hand-written; the huge and deeply nested files are made on the
fly. Every case pins the exact message; how fast each answer comes back (milliseconds) is
measured by benchmarks/bench_safe_input.py, not asserted here.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from typer.testing import CliRunner

from zoo.cli import app
from zoo.errors import FormatError
from zoo.interchange.identify import identify_file
from zoo.interchange.netfile import read_net_file
from zoo.interchange.netmodel import MAX_INPUT_BYTES, read_limited
from zoo.interchange.pnml import PNML_NAMESPACE, PTNET_TYPE, parse_pnml

DATA = Path(__file__).parents[1] / "data" / "pnml"


def refusal(path: Path) -> str:
    with pytest.raises(FormatError) as caught:
        read_net_file(path)
    message = str(caught.value)
    assert "\n" not in message
    return message


def test_billion_laughs_is_refused_at_the_first_entity() -> None:
    path = DATA / "billion-laughs.pnml"
    assert refusal(path) == (
        f"{path}: entity declaration 'ha' refused; entities can expand to gigabytes (the "
        "'billion laughs' attack) and PNML never needs them"
    )


def test_external_entity_to_a_local_file_is_refused(tmp_path: Path) -> None:
    secret = tmp_path / "secret.txt"
    secret.write_text("frame-key-4711")
    path = tmp_path / "leak.pnml"
    path.write_text(
        (DATA / "external-entity.pnml").read_text().replace("file:///etc/passwd", secret.as_uri())
    )
    message = refusal(path)
    assert message == (
        f"{path}: external entity 'secret' ({secret.as_uri()}) refused; zoo never reads files "
        "or addresses named inside its input"
    )
    assert "frame-key-4711" not in message
    assert refusal(DATA / "external-entity.pnml") == (
        f"{DATA / 'external-entity.pnml'}: external entity 'secret' (file:///etc/passwd) "
        "refused; zoo never reads files or addresses named inside its input"
    )


def test_external_parameter_entity_is_refused(tmp_path: Path) -> None:
    path = tmp_path / "pe.pnml"
    path.write_text(
        '<!DOCTYPE pnml [<!ENTITY % remote SYSTEM "http://127.0.0.1:9/x.dtd"> %remote;]><pnml/>'
    )
    assert refusal(path) == (
        f"{path}: external entity 'remote' (http://127.0.0.1:9/x.dtd) refused; zoo never reads "
        "files or addresses named inside its input"
    )


def test_external_dtd_is_never_fetched() -> None:
    # A DOCTYPE naming an external DTD is harmless: the parser does not load it (no network).
    document = (
        f'<!DOCTYPE pnml SYSTEM "http://127.0.0.1:9/pnml.dtd"><pnml xmlns='
        f'"{PNML_NAMESPACE}"><net id="n" type="{PTNET_TYPE}"><page id="p">'
        '<transition id="t"/></page></net></pnml>'
    ).encode()
    assert parse_pnml(document, "x").transitions == ("t",)


def test_oversized_file_is_refused_before_parsing(tmp_path: Path) -> None:
    path = tmp_path / "huge.pnml"
    with path.open("wb") as handle:  # sparse: 11 MiB without writing them
        handle.truncate(11 * 1024 * 1024)
    assert refusal(path) == (
        f"{path} is 11.0 MiB, over the input limit of 10 MiB; zoo reads nets up to that size "
        "(docs/pnml.md, Safe input)"
    )
    assert MAX_INPUT_BYTES == 10 * 1024 * 1024


def test_size_limit_counts_the_bytes_actually_read(tmp_path: Path) -> None:
    path = tmp_path / "small.mgraph"
    path.write_text("place p: a -> b\n" * 100)
    with pytest.raises(FormatError, match="over the input limit"):
        read_limited(path, limit=1000)
    assert len(read_limited(path, limit=1600)) == 1600


def test_truncated_xml() -> None:
    path = DATA / "truncated.pnml"
    assert refusal(path) == f"{path}: not well-formed XML at line 17, column 7: unclosed token"


def test_wrong_root() -> None:
    path = DATA / "wrong-root.pnml"
    assert refusal(path) == (
        f"{path}: root element is <svg> in the namespace http://www.w3.org/2000/svg, not <pnml> "
        f"in the namespace {PNML_NAMESPACE}; this is not a PNML file"
    )


def test_deeply_nested_pages_are_read_without_recursion() -> None:
    depth = 50_000
    document = (
        f'<pnml xmlns="{PNML_NAMESPACE}"><net id="n" type="{PTNET_TYPE}">'
        + "".join(f'<page id="g{i}">' for i in range(depth))
        + '<transition id="t"/>'
        + "</page>" * depth
        + "</net></pnml>"
    ).encode()
    net = parse_pnml(document, "deep")
    assert net.pages == depth and net.transitions == ("t",)


@pytest.mark.parametrize(
    ("name", "reason"),
    [
        (
            "arc-weights.pnml",
            "arc weights must all be 1, but arc 'e1' (a -> ab) has weight 2 (2 such arcs)",
        ),
        (
            "not-marked-graph.pnml",
            "not a marked graph: place 'switch' has 1 input transition ('back') and 2 output "
            "transitions ('to_left', 'to_right'); every place of a marked graph has exactly one "
            "input and one output transition",
        ),
        (
            "dead-cycle.pnml",
            "not live: the cycle advance2 -> free2 -> advance1 -> busy2 -> advance2 carries no "
            "token, so its transitions can never fire",
        ),
    ],
)
def test_nets_that_are_not_cycloids_get_their_reason(name: str, reason: str) -> None:
    answer = identify_file(DATA / name, use_catalog=False)
    assert answer.cycloid is False and answer.params is None
    assert answer.reason == reason


def test_several_pages_are_flattened() -> None:
    answer = identify_file(DATA / "pipeline-ring-pages.pnml", use_catalog=False)
    assert answer.cycloid and str(answer.params) == "C(1,2,1,1)"


def test_cli_prints_one_error_line_for_hostile_files() -> None:
    runner = CliRunner()
    result = runner.invoke(
        app,
        [
            "identify",
            str(DATA / "billion-laughs.pnml"),
            str(DATA / "pipeline-ring.pnml"),
            "--no-catalog",
        ],
    )
    assert result.exit_code == 1
    lines = result.output.splitlines()
    assert lines[0].startswith(f"Error: {DATA / 'billion-laughs.pnml'}: entity declaration 'ha'")
    assert lines[1].startswith(f"{DATA / 'pipeline-ring.pnml'}: cycloid system C(1,2,1,1)")
    assert "Traceback" not in result.output
