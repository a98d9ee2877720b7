"""The web catalog in a real browser (Debian's chromium, driven by Playwright) against a real
server on loopback: search with an error then its fix, paging and sorting, an entry page whose
pictures load, a download, an identify upload and keyboard navigation. Every test also fails on a
script error or a content-security-policy violation (the ``page`` fixture)."""

from __future__ import annotations

import xml.etree.ElementTree as ET
from pathlib import Path
from typing import Any

DATA = Path(__file__).resolve().parents[1] / "data" / "pnml"


def rows(page: Any) -> list[list[str]]:
    return [
        [cell.strip() for cell in row.locator("td").all_inner_texts()]
        for row in page.locator("table.results tbody tr").all()
    ]


def test_search_error_shows_a_caret_then_the_fix_answers(
    page: Any, live_url: str, tmp_path: Path
) -> None:
    page.goto(f"{live_url}/search")
    page.fill("#q", "loop >= 3 and procesess = 2")
    page.press("#q", "Enter")
    problem = page.locator("#query-error")
    assert "Unknown field 'procesess'" in problem.inner_text()
    caret = page.locator("pre.caret").inner_text().splitlines()
    assert caret[1].index("^") == caret[0].index("procesess")
    page.screenshot(path=str(tmp_path / "search-error.png"))
    page.fill("#q", "loop >= 3 and processes = 2")
    page.press("#q", "Enter")
    assert page.locator("#query-error").count() == 0
    found = rows(page)
    assert found and all(int(r[3]) >= 3 for r in found)  # the loop column
    assert "complete up to area 12" in page.locator("p.note").inner_text()


def test_paging_and_sorting(page: Any, live_url: str) -> None:
    page.goto(f"{live_url}/search?q=area+%3C%3D+12&limit=10")
    first = rows(page)
    assert len(first) == 10
    page.click("a[rel=next]")
    second = rows(page)
    assert len(second) == 10 and not {r[0] for r in first} & {r[0] for r in second}
    assert "rows 11–20" in page.locator("p.summary").inner_text()
    page.click("a[rel=prev]")
    assert rows(page) == first
    header = page.locator("th", has_text="states")
    header.locator("a").click()
    assert page.locator("th[aria-sort=ascending]", has_text="states").count() == 1
    states = [int(r[6]) for r in rows(page)]
    assert states == sorted(states)
    page.locator("th", has_text="states").locator("a").click()
    assert page.locator("th[aria-sort=descending]", has_text="states").count() == 1
    states = [int(r[6]) for r in rows(page)]
    assert states == sorted(states, reverse=True)
    assert page.evaluate("new URLSearchParams(location.search).get('q')") == "area <= 12"


def test_column_chooser(page: Any, live_url: str) -> None:
    page.goto(f"{live_url}/search?q=area+%3D+6")
    page.click("details.columns summary")
    page.check("input[name=col][value=slowness]")
    page.check("input[name=col][value=regular]")
    page.click("button[type=submit]")
    headings = page.locator("table.results thead th").all_inner_texts()
    assert [h.strip(" ▲▼") for h in headings] == [
        "id", "label", "area", "regular", "slowness", "members"
    ]  # fmt: skip


def test_entry_page_pictures_load(page: Any, live_url: str) -> None:
    page.goto(f"{live_url}/classes/CY12-3")
    assert page.locator("h1").inner_text().startswith("CY12-3")
    for view in ("parallelogram", "net"):
        picture = page.locator(f"#picture-{view} svg").first
        box = picture.bounding_box()
        assert box is not None and box["width"] > 200 and box["height"] > 100
        # A drawn picture, not an empty frame: a C(alpha,beta,gamma,delta) of area A has A
        # transitions and 2A places (Valk, "Petri's cycloids"), each a marker the browser laid
        # out inside the picture, at a place of its own.
        for prefix, count in (("transition", 12), ("place", 24)):
            markers = picture.locator(f'[id^="{prefix}-"]')
            assert markers.count() == count
            boxes = [markers.nth(i).bounding_box() for i in range(count)]
            assert all(b is not None and b["width"] > 1 and b["height"] > 1 for b in boxes)
            assert all(
                box["x"] <= b["x"] <= box["x"] + box["width"]
                and box["y"] <= b["y"] <= box["y"] + box["height"]
                for b in boxes
                if b is not None
            )
            centres = {(round(b["x"]), round(b["y"])) for b in boxes if b is not None}
            assert len(centres) == count
    assert page.locator("text=Members (6)").count() == 1
    assert page.locator(".citation").inner_text().count("CY12-3") == 1


