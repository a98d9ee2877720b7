"""The build's report counts only what this build stored (issue 8).

Another process stores one area while this build runs (a real second process, as when two
``zoo build`` share a catalog); the report must leave that area out of its counts and name it.
The stored counts per area are the reference.
"""

from __future__ import annotations

import subprocess
import sys
from collections.abc import Sequence
from pathlib import Path

from zoo.catalog.build import BuildReport, area_span, build_catalog
from zoo.catalog.enumeration import parameter_set_count
from zoo.catalog.service import AreaStats, Catalog

STORE_ONE_AREA = (
    "import sys\n"
    "from zoo.catalog.build import write_area\n"
    "from zoo.catalog.classify import classify_area\n"
    "from zoo.catalog.service import Catalog\n"
    "with Catalog.open(sys.argv[1]) as catalog:\n"
    "    assert write_area(catalog, classify_area(int(sys.argv[2])))\n"
)


class _OtherBuilderAfter:
    """Progress that lets another process store ``other`` once area ``after`` is stored."""

    def __init__(self, location: str, after: int, other: int) -> None:
        self.location, self.after, self.other = location, after, other

    def started(self, areas: Sequence[int], parameter_sets: int) -> None:
        pass

    def area_done(self, stats: AreaStats) -> None:
        if stats.area == self.after:
            subprocess.run(
                [sys.executable, "-c", STORE_ONE_AREA, self.location, str(self.other)],
                check=True,
            )

    def finished(self, report: BuildReport) -> None:
        pass


def test_summary_counts_only_the_areas_this_build_stored(tmp_path: Path) -> None:
    location = str(tmp_path / "shared.sqlite3")
    with Catalog.open(location, create=True) as catalog:
        report = build_catalog(
            catalog, 7, jobs=1, progress=_OtherBuilderAfter(location, after=2, other=5)
        )
        stats = {s.area: s for s in catalog.stats()}
    assert report.added == (1, 2, 3, 4, 6, 7)
    assert report.stored_elsewhere == (5,)
    assert report.complete_to == 7
    assert report.parameter_sets == sum(parameter_set_count(a) for a in report.added)
    assert report.parameter_sets == sum(stats[a].parameter_sets for a in report.added)
    assert report.classes == sum(stats[a].classes for a in report.added)
    assert report.frames == sum(stats[a].frames for a in report.added)
    assert report.added_text() == "areas 1..4, 6..7"


def test_area_span_names_runs_without_hiding_gaps() -> None:
    assert area_span([3]) == "area 3"
    assert area_span([1, 2, 3]) == "areas 1..3"
    assert area_span([5, 1, 2, 9]) == "areas 1..2, 5, 9"
