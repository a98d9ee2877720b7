"""Seed files: the shipped seeds and the one-line errors for bad files (docs/seeds.md)."""

from __future__ import annotations

from pathlib import Path

import pytest

from zoo.catalog.seeds import default_seed_directory, load_seed_directory, parse_seed_text
from zoo.core.params import ParameterSet
from zoo.core.rings import RingDesign
from zoo.errors import FormatError

# The shipped seeds are ring designs (docs/theory/ring-designs.md mapping, verified in
# tests/core/test_rings.py by
# state-graph isomorphism): (items, free slots, items tracked, slots tracked) per name.
SHIPPED = {
    "pipeline-ring-3-frames-2-slots": (3, 2, False, False),
    "pipeline-ring-3-tracked-frames-2-slots": (3, 2, True, False),
    "pipeline-ring-2-frames-3-slots-all-tracked": (2, 3, True, True),
    "pipeline-ring-4-frames-4-tracked-slots": (4, 4, False, True),
    "pipeline-ring-3-tracked-frames-3-tracked-slots": (3, 3, True, True),
    "pipeline-ring-8-tracked-frames-8-slots": (8, 8, True, False),
    "factory-loop-3-carts-1-bay": (3, 1, False, False),
    "factory-loop-2-tracked-carts-2-bays": (2, 2, True, False),
    "factory-loop-4-carts-12-bays": (4, 12, False, False),
    "factory-loop-5-tracked-carts-3-bays": (5, 3, True, False),
    "factory-loop-2-carts-6-tracked-bays": (2, 6, False, True),
    "factory-loop-6-tracked-carts-10-bays": (6, 10, True, False),
}


def test_shipped_seeds_are_the_ring_designs_their_names_say() -> None:
    seeds = load_seed_directory()
    assert {s.name for s in seeds} == set(SHIPPED)
    for seed in seeds:
        items, slots, tracked_items, tracked_slots = SHIPPED[seed.name]
        design = RingDesign(items, slots, tracked_items, tracked_slots)
        assert seed.params == design.params, seed.name
        assert seed.description and "\n" not in seed.description


def test_default_directory_holds_the_seed_files() -> None:
    directory = default_seed_directory()
    assert sorted(p.name for p in directory.glob("*.toml")) == [
        "factory_loops.toml",
        "ring_buffers.toml",
    ]


def test_both_parameter_spellings() -> None:
    text = """
[[seed]]
name = "a-ring"
description = "text form"
parameters = "C(2,3,1,1)"

[[seed]]
name = "b-ring"
description = "list form"
parameters = [2, 3, 1, 1]
"""
    seeds = parse_seed_text(text, "demo.toml")
    assert [s.params for s in seeds] == [ParameterSet(2, 3, 1, 1)] * 2


GOOD = 'name = "ring-a"\ndescription = "fine"\nparameters = "C(2,3,1,1)"\n'


@pytest.mark.parametrize(
    ("body", "expected"),
    [
        ("[[seed]]\nname = 'x'\n", "demo.toml: seed 1 ('x'): the key 'description' is missing"),
        (
            "[[seed]]\n" + GOOD + "colour = 'red'\n",
            "demo.toml: seed 1 ('ring-a'): unknown key 'colour'",
        ),
        (
            "[[seed]]\n" + GOOD.replace("ring-a", "Ring A"),
            "demo.toml: seed 1 ('Ring A'): name 'Ring A' must be lower-case letters",
        ),
        (
            "[[seed]]\n" + GOOD.replace('"C(2,3,1,1)"', "[2, 3, 1]"),
            "demo.toml: seed 1 ('ring-a'): parameters has 3 numbers",
        ),
        (
            "[[seed]]\n" + GOOD.replace('"C(2,3,1,1)"', '"C(0,3,1,1)"'),
            "demo.toml: seed 1 ('ring-a'): parameters: alpha must be a positive integer",
        ),
        (
            "[[seed]]\n" + GOOD.replace('"C(2,3,1,1)"', "2.5"),
            "demo.toml: seed 1 ('ring-a'): parameters must be text",
        ),
        (
            "[[seed]]\n" + GOOD.replace('"fine"', '""'),
            "demo.toml: seed 1 ('ring-a'): description must be a non-empty line",
        ),
        (
            "[[seed]]\n" + GOOD.replace('"fine"', '"""two\nlines"""'),
            "demo.toml: seed 1 ('ring-a'): description must be one line",
        ),
        (
            "[[seed]]\n" + GOOD + "\n[[seed]]\n" + GOOD,
            "demo.toml: seed 'ring-a' is defined twice",
        ),
        ("[[seed]\n", "demo.toml: not valid TOML"),
        ("title = 'x'\n", "demo.toml: unknown top-level key 'title'"),
        ("seed = 3\n", "demo.toml: 'seed' must be written as [[seed]] tables"),
    ],
)
def test_bad_seed_text_gives_one_line_naming_file_and_entry(body: str, expected: str) -> None:
    with pytest.raises(FormatError) as caught:
        parse_seed_text(body, "demo.toml")
    message = str(caught.value)
    assert message.startswith(expected), message
    assert "\n" not in message


def test_second_entry_is_named_by_position(tmp_path: Path) -> None:
    body = "[[seed]]\n" + GOOD + "\n[[seed]]\nname = 'ring-b'\nparameters = [1, 1, 1, 1]\n"
    with pytest.raises(FormatError, match=r"seed 2 \('ring-b'\): the key 'description'"):
        parse_seed_text(body, "demo.toml")


def test_duplicate_names_across_files(tmp_path: Path) -> None:
    (tmp_path / "one.toml").write_text("[[seed]]\n" + GOOD)
    (tmp_path / "two.toml").write_text("[[seed]]\n" + GOOD)
    expected = r"two.toml: seed 'ring-a' is defined twice \(also in one.toml\)"
    with pytest.raises(FormatError, match=expected):
        load_seed_directory(tmp_path)


def test_missing_directory_and_unreadable_file(tmp_path: Path) -> None:
    with pytest.raises(FormatError, match="does not exist"):
        load_seed_directory(tmp_path / "nowhere")
    (tmp_path / "bad.toml").write_bytes(b"\xff\xfe\x00")
    with pytest.raises(FormatError, match="bad.toml: cannot read"):
        load_seed_directory(tmp_path)
