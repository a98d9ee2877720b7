"""The version of zoo, in a module of its own so that every layer can name it without
importing the package's public interface."""

__version__ = "0.1.0"

#: The name zoo is installed under (``pip install cycloid-zoo``); the import package and the
#: command are ``zoo``. The index's ``zoo`` is an unrelated project.
DISTRIBUTION_NAME = "cycloid-zoo"

#: The landing page of the project, cited by ``zoo cite`` and CITATION.cff and named in
#: pyproject.toml. A placeholder until the project has a public address.
HOMEPAGE = "https://example.org/cycloid-zoo"
