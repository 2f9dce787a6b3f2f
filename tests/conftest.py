"""Test session set-up: the numba kernels compiled once, before the test processes start.

The kernels of steelfire.models.heat and steelfire.models.conduction are cached on disk
(``cache=True``). In a fresh clone the cache is empty and each process that runs them compiles them
first (about a minute of one core in all); with pytest-xdist every worker would do so. Here the
controlling process (or the only one, without xdist) has steelfire.models.kernels.prepare compile the
missing ones in short processes side by side before any test runs (as the CLI does on its first run), so
that the test processes load them from the cache. Nothing here changes
what a test computes; if the warm-up fails, the tests compile the kernels themselves (and show any
error).
"""

from __future__ import annotations


def _warm_numba_cache():
    try:
        from steelfire.models import kernels
    except Exception:   # the tests will show the import error
        return
    kernels.prepare(quiet=True)


def pytest_configure(config):
    if hasattr(config, "workerinput"):  # an xdist worker: the controlling process has warmed the cache
        return
    if config.getoption("collectonly", False):
        return
    _warm_numba_cache()
