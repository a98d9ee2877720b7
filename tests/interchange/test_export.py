"""The export documents (zoo.interchange.export): one builder of nets for every face, each format
the writer's own document, the command line's formats the same list.
"""

from __future__ import annotations

import pytest

from zoo.cli.interchange import ExportFormat
from zoo.core.net import build_net
from zoo.core.params import ParameterSet
from zoo.errors import FormatError
from zoo.interchange.dot import dot_document
from zoo.interchange.export import EXPORT_FORMATS, export_document
from zoo.interchange.netjson import json_document
from zoo.interchange.nettext import net_text, parse_net_text
from zoo.interchange.pnml import pnml_document
from zoo.pictures.views import draw_net_svg

C4223 = ParameterSet(4, 2, 2, 3)


def test_each_format_is_its_writers_document() -> None:
    net = build_net(C4223)
    assert export_document(C4223, "pnml") == pnml_document(net)
    assert export_document(C4223, "dot") == dot_document(net)
    assert export_document(C4223, "json") == json_document(net)
    assert export_document(C4223, "text") == net_text(net)
    assert export_document(C4223, "svg") == draw_net_svg(C4223)
    # The net text reads back as the same net (docs/theory/folding.md: A transitions, 2A places).
    again = parse_net_text(export_document(C4223, "text"), "c4223")
    assert len(again.transitions) == C4223.area and len(again.places) == 2 * C4223.area


def test_command_line_offers_exactly_the_export_formats() -> None:
    assert tuple(f.value for f in ExportFormat) == EXPORT_FORMATS


def test_unknown_format_is_refused_in_one_line() -> None:
    with pytest.raises(FormatError, match="unknown export format 'gif'; choose one of pnml"):
        export_document(C4223, "gif")
