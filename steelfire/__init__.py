"""steelfire: fire resistance of steel members under design fires (EN 1991-1-2, EN 1993-1-2).

Python API::

    import steelfire
    case = steelfire.load_case("cases/office_bay.toml")
    result = steelfire.analyse(case)
    result.members[0].peak_steel_temperature_C

Physics functions are importable on their own (``from steelfire.fire import parametric``).
"""

__version__ = "0.1.0"

__all__ = ["__version__", "load_case", "analyse", "InputError"]

from steelfire.errors import InputError  # noqa: E402


def load_case(path):
    """Read and validate a case file (TOML); see :func:`steelfire.case.load_case`."""
    from steelfire.inputs.case import load_case as _load

    return _load(path)


def analyse(case, histories: bool = True):
    """Run a case; see :func:`steelfire.analysis.analyse`."""
    from steelfire.chain.analysis import analyse as _analyse

    return _analyse(case, histories=histories)