def test_download_from_an_entry_page(page: Any, live_url: str, tmp_path: Path) -> None:
    page.goto(f"{live_url}/classes/CY4-1")
    with page.expect_download() as waiting:
        page.click("text=PNML")
    download = waiting.value
    assert download.suggested_filename == "CY4-1-net.pnml"
    saved = tmp_path / download.suggested_filename
    download.save_as(saved)
    root = ET.parse(saved).getroot()
    # C(1,1,1,3): area alpha*delta + beta*gamma = 4 transitions (Valk, "Petri's cycloids").
    assert len([e for e in root.iter() if e.tag.endswith("transition")]) == 4


def test_identify_upload(page: Any, live_url: str) -> None:
    page.goto(f"{live_url}/identify")
    page.set_input_files("#file", str(DATA / "pipeline-ring.mgraph"))
    page.click("button[type=submit]")
    verdict = page.locator("p.verdict").inner_text()
    # Two frames in flight, one free stage: the ring C(G, C, 1, 1) = C(1,2,1,1) (docs/rings.md).
    assert "C(1,2,1,1)" in verdict and "CY3-2" in verdict
    page.click("text=CY3-2")
    assert page.url.endswith("/classes/CY3-2")
    page.goto(f"{live_url}/identify")
    page.set_input_files("#file", str(DATA / "not-marked-graph.pnml"))
    page.click("button[type=submit]")
    assert page.locator(".answer h2, .problem").first.inner_text()


def test_keyboard_navigation(page: Any, live_url: str) -> None:
    page.goto(live_url)
    page.keyboard.press("/")
    assert page.evaluate("document.activeElement.id") == "q"
    page.keyboard.type("tokens = 2")
    page.keyboard.press("Enter")
    page.wait_for_url("**/search?q=tokens*")
    # Tab from the query box reaches the first result link without the mouse.
    page.focus("#q")
    for _ in range(40):
        page.keyboard.press("Tab")
        href = page.evaluate("document.activeElement.getAttribute('href') || ''")
        if href.startswith("/classes/"):
            break
    else:
        raise AssertionError("no result link is reachable with Tab")
    page.keyboard.press("Enter")
    page.wait_for_url("**/classes/CY*")
    assert page.locator("h1 .ident").inner_text() == href.rsplit("/", 1)[1]
    # The first Tab on a fresh page lands on the skip link, which moves focus to the content.
    page.goto(live_url)
    page.keyboard.press("Tab")
    assert page.evaluate("document.activeElement.className") == "skip"


def test_every_page_renders_without_errors(page: Any, live_url: str, tmp_path: Path) -> None:
    for name, address in {
        "home": "/",
        "frame": "/frames/FR12-2",
        "rings": "/rings?items=2&slots=3&individual_items=on",
        "docs": "/docs/query-language",
        "docs-index": "/docs",
    }.items():
        answer = page.goto(live_url + address)
        assert answer is not None and answer.status == 200, address
        assert page.locator("main h1").count() >= 1
        page.screenshot(path=str(tmp_path / f"{name}.png"), full_page=True)
        assert (tmp_path / f"{name}.png").stat().st_size > 5_000
    assert "CY10-11" in page.goto(f"{live_url}/rings?items=2&slots=3&individual_items=on").text()
