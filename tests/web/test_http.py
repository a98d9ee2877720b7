"""The web catalog over real HTTP on loopback: the API answers what the command line answers,
bad input gets one clear 4xx error, and the server never writes or reads a path from a request."""

from __future__ import annotations

import hashlib
import json
import xml.etree.ElementTree as ET
from collections.abc import Iterator
from pathlib import Path

import httpx
import pydot
import pytest
from typer.testing import CliRunner

from zoo.catalog.build import build_catalog
from zoo.cli import app

DATA = Path(__file__).resolve().parents[1] / "data" / "pnml"
runner = CliRunner()

# OEIS A055507, a(n) = Sum_{k=1..n} d(k) d(n+1-k): the parameter sets (a,b,c,d >= 1 with
# a*d + b*c = n + 1) of area n + 1; terms n = 1..11, i.e. areas 2..12 (oeis.org/A055507, as in
# tests/catalog/test_enumeration.py).
A055507_AREAS_2_TO_12 = (1, 4, 8, 14, 20, 28, 37, 44, 58, 64, 80)


def cli_json(*args: str) -> object:
    result = runner.invoke(app, list(args))
    assert result.exit_code == 0, result.output
    return json.loads(result.stdout)


def test_class_api_is_the_object_of_zoo_show(live_url: str, web_catalog: str) -> None:
    answer = httpx.get(f"{live_url}/api/classes/CY12-3")
    assert answer.status_code == 200
    assert answer.json() == cli_json("show", "CY12-3", "--format", "json", "--db", web_catalog)


def test_frame_api_is_the_object_of_zoo_show(live_url: str, web_catalog: str) -> None:
    answer = httpx.get(f"{live_url}/api/frames/FR12-2")
    assert answer.json() == cli_json("show", "FR12-2", "--format", "json", "--db", web_catalog)


def test_parameter_set_api_is_the_object_of_zoo_show(live_url: str, web_catalog: str) -> None:
    answer = httpx.get(f"{live_url}/api/parameter-sets/4,2,2,3")
    expected = cli_json("show", "4,2,2,3", "--format", "json", "--db", web_catalog)
    assert answer.json() == expected
    # C(4,2,2,3) has area alpha*delta + beta*gamma = 4*3 + 2*2 = 16 (Valk, "Petri's cycloids",
    # area of the fundamental parallelogram); beyond this catalog, so no identifier.
    assert answer.json()["area"] == 16 and answer.json()["id"] is None


def test_search_api_pages_through_zoo_find(live_url: str, web_catalog: str) -> None:
    query = "processes = 2 and area <= 12"
    everything = cli_json(
        "find", query, "--sort", "-states", "--format", "json", "--db", web_catalog
    )
    assert isinstance(everything, list) and len(everything) > 6
    seen: list[object] = []
    offset = 0
    while True:
        answer = httpx.get(
            f"{live_url}/api/classes",
            params={"q": query, "sort": "-states", "limit": 4, "offset": offset},
        ).json()
        assert answer["total"] == len(everything) and answer["complete_to"] == 12
        if not answer["items"]:
            break
        seen.extend(answer["items"])
        offset += 4
    assert seen == everything


def test_parameter_sets_per_area_are_oeis_a055507(live_url: str) -> None:
    html = httpx.get(live_url).text
    for area, count in zip(range(2, 13), A055507_AREAS_2_TO_12, strict=True):
        assert f'<td><a href="/search?q=area+%3D+{area}">{area}</a></td><td>{count}</td>' in html
    assert "The catalog is complete up to area 12:" in html


def test_query_error_is_a_json_4xx_with_its_position(live_url: str) -> None:
    answer = httpx.get(f"{live_url}/api/classes", params={"q": "loop >= "})
    assert answer.status_code == 400
    body = answer.json()
    assert body["status"] == 400 and body["position"] == len("loop >= ")
    assert "Traceback" not in answer.text
    page = httpx.get(f"{live_url}/search", params={"q": "lop = 3"})
    assert page.status_code == 400 and "Unknown field" in page.text
    assert "lop = 3\n^</pre>" in page.text  # the caret under the offending field


