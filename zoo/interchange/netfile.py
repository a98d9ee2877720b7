"""Reading a net file whatever its format: PNML or the net text format, told apart by content.

Formats zoo writes but does not read (JSON, DOT) and empty files are refused with a message
that names the format and what to use instead.
"""

from __future__ import annotations

import os
import re

from zoo.errors import FormatError
from zoo.interchange import nettext, pnml
from zoo.interchange.netmodel import (
    MAX_INPUT_BYTES,
    PlaceTransitionNet,
    looks_like_xml,
    read_limited,
)


def read_net_file(path: str | os.PathLike[str], limit: int = MAX_INPUT_BYTES) -> PlaceTransitionNet:
    """Read a PNML file or a net text file, told apart by content (XML starts with '<')."""
    data = read_limited(path, limit)
    source = str(path)
    if looks_like_xml(data):
        return pnml.parse_pnml(data, source)
    refuse_unread_formats(data, source)
    return nettext.parse_net_text(data, source)


# A DOT file starts with an optional 'strict', then 'graph' or 'digraph' (Graphviz grammar),
# possibly after // or # comment lines.
_DOT_START = re.compile(rb"^(?:\s*(?://|#)[^\n]*\n)*\s*(?:strict\s+)?(?:di)?graph\b", re.IGNORECASE)


def refuse_unread_formats(data: bytes, source: str) -> None:
    """``FormatError`` for an empty file and for the formats zoo writes but does not read.

    Without this, an empty file would pass as a net without transitions and a JSON or DOT file
    would get a net text syntax error about its first line.
    """
    text = data.removeprefix(b"\xef\xbb\xbf")
    if not text.strip():
        raise FormatError(f"{source} is empty; give a PNML or net text file")
    head = text.lstrip()[:1]
    if head in (b"{", b"["):
        raise FormatError(
            f"{source} is JSON; JSON nets from zoo export are not read by identify, use PNML "
            "(zoo export --format pnml) or the net text format (--format text)"
        )
    if _DOT_START.match(text[:4096]):
        raise FormatError(
            f"{source} is a Graphviz DOT file; DOT files are drawings, not read by identify, use "
            "PNML (zoo export --format pnml) or the net text format (--format text)"
        )


__all__ = ["read_net_file", "refuse_unread_formats"]
