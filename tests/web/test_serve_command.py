"""``zoo serve`` as a user runs it: a real process on loopback; bad options get one line."""

from __future__ import annotations

import shutil
import socket
import subprocess
import sys
import time
from pathlib import Path
from typing import Any

import httpx
import pytest
from typer.testing import CliRunner

from zoo.cli import app

runner = CliRunner()
DATA = Path(__file__).resolve().parents[1] / "data" / "pnml"


def test_serve_refuses_a_missing_catalog(tmp_path: Path) -> None:
    missing = tmp_path / "folder" / "none.sqlite3"
    result = runner.invoke(app, ["serve", "--db", str(missing)])
    assert result.exit_code == 1
    assert result.stderr.startswith("Error: no catalog at") and "zoo build" in result.stderr
    assert not missing.parent.exists()  # a reader leaves nothing behind, not even a folder


def test_serve_refuses_a_bad_port(web_catalog: str) -> None:
    result = runner.invoke(app, ["serve", "--db", web_catalog, "--port", "70000"])
    assert result.exit_code == 1 and "--port must be between 1 and 65535" in result.stderr


def test_serve_refuses_a_bad_worker_count(web_catalog: str) -> None:
    result = runner.invoke(app, ["serve", "--db", web_catalog, "--workers", "0"])
    assert result.exit_code == 1 and "--workers must be between 1 and" in result.stderr


@pytest.mark.parametrize("workers", [1, 2])
def test_zoo_serve_answers_on_loopback(web_catalog: str, workers: int) -> None:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        port = s.getsockname()[1]
    command = shutil.which("zoo", path=str(Path(sys.executable).parent))
    assert command is not None
    process = subprocess.Popen(
        [command, "serve", "--db", web_catalog, "--port", str(port), "--workers", str(workers)],
        stderr=subprocess.PIPE,
        text=True,
    )
    try:
        deadline = time.monotonic() + 60
        while True:
            try:
                answer = httpx.get(f"http://127.0.0.1:{port}/api/classes/CY3-2", timeout=2)
                break
            except httpx.TransportError:
                assert process.poll() is None and time.monotonic() < deadline
                time.sleep(0.2)
        assert answer.status_code == 200 and answer.json()["label"] == "C(1,2,1,1)"
        # Every process answers from the same catalog: a page that needs it, several times.
        for _ in range(4):
            page = httpx.get(f"http://127.0.0.1:{port}/classes/CY3-2", timeout=10)
            assert page.status_code == 200 and 'id="picture-net"' in page.text
    finally:
        process.terminate()
        process.wait(timeout=20)
    assert process.returncode is not None


def test_identify_gives_up_after_its_time_limit(
    live_url: str, monkeypatch: pytest.MonkeyPatch
) -> None:
    from zoo.web import catalog_access

    monkeypatch.setattr(catalog_access, "IDENTIFY_SECONDS", 1e-9)  # the server runs in this process
    data = (DATA / "pipeline-ring.pnml").read_bytes()
    answer: Any = httpx.post(f"{live_url}/api/identify", files={"file": ("ring.pnml", data)})
    assert answer.status_code == 400
    assert "took over" in answer.json()["error"]