@pytest.mark.parametrize(
    ("address", "status"),
    [
        ("/api/classes/CY99-1", 404),
        ("/api/classes/banana", 404),
        ("/api/parameter-sets/4,2,2", 400),
        ("/api/classes?limit=-1", 400),
        ("/api/classes?limit=100000", 400),
        ("/api/classes?offset=x", 400),
    ],
)
def test_bad_api_input_is_named(live_url: str, address: str, status: int) -> None:
    answer = httpx.get(live_url + address)
    assert answer.status_code == status
    body = answer.json()
    assert body["error"] and body["status"] == status


def test_overlong_query_is_refused(live_url: str) -> None:
    answer = httpx.get(f"{live_url}/api/classes", params={"q": "loop = 3 or " * 400 + "loop = 4"})
    assert answer.status_code == 400 and "over the limit" in answer.json()["error"]


def test_parameter_set_address_redirects_to_its_class(live_url: str) -> None:
    answer = httpx.get(f"{live_url}/parameter-sets/1,1,1,3", follow_redirects=False)
    assert answer.status_code == 301 and answer.headers["location"] == "/classes/CY4-1"
    assert (
        httpx.get(f"{live_url}/classes/c(1,1,3,1)", follow_redirects=True).url.path
        == "/classes/CY4-1"
    )
    assert httpx.get(f"{live_url}/parameter-sets/4,2,2,3").status_code == 404


def test_downloads_are_the_net_of_the_class(live_url: str) -> None:
    # Area = number of transitions of the cycloid net (Valk, "Petri's cycloids", definition);
    # CY4-1 is C(1,1,1,3): area 1*3 + 1*1 = 4, and a place per transition and direction.
    pnml = httpx.get(f"{live_url}/classes/CY4-1/net.pnml")
    assert pnml.status_code == 200 and "attachment" in pnml.headers["content-disposition"]
    root = ET.fromstring(pnml.content)
    assert len([e for e in root.iter() if e.tag.endswith("transition")]) == 4
    assert len([e for e in root.iter() if e.tag.endswith("place")]) == 8
    dot = httpx.get(f"{live_url}/classes/CY4-1/net.dot").text
    (graph,) = pydot.graph_from_dot_data(dot)  # pydot as the reference reader of DOT
    assert len(graph.get_edges()) == 16  # each place: one arc in, one arc out
    page = httpx.get(f"{live_url}/classes/CY4-1").text
    for view in ("parallelogram", "net"):
        svg = httpx.get(f"{live_url}/classes/CY4-1/{view}.svg")
        assert svg.headers["content-type"].startswith("image/svg+xml")
        ids = [e.get("id", "") for e in ET.fromstring(svg.content).iter()]
        assert sum(i.startswith("transition-") for i in ids) == 4
        assert sum(i.startswith("place-") for i in ids) == 8
        assert svg.text.strip() in page  # the picture inline on the entry page is this file
    bib = httpx.get(f"{live_url}/classes/CY4-1/cite.bib").text
    assert bib.startswith("@misc{zoo:CY4-1,")
    csv_text = httpx.get(f"{live_url}/search.csv", params={"q": "area <= 4"}).text
    assert csv_text.splitlines()[0] == "id,label,area,loop,tokens,processes,states,frame,members"
    assert httpx.get(f"{live_url}/classes/CY4-1/../../pyproject.toml").status_code == 404


def test_identify_upload_names_the_class(live_url: str, web_catalog: str) -> None:
    for name in ("pipeline-ring.pnml", "pipeline-ring.mgraph"):
        data = (DATA / name).read_bytes()
        answer = httpx.post(f"{live_url}/api/identify", files={"file": (name, data)})
        assert answer.status_code == 200
        expected = runner.invoke(
            app, ["identify", str(DATA / name), "--format", "json", "--db", web_catalog]
        )
        cli = json.loads(expected.stdout)
        body = answer.json()
        assert {k: v for k, v in body.items() if k not in ("file", "catalog")} == {
            k: v for k, v in cli.items() if k not in ("file", "catalog")
        }
        # Three stages, two frames in flight, one free slot: the ring of C items and G slots is
        # C(G, C, 1, 1) (Valk, ring models of cycloids; docs/rings.md), here C(1,2,1,1).
        assert body["label"] == "C(1,2,1,1)" and body["id"] == "CY3-2"


