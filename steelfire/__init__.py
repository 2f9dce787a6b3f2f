"""steelfire: fire resistance of steel members under design fires (EN 1991-1-2, EN 1993-1-2).

Python API::

    import steelfire
    case = steelfire.load_case("cases/office_bay.toml")
    result = steelfire.analyse(case)          # or steelfire.size(case)
    result.members[0].peak_steel_temperature_C
    steelfire.write_outputs(result, "out", case=case)

Physics functions are importable on their own (``from steelfire.fire import parametric``).
"""

from steelfire._version import __version__  # noqa: E402

__all__ = ["__version__", "load_case", "analyse", "size", "write_outputs", "document", "dataframe", "InputError"]

from steelfire.errors import InputError  # noqa: E402


def _numba_cache_dir():
    """numba keeps its compiled kernels beside the package; where that folder cannot be written (an install
    owned by another user, a read-only image), a user cache folder is used instead (XDG_CACHE_HOME or
    ~/.cache, else the temporary folder). Set NUMBA_CACHE_DIR to choose one."""
    import os
    import tempfile
    from pathlib import Path

    if os.environ.get("NUMBA_CACHE_DIR"):
        return
    here = Path(__file__).resolve().parent / "models"
    if os.access(here, os.W_OK) and (not (here / "__pycache__").exists() or os.access(here / "__pycache__", os.W_OK)):
        return
    for base in (os.environ.get("XDG_CACHE_HOME"), Path.home() / ".cache" if Path.home() else None,
                 Path(tempfile.gettempdir())):
        if base is None:
            continue
        d = Path(base) / f"steelfire-numba-{os.getuid() if hasattr(os, 'getuid') else 'user'}"
        try:
            d.mkdir(parents=True, exist_ok=True)
        except OSError:
            continue
        if os.access(d, os.W_OK):
            os.environ["NUMBA_CACHE_DIR"] = str(d)
            return


_numba_cache_dir()


def load_case(path):
    """Read and validate a case file (TOML); see :func:`steelfire.inputs.case.load_case`."""
    from steelfire.inputs.case import load_case as _load

    return _load(path)


def analyse(case, histories: bool = True):
    """Run a case; see :func:`steelfire.chain.analysis.analyse`."""
    from steelfire.chain.analysis import analyse as _analyse

    return _analyse(case, histories=histories)


def size(case, histories: bool = True):
    """Size the protection of every member, then check at the chosen thicknesses; see
    :func:`steelfire.chain.sizing.size`."""
    from steelfire.chain.sizing import size as _size

    return _size(case, histories=histories)


def write_outputs(result, folder, case=None, case_path=None):
    """Write results.json, the CSV tables, the figures and report.html into ``folder``; see
    :func:`steelfire.outputs.files.write_outputs`."""
    from steelfire.outputs.files import write_outputs as _write

    if case_path is None and case is not None:
        case_path = case.source
    return _write(result, folder, case_path, case=case)


def document(result) -> dict:
    """The result document of a run (what ``--json`` prints); see :func:`steelfire.outputs.document.build`."""
    from steelfire.outputs.document import build

    return build(result)


def dataframe(result):
    """The members' results as a pandas DataFrame (one row per member, the document's member keys, nested
    entries flattened with dots); needs pandas (an optional dependency)."""
    try:
        import pandas as pd
    except ImportError:
        raise ImportError("steelfire.dataframe needs pandas: python -m pip install pandas") from None
    return pd.json_normalize(document(result)["members"])
