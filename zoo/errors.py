"""The exceptions of zoo.

Every error a user can cause is a ``ZooError`` whose message is one line naming the thing, the
rule, the value and the fix. Subclasses also inherit the builtin a caller would catch.
"""

from typing import Any


class ZooError(Exception):
    """Base class of every error zoo raises on purpose."""


class ParameterError(ZooError, ValueError):
    """A parameter set (alpha, beta, gamma, delta) is malformed or out of range."""


class LimitExceeded(ZooError, RuntimeError):
    """An explicit computation would pass a size limit (states, transitions, file size)."""


class QuerySyntaxError(ZooError, ValueError):
    """A catalog query does not parse; ``position`` is the offset of the offending text."""

    def __init__(self, message: str, query: str = "", position: int = 0) -> None:
        super().__init__(message)
        self.query = query
        self.position = position

    def caret_text(self) -> str:
        """The query with a caret under the offending text, for terminal output."""
        return f"{self.query}\n{' ' * self.position}^"


class CatalogError(ZooError, RuntimeError):
    """The catalog database is missing, outdated, inconsistent or cannot be written."""


class NotInCatalog(ZooError, LookupError):
    """An identifier or parameter set is not held by the catalog."""


class FormatError(ZooError, ValueError):
    """An input file (PNML, net text, seeds data) is malformed, unsafe or unsupported."""


class MissingExtra(ZooError, ImportError):
    """An optional part of zoo is used but its extra (pyproject.toml) is not installed."""


def extra_advice(module: str, extra: str, purpose: str) -> str:
    """The one line that says which extra to install for ``purpose``."""
    from zoo.version import DISTRIBUTION_NAME

    return (
        f"{purpose} needs {module}, which is not installed; install it with: "
        f"pip install '{DISTRIBUTION_NAME}[{extra}]'"
    )


def import_extra(module: str, extra: str, purpose: str) -> Any:
    """Import ``module`` of the optional ``extra``, or raise MissingExtra naming the extra.

    >>> import_extra("json", "none", "reading JSON").__name__
    'json'
    """
    import importlib

    try:
        return importlib.import_module(module)
    except ImportError:
        raise MissingExtra(extra_advice(module.split(".")[0], extra, purpose)) from None
