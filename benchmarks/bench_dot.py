"""How long Graphviz takes to render zoo's DOT text of area-100 and area-200 nets.

Prints figures (not a test): for each net and view, the size of the DOT text and the seconds
``neato -Tsvg`` and ``dot -Tsvg`` take on it, with the attributes zoo writes
(zoo.interchange.dot.FAST_RENDERING). ``--compare`` also times the same text with spline
routing (``splines=true``, the attribute zoo wrote before) and no bound on ``dot``'s rank search,
each run cut off after --timeout seconds. Needs Graphviz on the PATH.

    .venv/bin/python benchmarks/bench_dot.py
    .venv/bin/python benchmarks/bench_dot.py --compare --timeout 120
"""

from __future__ import annotations

import argparse
import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path

from zoo.core.params import ParameterSet
from zoo.interchange.dot import FAST_RENDERING, picture_dot

#: C(10,5,10,15): 10*15 + 5*10 = 200 transitions; C(6,4,4,14): 6*14 + 4*4 = 100.
NETS = (ParameterSet(6, 4, 4, 14), ParameterSet(10, 5, 10, 15))
VIEWS = ("parallelogram", "net")
#: What zoo wrote before: splines routed around the nodes, dot's searches unbounded.
SLOW_RENDERING = ("splines=true", "outputorder=edgesfirst")


def render_seconds(program: str, source: Path, timeout: float) -> str:
    started = time.perf_counter()
    try:
        done = subprocess.run(
            [program, "-Tsvg", "-o", "/dev/null", str(source)],
            capture_output=True,
            timeout=timeout,
        )
    except subprocess.TimeoutExpired:
        return f"> {timeout:.0f} s"
    seconds = time.perf_counter() - started
    if done.returncode != 0:
        return f"failed ({done.stderr.decode(errors='replace').strip()[:60]})"
    return f"{seconds:.2f} s"


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--compare", action="store_true", help="also time splines=true")
    parser.add_argument("--timeout", type=float, default=120.0)
    args = parser.parse_args()
    if shutil.which("neato") is None or shutil.which("dot") is None:
        sys.exit("Graphviz (neato, dot) is not on the PATH; install it to run this benchmark")
    version = subprocess.run(["dot", "-V"], capture_output=True, text=True).stderr.strip()
    print(f"{version}; attributes: {', '.join(FAST_RENDERING)}")
    print(f"{'net':<20} {'view':<14} {'attributes':<10} {'bytes':>9} {'neato':>10} {'dot':>10}")
    with tempfile.TemporaryDirectory() as folder:
        for p in NETS:
            for view in VIEWS:
                text = picture_dot(p, view)
                variants = [("zoo", text)]
                if args.compare:
                    slow = text.replace(", ".join(FAST_RENDERING), ", ".join(SLOW_RENDERING))
                    variants.append(("splines", slow))
                for name, body in variants:
                    source = Path(folder) / f"{view}.dot"
                    source.write_text(body)
                    neato = render_seconds("neato", source, args.timeout)
                    dot = render_seconds("dot", source, args.timeout)
                    print(
                        f"{str(p) + f' A={p.area}':<20} {view:<14} {name:<10} "
                        f"{len(body):>9,} {neato:>10} {dot:>10}",
                        flush=True,
                    )


if __name__ == "__main__":
    main()
