"""The net of a cycloid system as a document in one of zoo's export formats.

One place that builds the net (zoo.core.net.build_net) and hands it to the writer of the chosen
format, so that ``zoo export`` and every other face write the same documents: PNML
(zoo.interchange.pnml), DOT (zoo.interchange.dot), JSON (zoo.interchange.netjson), net text
(zoo.interchange.nettext) and the SVG picture of the net (zoo.pictures.views).
"""

from __future__ import annotations

from zoo.core.params import ParameterSet
from zoo.errors import FormatError

#: Export formats, in the order help texts list them.
EXPORT_FORMATS = ("pnml", "dot", "svg", "json", "text")


def export_document(p: ParameterSet, fmt: str) -> str:
    """The net of C(p) as text in the format ``fmt`` (one of EXPORT_FORMATS)."""
    if fmt not in EXPORT_FORMATS:
        raise FormatError(
            f"unknown export format {fmt!r}; choose one of {', '.join(EXPORT_FORMATS)}"
        )
    if fmt == "svg":
        from zoo.pictures.views import draw_net_svg

        return draw_net_svg(p)
    from zoo.core.net import build_net

    net = build_net(p)
    if fmt == "pnml":
        from zoo.interchange.pnml import pnml_document

        return pnml_document(net)
    if fmt == "dot":
        from zoo.interchange.dot import dot_document

        return dot_document(net)
    if fmt == "json":
        from zoo.interchange.netjson import json_document

        return json_document(net)
    from zoo.interchange.nettext import net_text

    return net_text(net)


__all__ = ["EXPORT_FORMATS", "export_document"]
