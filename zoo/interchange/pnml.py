"""PNML (ISO/IEC 15909-2) for place/transition nets: write a cycloid's net, read foreign nets.

Writing follows the PT-net grammar of the standard: ``pnml/net[@id,@type]/page`` holding
``place``, ``transition`` and ``arc`` elements with ``name/text``, ``initialMarking/text`` and
``graphics/position[@x,@y]``. Positions are the parallelogram layout of zoo.pictures.layout, the
one the pictures and the DOT text use, with time pointing up (docs/theory/petri-space.md,
Drawing): transition (xi, eta) sits at x = GRID*(xi - eta), y = -GRID*(xi + eta) in screen
coordinates (shifted by a margin), a place at the midpoint of its arc in the Petri space.

Reading is defensive (docs/pnml.md, "Safe input"): the size limit is applied before parsing,
defusedxml refuses entity declarations (entity expansion, external entities), and everything a
file can get wrong is reported as a one-line ``FormatError``. Pages are flattened: they only
structure the drawing, and reference places and transitions are resolved to the node they stand
for.
"""

from __future__ import annotations

import os
import re
import xml.etree.ElementTree as ET
from collections.abc import Iterator
from typing import TYPE_CHECKING

import defusedxml
import defusedxml.ElementTree as SafeET

from zoo.errors import FormatError
from zoo.interchange.netmodel import (
    MAX_COUNT_DIGITS,
    MAX_INPUT_BYTES,
    PLACE,
    TRANSITION,
    Arc,
    PlaceTransitionNet,
    count_too_large,
    read_limited,
)
from zoo.pictures.layout import screen_positions

if TYPE_CHECKING:
    from zoo.core.net import CycloidNet

PNML_NAMESPACE = "http://www.pnml.org/version-2009/grammar/pnml"
PTNET_TYPE = "http://www.pnml.org/version-2009/grammar/ptnet"
#: Net types read as place/transition nets: PT nets, and the core model (no markings and no
#: inscriptions, so every place is empty and every arc has weight 1).
READABLE_TYPES = (PTNET_TYPE, "http://www.pnml.org/version-2009/grammar/pnmlcoremodel")

#: Distance, in PNML coordinate units, of one step of xi or eta in the drawing.
GRID = 40
#: Free border around the drawing, so that every position is positive.
MARGIN = 40

_COUNT = re.compile(rf"^\s*[+]?(\d{{1,{MAX_COUNT_DIGITS}}})\s*$")
_TOOL = "zoo"


# --- writing -------------------------------------------------------------------------------


def _tag(local: str) -> str:
    return f"{{{PNML_NAMESPACE}}}{local}"


def _sub(parent: ET.Element, local: str, **attributes: str) -> ET.Element:
    return ET.SubElement(parent, _tag(local), attributes)


def _text_label(parent: ET.Element, local: str, text: str) -> ET.Element:
    label = _sub(parent, local)
    _sub(label, "text").text = text
    return label


def _position(parent: ET.Element, x: float, y: float) -> None:
    graphics = _sub(parent, "graphics")
    _sub(graphics, "position", x=_number(x), y=_number(y))


def _number(value: float) -> str:
    return str(int(value)) if float(value).is_integer() else f"{value:.1f}"


def net_identifier(net: CycloidNet) -> str:
    """The PNML id of a cycloid's net, e.g. ``cycloid_4_2_2_3`` (an XML name, no brackets)."""
    return "cycloid_" + "_".join(str(v) for v in net.params.as_tuple())


def pnml_document(net: CycloidNet) -> str:
    """The net of a cycloid system as a PNML document (ISO/IEC 15909-2, PT net).

    Element ids are the coordinate names of docs/architecture.md (``t_3_-1``, ``f_3_-1``,
    ``b_3_-1``), repeated as ``name/text``; arcs are ``a_`` plus source and target. A
    ``toolspecific`` element for the tool ``zoo`` records the parameter set; readers ignore it.
    """
    from zoo.version import __version__

    ET.register_namespace("", PNML_NAMESPACE)
    root = ET.Element(_tag("pnml"))
    element = _sub(root, "net", id=net_identifier(net), type=PTNET_TYPE)
    _text_label(element, "name", str(net.params))
    tool = _sub(element, "toolspecific", tool=_TOOL, version=__version__)
    p = net.params
    _sub(
        tool,
        "parameters",
        alpha=str(p.alpha),
        beta=str(p.beta),
        gamma=str(p.gamma),
        delta=str(p.delta),
    )
    page = _sub(element, "page", id="page")
    transition_at, place_at = screen_positions(net, GRID, MARGIN)
    for name, (x, y), tokens in zip(net.places, place_at, net.tokens, strict=True):
        place = _sub(page, "place", id=name)
        _text_label(place, "name", name)
        _position(place, x, y)
        if tokens:
            _text_label(place, "initialMarking", str(tokens))
    for name, (x, y) in zip(net.transitions, transition_at, strict=True):
        transition = _sub(page, "transition", id=name)
        _text_label(transition, "name", name)
        _position(transition, x, y)
    for j, place_name in enumerate(net.places):
        source = net.transitions[net.pre[j]]
        target = net.transitions[net.post[j]]
        _sub(page, "arc", id=f"a_{source}_{place_name}", source=source, target=place_name)
        _sub(page, "arc", id=f"a_{place_name}_{target}", source=place_name, target=target)
    ET.indent(root, space="  ")
    body = ET.tostring(root, encoding="unicode")
    return '<?xml version="1.0" encoding="UTF-8"?>\n' + body + "\n"


