"""The version of zoo, in a module of its own so that every layer can name it without
importing the package's public interface."""

__version__ = "0.1.0"
