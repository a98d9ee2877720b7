"""Make ``catalog-r0001.sqlite3``: a small catalog at schema revision 0001, for upgrade tests.

The committed file stands for a catalog written by an older zoo. It must not be regenerated
after later revisions change ``zoo.storage.models``: this script writes through the tables as
revision 0001 created them (reflected), never through the current models. Run it only to
rebuild the file from scratch:

    .venv/bin/python tests/data/make_catalog_r0001.py

Rows: every parameter set of area 2..5, grouped into classes by the nauty fingerprint of the
marked net (zoo.core.canonical.system_form) and into frames by the fingerprint of the unmarked net
(net_form), cross-checked against the algebraic class and frame keys (zoo.core.algebra); invariants
from zoo.core.invariants. Ranks follow docs/citing.md (by smallest member).
"""

from __future__ import annotations

import sqlite3
import sys
from collections import defaultdict
from datetime import UTC, datetime
from pathlib import Path

from sqlalchemy import MetaData

from zoo.core import algebra, invariants
from zoo.core.canonical import ENCODING_VERSION, net_form, system_form
from zoo.core.params import ParameterSet
from zoo.storage.database import open_engine, resolve_location, upgrade

MAX_AREA = 5
TARGET = Path(__file__).with_name("catalog-r0001.sqlite3")


def parameter_sets(area: int) -> list[ParameterSet]:
    return [
        ParameterSet(a, b, c, d)
        for a in range(1, area + 1)
        for b in range(1, area + 1)
        for c in range(1, area + 1)
        for d in range(1, area + 1)
        if a * d + b * c == area
    ]


def groups(members: list[ParameterSet], key: object) -> list[list[ParameterSet]]:
    """Members grouped by key(member), each group sorted, groups ordered by smallest member."""
    grouped: dict[object, list[ParameterSet]] = defaultdict(list)
    for p in members:
        grouped[key(p)].append(p)  # type: ignore[operator]
    return sorted((sorted(g) for g in grouped.values()), key=lambda g: g[0])


def same_partition(a: list[list[ParameterSet]], b: list[list[ParameterSet]]) -> bool:
    return sorted(map(tuple, a)) == sorted(map(tuple, b))


