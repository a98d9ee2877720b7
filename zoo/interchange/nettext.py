"""The marked-graph text format of zoo: one line per place, ``place NAME: FROM -> TO [tokens N]``.

A marked graph is fully described by its places: each has exactly one input and one output
transition and an initial number of tokens. The format says exactly that and nothing more, so
a hand-written net is short and every line can be checked on its own. The grammar is in
docs/net-text-format.md; in brief::

    file       = { line } ;
    line       = [ statement ] [ "#" comment ] end-of-line ;
    statement  = "net" title
               | "transition" NAME { NAME }
               | "place" NAME ":" NAME "->" NAME [ "tokens" COUNT ] ;
    NAME       = one or more of  A-Z a-z 0-9 _ . ' [ ]  and "-" not followed by ">" ;
    COUNT      = one or more digits ;

Transitions come into being when a place names them; ``transition`` lines only add transitions
without places, or fix the order in which they are listed. Errors name the file and line.
"""

from __future__ import annotations

import os
import re

from zoo.errors import FormatError
from zoo.interchange.netmodel import (
    MAX_COUNT_DIGITS,
    MAX_INPUT_BYTES,
    Arc,
    PlaceTransitionNet,
    count_too_large,
    read_limited,
)

#: The usual file suffix of the format (any suffix is read: the reader looks at the content).
SUFFIX = ".mgraph"

_NAME = r"(?:[A-Za-z0-9_.'\[\]]|-(?!>))+"
_NAME_ONLY = re.compile(rf"^{_NAME}$")
_PLACE = re.compile(
    rf"^place\s+(?P<name>{_NAME})\s*:\s*(?P<source>{_NAME})\s*->\s*(?P<target>{_NAME})"
    rf"(?:\s+tokens\s+(?P<tokens>\S+))?\s*$"
)
_KEYWORD = re.compile(r"^(?P<word>[A-Za-z]+)\b")
_PLACE_SHAPE = "place NAME: FROM -> TO [tokens N]"


def parse_net_text(data: bytes | str, source: str = "<text>") -> PlaceTransitionNet:
    """Read a marked graph in the net text format; errors say ``SOURCE line N: ...``."""
    text = _decode(data, source) if isinstance(data, bytes) else data
    title = ""
    places: list[str] = []
    tokens: list[int] = []
    arcs: list[Arc] = []
    transitions: list[str] = []
    declared_at: dict[str, tuple[str, int]] = {}  # name -> (kind, line of first use)
    listed_at: dict[str, int] = {}  # transition -> line of its 'transition' statement

    def fail(number: int, message: str) -> FormatError:
        return FormatError(f"{source} line {number}: {message}")

    def use_transition(name: str, number: int) -> None:
        kind, line = declared_at.get(name, ("", 0))
        if kind == "place":
            raise fail(number, f"{name!r} is a place (line {line}) and cannot also be a transition")
        if not kind:
            declared_at[name] = ("transition", number)
            transitions.append(name)

    for number, raw in enumerate(text.splitlines(), start=1):
        line = raw.split("#", 1)[0].strip()
        if not line:
            continue
        keyword = _KEYWORD.match(line)
        word = keyword.group("word") if keyword else ""
        if word == "net":
            if title:
                raise fail(number, "a second 'net' line; a file holds one net")
            title = line[3:].strip()
            if not title:
                raise fail(number, "'net' needs a title, e.g. 'net pipeline ring'")
        elif word == "transition":
            names = line[len("transition") :].split()
            if not names:
                raise fail(number, "'transition' needs at least one name, e.g. 'transition t1 t2'")
            for name in names:
                if not _NAME_ONLY.match(name):
                    raise fail(number, _bad_name(name))
                if name in listed_at:
                    raise fail(
                        number, f"transition {name!r} is already listed on line {listed_at[name]}"
                    )
                listed_at[name] = number
                use_transition(name, number)
        elif word == "place":
            match = _PLACE.match(line)
            if match is None:
                raise fail(number, _explain_place(line))
            name = match.group("name")
            kind, line_before = declared_at.get(name, ("", 0))
            if kind:
                raise fail(
                    number,
                    f"{name!r} is already a {kind} (line {line_before}); "
                    "every place and transition needs its own name",
                )
            count_text = match.group("tokens")
            count = 0
            if count_text is not None:
                if not re.fullmatch(rf"\d{{1,{MAX_COUNT_DIGITS}}}", count_text):
                    raise fail(
                        number,
                        count_too_large("tokens", count_text)
                        or f"tokens must be a whole number >= 0, got {count_text!r}",
                    )
                count = int(count_text)
            for end in ("source", "target"):
                if match.group(end) == name:
                    raise fail(number, f"place {name!r} names itself as a transition")
                use_transition(match.group(end), number)
            declared_at[name] = ("place", number)
            places.append(name)
            tokens.append(count)
            arcs.append(Arc(match.group("source"), name, 1, f"line {number}"))
            arcs.append(Arc(name, match.group("target"), 1, f"line {number}"))
        else:
            shown = line if len(line) <= 40 else line[:37] + "..."
            raise fail(
                number,
                f"cannot read {shown!r}; a line is '{_PLACE_SHAPE}', 'transition NAME ...', "
                "'net TITLE' or a # comment",
            )
    return PlaceTransitionNet(
        source=source,
        name=title,
        places=tuple(places),
        transitions=tuple(transitions),
        tokens=tuple(tokens),
        arcs=tuple(arcs),
    )