# --- reading -------------------------------------------------------------------------------


def _local(tag: object) -> tuple[str, str]:
    """(namespace, local name) of an element tag; comments and processing instructions give ''."""
    if not isinstance(tag, str):
        return ("", "")
    if tag.startswith("{"):
        namespace, _, local = tag[1:].partition("}")
        return (namespace, local)
    return ("", tag)


def _children(element: ET.Element, local: str) -> list[ET.Element]:
    return [child for child in element if _local(child.tag)[1] == local]


def _label_text(element: ET.Element, local: str) -> str | None:
    """The ``text`` of the label ``local`` of an element (``name``, ``initialMarking``, ...)."""
    labels = _children(element, local)
    if not labels:
        return None
    texts = _children(labels[0], "text")
    if not texts:
        return None
    return "".join(texts[0].itertext())


def parse_xml(data: bytes, source: str) -> ET.Element:
    """Parse XML safely: entity declarations and external references are refused.

    defusedxml raises on the declaration itself, before anything is expanded, so a "billion
    laughs" document is refused in milliseconds.
    """
    try:
        root: ET.Element = SafeET.fromstring(
            data, forbid_dtd=False, forbid_entities=True, forbid_external=True
        )
        return root
    except defusedxml.EntitiesForbidden as exc:
        if exc.sysid is not None or exc.pubid is not None:
            raise FormatError(
                f"{source}: external entity {exc.name!r} ({exc.sysid or exc.pubid}) refused; "
                "zoo never reads files or addresses named inside its input"
            ) from None
        raise FormatError(
            f"{source}: entity declaration {exc.name!r} refused; entities can expand to "
            "gigabytes (the 'billion laughs' attack) and PNML never needs them"
        ) from None
    except defusedxml.ExternalReferenceForbidden as exc:
        raise FormatError(
            f"{source}: external reference {exc.sysid or exc.pubid!r} refused; zoo never reads "
            "files or addresses named inside its input"
        ) from None
    except defusedxml.DefusedXmlException as exc:
        raise FormatError(f"{source}: unsafe XML construct refused ({exc})") from None
    except ET.ParseError as exc:
        line, column = getattr(exc, "position", (0, 0))
        reason = str(exc).split(":")[0]
        raise FormatError(
            f"{source}: not well-formed XML at line {line}, column {column + 1}: {reason}"
        ) from None
    except (ValueError, LookupError) as exc:  # e.g. an unknown encoding declaration
        raise FormatError(f"{source}: cannot be decoded as XML ({exc})") from None


_NODES = ("place", "transition", "arc", "referencePlace", "referenceTransition")


def _iter_page_objects(
    net_element: ET.Element, source: str, pages_seen: list[str], warnings: list[str]
) -> Iterator[ET.Element]:
    """Every object of every page of a net, pages nested to any depth, without recursion.

    The id of every page visited is appended to ``pages_seen``. Objects written straight under
    ``<net>`` (some tools leave out the page) are read too, with a warning, rather than dropped.
    """
    pages = _children(net_element, "page")
    loose = [child for child in net_element if _local(child.tag)[1] in _NODES]
    if not pages and not loose:
        raise FormatError(
            f"{source}: the net has no <page>; PNML places, transitions and arcs live on a page"
        )
    if loose:
        warnings.append(
            f"{source}: {len(loose)} places, transitions or arcs stand directly under <net>, "
            "outside any <page>; read as if on one page (PNML wants them inside "
            '<page id="...">)'
        )
        pages_seen.append("")
        yield from loose
    stack = [(page, page.get("id", "?")) for page in reversed(pages)]
    while stack:
        page, page_id = stack.pop()
        pages_seen.append(page_id)
        nested = []
        for child in page:
            _, local = _local(child.tag)
            if local == "page":
                nested.append((child, child.get("id", "?")))
            elif local:
                yield child
        stack.extend(reversed(nested))


