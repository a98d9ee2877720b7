"""Between value types and rows: typed entries from result rows, rows from a classified area.

The invariant columns themselves are mapped by ``zoo.storage.models`` (``stored_row`` and
``loaded_values``, driven by the registry of invariants); this module puts them together with
the structural columns (identifiers, labels, parameters, lattice keys) for whole entries and
whole areas. It is the only place that knows how an entry is laid out in rows.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from fractions import Fraction
from typing import Any, Protocol

from zoo.core.entries import ClassEntry, ReadingEntry, SeedEntry, frozen_values
from zoo.core.params import MAX_AREA, ParameterSet
from zoo.errors import CatalogError
from zoo.storage.models import loaded_values, stored_row

#: Readings get the explicit id area * READING_ID_STRIDE + index, so that the same build gives
#: the same ids whatever was interrupted before (PostgreSQL sequences do not roll back).
READING_ID_STRIDE = 100_000


# --- rows to entries ---------------------------------------------------------------------------


def seed_entry(row: Any) -> SeedEntry:
    return SeedEntry(
        name=row.name,
        description=row.description,
        params=ParameterSet(row.alpha, row.beta, row.gamma, row.delta),
        class_id=row.class_id,
    )


def reading_entry(row: Any, members: list[ParameterSet]) -> ReadingEntry:
    return ReadingEntry(
        alpha=row.alpha,
        beta=row.beta,
        lattice_key=(row.area, row.lattice_g, row.lattice_r),
        members=tuple(members),
        invariant_values=frozen_values(loaded_values("readings", row)),
    )


def class_entry(
    row: Any,
    readings: Sequence[Any],
    members_of_reading: Mapping[int, list[tuple[int, int, int, int]]],
    seeds: Sequence[SeedEntry],
) -> ClassEntry:
    """A class entry from its class row (joined with its frame's values as ``frame_*``), its
    reading rows, the parameters of the members of each reading, and its seeds."""
    ordered: list[tuple[tuple[int, int, int, int], ReadingEntry]] = []
    members: list[ParameterSet] = []
    for reading in readings:
        values = sorted(members_of_reading.get(reading.id, []))
        reading_members = [ParameterSet(*v) for v in values]
        members.extend(reading_members)
        first = values[0] if values else (MAX_AREA, 0, 0, 0)
        ordered.append((first, reading_entry(reading, reading_members)))
    ordered.sort(key=lambda pair: pair[0])
    return ClassEntry(
        id=row.id,
        label=row.label,
        area=row.area,
        frame_id=row.frame_id,
        fingerprint=row.fingerprint,
        members=tuple(sorted(members)),
        readings=tuple(r for _, r in ordered),
        invariant_values=frozen_values(
            {**loaded_values("classes", row), **loaded_values("frames", row, "frame_")}
        ),
        seeds=tuple(sorted(seeds, key=lambda s: s.name)),
        behaviour_id=row.behaviour_id,
        behaviour_evidence=row.behaviour_evidence,
    )


def field_value(field: Any, raw: Sequence[Any]) -> object:
    """A stored query field (its columns, in ``Field.columns`` order) as its JSON value:
    true/false, an integer, a fraction as ``num/den``."""
    from zoo.query.fields import FieldType

    if raw[0] is None:
        return None
    if field.type is FieldType.BOOLEAN:
        return bool(raw[0])
    if field.type is FieldType.FRACTION:
        value = Fraction(raw[0], raw[1])
        return f"{value.numerator}/{value.denominator}"
    return int(raw[0])  # INTEGER, and BIG_INTEGER from its exact decimal text


# --- a classified area to rows -------------------------------------------------------------------


class _Reading(Protocol):
    @property
    def alpha(self) -> int: ...
    @property
    def beta(self) -> int: ...
    @property
    def lattice_g(self) -> int: ...
    @property
    def lattice_r(self) -> int: ...
    @property
    def members(self) -> Sequence[ParameterSet]: ...
    @property
    def values(self) -> Mapping[str, object]: ...


class _Class(Protocol):
    @property
    def id(self) -> str: ...
    @property
    def area(self) -> int: ...
    @property
    def rank(self) -> int: ...
    @property
    def label(self) -> ParameterSet: ...
    @property
    def frame_id(self) -> str: ...
    @property
    def fingerprint(self) -> str: ...
    @property
    def readings(self) -> Sequence[_Reading]: ...
    @property
    def values(self) -> Mapping[str, object]: ...
    @property
    def behaviour_key(self) -> str | None: ...
    @property
    def behaviour_evidence(self) -> str | None: ...


class _Frame(Protocol):
    @property
    def id(self) -> str: ...
    @property
    def area(self) -> int: ...
    @property
    def rank(self) -> int: ...
    @property
    def label(self) -> ParameterSet: ...
    @property
    def fingerprint(self) -> str: ...
    @property
    def lattice_g(self) -> int: ...
    @property
    def lattice_r(self) -> int: ...
    @property
    def values(self) -> Mapping[str, object]: ...


class ClassifiedArea(Protocol):
    """What the storage needs of a classified area (``zoo.catalog.classify``)."""

    @property
    def area(self) -> int: ...
    @property
    def classes(self) -> Sequence[_Class]: ...
    @property
    def frames(self) -> Sequence[_Frame]: ...


@dataclass(frozen=True)
class AreaRows:
    """The rows of one area, per table."""

    frames: list[dict[str, object]]
    classes: list[dict[str, object]]
    readings: list[dict[str, object]]
    parameter_sets: list[dict[str, object]]


def area_rows(result: ClassifiedArea) -> AreaRows:
    """The rows of one classified area for frames, classes, readings and parameter_sets."""
    frames: list[dict[str, object]] = [
        {
            "id": frame.id,
            "area": frame.area,
            "rank": frame.rank,
            "label": str(frame.label),
            "fingerprint": frame.fingerprint,
            "lattice_g": frame.lattice_g,
            "lattice_r": frame.lattice_r,
            **stored_row("frames", frame.values),
        }
        for frame in result.frames
    ]
    classes = [_class_row(c) for c in result.classes]
    readings: list[dict[str, object]] = []
    parameter_sets: list[dict[str, object]] = []
    index = 0
    for summary in result.classes:
        for reading in summary.readings:
            index += 1
            if index >= READING_ID_STRIDE:
                raise CatalogError(
                    f"area {result.area} has more than {READING_ID_STRIDE - 1} readings, "
                    "more than the reading ids of this schema allow"
                )
            reading_id = result.area * READING_ID_STRIDE + index
            readings.append(
                {
                    "id": reading_id,
                    "class_id": summary.id,
                    "area": result.area,
                    "alpha": reading.alpha,
                    "beta": reading.beta,
                    "lattice_g": reading.lattice_g,
                    "lattice_r": reading.lattice_r,
                    **stored_row("readings", reading.values),
                }
            )
            parameter_sets.extend(
                {
                    "alpha": p.alpha,
                    "beta": p.beta,
                    "gamma": p.gamma,
                    "delta": p.delta,
                    "area": result.area,
                    "reading_id": reading_id,
                    "class_id": summary.id,
                }
                for p in reading.members
            )
    return AreaRows(frames, classes, readings, parameter_sets)


def _class_row(c: _Class) -> dict[str, object]:
    label = c.label
    return {
        "id": c.id,
        "area": c.area,
        "rank": c.rank,
        "label": str(label),
        "label_alpha": label.alpha,
        "label_beta": label.beta,
        "label_gamma": label.gamma,
        "label_delta": label.delta,
        "frame_id": c.frame_id,
        "fingerprint": c.fingerprint,
        "behaviour_key": c.behaviour_key,
        "behaviour_evidence": c.behaviour_evidence,
        "behaviour_id": None,  # given in catalog order once the areas below are stored
        **stored_row("classes", c.values),  # every class invariant of the registry
    }
