"""Catalog identifiers, labels and their parsing (docs/citing.md, docs/citing.md).

* A class identifier is ``CY{area}-{rank}``: the area and the 1-based rank of the class among
  all classes of that area, ordered by their smallest member parameter set (lexicographic on
  alpha, beta, gamma, delta). Frames use ``FR{area}-{rank}`` in the same way.
* The label of a class or frame is its smallest member, written ``C(alpha,beta,gamma,delta)``.

Every member of a class has the same area, and an area is stored completely or not at all, so
a rank depends only on the parameter sets of its own area: extending the catalog to larger
areas never changes an identifier that already exists.
"""

from __future__ import annotations

import re
from collections.abc import Iterable
from dataclasses import dataclass
from typing import Literal

from zoo.core.params import ParameterSet
from zoo.errors import NotInCatalog

__all__ = [
    "BEHAVIOUR_PREFIX",
    "CLASS_PREFIX",
    "FRAME_PREFIX",
    "Identifier",
    "behaviour_identifier",
    "class_identifier",
    "frame_identifier",
    "label",
    "parse_identifier",
    "read_identifier",
    "smallest_member",
]

CLASS_PREFIX = "CY"
FRAME_PREFIX = "FR"
#: Behaviour classes are named after their first class: ``BE{area}-{rank}`` for ``CY{area}-{rank}``
#: (docs/theory/behaviour.md).
BEHAVIOUR_PREFIX = "BE"


def behaviour_identifier(class_id: str) -> str:
    """The identifier of the behaviour class whose first class is ``class_id``.

    >>> behaviour_identifier("CY5-1")
    'BE5-1'
    """
    return BEHAVIOUR_PREFIX + class_id[len(CLASS_PREFIX) :]


IdentifierKind = Literal["class", "frame"]

_SHAPE = re.compile(r"^\s*(?P<prefix>CY|FR)\s*(?P<area>\d{1,7})\s*-\s*(?P<rank>\d{1,9})\s*$", re.I)


@dataclass(frozen=True, order=True)
class Identifier:
    """A parsed identifier: kind (class or frame), area and 1-based rank.

    >>> str(parse_identifier("cy16-3"))
    'CY16-3'
    """

    kind: IdentifierKind
    area: int
    rank: int

    def __post_init__(self) -> None:
        if self.area < 2:
            raise NotInCatalog(
                f"identifier area {self.area} is below 2, the smallest cycloid area "
                "(C(1,1,1,1)); check the identifier"
            )
        if self.rank < 1:
            raise NotInCatalog(f"identifier rank {self.rank} must be at least 1; ranks start at 1")

    def __str__(self) -> str:
        prefix = CLASS_PREFIX if self.kind == "class" else FRAME_PREFIX
        return f"{prefix}{self.area}-{self.rank}"


def class_identifier(area: int, rank: int) -> str:
    """The identifier of the rank-th class of an area, e.g. ``CY16-3``.

    >>> class_identifier(16, 3)
    'CY16-3'
    """
    return str(Identifier("class", area, rank))


def frame_identifier(area: int, rank: int) -> str:
    """The identifier of the rank-th frame of an area, e.g. ``FR16-2``."""
    return str(Identifier("frame", area, rank))


def read_identifier(text: str) -> Identifier | None:
    """The identifier written in text, or None when text does not have the shape of one.

    Case and spaces around the parts are forgiven (``cy 16-3``); the canonical spelling is
    what ``str()`` gives back.

    >>> read_identifier("FR8-1")
    Identifier(kind='frame', area=8, rank=1)
    >>> read_identifier("C(1,1,1,1)") is None
    True
    """
    match = _SHAPE.match(text)
    if match is None:
        return None
    kind: IdentifierKind = "class" if match.group("prefix").upper() == CLASS_PREFIX else "frame"
    return Identifier(kind, int(match.group("area")), int(match.group("rank")))


def parse_identifier(text: str) -> Identifier:
    """Parse a class or frame identifier; NotInCatalog when the text is not one."""
    found = read_identifier(text)
    if found is None:
        raise NotInCatalog(
            f"{text.strip()!r} is not a catalog identifier; write CY{{area}}-{{rank}} for a "
            "class (e.g. CY16-3) or FR{area}-{rank} for a frame (e.g. FR16-1)"
        )
    return found


def smallest_member(members: Iterable[ParameterSet]) -> ParameterSet:
    """The lexicographically smallest parameter set: the member that names a class or frame."""
    return min(members)


def label(members: Iterable[ParameterSet]) -> str:
    """The label of a class or frame: its smallest member, e.g. ``C(1,1,1,3)``.

    >>> label([ParameterSet(2, 4, 3, 2), ParameterSet(4, 2, 2, 3)])
    'C(2,4,3,2)'
    """
    return str(smallest_member(members))
