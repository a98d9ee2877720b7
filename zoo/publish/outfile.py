"""Writing output files: the one place every command that writes a file goes through.

``draw``, ``export``, ``dump`` and the files of ``release`` are written here, so that they all
behave alike:

* a plain file is replaced atomically: the new content goes to a temporary file in the same
  folder, renamed over the old one at the end (a rename within one file system is atomic on
  POSIX), so a failure half-way leaves the old file as it was; an existing file keeps its
  permissions;
* a symbolic link is written through, as an editor does: its final target is replaced
  atomically and the link stays a link;
* anything that is not a regular file (a folder, a device, a FIFO, a socket) is refused with one
  line, before anything is written: replacing ``/dev/full`` or a named pipe by a regular file
  is never what the user meant.
"""

from __future__ import annotations

import os
import stat
import tempfile
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import IO

from zoo.errors import ZooError


class OutputNotWritable(ZooError, OSError):
    """An output file or folder cannot be created where the user asked for it."""


def not_writable(path: Path, exc: OSError) -> OutputNotWritable:
    """The one-line error for an output that the operating system refused to create."""
    reason = exc.strerror or type(exc).__name__
    return OutputNotWritable(f"cannot write {str(path)!r}: {reason}; choose a writable location")


_KINDS = (
    (stat.S_ISDIR, "a folder"),
    (stat.S_ISCHR, "a character device"),
    (stat.S_ISBLK, "a block device"),
    (stat.S_ISFIFO, "a named pipe (FIFO)"),
    (stat.S_ISSOCK, "a socket"),
)


def output_target(path: Path) -> Path:
    """The regular file that writing ``path`` replaces: ``path`` itself, or the final target of
    a symbolic link (a dangling link's target is created). Special files are refused."""
    path = Path(path)
    target = Path(os.path.realpath(path)) if path.is_symlink() else path
    try:
        mode = target.stat().st_mode
    except FileNotFoundError:
        return target
    except OSError as exc:
        raise not_writable(path, exc) from None
    if stat.S_ISREG(mode):
        return target
    kind = next((name for test, name in _KINDS if test(mode)), "not a regular file")
    via = f" (through the link to {str(target)!r})" if target != path else ""
    raise OutputNotWritable(
        f"cannot write {str(path)!r}: it is {kind}{via}, not a regular file; "
        "give a file path (leave out --output to write to standard output)"
    )


def default_mode(directory: bool = False) -> int:
    """Permissions a plain ``open`` would give under the current umask (mkstemp gives 0600)."""
    mask = os.umask(0)
    os.umask(mask)
    return (0o777 if directory else 0o666) & ~mask


@contextmanager
def replacing(path: Path, what: str = "the output") -> Iterator[IO[bytes]]:
    """A binary file that replaces ``path`` (or its link target) when the block ends normally,
    and vanishes otherwise."""
    path = Path(path)
    target = output_target(path)
    folder = target.parent
    if not folder.is_dir():
        raise ZooError(f"folder {str(folder)!r} for {what} does not exist; create it first")
    try:
        mode = stat.S_IMODE(target.stat().st_mode)
    except OSError:
        mode = default_mode()
    try:
        handle, temporary = tempfile.mkstemp(prefix=f".{target.name}.", dir=folder)
    except OSError as exc:
        raise not_writable(path, exc) from None
    try:
        with os.fdopen(handle, "wb") as out:
            yield out
        os.chmod(temporary, mode)
        os.replace(temporary, target)
    except OutputNotWritable:
        Path(temporary).unlink(missing_ok=True)
        raise
    except OSError as exc:  # a full disk, a quota
        Path(temporary).unlink(missing_ok=True)
        raise not_writable(path, exc) from None
    except BaseException:
        Path(temporary).unlink(missing_ok=True)
        raise


def write_output(path: Path, data: bytes) -> None:
    """Write ``data`` to the output file ``path`` (atomically, through links, never over a
    special file)."""
    with replacing(Path(path), Path(path).name) as out:
        out.write(data)


__all__ = [
    "OutputNotWritable",
    "default_mode",
    "not_writable",
    "output_target",
    "replacing",
    "write_output",
]