def main() -> None:
    if TARGET.exists():
        TARGET.unlink()
    url = resolve_location(str(TARGET))
    upgrade(url, "0001")
    engine = open_engine(url)
    tables = MetaData()
    tables.reflect(engine)
    now = datetime(2026, 11, 30, 12, 0, tzinfo=UTC)
    with engine.begin() as conn:
        conn.execute(
            tables.tables["catalog_info"].insert(), [{"key": "encoding", "value": ENCODING_VERSION}]
        )
        reading_id = 0
        for area in range(2, MAX_AREA + 1):
            members = parameter_sets(area)
            classes = groups(members, lambda p: system_form(p).fingerprint)
            frames = groups(members, lambda p: net_form(p).fingerprint)
            assert same_partition(classes, groups(members, algebra.class_key)), area
            assert same_partition(frames, groups(members, algebra.frame_key)), area
            frame_of: dict[ParameterSet, str] = {}
            for rank, frame in enumerate(frames, 1):
                label = frame[0]
                form, key = net_form(label), algebra.lattice_key(label)
                frame_id = f"FR{area}-{rank}"
                frame_of.update({p: frame_id for p in frame})
                conn.execute(
                    tables.tables["frames"]
                    .insert()
                    .values(
                        id=frame_id,
                        area=area,
                        rank=rank,
                        label=str(label),
                        fingerprint=form.fingerprint,
                        automorphisms=str(form.automorphisms),
                        lattice_g=key.g,
                        lattice_r=key.r,
                    )
                )
            reading_count = 0
            for rank, entry in enumerate(classes, 1):
                label = entry[0]
                class_id = f"CY{area}-{rank}"
                readings = groups(entry, algebra.reading_key)
                reading_count += len(readings)
                d1 = algebra.transition_group(label)[0]
                states = invariants.reachable_state_count(label)
                arcs = invariants.state_arc_count(label)
                cycle_time = invariants.cycle_time(label)
                conn.execute(
                    tables.tables["classes"]
                    .insert()
                    .values(
                        id=class_id,
                        area=area,
                        rank=rank,
                        label=str(label),
                        label_alpha=label.alpha,
                        label_beta=label.beta,
                        label_gamma=label.gamma,
                        label_delta=label.delta,
                        frame_id=frame_of[label],
                        fingerprint=system_form(label).fingerprint,
                        loop=invariants.minimal_cycle_length(label),
                        states=str(states),
                        states_key=f"{len(str(states)):04d}{states}",
                        state_arcs=str(arcs),
                        state_arcs_key=f"{len(str(arcs)):04d}{arcs}",
                        automorphisms=str(system_form(label).automorphisms),
                        tokens=label.alpha + label.beta,
                        enabled=invariants.enabled_count(label),
                        semi_enabled=invariants.semi_enabled_count(label),
                        cycle_time_num=cycle_time.numerator,
                        cycle_time_den=cycle_time.denominator,
                        group_d1=d1,
                        cyclic=d1 == 1,
                        iteration=algebra.iteration_depth(label),
                        reading_count=len(readings),
                        member_count=len(entry),
                    )
                )
                for reading in readings:
                    reading_id += 1
                    first = reading[0]
                    key = algebra.lattice_key(first)
                    forward = invariants.forward_cycles(first)
                    backward = invariants.backward_cycles(first)
                    w = invariants.slowness(first)
                    conn.execute(
                        tables.tables["readings"]
                        .insert()
                        .values(
                            id=reading_id,
                            class_id=class_id,
                            area=area,
                            alpha=first.alpha,
                            beta=first.beta,
                            lattice_g=key.g,
                            lattice_r=key.r,
                            processes=invariants.process_count(first),
                            regular=invariants.is_regular(first),
                            slowness_num=w.numerator,
                            slowness_den=w.denominator,
                            forward_count=forward.count,
                            forward_length=forward.length,
                            forward_tokens=forward.tokens,
                            backward_count=backward.count,
                            backward_length=backward.length,
                            backward_tokens=backward.tokens,
                            nf_beta_delta=str(algebra.normal_form_beta_delta(first)),
                            nf_alpha_gamma=str(algebra.normal_form_alpha_gamma(first)),
                        )
                    )
                    conn.execute(
                        tables.tables["parameter_sets"].insert(),
                        [
                            {
                                "alpha": p.alpha,
                                "beta": p.beta,
                                "gamma": p.gamma,
                                "delta": p.delta,
                                "area": area,
                                "reading_id": reading_id,
                                "class_id": class_id,
                            }
                            for p in reading
                        ],
                    )
            conn.execute(
                tables.tables["areas"]
                .insert()
                .values(
                    area=area,
                    complete=True,
                    parameter_sets=len(members),
                    readings=reading_count,
                    classes=len(classes),
                    frames=len(frames),
                    built_at=now,
                    seconds=0.01,
                )
            )
    engine.dispose()
    # One self-contained file: fold the WAL back in and leave rollback-journal mode.
    with sqlite3.connect(TARGET) as plain:
        plain.execute("PRAGMA wal_checkpoint(TRUNCATE)")
        plain.execute("PRAGMA journal_mode = DELETE")
    plain.close()
    with sqlite3.connect(TARGET) as plain:
        plain.execute("VACUUM")
    plain.close()
    with sqlite3.connect(TARGET) as plain:
        assert plain.execute("SELECT version_num FROM alembic_version").fetchall() == [("0001",)]
    plain.close()
    print(f"wrote {TARGET} ({TARGET.stat().st_size} bytes)", file=sys.stderr)


if __name__ == "__main__":
    main()