#: Children a PT-net label (initialMarking, inscription, name) may have besides its text.
_LABEL_EXTRAS = ("graphics", "toolspecific")
#: Labels a node may carry in a PT net (ISO/IEC 15909-2, PT-net type).
_PT_LABELS = {
    "place": {"name", "initialMarking", "graphics", "toolspecific"},
    "transition": {"name", "graphics", "toolspecific"},
    "arc": {"inscription", "graphics", "toolspecific"},
}


def _count_label(
    element: ET.Element, local: str, what: str, source: str, example: str
) -> str | None:
    """The ``text`` of a number label, refusing forms zoo does not read instead of guessing.

    A marking written as ``<value>`` or ``<token>`` (high-level or tool forms) would otherwise
    read as no tokens and turn a live net into a dead one without a word.
    """
    labels = _children(element, local)
    if not labels:
        return None
    label = labels[0]
    foreign = [
        name
        for name in (_local(child.tag)[1] for child in label)
        if name and name != "text" and name not in _LABEL_EXTRAS
    ]
    loose_text = (label.text or "").strip()
    if foreign or (loose_text and not _children(label, "text")):
        found = f"<{foreign[0]}>" if foreign else f"the bare text {loose_text[:20]!r}"
        raise FormatError(
            f"{source}: {what} is written as <{local}> holding {found}, a form zoo does not "
            f"read; write the PT-net form <{local}><text>{example}</text></{local}>"
        )
    return _label_text(element, local)


def _count(text: str | None, what: str, source: str, default: int) -> int:
    if text is None or not text.strip():
        return default
    match = _COUNT.match(text)
    if match is None:
        too_large = count_too_large(what, text)
        if too_large:
            raise FormatError(f"{source}: {too_large}")
        raise FormatError(
            f"{source}: {what} is {text.strip()[:40]!r}, not a whole number >= 0; write e.g. 1"
        )
    return int(match.group(1))


