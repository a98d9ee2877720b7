"""Load benchmark of the web catalog (prints figures; not a timed test).

Run from the repository root::

    .venv/bin/python benchmarks/bench_web.py                        # SQLite, area <= 100
    .venv/bin/python benchmarks/bench_web.py --sqlite catalog.sqlite3 --postgres \\
        postgresql://postgres@127.0.0.1:5432/test --seconds 30 --clients 16

For each backend it starts ``zoo serve`` (``--workers`` processes) in its own process on loopback
(so that the clients do not share its interpreter), then runs ``--clients`` concurrent clients
for ``--seconds`` seconds, each looping over three kinds of request, and prints per kind the
count, p50 and p99 latency in milliseconds, and the number of errors (an answer other than 200,
or no answer):

* ``entry page``: ``/classes/ID`` of a class drawn at random (HTML with two inline SVG pictures;
  pictures are cached per label, so repeated entries are cheaper than first visits);
* ``search 50``: ``/search?q=...&limit=50`` for a query drawn from a small set;
* ``api``: ``/api/classes?q=...&limit=50`` or ``/api/classes/ID``.

Two more runs put those figures in context:

* ``one client``: the same loop with a single client for ``--seconds / 3`` seconds: the time one
  request costs the server when nothing waits, per kind;
* ``floor``: the same ``--clients`` clients asking only for ``/robots.txt`` (a constant text)
  for ``--seconds / 3`` seconds: what the HTTP stack, the clients and the machine cost per request
  at that concurrency, below which no page can answer.

Without ``--sqlite`` an area-100 SQLite catalog is built in a temporary folder; with
``--postgres URL`` (a server URL) a database ``zoo_bench_web`` is created there, built to the
same area, and dropped at the end. The machine's load average is printed: on a shared machine
the figures depend on what else runs.
"""

from __future__ import annotations

import argparse
import asyncio
import os
import random
import socket
import statistics
import subprocess
import sys
import tempfile
import time
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path

import httpx

from zoo.catalog.build import build_catalog
from zoo.catalog.service import Catalog

QUERIES = (
    "processes = 3 and area < 100",
    "regular and loop >= 5",
    "tokens = 4",
    "area in 50..60 and cyclic",
    "",
)


def free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return int(s.getsockname()[1])


@contextmanager
def server(location: str, workers: int) -> Iterator[str]:
    port = free_port()
    command = [str(Path(sys.executable).parent / "zoo"), "serve", "--db", location]
    process = subprocess.Popen(
        [*command, "--port", str(port), "--workers", str(workers)],
        stdout=subprocess.DEVNULL,
        stderr=subprocess.PIPE,
    )
    url = f"http://127.0.0.1:{port}"
    try:
        deadline = time.monotonic() + 60
        while True:
            try:
                if httpx.get(url + "/api/openapi.json", timeout=2).status_code == 200:
                    break
            except httpx.TransportError:
                pass
            if process.poll() is not None or time.monotonic() > deadline:
                raise RuntimeError(f"zoo serve did not start: {process.stderr.read()!r}")
            time.sleep(0.2)
        yield url
    finally:
        process.terminate()
        process.wait(timeout=20)


def build(location: str, max_area: int) -> list[str]:
    with Catalog.open(location, create=True) as catalog:
        if catalog.complete_to() < max_area:
            started = time.perf_counter()
            build_catalog(catalog, max_area, jobs=2)
            print(f"  built area <= {max_area} in {time.perf_counter() - started:.1f} s")
        return [e.id for e in catalog.iter_entries()]


KINDS = ("entry page", "search 50", "api")


async def client(
    url: str, ids: list[str], stop: float, seed: int, times: dict[str, list[float]],
    errors: dict[str, int],
) -> None:  # fmt: skip
    chooser = random.Random(seed)
    async with httpx.AsyncClient(base_url=url, timeout=30) as http:
        while time.perf_counter() < stop:
            for kind in times:
                query = chooser.choice(QUERIES)
                if kind == "floor":
                    address, params = "/robots.txt", None
                elif kind == "entry page":
                    address, params = f"/classes/{chooser.choice(ids)}", None
                elif kind == "search 50":
                    address, params = "/search", {"q": query, "limit": 50}
                elif chooser.random() < 0.5:
                    address, params = "/api/classes", {"q": query, "limit": 50}
                else:
                    address, params = f"/api/classes/{chooser.choice(ids)}", None
                started = time.perf_counter()
                try:
                    answer = await http.get(address, params=params)
                    ok = answer.status_code == 200
                except httpx.HTTPError:
                    ok = False
                times[kind].append(time.perf_counter() - started)
                if not ok:
                    errors[kind] += 1


