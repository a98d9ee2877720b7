"""A catalog that cannot be written still reads; a build on it says so in one line (issue 8).

The catalog lies in a directory mounted read-only (a bind mount in a private mount namespace of
the child process, ``unshare -m``), so the WAL side files cannot be created and the file cannot
be written, whoever runs the test (root ignores file permissions, not a read-only mount).
"""

from __future__ import annotations

import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from zoo.catalog.build import build_catalog
from zoo.catalog.service import Catalog

MAIN = "import sys; from zoo.cli import main; sys.exit(main())"
MOUNT = 'mount --bind "$1" "$2" && mount -o remount,bind,ro "$2" || exit 97; shift 2; exec "$@"'


def _read_only_run(source: Path, target: Path, args: list[str]) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [
            "unshare",
            "-m",
            "sh",
            "-c",
            MOUNT,
            "sh",
            str(source),
            str(target),
            sys.executable,
            "-c",
            MAIN,
            *args,
        ],
        capture_output=True,
        text=True,
        timeout=120,
    )


@pytest.fixture
def read_only_catalog(tmp_path: Path) -> tuple[Path, Path]:
    if shutil.which("unshare") is None:
        pytest.skip("needs unshare(1) to mount a directory read-only")
    source, target = tmp_path / "source", tmp_path / "mounted"
    source.mkdir()
    target.mkdir()
    with Catalog.open(str(source / "c.sqlite3"), create=True) as catalog:
        build_catalog(catalog, 6, jobs=1)
    probe = _read_only_run(source, target, ["--help"])
    if probe.returncode == 97:
        pytest.skip("this process may not mount (needs root or a user namespace)")
    return source, target / "c.sqlite3"


def _snapshot(directory: Path) -> dict[str, bytes]:
    return {p.name: p.read_bytes() for p in sorted(directory.iterdir())}


@pytest.mark.parametrize(
    ("args", "expected"),
    [
        (["find", "area < 4"], "3 classes match."),
        (["show", "CY4-1"], "C(1,1,1,3)"),
        (["stats"], "complete up to area 6"),
    ],
)
def test_readers_read_a_catalog_in_a_read_only_directory(
    read_only_catalog: tuple[Path, Path], args: list[str], expected: str
) -> None:
    source, mounted = read_only_catalog
    before = _snapshot(source)
    result = _read_only_run(source, mounted.parent, [*args, "--db", str(mounted)])
    assert result.returncode == 0, result.stderr
    assert expected in result.stdout
    assert _snapshot(source) == before


def test_build_on_a_read_only_catalog_is_one_line(read_only_catalog: tuple[Path, Path]) -> None:
    source, mounted = read_only_catalog
    before = _snapshot(source)
    result = _read_only_run(
        source, mounted.parent, ["build", "--max-area", "7", "--jobs", "1", "--db", str(mounted)]
    )
    assert result.returncode == 1
    assert "Traceback" not in result.stderr
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1 and "is read-only here" in lines[0], result.stderr
    assert _snapshot(source) == before
