"""The version of steelfire (one place; the package and the documents read it)."""

__version__ = "0.2.0.dev0"