def percentile(values: list[float], fraction: float) -> float:
    ordered = sorted(values)
    return ordered[min(len(ordered) - 1, int(fraction * len(ordered)))]


async def load(
    url: str, ids: list[str], clients: int, seconds: float, kinds: tuple[str, ...] = KINDS
) -> None:
    times: dict[str, list[float]] = {kind: [] for kind in kinds}
    errors = dict.fromkeys(times, 0)
    stop = time.perf_counter() + seconds
    await asyncio.gather(*(client(url, ids, stop, n, times, errors) for n in range(clients)))
    for kind, values in times.items():
        print(
            f"  {kind:<12} {len(values):>7} {statistics.median(values) * 1000:>8.1f} "
            f"{percentile(values, 0.99) * 1000:>8.1f} {errors[kind]:>7}"
        )
    total = sum(len(v) for v in times.values())
    print(f"  {total / seconds:.1f} requests/s over {seconds:.0f} s, {clients} clients")


def search_split(location: str) -> None:
    """Per query, in this process and without load: what ``Catalog.find`` costs (the catalog's
    part) against the whole search page (find plus the page's rows and template), best of 5."""
    from urllib.parse import urlencode

    from starlette.requests import Request

    from zoo.web import answers, pages
    from zoo.web.app import create_app

    app = create_app(location)
    print("  search split, one request at a time (best of 5):")
    for query in QUERIES:
        scope = {
            "type": "http", "method": "GET", "path": "/search", "headers": [], "app": app,
            "query_string": urlencode({"q": query, "limit": 50}).encode(), "path_params": {},
        }  # fmt: skip
        finds, whole = [], []
        for _ in range(5):
            started = time.perf_counter()
            answers.search(app.state.catalog, query, limit=50)
            middle = time.perf_counter()
            pages.search_page(Request(scope))
            finds.append(middle - started)
            whole.append(time.perf_counter() - middle)
        print(
            f"    {query or '(empty)':<30} find {min(finds) * 1000:6.1f} ms, "
            f"whole page {min(whole) * 1000:6.1f} ms"
        )
    app.state.catalog.close()


def run(name: str, location: str, args: argparse.Namespace) -> None:
    print(f"{name}:")
    ids = build(location, args.max_area)
    search_split(location)
    print(f"  {len(ids):,} classes; {args.workers} server processes")
    with server(location, args.workers) as url:
        print(f"  {'request':<12} {'count':>7} {'p50 ms':>8} {'p99 ms':>8} {'errors':>7}")
        print(f"  load average before: {os.getloadavg()[0]:.2f}")
        asyncio.run(load(url, ids, args.clients, args.seconds))
        print(f"  load average after: {os.getloadavg()[0]:.2f}")
        print("  one client (no waiting):")
        asyncio.run(load(url, ids, 1, args.seconds / 3))
        print(f"  floor ({args.clients} clients, /robots.txt only):")
        asyncio.run(load(url, ids, args.clients, args.seconds / 3, ("floor",)))
        print(f"  load average at the end: {os.getloadavg()[0]:.2f}")


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--sqlite", help="an existing SQLite catalog (else one is built)")
    parser.add_argument("--postgres", help="a PostgreSQL server URL; a database is made there")
    parser.add_argument("--max-area", type=int, default=100)
    parser.add_argument("--clients", type=int, default=16)
    parser.add_argument("--seconds", type=float, default=30)
    parser.add_argument("--workers", type=int, default=1, help="zoo serve --workers")
    args = parser.parse_args()
    print(f"zoo serve under load; {os.cpu_count()} cores")
    run("SQLite", args.sqlite or str(Path(tempfile.mkdtemp()) / "catalog.sqlite3"), args)
    if args.postgres:
        import psycopg
        from sqlalchemy.engine import make_url

        admin = make_url(args.postgres).set(drivername="postgresql")
        name = "zoo_bench_web"
        with psycopg.connect(admin.render_as_string(hide_password=False), autocommit=True) as c:
            c.execute(f'DROP DATABASE IF EXISTS "{name}" WITH (FORCE)')
            c.execute(f'CREATE DATABASE "{name}"')
        try:
            url = make_url(args.postgres).set(drivername="postgresql+psycopg", database=name)
            run("PostgreSQL", url.render_as_string(hide_password=False), args)
        finally:
            with psycopg.connect(admin.render_as_string(hide_password=False), autocommit=True) as c:
                c.execute(f'DROP DATABASE IF EXISTS "{name}" WITH (FORCE)')


if __name__ == "__main__":
    main()