def _bad_name(name: str) -> str:
    return f"{name!r} is not a valid name; names use letters, digits and _ . ' [ ] - (but not '->')"


def _explain_place(line: str) -> str:
    """A precise reason why a ``place`` line does not parse."""
    rest = line[len("place") :].strip()
    if ":" not in rest:
        return f"a place line needs ':' after the place name; write '{_PLACE_SHAPE}'"
    name, _, arc = rest.partition(":")
    name = name.strip()
    if not name or not _NAME_ONLY.match(name):
        return _bad_name(name) if name else f"the place has no name; write '{_PLACE_SHAPE}'"
    if "->" not in arc:
        return f"place {name!r} needs 'FROM -> TO' after ':'; write '{_PLACE_SHAPE}'"
    source, _, target = arc.partition("->")
    source = source.strip()
    if not source or not _NAME_ONLY.match(source):
        return (
            f"place {name!r} needs one input transition before '->', got {source!r}; "
            "a marked-graph place has exactly one input and one output"
        )
    parts = target.split()
    if not parts:
        return f"place {name!r} needs an output transition after '->'"
    if not _NAME_ONLY.match(parts[0]):
        return _bad_name(parts[0])
    if len(parts) >= 2 and parts[1] == "tokens":
        if len(parts) == 2:
            return f"place {name!r}: 'tokens' needs a number, e.g. 'tokens 1'"
        if len(parts) > 3:
            return f"place {name!r}: unexpected {' '.join(parts[3:])!r} after the token count"
        too_large = count_too_large("tokens", parts[2])
        if too_large:
            return f"place {name!r}: {too_large}"
        return f"place {name!r}: tokens must be a whole number >= 0, got {parts[2]!r}"
    if len(parts) >= 2 and parts[1].startswith("weight"):
        return (
            f"place {name!r}: arc weights are not part of the format; every arc of a "
            "marked graph has weight 1"
        )
    return (
        f"place {name!r}: unexpected {' '.join(parts[1:])!r} after the output transition; "
        f"write '{_PLACE_SHAPE}' (a place has exactly one output transition)"
    )


def _decode(data: bytes, source: str) -> str:
    if b"\x00" in data[:8192]:
        raise FormatError(f"{source}: binary data (a NUL byte); a net text file is UTF-8 text")
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = data[: exc.start].count(b"\n") + 1
        raise FormatError(
            f"{source} line {line}: not UTF-8 text (byte {data[exc.start]:#04x}); "
            "save the file as UTF-8"
        ) from None


def read_net_text(path: str | os.PathLike[str], limit: int = MAX_INPUT_BYTES) -> PlaceTransitionNet:
    """Read a net text file, refusing files over the size limit before parsing."""
    return parse_net_text(read_limited(path, limit), str(path))


def net_text(net: object) -> str:
    """A cycloid's net (``zoo.core.net.CycloidNet``) in the net text format, one place per line.

    Places are listed forward places first, each named after its input transition; the comment
    header says what the names mean, so the file documents itself.
    """
    from zoo.core.net import CycloidNet
    from zoo.version import __version__

    if not isinstance(net, CycloidNet):
        raise FormatError(f"net_text needs a cycloid net, got {type(net).__name__}")
    p = net.params
    lines = [
        f"# {p}: cycloid system, area {p.area}, {p.beta} forward and {p.alpha} backward tokens",
        f"# written by zoo {__version__}; t_XI_ETA is the transition at (xi, eta) of the",
        "# fundamental parallelogram, f_ and b_ the forward and backward place after it",
        f"net {p}",
        "transition " + " ".join(net.transitions),
    ]
    width = max(len(name) for name in net.places)
    twidth = max(len(name) for name in net.transitions)
    for j, name in enumerate(net.places):
        source = net.transitions[net.pre[j]]
        target = net.transitions[net.post[j]]
        line = f"place {name:<{width}}: {source:<{twidth}} -> {target}"
        if net.tokens[j]:
            line = f"{line:<{12 + width + 2 * twidth}} tokens {net.tokens[j]}"
        lines.append(line.rstrip())
    return "\n".join(lines) + "\n"


__all__ = ["SUFFIX", "net_text", "parse_net_text", "read_net_text"]
