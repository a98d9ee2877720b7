"""The marked-graph text format (zoo.interchange.nettext, docs/net-text-format.md)."""

from __future__ import annotations

from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from zoo.core.net import build_net
from zoo.core.params import ParameterSet
from zoo.errors import FormatError
from zoo.interchange.netfile import read_net_file
from zoo.interchange.nettext import net_text, parse_net_text, read_net_text

DATA = Path(__file__).parents[1] / "data" / "pnml"


def test_a_small_file_reads_as_written() -> None:
    text = """
    # two stages passing one frame back and forth
    net two stages
    place full: left -> right tokens 1   # the frame
    place empty:right->left
    transition idle
    """
    net = parse_net_text(text, "two.mgraph")
    assert net.name == "two stages"
    assert net.places == ("full", "empty")
    assert net.transitions == ("left", "right", "idle")
    assert net.tokens == (1, 0)
    assert [(a.source, a.target, a.weight) for a in net.arcs] == [
        ("left", "full", 1),
        ("full", "right", 1),
        ("right", "empty", 1),
        ("empty", "left", 1),
    ]
    assert net.arcs[0].where == "line 4"


def test_names_may_hold_minus_signs_and_dots() -> None:
    net = parse_net_text("place f_3_-1: t_3_-1->t_4_-1 tokens 0\nplace q.1': t_4_-1 -> t_3_-1")
    assert net.places == ("f_3_-1", "q.1'")
    assert net.transitions == ("t_3_-1", "t_4_-1")


@pytest.mark.parametrize(
    "p",
    [ParameterSet(*v) for v in [(1, 1, 1, 1), (4, 2, 2, 3), (3, 2, 6, 6), (2, 5, 1, 5)]],
    ids=str,
)
def test_export_reads_back_as_the_same_net(p: ParameterSet) -> None:
    net = build_net(p)
    read = parse_net_text(net_text(net), "x")
    assert read.transitions == net.transitions
    assert read.places == net.places
    assert read.tokens == net.tokens
    assert read.name == str(p)
    pre = {a.target: a.source for a in read.arcs if a.target in read.places}
    post = {a.source: a.target for a in read.arcs if a.source in read.places}
    for j, place in enumerate(net.places):
        assert pre[place] == net.transitions[net.pre[j]]
        assert post[place] == net.transitions[net.post[j]]


@pytest.mark.parametrize(
    ("text", "message"),
    [
        (
            "place p: a -> b\nplace q a -> b",
            "f line 2: a place line needs ':' after the place name; write "
            "'place NAME: FROM -> TO [tokens N]'",
        ),
        (
            "\n\nplace p: a b -> c",
            "f line 3: place 'p' needs one input transition before '->', got 'a b'; a marked-graph "
            "place has exactly one input and one output",
        ),
        (
            "place p: a -> b c",
            "f line 1: place 'p': unexpected 'c' after the output transition; write "
            "'place NAME: FROM -> TO [tokens N]' (a place has exactly one output transition)",
        ),
        ("place p: a -> b tokens", "f line 1: place 'p': 'tokens' needs a number, e.g. 'tokens 1'"),
        ("place p: a -> b tokens -1", "f line 1: tokens must be a whole number >= 0, got '-1'"),
        (
            "place p: a -> b tokens 99999999999999999999999",
            "f line 1: tokens must be at most 999,999,999,999,999 (15 digits), got "
            "'99999999999999999999999'",
        ),
        (
            "place p: a -> b tokens 1000000000000000 extra",
            "f line 1: place 'p': unexpected 'extra' after the token count",
        ),
        (
            "place p: a -> b weight 2",
            "f line 1: place 'p': arc weights are not part of the format; every arc of a marked "
            "graph has weight 1",
        ),
        (
            "place p: a",
            "f line 1: place 'p' needs 'FROM -> TO' after ':'; write "
            "'place NAME: FROM -> TO [tokens N]'",
        ),
        (
            "place p: a -> b\nplace p: b -> a",
            "f line 2: 'p' is already a place (line 1); every place and transition needs its own "
            "name",
        ),
        (
            "place p: a -> b\nplace a: b -> b",
            "f line 2: 'a' is already a transition (line 1); every place and transition needs its "
            "own name",
        ),
        (
            "place p: a -> b\nplace q: p -> b",
            "f line 2: 'p' is a place (line 1) and cannot also be a transition",
        ),
        ("transition a b a", "f line 1: transition 'a' is already listed on line 1"),
        ("transition", "f line 1: 'transition' needs at least one name, e.g. 'transition t1 t2'"),
        ("net one\nnet two", "f line 2: a second 'net' line; a file holds one net"),
        (
            "arc a -> b",
            "f line 1: cannot read 'arc a -> b'; a line is 'place NAME: FROM -> TO [tokens N]', "
            "'transition NAME ...', 'net TITLE' or a # comment",
        ),
        (
            "place p(1): a -> b",
            "f line 1: 'p(1)' is not a valid name; names use letters, digits and _ . ' [ ] - "
            "(but not '->')",
        ),
    ],
)
def test_errors_name_the_line_and_the_rule(text: str, message: str) -> None:
    with pytest.raises(FormatError) as caught:
        parse_net_text(text, "f")
    assert str(caught.value) == message


def test_binary_and_non_utf8_files_are_refused(tmp_path: Path) -> None:
    binary = tmp_path / "b.mgraph"
    binary.write_bytes(b"place p: a -> b\x00\x01")
    with pytest.raises(FormatError, match="binary data"):
        read_net_text(binary)
    latin = tmp_path / "l.mgraph"
    latin.write_bytes(b"# caf\xe9\nplace p: a -> b\n")
    with pytest.raises(FormatError) as caught:
        read_net_text(latin)
    assert str(caught.value) == (
        f"{latin} line 1: not UTF-8 text (byte 0xe9); save the file as UTF-8"
    )


def test_reader_is_chosen_by_content(tmp_path: Path) -> None:
    as_xml = tmp_path / "ring.txt"
    as_xml.write_bytes((DATA / "pipeline-ring.pnml").read_bytes())
    as_text = tmp_path / "ring.pnml"
    as_text.write_bytes((DATA / "pipeline-ring.mgraph").read_bytes())
    xml_net, text_net = read_net_file(as_xml), read_net_file(as_text)
    assert len(xml_net.places) == len(text_net.places) == 6
    assert sum(xml_net.tokens) == sum(text_net.tokens) == 3


_name = st.from_regex(r"[A-Za-z_][A-Za-z0-9_.']{0,6}", fullmatch=True)


@settings(max_examples=60, deadline=None)
@given(
    st.lists(
        st.tuples(_name, _name, st.integers(0, 3)), min_size=1, max_size=8, unique_by=lambda x: x[0]
    )
)
def test_any_list_of_places_round_trips(rows: list[tuple[str, str, int]]) -> None:
    # Places p_<name> between transitions t_<name>: the text, read back, states the same net.
    lines = ["# generated", "net generated"]
    for name, other, tokens in rows:
        lines.append(f"place p_{name}: t_{other} -> t_{name}  tokens {tokens}")
    net = parse_net_text("\n".join(lines), "g")
    assert net.places == tuple(f"p_{name}" for name, _, _ in rows)
    assert net.tokens == tuple(tokens for _, _, tokens in rows)
    assert [(a.source, a.target) for a in net.arcs[::2]] == [
        (f"t_{other}", f"p_{name}") for name, other, _ in rows
    ]
