"""PNML written in forms other than the PT-net grammar: read exactly, warn, or refuse (issue 8).

The standard form (ISO/IEC 15909-2, PT-net type) of a marking is
``<initialMarking><text>1</text></initialMarking>``. A marking held in ``<value>`` or
``<token>`` used to read as no tokens, so the live pipeline ring of tests/data/pnml became "not
live" without a word. The scenario is our own ring buffer: 3 stages, 2 frames, 1 free slot,
the cycloid C(1,2,1,1) (test_identify.py works it out independently).
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from typer.testing import CliRunner

from zoo.cli import app
from zoo.core.params import ParameterSet
from zoo.errors import FormatError
from zoo.interchange.identify import identify_net
from zoo.interchange.pnml import PTNET_TYPE, parse_pnml, read_pnml

DATA = Path(__file__).parents[1] / "data" / "pnml"
RING = (DATA / "pipeline-ring.pnml").read_text("utf-8")
MARKING = "<initialMarking><text>1</text></initialMarking>"


def _variant(old: str, new: str, count: int = -1) -> bytes:
    assert old in RING
    return RING.replace(old, new, count).encode()


def test_the_standard_form_is_read_exactly_and_quietly() -> None:
    net = read_pnml(DATA / "pipeline-ring.pnml")
    assert dict(zip(net.places, net.tokens, strict=True)) == {
        "busy0": 1,
        "busy1": 1,
        "busy2": 0,
        "free0": 0,
        "free1": 0,
        "free2": 1,
    }
    assert net.warnings == ()
    assert identify_net(net, use_catalog=False).warnings == ()


@pytest.mark.parametrize(
    ("marking", "found"),
    [
        ("<initialMarking><value>1</value></initialMarking>", "<value>"),
        (
            '<initialMarking><token><value><object type="int">1</object></value></token>'
            "</initialMarking>",
            "<token>",
        ),
        ("<initialMarking>1</initialMarking>", "the bare text '1'"),
        ("<initialMarking><text>1</text><value>1</value></initialMarking>", "<value>"),
    ],
)
def test_a_marking_in_another_form_is_refused_with_the_fix(marking: str, found: str) -> None:
    with pytest.raises(FormatError) as refused:
        parse_pnml(_variant(MARKING, marking), "ring.pnml")
    assert str(refused.value) == (
        f"ring.pnml: the initial marking of place 'busy0' is written as <initialMarking> "
        f"holding {found}, a form zoo does not read; write the PT-net form "
        "<initialMarking><text>1</text></initialMarking>"
    )


def test_an_inscription_in_another_form_is_refused_with_the_fix() -> None:
    document = _variant(
        '<arc id="a1" source="busy0" target="advance0"/>',
        '<arc id="a1" source="busy0" target="advance0">'
        "<inscription><value>1</value></inscription></arc>",
    )
    with pytest.raises(FormatError, match="inscription of arc 'a1' is written as <inscription> "):
        parse_pnml(document, "ring.pnml")


def test_graphics_and_toolspecific_inside_a_marking_are_allowed() -> None:
    # The PT-net grammar lets a label carry graphics and tool data beside its text.
    marking = (
        '<initialMarking><text>1</text><graphics><offset x="0" y="0"/></graphics>'
        '<toolspecific tool="x" version="1"/></initialMarking>'
    )
    net = parse_pnml(_variant(MARKING, marking), "ring.pnml")
    assert sum(net.tokens) == 3 and net.warnings == ()


def test_an_untyped_net_without_page_is_read_as_a_pt_net_with_warnings() -> None:
    net = read_pnml(DATA / "pipeline-ring-untyped.pnml")
    assert len(net.warnings) == 2
    assert "has no type attribute; read as a place/transition net" in net.warnings[0]
    assert f'type="{PTNET_TYPE}"' in net.warnings[0]
    assert "stand directly under <net>, outside any <page>" in net.warnings[1]
    answer = identify_net(net, use_catalog=False)
    assert answer.cycloid, answer.reason
    assert answer.params == ParameterSet(1, 2, 1, 1)
    assert answer.warnings == net.warnings


def test_an_untyped_net_with_a_high_level_label_is_refused() -> None:
    document = _variant(f' type="{PTNET_TYPE}"', "").replace(
        b'<place id="busy2">', b'<place id="busy2"><type><text>Frame</text></type>'
    )
    with pytest.raises(FormatError) as refused:
        parse_pnml(document, "ring.pnml")
    assert str(refused.value) == (
        "ring.pnml: the <net> has no type attribute and place 'busy2' has a <type> label, "
        "which place/transition nets do not have; zoo reads PT nets only: save the net as "
        f'type="{PTNET_TYPE}"'
    )


def test_nodes_outside_the_page_are_no_longer_dropped() -> None:
    # One transition and its arcs moved out of the page: before, the net lost them silently.
    document = _variant(
        '<transition id="advance2"><name><text>advance stage 2 to 0</text></name></transition>',
        "",
    ).replace(
        b"</page>",
        b'</page><transition id="advance2"/>',
    )
    net = parse_pnml(document, "ring.pnml")
    assert set(net.transitions) == {"advance0", "advance1", "advance2"}
    assert len(net.warnings) == 1 and "outside any <page>" in net.warnings[0]
    assert identify_net(net, use_catalog=False).params == ParameterSet(1, 2, 1, 1)


def test_a_name_without_text_warns_and_shows_the_id() -> None:
    document = _variant(
        "<name><text>stage 0 holds a frame</text></name>", "<name><value>busy</value></name>"
    )
    net = parse_pnml(document, "ring.pnml")
    assert net.label_of("busy0") == "busy0"
    assert net.warnings == (
        "ring.pnml: the name of place 'busy0' has no <text>; shown by its id "
        "(PNML writes <name><text>...</text></name>)",
    )


def test_identify_prints_the_warnings_on_standard_error() -> None:
    runner = CliRunner()
    path = str(DATA / "pipeline-ring-untyped.pnml")
    result = runner.invoke(app, ["identify", path, "--no-catalog"])
    assert result.exit_code == 0, result.output
    assert "cycloid system C(1,2,1,1)" in result.stdout
    warnings = [line for line in result.stderr.splitlines() if line.startswith("Warning: ")]
    assert len(warnings) == 2
    as_json = runner.invoke(app, ["identify", path, "--no-catalog", "--format", "json"])
    assert len(json.loads(as_json.stdout)["warnings"]) == 2


def test_identify_names_the_marking_it_cannot_read(tmp_path: Path) -> None:
    path = tmp_path / "ring.pnml"
    path.write_bytes(_variant(MARKING, "<initialMarking><value>1</value></initialMarking>"))
    result = CliRunner().invoke(app, ["identify", str(path), "--no-catalog"])
    assert result.exit_code == 1
    assert "not live" not in result.output
    assert result.stderr.strip().splitlines() == [
        f"Error: {path}: the initial marking of place 'busy0' is written as <initialMarking> "
        "holding <value>, a form zoo does not read; write the PT-net form "
        "<initialMarking><text>1</text></initialMarking>"
    ]