@pytest.mark.parametrize("name", ["billion-laughs.pnml", "external-entity.pnml"])
def test_identify_keeps_the_xml_defences(live_url: str, name: str) -> None:
    data = (DATA / name).read_bytes()
    answer = httpx.post(f"{live_url}/api/identify", files={"file": (name, data)})
    assert answer.status_code == 400
    assert answer.json()["error"]


def test_identify_refuses_large_uploads(live_url: str) -> None:
    data = b"# padding\n" * 300_000
    answer = httpx.post(f"{live_url}/api/identify", files={"file": ("big.txt", data)})
    assert answer.status_code == 413
    assert "over the limit" in answer.json()["error"]


def test_identify_without_a_file_is_named(live_url: str) -> None:
    answer = httpx.post(f"{live_url}/api/identify", data={"nothing": "here"})
    assert answer.status_code == 400 and "no file" in answer.json()["error"]


def test_every_answer_carries_the_security_headers(live_url: str) -> None:
    for address in ("/", "/api/classes", "/classes/CY4-1", "/nowhere"):
        headers = httpx.get(live_url + address).headers
        policy = headers["content-security-policy"]
        assert "script-src 'self'" in policy and "default-src 'none'" in policy
        assert headers["x-content-type-options"] == "nosniff"


def test_openapi_describes_every_api_path(live_url: str) -> None:
    document = httpx.get(f"{live_url}/api/openapi.json").json()
    assert document["openapi"].startswith("3.1")
    assert {
        "/api/classes",
        "/api/classes/{id}",
        "/api/parameter-sets/{params}",
        "/api/identify",
    } <= set(document["paths"])


def test_the_server_never_writes(live_url: str, web_catalog: str) -> None:
    from sqlalchemy import text

    from zoo.web.catalog_access import open_read_only

    before = hashlib.sha256(Path(web_catalog).read_bytes()).hexdigest()
    for address in ("/", "/search?q=loop%3D3", "/classes/CY12-3", "/rings?items=2&slots=3"):
        assert httpx.get(live_url + address).status_code == 200
    catalog = open_read_only(web_catalog)
    try:
        with pytest.raises(Exception, match="readonly|read-only|query_only"):
            with catalog.engine.begin() as connection:
                connection.execute(text("DELETE FROM seeds"))
    finally:
        catalog.close()
    assert hashlib.sha256(Path(web_catalog).read_bytes()).hexdigest() == before


@pytest.mark.postgres
def test_read_only_on_postgresql(postgres_url: str, web_catalog: str) -> None:
    from sqlalchemy import text

    from zoo.catalog.service import Catalog
    from zoo.web.catalog_access import open_read_only

    with Catalog.open(postgres_url, create=True) as catalog:
        build_catalog(catalog, 6)
    with Catalog.open(web_catalog) as on_sqlite:
        expected = on_sqlite.find("area <= 6", limit=0).total
    catalog = open_read_only(postgres_url)
    try:
        assert catalog.find("area <= 6", limit=0).total == expected
        with pytest.raises(Exception, match="read-only"):
            with catalog.engine.begin() as connection:
                connection.execute(text("DELETE FROM seeds"))
    finally:
        catalog.close()


def test_a_streamed_upload_is_cut_at_the_limit(live_url: str) -> None:
    def body() -> Iterator[bytes]:  # no Content-Length: the server counts while it reads
        yield b'--edge\r\nContent-Disposition: form-data; name="file"; filename="a.txt"\r\n\r\n'
        for _ in range(300):
            yield b"#" * 10_000 + b"\n"
        yield b"\r\n--edge--\r\n"

    answer = httpx.post(
        f"{live_url}/api/identify",
        content=body(),
        headers={"content-type": "multipart/form-data; boundary=edge"},
    )
    assert answer.status_code == 413 and "over the limit" in answer.json()["error"]
