"""zoo: a research catalog of Petri's cycloids C(alpha, beta, gamma, delta).

The Python interface (docs/api.md)::

    import zoo

    p = zoo.ParameterSet(4, 2, 2, 3)          # or zoo.parse_params("C(4,2,2,3)")
    graph = p.to_networkx()                    # the explicit net, marking included
    with zoo.Catalog.open("catalog.sqlite3", create=True) as catalog:
        zoo.build_catalog(catalog, 30)         # every class of area <= 30
        result = catalog.find("processes = 3 and area < 30", sort="loop")
        first = result[0]                      # a ClassEntry; len(result), for e in result
        first.value("slowness")                # exact: int, fractions.Fraction, bool
        table = result.to_pandas()             # needs pandas
    answer = zoo.identify("ring.pnml", db="catalog.sqlite3")

In a notebook a parameter set shows its parallelogram, and entries and results show tables.

The package is layered (docs/architecture.md): ``zoo.core`` (the mathematics), ``zoo.query``
(the query language), ``zoo.storage`` (the database), ``zoo.catalog`` (enumeration,
classification, build and the read service), ``zoo.pictures``, ``zoo.interchange`` and
``zoo.publish``, and the faces ``zoo.cli`` and ``zoo.web``. Imports run one way, down the
layers. The catalog names below load on first use, so that ``import zoo`` stays light.
"""

from __future__ import annotations

import os
from importlib import import_module
from typing import TYPE_CHECKING, Any

from zoo.core import params as _params
from zoo.core.params import ParameterSet, parse_params
from zoo.errors import ZooError
from zoo.version import __version__

if TYPE_CHECKING:
    from zoo.interchange.identify import Identification

#: Names loaded on first use: (module, attribute).
_LAZY: dict[str, tuple[str, str]] = {
    "Catalog": ("zoo.catalog.service", "Catalog"),
    "FindResult": ("zoo.catalog.service", "FindResult"),
    "build_catalog": ("zoo.catalog.build", "build_catalog"),
    "ClassEntry": ("zoo.core.entries", "ClassEntry"),
    "ReadingEntry": ("zoo.core.entries", "ReadingEntry"),
    "FrameEntry": ("zoo.core.entries", "FrameEntry"),
    "RingDesign": ("zoo.core.rings", "RingDesign"),
    "Identification": ("zoo.interchange.identify", "Identification"),
    "draw": ("zoo.pictures.views", "draw"),
}

__all__ = [
    "Catalog",
    "ClassEntry",
    "FindResult",
    "FrameEntry",
    "Identification",
    "ParameterSet",
    "ReadingEntry",
    "RingDesign",
    "ZooError",
    "__version__",
    "build_catalog",
    "draw",
    "identify",
    "parse_params",
]


def __getattr__(name: str) -> Any:
    if name in _LAZY:
        module, attribute = _LAZY[name]
        value = getattr(import_module(module), attribute)
        globals()[name] = value
        return value
    raise AttributeError(f"module 'zoo' has no attribute {name!r}")


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(_LAZY))


def identify(
    path: str | os.PathLike[str], db: str | None = None, *, use_catalog: bool = True
) -> Identification:
    """Identify the net of a PNML or net-text file: is it a cycloid system, which parameter
    set and catalog class, and which node is which (``zoo identify``). ``db`` names the
    catalog (file or URL; default as for the command line); the catalog is only read."""
    from zoo.catalog.lookup import catalog_lookup
    from zoo.interchange.identify import identify_file

    return identify_file(path, catalog_lookup(db), use_catalog=use_catalog)


def _net_graph(p: ParameterSet) -> Any:
    from zoo.core.net import build_net, to_networkx

    return to_networkx(build_net(p))


def _parallelogram_svg(p: ParameterSet) -> str | None:
    from zoo.pictures.views import draw

    try:
        return draw(p, "parallelogram", "svg").decode("utf-8")
    except ZooError:
        return None


_params.EXTENSIONS.update(to_networkx=_net_graph, svg=_parallelogram_svg)
