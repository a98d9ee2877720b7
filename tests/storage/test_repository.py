"""The repository (zoo/storage/repository.py) on SQLite and on the PostgreSQL server: the seed
filter takes LIKE wildcards literally, and a read sees one snapshot while a build writes."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

from zoo.catalog.build import build_catalog
from zoo.catalog.seeds import Seed
from zoo.catalog.service import Catalog
from zoo.core.params import ParameterSet

ROOT = Path(__file__).resolve().parents[2]


def test_the_seed_filter_takes_wildcards_literally(db_url: str) -> None:
    seeds = [
        Seed("loop_50%", "a demo loop of carts", ParameterSet(2, 2, 1, 1)),
        Seed("loopx50y", "another demo loop", ParameterSet(3, 1, 1, 1)),
        Seed("ring", "a demo ring buffer", ParameterSet(1, 1, 1, 1)),
    ]
    with Catalog.open(db_url, create=True) as catalog:
        build_catalog(catalog, 6, seeds=seeds)
        expected = catalog.get("C(2,2,1,1)").id
        assert [e.id for e in catalog.find("", seed="%")] == [expected]
        assert [e.id for e in catalog.find("", seed="_50%")] == [expected]
        assert len(catalog.find("", seed="LOOP")) == 2  # a plain substring, any case
        assert catalog.count("", seed="%") == 1


# A child that builds the catalog area by area while this process reads it.
_BUILD = (
    "import sys\n"
    "from zoo.catalog.build import build_catalog\n"
    "from zoo.catalog.service import Catalog\n"
    "with Catalog.open(sys.argv[1], create=True) as catalog:\n"
    "    print('open', flush=True)\n"
    "    build_catalog(catalog, int(sys.argv[2]), jobs=1)\n"
)


def test_an_answer_states_only_the_completeness_it_read(db_url: str, small_catalog: str) -> None:
    bound = 12
    with Catalog.open(small_catalog) as reference:
        per_area = {s.area: s.classes for s in reference.stats()}
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    child = subprocess.Popen(
        [sys.executable, "-c", _BUILD, db_url, str(bound)],
        stdout=subprocess.PIPE,
        text=True,
        env=env,
    )
    assert child.stdout is not None
    assert child.stdout.readline().strip() == "open"  # the schema exists from here on
    answers = []
    with Catalog.open(db_url) as catalog:
        while child.poll() is None or not answers:
            result = catalog.find(f"area <= {bound}")
            held = sum(1 for e in result if e.area <= result.complete_to)
            answers.append((result.complete_to, held))
    assert child.wait() == 0
    for complete_to, held in answers:
        # Every class of areas 1..complete_to is in the answer that says it is complete there.
        assert held == sum(per_area.get(a, 0) for a in range(1, complete_to + 1))
    assert len(answers) > 1
