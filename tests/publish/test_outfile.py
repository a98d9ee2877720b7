"""Output files (zoo.publish.outfile): written through symbolic links, special files refused,
plain files replaced atomically, for every command that writes one (draw, export, dump).

Reference: POSIX file types as Python's ``stat`` module reads them (S_ISLNK, S_ISFIFO, S_ISCHR,
S_ISDIR); writing through a link to its target is what editors and shell redirection do
(common practice).
"""

from __future__ import annotations

import os
import stat
from pathlib import Path

import pytest
from typer.testing import CliRunner

from zoo.cli import app
from zoo.errors import ZooError
from zoo.publish.outfile import OutputNotWritable, output_target, write_output

COMMANDS = {
    "export": ["export", "4,2,2,3", "--format", "dot"],
    "draw": ["draw", "4,2,2,3", "--format", "dot"],
    "dump": ["dump", "--format", "jsonl"],
}


def _run(name: str, output: Path, db: str) -> tuple[int, str]:
    extra = ["--db", db] if name == "dump" else []
    result = CliRunner().invoke(app, [*COMMANDS[name], "--output", str(output), *extra])
    return result.exit_code, result.stderr


@pytest.mark.parametrize("name", sorted(COMMANDS))
def test_symbolic_link_is_written_through(name: str, tmp_path: Path, small_catalog: str) -> None:
    target = tmp_path / "real" / "out.txt"
    target.parent.mkdir()
    target.write_text("old")
    os.chmod(target, 0o640)
    link = tmp_path / "link.txt"
    link.symlink_to(target)
    code, err = _run(name, link, small_catalog)
    assert code == 0, err
    assert stat.S_ISLNK(os.lstat(link).st_mode)  # still a link ...
    assert os.readlink(link) == str(target)
    assert target.read_text() != "old" and target.stat().st_size > 0  # ... to the new content
    assert stat.S_IMODE(target.stat().st_mode) == 0o640  # the file keeps its permissions
    left = sorted(p.name for p in target.parent.iterdir() if p.name != "datapackage.json")
    assert left == ["out.txt"]  # no temporary file left behind


@pytest.mark.parametrize("name", sorted(COMMANDS))
def test_special_files_are_refused(name: str, tmp_path: Path, small_catalog: str) -> None:
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    code, err = _run(name, fifo, small_catalog)
    assert code == 1
    assert err.strip().splitlines() == [
        f"Error: cannot write '{fifo}': it is a named pipe (FIFO), not a regular file; "
        "give a file path (leave out --output to write to standard output)"
    ]
    assert stat.S_ISFIFO(os.lstat(fifo).st_mode)  # untouched
    link = tmp_path / "to-pipe"
    link.symlink_to(fifo)
    code, err = _run(name, link, small_catalog)
    assert code == 1 and "through the link to" in err and len(err.strip().splitlines()) == 1
    assert stat.S_ISFIFO(os.lstat(fifo).st_mode) and stat.S_ISLNK(os.lstat(link).st_mode)


def test_devices_and_folders_are_refused_before_writing(tmp_path: Path) -> None:
    with pytest.raises(OutputNotWritable, match="it is a character device"):
        output_target(Path("/dev/null"))
    with pytest.raises(OutputNotWritable, match="it is a folder"):
        write_output(tmp_path, b"x")
    assert isinstance(OutputNotWritable("x"), ZooError)


def test_dangling_link_creates_its_target(tmp_path: Path) -> None:
    link = tmp_path / "link"
    link.symlink_to(tmp_path / "new.svg")
    write_output(link, b"<svg/>")
    assert (tmp_path / "new.svg").read_bytes() == b"<svg/>" and link.is_symlink()


def test_plain_file_is_replaced_atomically(tmp_path: Path) -> None:
    out = tmp_path / "x.dot"
    out.write_text("old")
    inode = out.stat().st_ino
    write_output(out, b"new")
    assert out.read_bytes() == b"new" and out.stat().st_ino != inode  # a rename, not a rewrite


def test_one_writer_for_every_command() -> None:
    """No command module writes files of its own: they all call zoo.publish.outfile (a release
    renames its finished staging folder, which is a folder, not a file)."""
    root = Path(__file__).resolve().parents[2] / "zoo"
    writers = []
    for path in [*root.glob("cli/*.py"), *root.glob("publish/*.py"), *root.glob("web/*.py")]:
        text = path.read_text(encoding="utf-8")
        if path.name != "outfile.py" and "mkstemp(" in text:
            writers.append(path.name)
    assert writers == []
