"""``zoo site``: the web catalog's pages as static files, served by a plain file server (Python's
http.server) and read in a real browser; its search filters the shipped JSON index."""

from __future__ import annotations

import functools
import json
import re
import threading
from collections.abc import Iterator
from http.server import SimpleHTTPRequestHandler, ThreadingHTTPServer
from pathlib import Path
from typing import Any

import pytest
from typer.testing import CliRunner

from zoo.catalog.build import build_catalog
from zoo.cli import app

runner = CliRunner()


@pytest.fixture(scope="module")
def site_folder(tmp_path_factory: pytest.TempPathFactory) -> Path:
    from zoo.catalog.service import Catalog

    location = str(tmp_path_factory.mktemp("site-catalog") / "catalog.sqlite3")
    with Catalog.open(location, create=True) as catalog:
        build_catalog(catalog, 6)
    folder = tmp_path_factory.mktemp("site") / "public"
    result = runner.invoke(app, ["site", str(folder), "--db", location])
    assert result.exit_code == 0, result.output
    assert "for 20 classes" in result.stdout
    (folder / "catalog-location.txt").write_text(location)
    return folder


@pytest.fixture(scope="module")
def site_url(site_folder: Path) -> Iterator[str]:
    class Quiet(SimpleHTTPRequestHandler):
        def log_message(self, format: str, *args: Any) -> None:
            pass

    handler = functools.partial(Quiet, directory=str(site_folder))
    server = ThreadingHTTPServer(("127.0.0.1", 0), handler)
    thread = threading.Thread(target=server.serve_forever, daemon=True)
    thread.start()
    yield f"http://127.0.0.1:{server.server_address[1]}"
    server.shutdown()
    thread.join(timeout=10)


def test_site_holds_every_entry_and_its_downloads(site_folder: Path) -> None:
    location = (site_folder / "catalog-location.txt").read_text()
    index = json.loads((site_folder / "search-index.json").read_text())
    assert index["complete_to"] == 6 and len(index["classes"]) == 20
    for row in index["classes"]:
        page = site_folder / "classes" / row["id"] / "index.html"
        assert row["id"] in page.read_text()
        assert (site_folder / "frames" / row["frame"] / "index.html").is_file()
    for area in range(1, 7):
        assert (site_folder / "areas" / str(area) / "index.html").is_file()
    shown = runner.invoke(app, ["show", "CY6-2", "--format", "json", "--db", location])
    saved = json.loads((site_folder / "classes" / "CY6-2" / "entry.json").read_text())
    assert saved == json.loads(shown.stdout)
    assert (site_folder / "classes" / "CY6-2" / "cite.bib").read_text().startswith("@misc{zoo:")


def test_site_refuses_a_file_as_its_folder(tmp_path: Path, site_folder: Path) -> None:
    location = (site_folder / "catalog-location.txt").read_text()
    target = tmp_path / "taken"
    target.write_text("keep me")
    result = runner.invoke(app, ["site", str(target), "--db", location])
    assert result.exit_code == 1
    assert result.stderr.startswith("Error: ") and "is a file" in result.stderr
    assert target.read_text() == "keep me"


def test_static_search_in_the_browser(page: Any, site_url: str) -> None:
    page.goto(f"{site_url}/search.html")
    page.fill("#q", "tokens >= 2 and lop = 3")
    page.press("#q", "Enter")
    page.wait_for_selector("#query-error:not([hidden])")
    caret = page.locator("#caret").inner_text().splitlines()
    assert caret[1].index("^") == caret[0].index("lop")
    page.fill("#q", "tokens >= 2 and loop = 3")
    page.press("#q", "Enter")
    page.wait_for_selector("#results:not([hidden])")
    rows = page.locator("#results tbody tr").all()
    assert rows
    for row in rows:
        cells = row.locator("td").all_inner_texts()
        assert int(cells[3]) == 3 and int(cells[4]) >= 2
    assert "complete up to area 6" in page.locator("#note").inner_text()
    page.locator("#results tbody tr a").first.click()
    page.wait_for_url("**/classes/CY*/")
    assert page.locator(".picture svg").count() == 2


def test_area_index_links_entries(page: Any, site_url: str, site_folder: Path) -> None:
    index = json.loads((site_folder / "search-index.json").read_text())
    of_area_5 = [c["id"] for c in index["classes"] if c["area"] == 5]
    page.goto(site_url)
    page.click("text=Table of counts")
    page.click("a[href='/areas/5/']")
    assert page.locator("h1").inner_text() == "Area 5"
    listed = page.locator("table.results tbody tr td:first-child").all_inner_texts()
    assert listed == of_area_5 and listed
    page.click("text=area 6 →")
    assert page.locator("h1").inner_text() == "Area 6"


def test_class_pages_write_the_group_one_way_and_per_reading(site_folder: Path) -> None:
    # issue 8: one group notation (Z_n when cyclic, never Z_1 x Z_n), and each reading row
    # carries its own group and iteration depth (Smith normal form of that reading's label,
    # docs/theory/lattice-key.md; the values come from zoo.core.algebra).
    from zoo.core import algebra
    from zoo.core.params import parse_params

    pages = sorted((site_folder / "classes").glob("CY*/index.html"))
    assert len(pages) == 20
    for page in pages:
        html = page.read_text(encoding="utf-8")
        assert "Z<sub>1</sub>" not in html, page
        assert '<th scope="col">transition group</th>' in html
        rows = re.findall(r"<tr><td>(C\([0-9,]+\))</td>(.*?)</tr>", html, re.S)
        assert rows, page
        for label, cells in rows:
            d1, order = algebra.transition_group(parse_params(label))
            group = f"Z<sub>{order}</sub>" if d1 == 1 else f"Z<sub>{d1}</sub> × Z<sub>{order}</sub>"
            depth = algebra.iteration_depth(parse_params(label))
            assert f"<td>{group}</td><td>{depth}</td>" in cells, (page, label)
