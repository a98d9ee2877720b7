"""Builds on a real Dask cluster (scheduler and worker processes on loopback) against --jobs 1."""

from __future__ import annotations

import hashlib
import os
import signal
import time
from pathlib import Path
from typing import Any

import pytest

from tests.catalog.test_service import dump
from zoo.catalog.build import build_catalog
from zoo.catalog.classify import classify_area
from zoo.catalog.cluster import ClusterClassifier, check_cluster_address
from zoo.catalog.service import Catalog
from zoo.errors import ParameterError

pytest.importorskip("distributed")

MAX_AREA = 20


def _table_hashes(location: str) -> dict[str, str]:
    """sha256 of every table's rows in key order (timestamps and timings left out)."""
    return {
        table: hashlib.sha256(repr(rows).encode()).hexdigest()
        for table, rows in dump(location).items()
    }


def _build(path: Path, **options: Any) -> str:
    with Catalog.open(str(path), create=True) as catalog:
        build_catalog(catalog, MAX_AREA, **options)
    return str(path)


def test_local_cluster_build_equals_a_single_process_build(tmp_path: Path) -> None:
    single = _build(tmp_path / "single.sqlite3", jobs=1)
    cluster = _build(tmp_path / "cluster.sqlite3", cluster="local:2")
    expected = _table_hashes(single)
    assert set(expected) == {"frames", "classes", "readings", "parameter_sets", "seeds", "areas"}
    assert _table_hashes(cluster) == expected


def test_a_lost_workers_task_is_run_again() -> None:
    areas = list(range(MAX_AREA, 0, -1))
    with ClusterClassifier("local:2") as cluster:
        client = cluster.client
        pids = client.run(os.getpid)
        results = cluster.classify(areas)
        deadline = time.monotonic() + 60
        busy: list[str] = []
        while not busy and time.monotonic() < deadline:
            busy = [worker for worker, keys in client.processing().items() if keys]
        assert busy, "no worker ever took a task"
        os.kill(pids[busy[0]], signal.SIGKILL)  # the worker dies holding its tasks
        got = list(results)
    assert [r.area for r in got] == areas
    for result in got:
        expected = classify_area(result.area)
        assert (result.classes, result.frames) == (expected.classes, expected.frames)


@pytest.mark.parametrize("address", ["", "local:0", "local:x", "http://x", "no port", 7])
def test_bad_cluster_addresses_are_refused_in_one_line(address: object) -> None:
    with pytest.raises(ParameterError) as info:
        check_cluster_address(address)
    assert "\n" not in str(info.value)


def test_good_cluster_addresses_are_accepted() -> None:
    for address in ("local:2", "tcp://127.0.0.1:8786", "scheduler.lan:8786"):
        assert check_cluster_address(address) == address
