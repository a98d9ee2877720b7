"""Catalog entries as frozen typed values: a class, its readings, its frame and a seed.

The catalog service (``zoo.catalog.service``) returns these; the reports and the faces read
them. Invariant values are held by registry name (``zoo.core.registry``), so an invariant added
to the registry reaches every entry and its JSON without a change here. ``as_dict`` is the
published JSON (``zoo show ID --format json``, ``zoo find --format json``, dumps): key names
and order follow the registry and never change for an existing key.

A reading is also a read-only mapping of its JSON (``reading["processes"]``, ``dict(reading)``),
so that code written for the JSON object reads the typed value alike.
"""

from __future__ import annotations

import html
from collections.abc import Iterator, Mapping
from dataclasses import dataclass, field
from fractions import Fraction
from functools import cached_property
from types import MappingProxyType
from typing import Any

from zoo.core import registry
from zoo.core.params import ParameterSet, parse_params
from zoo.core.registry import Level, Value

_EMPTY: Mapping[str, Value] = MappingProxyType({})


def frozen_values(values: Mapping[str, Value]) -> Mapping[str, Value]:
    """A read-only copy of invariant values by registry name."""
    return MappingProxyType(dict(values))


def json_values(
    levels: tuple[Level, ...], values: Mapping[str, Value], area: int
) -> dict[str, Any]:
    """The JSON of every registry invariant of ``levels`` (structural keys excepted), in
    registry order: a fraction is followed by ``<key>_float``, a dotted key fills a nested
    object (``forward_cycles.count``)."""
    out: dict[str, Any] = {}
    for inv in registry.INVARIANTS:
        if inv.level not in levels or inv.structural:
            continue
        value = values[inv.name]
        form = registry.json_value(inv, value, area)
        head, _, member = inv.key.partition(".")
        if member:
            out.setdefault(head, {})[member] = form
            continue
        out[inv.key] = form
        if isinstance(value, Fraction):
            out[f"{inv.key}_float"] = float(value)
    return out


def value_text(value: object) -> str:
    """A value as a reader sees it: yes/no, exact fractions as p/q, digits grouped; integers
    longer than 40 digits shortened to their first and last digits and their length."""
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, Fraction):
        return str(value.numerator) if value.denominator == 1 else str(value)
    if isinstance(value, int):
        digits = str(abs(value))
        if len(digits) <= 40:
            return f"{value:,}"
        return f"{'-' if value < 0 else ''}{digits[:6]}...{digits[-6:]} ({len(digits):,} digits)"
    return str(value)


def html_table(caption: str, rows: list[tuple[str, str]]) -> str:
    """A two-column HTML table (name, value), escaped, for notebooks (``_repr_html_``)."""
    body = "".join(
        f"<tr><th style='text-align:left'>{html.escape(name)}</th>"
        f"<td style='text-align:left'>{html.escape(text)}</td></tr>"
        for name, text in rows
    )
    return f"<table><caption>{html.escape(caption)}</caption>{body}</table>"


_READING = (Level.READING,)
_CLASS = (Level.CLASS, Level.FRAME)  # a frame value sits among the class ones in the JSON
_FRAME = (Level.FRAME,)


@dataclass(frozen=True)
class AreaStats:
    """Counts of one stored area."""

    area: int
    parameter_sets: int
    readings: int
    classes: int
    frames: int
    complete: bool = True
    seconds: float | None = None

    def as_dict(self) -> dict[str, object]:
        return {
            "area": self.area,
            "parameter_sets": self.parameter_sets,
            "readings": self.readings,
            "classes": self.classes,
            "frames": self.frames,
        }


@dataclass(frozen=True)
class SeedEntry:
    """A named seed (seeds_data/) and the class it belongs to, if that area is stored."""

    name: str
    description: str
    params: ParameterSet
    class_id: str | None

    def as_dict(self) -> dict[str, object]:
        return {
            "name": self.name,
            "description": self.description,
            "params": str(self.params),
            "class_id": self.class_id,
        }


@dataclass(frozen=True)
class ReadingEntry(Mapping[str, object]):
    """A reading of a class: same lattice and same (alpha, beta), places typed
    (docs/theory/isomorphism.md), with its reading-level invariants."""

    alpha: int
    beta: int
    lattice_key: tuple[int, int, int]  # (A, g, r)
    members: tuple[ParameterSet, ...]  # sorted; the first is the reading's label
    invariant_values: Mapping[str, Value] = field(
        default_factory=lambda: _EMPTY
    )  # reading-level invariants by name

    @property
    def label(self) -> str:
        return str(self.members[0]) if self.members else ""

    def value(self, name: str) -> Value:
        """A reading-level invariant by registry name (``processes``, ``slowness``, ...)."""
        return self.invariant_values[name]

    def as_dict(self) -> dict[str, object]:
        return dict(self._json)

    @cached_property
    def _json(self) -> dict[str, object]:
        area = self.lattice_key[0]
        return {
            "label": self.label,
            "alpha": self.alpha,
            "beta": self.beta,
            "tokens_forward": self.beta,
            "tokens_backward": self.alpha,
            "lattice_key": list(self.lattice_key),
            **json_values(_READING, self.invariant_values, area),
            "members": [str(p) for p in self.members],
        }

    # the read-only mapping of the JSON object
    def __getitem__(self, key: str) -> object:
        return self._json[key]

    def __iter__(self) -> Iterator[str]:
        return iter(self._json)

    def __len__(self) -> int:
        return len(self._json)


