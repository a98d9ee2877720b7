"""A real web catalog on loopback (uvicorn in a thread) over the session's small catalog, and a
real browser (Debian's chromium driven by Playwright; never a downloaded browser)."""

from __future__ import annotations

import shutil
import threading
from collections.abc import Iterator
from pathlib import Path
from typing import Any

import pytest

CHROMIUM = "/usr/bin/chromium"
CHROMIUM_ARGS = [
    "--headless",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
]


class LiveServer:
    """uvicorn serving ``zoo.web.app.create_app`` on 127.0.0.1 and a free port."""

    def __init__(self, location: str) -> None:
        import uvicorn

        from zoo.web.app import create_app

        self.app = create_app(location)
        config = uvicorn.Config(self.app, host="127.0.0.1", port=0, log_level="warning")
        self.ready = threading.Event()
        ready = self.ready

        class _Server(uvicorn.Server):
            async def startup(self, sockets: Any = None) -> None:
                await super().startup(sockets=sockets)
                ready.set()  # listening: the event the test waits on

        self.server = _Server(config)
        self.thread = threading.Thread(target=self._run, daemon=True)

    def _run(self) -> None:
        try:
            self.server.run()
        finally:
            self.ready.set()  # a server that failed to start wakes the waiter too

    def start(self) -> str:
        self.thread.start()
        if not self.ready.wait(timeout=30) or not self.server.started:
            raise RuntimeError("the web catalog did not start")
        port = self.server.servers[0].sockets[0].getsockname()[1]
        return f"http://127.0.0.1:{port}"

    def stop(self) -> None:
        self.server.should_exit = True
        self.thread.join(timeout=10)
        self.app.state.catalog.close()


@pytest.fixture(scope="session")
def web_catalog(small_catalog: str, tmp_path_factory: pytest.TempPathFactory) -> str:
    """A copy of the session's small catalog (areas <= 12) that only the web tests read, so
    that a test can check the server left it byte for byte as it was."""
    path = tmp_path_factory.mktemp("web-catalog") / "catalog.sqlite3"
    shutil.copyfile(small_catalog, path)
    return str(path)


@pytest.fixture(scope="session")
def live_url(web_catalog: str) -> Iterator[str]:
    server = LiveServer(web_catalog)
    url = server.start()
    yield url
    server.stop()


@pytest.fixture(scope="session")
def browser() -> Iterator[Any]:
    if not Path(CHROMIUM).exists():
        pytest.skip("Debian's chromium is not installed (.ci/run installs it)")
    from playwright.sync_api import sync_playwright

    with sync_playwright() as playwright:
        launched = playwright.chromium.launch(executable_path=CHROMIUM, args=CHROMIUM_ARGS)
        yield launched
        launched.close()


@pytest.fixture
def page(browser: Any, tmp_path: Path) -> Iterator[Any]:
    context = browser.new_context(viewport={"width": 1200, "height": 900}, accept_downloads=True)
    opened = context.new_page()
    problems: list[str] = []
    # A CSP violation or a script error shows up on the console; none is allowed.
    opened.on("console", lambda m: problems.append(m.text) if m.type == "error" else None)
    opened.on("pageerror", lambda e: problems.append(str(e)))
    yield opened
    context.close()
    unexpected = [p for p in problems if "status of 4" not in p]  # 4xx pages are on purpose
    assert not unexpected, unexpected


SCREENSHOTS = Path(__file__).resolve().parents[2] / "docs" / "images"
