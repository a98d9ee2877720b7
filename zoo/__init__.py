"""zoo: a research catalog of Petri's cycloids C(alpha, beta, gamma, delta).

The package is layered (docs/architecture.md): ``zoo.core`` (the mathematics), ``zoo.query``
(the query language), ``zoo.storage`` (the database), ``zoo.catalog`` (enumeration,
classification, build and the read service), ``zoo.pictures``, ``zoo.interchange`` and
``zoo.publish``, and the faces ``zoo.cli``. Imports run one way, down the layers.
"""

from zoo.core.params import ParameterSet, parse_params
from zoo.errors import ZooError
from zoo.version import __version__

__all__ = ["ParameterSet", "ZooError", "__version__", "parse_params"]
