"""zoo: a research catalog of Petri's cycloids C(alpha, beta, gamma, delta).

The core (``params``, ``algebra``, ``invariants``, ``net``, ``canonical``, ``behaviour``)
imports neither the storage layer nor the command line.
"""

from zoo.errors import ZooError
from zoo.params import ParameterSet, parse_params

__version__ = "0.1.0"

__all__ = ["ParameterSet", "ZooError", "__version__", "parse_params"]
