"""A cycloid's net as JSON: parameters, transitions with coordinates, places with their arcs.

The document is meant for scripts (plotting, other tools): every transition lists its
coordinates (xi, eta) in the fundamental parallelogram and its drawing position, every place its
kind, input and output transition and initial tokens. The shape is described in docs/pnml.md
("JSON") and versioned by ``format_version``.
"""

from __future__ import annotations

import json
from typing import TYPE_CHECKING

from zoo.pictures.layout import drawing_coordinates

if TYPE_CHECKING:
    from zoo.core.net import CycloidNet

FORMAT_NAME = "zoo-net"
FORMAT_VERSION = 1


def net_dict(net: CycloidNet) -> dict[str, object]:
    """The net of a cycloid system as plain JSON-ready data."""
    from zoo.version import __version__

    p = net.params
    transitions_at, places_at = drawing_coordinates(net)
    transitions = [
        {"name": name, "xi": xi, "eta": eta, "x": x, "y": y}
        for name, (xi, eta), (x, y) in zip(
            net.transitions, net.coordinates, transitions_at, strict=True
        )
    ]
    places = [
        {
            "name": name,
            "kind": net.kinds[j],
            "from": net.transitions[net.pre[j]],
            "to": net.transitions[net.post[j]],
            "tokens": net.tokens[j],
            "x": places_at[j][0],
            "y": places_at[j][1],
        }
        for j, name in enumerate(net.places)
    ]
    return {
        "format": FORMAT_NAME,
        "format_version": FORMAT_VERSION,
        "written_by": f"zoo {__version__}",
        "label": str(p),
        "params": {"alpha": p.alpha, "beta": p.beta, "gamma": p.gamma, "delta": p.delta},
        "area": p.area,
        "tokens": {"forward": p.beta, "backward": p.alpha},
        "drawing": "x = xi - eta (space), y = xi + eta (time, pointing up)",
        "transitions": transitions,
        "places": places,
    }


def json_document(net: CycloidNet) -> str:
    """``net_dict`` as indented JSON text."""
    return json.dumps(net_dict(net), indent=2, ensure_ascii=False) + "\n"


__all__ = ["FORMAT_NAME", "FORMAT_VERSION", "json_document", "net_dict"]