@dataclass(frozen=True)
class ClassEntry:
    """A catalog entry: an isomorphism class of marked nets, places untyped
    (docs/theory/isomorphism.md)."""

    id: str
    label: str
    area: int
    frame_id: str
    fingerprint: str
    members: tuple[ParameterSet, ...]  # sorted
    readings: tuple[ReadingEntry, ...]  # by smallest member
    invariant_values: Mapping[str, Value] = field(
        default_factory=lambda: _EMPTY
    )  # class and frame invariants by name
    seeds: tuple[SeedEntry, ...] = ()
    #: The behaviour identifier (``BE{area}-{rank}``, docs/theory/behaviour.md) and how the
    #: class's behaviour was found; None above the catalog's state bound.
    behaviour_id: str | None = None
    behaviour_evidence: str | None = None

    @property
    def rank(self) -> int:
        return int(self.id.rsplit("-", 1)[1])

    def value(self, name: str) -> Value:
        """A class- or frame-level invariant by registry name (``loop``, ``states``, ...)."""
        return self.invariant_values[name]

    @property
    def invariants(self) -> dict[str, object]:
        """The class-level invariants keyed and written as in the JSON (``zoo show ID``)."""
        return json_values(_CLASS, self.invariant_values, self.area)

    @property
    def params(self) -> ParameterSet:
        """The class label as a parameter set (the smallest member)."""
        return parse_params(self.label)

    def to_networkx(self) -> Any:
        """The explicit net of the class label (``ParameterSet.to_networkx``)."""
        return self.params.to_networkx()

    def _repr_html_(self) -> str:
        """The entry as a table in a notebook: every class and frame invariant by its label."""
        rows = [("label", self.label), ("frame", self.frame_id)]
        for inv in registry.INVARIANTS:
            if inv.level in _CLASS and not inv.structural and inv.name in self.invariant_values:
                rows.append((inv.label, value_text(self.invariant_values[inv.name])))
        for reading in self.readings:
            values = ", ".join(
                f"{inv.name} {value_text(reading.invariant_values[inv.name])}"
                for inv in registry.of_level(Level.READING)
                if inv.name in ("processes", "regular", "slowness")
                and inv.name in reading.invariant_values
            )
            rows.append((f"reading {reading.label}", values))
        return html_table(f"{self.id} = {self.label}, area {self.area}", rows)

    def as_dict(self) -> dict[str, object]:
        """A JSON-ready dict: id, label, area, members first, then every invariant."""
        values = json_values(_CLASS, self.invariant_values, self.area)
        values["behaviour"] = {
            "id": self.behaviour_id,
            **values.get("behaviour", {}),
            "evidence": self.behaviour_evidence,
        }
        return {
            "id": self.id,
            "label": self.label,
            "area": self.area,
            "members": [str(p) for p in self.members],
            "frame_id": self.frame_id,
            "fingerprint": self.fingerprint,
            **values,
            "readings": [r.as_dict() for r in self.readings],
            "seeds": [s.as_dict() for s in self.seeds],
        }


@dataclass(frozen=True)
class FrameEntry:
    """A frame: an isomorphism class of unmarked nets, with the classes that lie on it."""

    id: str
    label: str
    area: int
    fingerprint: str
    lattice_key: tuple[int, int, int]
    class_ids: tuple[str, ...]
    invariant_values: Mapping[str, Value] = field(
        default_factory=lambda: _EMPTY
    )  # frame-level invariants by name

    @property
    def automorphisms(self) -> int:
        """The order of the automorphism group of the unmarked net (nauty)."""
        value = self.invariant_values["net_automorphisms"]
        assert isinstance(value, int)
        return value

    def as_dict(self) -> dict[str, object]:
        return {
            "id": self.id,
            "label": self.label,
            "area": self.area,
            "fingerprint": self.fingerprint,
            **json_values(_FRAME, self.invariant_values, self.area),
            "lattice_key": list(self.lattice_key),
            "classes": list(self.class_ids),
        }


__all__ = [
    "ClassEntry",
    "FrameEntry",
    "ReadingEntry",
    "SeedEntry",
    "frozen_values",
    "json_values",
]
