"""How fast hostile and broken net files are refused (docs/pnml.md, "Safe input").

Prints figures (not a test): seconds to read, or refuse with one line, each hand-written file of
tests/data/pnml, an 11 MiB file (refused before parsing) and PNML pages nested 50,000 deep;
and seconds to identify the nets there that are not cycloids. Every answer should take
milliseconds; tests/interchange/test_safe_input.py checks the messages.

    .venv/bin/python benchmarks/bench_safe_input.py
"""

from __future__ import annotations

import tempfile
import time
from collections.abc import Callable
from pathlib import Path

from zoo.errors import FormatError
from zoo.interchange.identify import identify_file
from zoo.interchange.netfile import read_net_file
from zoo.interchange.pnml import PNML_NAMESPACE, PTNET_TYPE, parse_pnml

DATA = Path(__file__).resolve().parents[1] / "tests" / "data" / "pnml"


def timed(action: Callable[[], object]) -> tuple[float, str]:
    started = time.perf_counter()
    try:
        action()
        outcome = "read"
    except FormatError:
        outcome = "refused"
    return time.perf_counter() - started, outcome


def main() -> None:
    print(f"{'input':<40} {'outcome':<9} {'seconds':>9}")
    for path in sorted(DATA.glob("*.pnml")):
        seconds, outcome = timed(lambda path=path: read_net_file(path))
        print(f"{path.name:<40} {outcome:<9} {seconds:>9.4f}")
    with tempfile.TemporaryDirectory() as folder:
        huge = Path(folder) / "huge.pnml"
        with huge.open("wb") as handle:  # sparse: 11 MiB without writing them
            handle.truncate(11 * 1024 * 1024)
        seconds, outcome = timed(lambda: read_net_file(huge))
        print(f"{'11 MiB file':<40} {outcome:<9} {seconds:>9.4f}")
    depth = 50_000
    document = (
        f'<pnml xmlns="{PNML_NAMESPACE}"><net id="n" type="{PTNET_TYPE}">'
        + "".join(f'<page id="g{i}">' for i in range(depth))
        + '<transition id="t"/>'
        + "</page>" * depth
        + "</net></pnml>"
    ).encode()
    seconds, outcome = timed(lambda: parse_pnml(document, "deep"))
    print(f"{f'pages nested {depth:,} deep':<40} {outcome:<9} {seconds:>9.4f}")
    for name in ("arc-weights.pnml", "not-marked-graph.pnml", "dead-cycle.pnml"):
        started = time.perf_counter()
        answer = identify_file(DATA / name, use_catalog=False)
        seconds = time.perf_counter() - started
        verdict = "cycloid" if answer.cycloid else "not one"
        print(f"{'identify ' + name:<40} {verdict:<9} {seconds:>9.4f}")


if __name__ == "__main__":
    main()
