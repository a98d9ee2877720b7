"""A reader never builds what another process is building (issue 8).

A real second process builds a new catalog; meanwhile ``ensure_catalog`` (what ``zoo find``
runs first) must not build, must leave the other build's target alone, and the answer must say
that a build is in progress. The finished catalog is the reference for what was complete.
"""

from __future__ import annotations

import subprocess
import sys
import time
from pathlib import Path

import pytest

from zoo.catalog import service as catalog_service
from zoo.catalog.build import BUILD_TARGET_KEY, ensure_catalog
from zoo.catalog.service import Catalog
from zoo.storage.buildlock import build_in_progress
from zoo.storage.database import catalog_exists, resolve_location

BUILD = (
    "import sys\n"
    "from zoo.catalog.build import build_catalog\n"
    "from zoo.catalog.service import Catalog\n"
    "with Catalog.open(sys.argv[1], create=True) as catalog:\n"
    "    build_catalog(catalog, int(sys.argv[2]), jobs=1)\n"
)


def test_a_reader_answers_from_what_is_complete_while_another_process_builds(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.setattr(catalog_service, "DEFAULT_MAX_AREA", 12)
    location = str(tmp_path / "new.sqlite3")
    builder = subprocess.Popen([sys.executable, "-c", BUILD, location, "40"], text=True)
    try:
        url = resolve_location(location)
        deadline = time.monotonic() + 120
        while True:  # until the other build holds its lock on an existing catalog
            if catalog_exists(url):
                with Catalog.open(location) as probe:
                    if build_in_progress(probe.engine):
                        break
            assert time.monotonic() < deadline and builder.poll() is None
            time.sleep(0.05)
        catalog, report = ensure_catalog(location, jobs=1)
        with catalog:
            assert report is None  # it did not build
            result = catalog.find("area < 5")
            assert result.building
            assert "A build of this catalog is in progress" in result.completeness_note()
            read_to = result.complete_to
            held = len(result.entries)
    finally:
        builder.wait(timeout=300)
    assert builder.returncode == 0
    with Catalog.open(location) as catalog:
        assert catalog.info()[BUILD_TARGET_KEY] == "40"  # the builder's target, not the reader's
        assert catalog.complete_to() == 40
        reference = catalog.find("area < 5")
        assert not reference.building
    assert held == sum(1 for e in reference.entries if e.area <= read_to)