def parse_pnml(data: bytes, source: str = "<pnml>") -> PlaceTransitionNet:
    """Read one place/transition net from PNML bytes (docs/pnml.md describes what is accepted)."""
    root = parse_xml(data, source)
    namespace, local = _local(root.tag)
    if local != "pnml" or namespace not in ("", PNML_NAMESPACE):
        shown = f"<{local}> in the namespace {namespace}" if namespace else f"<{local}>"
        raise FormatError(
            f"{source}: root element is {shown}, not <pnml> in the namespace {PNML_NAMESPACE}; "
            "this is not a PNML file"
        )
    nets = _children(root, "net")
    if not nets:
        raise FormatError(f"{source}: the <pnml> element holds no <net>")
    if len(nets) > 1:
        raise FormatError(
            f"{source}: the file holds {len(nets)} nets; zoo reads one net per file, "
            "split them into separate files"
        )
    net = nets[0]
    warnings: list[str] = []
    net_type = (net.get("type") or "").strip()
    untyped = not net_type
    if untyped:
        warnings.append(
            f"{source}: the <net> has no type attribute; read as a place/transition net "
            f'(PNML names it: <net id="..." type="{PTNET_TYPE}">)'
        )
    elif net_type not in READABLE_TYPES:
        raise FormatError(
            f"{source}: net type {net_type!r} is not a place/transition net; zoo reads the type "
            f"{PTNET_TYPE}"
        )
    kinds: dict[str, str] = {}
    references: dict[str, tuple[str, str]] = {}  # id -> (ref, "place" | "transition")
    places: list[str] = []
    transitions: list[str] = []
    tokens: list[int] = []
    labels: list[tuple[str, str]] = []
    raw_arcs: list[tuple[str, str, str, int]] = []
    page_ids: list[str] = []

    def claim(element_id: str | None, kind: str) -> str:
        if not element_id:
            raise FormatError(
                f"{source}: a <{kind}> has no id attribute; every PNML object needs one"
            )
        if element_id in kinds or element_id in references:
            raise FormatError(
                f"{source}: id {element_id!r} is used twice; PNML ids must be unique in a file"
            )
        return element_id

    for element in _iter_page_objects(net, source, page_ids, warnings):
        _, local = _local(element.tag)
        element_id = element.get("id")
        if untyped and local in _PT_LABELS:
            # Without a type, only a net whose every label is a PT-net label is read as one.
            extra = [
                name
                for name in (_local(child.tag)[1] for child in element)
                if name and name not in _PT_LABELS[local]
            ]
            if extra:
                raise FormatError(
                    f"{source}: the <net> has no type attribute and {local} {element_id!r} has a "
                    f"<{extra[0]}> label, which place/transition nets do not have; zoo reads "
                    f'PT nets only: save the net as type="{PTNET_TYPE}"'
                )
        if local == "place":
            name = claim(element_id, "place")
            kinds[name] = PLACE
            places.append(name)
            marking = _count_label(
                element, "initialMarking", f"the initial marking of place {name!r}", source, "1"
            )
            tokens.append(_count(marking, f"the initial marking of place {name!r}", source, 0))
        elif local == "transition":
            name = claim(element_id, "transition")
            kinds[name] = TRANSITION
            transitions.append(name)
        elif local in ("referencePlace", "referenceTransition"):
            name = claim(element_id, local)
            target = element.get("ref")
            if not target:
                raise FormatError(f"{source}: {local} {name!r} has no ref attribute")
            references[name] = (target, PLACE if local == "referencePlace" else TRANSITION)
        elif local == "arc":
            name = claim(element_id, "arc")
            kinds[name] = "arc"
            weight = _count(
                _count_label(
                    element, "inscription", f"the inscription of arc {name!r}", source, "1"
                ),
                f"the inscription of arc {name!r}",
                source,
                1,
            )
            if weight == 0:
                raise FormatError(
                    f"{source}: arc {name!r} has inscription 0; a PT-net arc weight is at least 1"
                )
            raw_arcs.append(
                (name, element.get("source") or "", element.get("target") or "", weight)
            )
        else:
            continue
        display = _label_text(element, "name")
        if display is None and _children(element, "name") and local in ("place", "transition"):
            warnings.append(
                f"{source}: the name of {local} {element_id!r} has no <text>; shown by its id "
                "(PNML writes <name><text>...</text></name>)"
            )
        if local in ("place", "transition") and display is not None and display.strip():
            if display.strip() != element_id:
                labels.append((str(element_id), display.strip()))

    def resolve(node: str, where: str) -> str:
        seen: list[str] = []
        while node in references:
            if node in seen:
                chain = " -> ".join([*seen, node])
                raise FormatError(f"{source}: reference nodes form a cycle ({chain})")
            seen.append(node)
            target, expected = references[node]
            if target not in kinds and target not in references:
                raise FormatError(
                    f"{source}: reference {node!r} points to {target!r}, which is not in the file"
                )
            if target in kinds and kinds[target] != expected:
                raise FormatError(
                    f"{source}: reference {node!r} must point to a {expected}, but {target!r} "
                    f"is a{'n' if kinds[target] == 'arc' else ''} {kinds[target]}"
                )
            node = target
        if node not in kinds or kinds[node] == "arc":
            raise FormatError(
                f"{source}: {where} refers to {node!r}, which is no place or transition in the file"
            )
        return node

    arcs: list[Arc] = []
    for name, raw_source, raw_target, weight in raw_arcs:
        where = f"arc {name!r}"
        if not raw_source or not raw_target:
            raise FormatError(f"{source}: {where} needs both a source and a target attribute")
        tail = resolve(raw_source, f"the source of {where}")
        head = resolve(raw_target, f"the target of {where}")
        if kinds[tail] == kinds[head]:
            raise FormatError(
                f"{source}: {where} joins {kinds[tail]} {tail!r} to {kinds[head]} {head!r}; "
                "an arc must join a place and a transition"
            )
        arcs.append(Arc(tail, head, weight, where))
    net_name = (_label_text(net, "name") or net.get("id") or "").strip()
    return PlaceTransitionNet(
        source=source,
        name=net_name,
        places=tuple(places),
        transitions=tuple(transitions),
        tokens=tuple(tokens),
        arcs=tuple(arcs),
        labels=tuple(labels),
        pages=len(page_ids),
        warnings=tuple(warnings),
    )


def read_pnml(path: str | os.PathLike[str], limit: int = MAX_INPUT_BYTES) -> PlaceTransitionNet:
    """Read a PNML file: size limit first, then the safe parser."""
    return parse_pnml(read_limited(path, limit), str(path))


__all__ = [
    "PNML_NAMESPACE",
    "PTNET_TYPE",
    "parse_pnml",
    "pnml_document",
    "read_pnml",
]
