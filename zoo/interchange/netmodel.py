"""The net as a file states it (``PlaceTransitionNet``), safe reading of bytes, and limits.

Readers (``pnml``, ``nettext``) produce a ``PlaceTransitionNet``: the net exactly as the file
states it, arc weights and all, before any check that it is a marked graph. Deciding what the
net *is* belongs to ``zoo.interchange.identify``. Writers (``pnml``, ``nettext``, ``dot``,
``netjson``) take a ``CycloidNet`` from ``zoo.core.net.build_net``.

Every reader goes through ``read_limited``: a file larger than ``MAX_INPUT_BYTES`` is refused
before a single byte is parsed (docs/pnml.md, "Safe input").
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path

from zoo.errors import FormatError

#: Largest input file accepted by any reader: 10 MiB. zoo's own PNML export takes about 850
#: bytes per transition, so every exported net up to area ~12,000 reads back. That is ten times
#: the largest net the canonical form accepts (zoo.core.canonical.CANONICAL_LIMIT vertices at 5 per
#: transition: area CANONICAL_LIMIT // 5), so nothing identifiable is refused for its size;
#: tests/interchange/test_identify.py checks this against the constant.
MAX_INPUT_BYTES = 10 * 1024 * 1024

PLACE = "place"
TRANSITION = "transition"

#: Most digits of a token count or arc weight a reader accepts: a count is read as an exact
#: integer, and a net with more tokens than this on one place is no safe marked graph anyway.
MAX_COUNT_DIGITS = 15
MAX_COUNT = 10**MAX_COUNT_DIGITS - 1


def count_too_large(what: str, text: str) -> str | None:
    """``WHAT must be at most MAX_COUNT ...`` when text is a whole number over the limit."""
    digits = text.strip().lstrip("+")
    if digits.isdigit() and digits.isascii() and len(digits) > MAX_COUNT_DIGITS:
        shown = digits if len(digits) <= 40 else digits[:37] + "..."
        return f"{what} must be at most {MAX_COUNT:,} ({MAX_COUNT_DIGITS} digits), got {shown!r}"
    return None


@dataclass(frozen=True)
class Arc:
    """One arc of a place/transition net as read: node names, weight, and where it was stated."""

    source: str
    target: str
    weight: int
    where: str  # "arc 'a7'" or "line 12": names the arc in messages


@dataclass(frozen=True)
class PlaceTransitionNet:
    """A place/transition net as a file states it, before any structural check.

    ``places`` and ``transitions`` are the element names (PNML ids, or the names of the net text
    format), unique over both kinds; ``tokens[i]`` is the initial marking of ``places[i]``.
    ``labels`` maps an element to the display name the file gave it, where that differs.
    ``warnings`` are one-line notes on what the reader had to assume (e.g. a missing net type).
    """

    source: str
    name: str
    places: tuple[str, ...]
    transitions: tuple[str, ...]
    tokens: tuple[int, ...]
    arcs: tuple[Arc, ...]
    labels: tuple[tuple[str, str], ...] = ()
    pages: int = 1
    warnings: tuple[str, ...] = ()

    def label_of(self, element: str) -> str:
        """The file's display name of an element (its own name when the file gave none)."""
        return dict(self.labels).get(element, element)


def read_limited(path: str | os.PathLike[str], limit: int = MAX_INPUT_BYTES) -> bytes:
    """The bytes of a file, refused with ``FormatError`` when it is larger than ``limit``.

    The size is checked before reading and again while reading (a pipe or a growing file has no
    trustworthy size), so at most ``limit + 1`` bytes are ever held in memory.
    """
    file = Path(path)
    try:
        size = file.stat().st_size
        if file.is_dir():
            raise FormatError(f"{file} is a directory; give a PNML or net text file")
        if size > limit:
            raise FormatError(_too_large(file, size, limit))
        with file.open("rb") as stream:
            data = stream.read(limit + 1)
    except FileNotFoundError:
        raise FormatError(f"{file}: no such file; check the path") from None
    except PermissionError:
        raise FormatError(f"{file}: permission denied; check the file's permissions") from None
    except IsADirectoryError:
        raise FormatError(f"{file} is a directory; give a PNML or net text file") from None
    except OSError as exc:
        raise FormatError(f"{file}: cannot be read ({exc.strerror or exc})") from None
    if len(data) > limit:
        raise FormatError(_too_large(file, len(data), limit))
    return data


def _too_large(file: Path, size: int, limit: int) -> str:
    return (
        f"{file} is {size / 1048576:.1f} MiB, over the input limit of {limit / 1048576:.0f} MiB; "
        "zoo reads nets up to that size (docs/pnml.md, Safe input)"
    )


def looks_like_xml(data: bytes) -> bool:
    """Whether the data starts (after a byte-order mark and white space) with '<'."""
    head = data[:4096]
    for bom in (b"\xef\xbb\xbf", b"\xff\xfe", b"\xfe\xff"):
        if head.startswith(bom):
            return True if bom != b"\xef\xbb\xbf" else head[3:].lstrip().startswith(b"<")
    return head.lstrip().startswith(b"<")


__all__ = [
    "MAX_COUNT",
    "MAX_COUNT_DIGITS",
    "MAX_INPUT_BYTES",
    "count_too_large",
    "Arc",
    "PlaceTransitionNet",
    "looks_like_xml",
    "read_limited",
]
