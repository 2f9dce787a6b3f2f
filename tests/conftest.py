"""Test session set-up: the numba kernels compiled once, before the test processes start.

The kernels of steelfire.models.heat and steelfire.models.conduction are cached on disk
(``cache=True``). In a fresh clone the cache is empty and each process that runs them compiles them
first (about a minute of one core in all); with pytest-xdist every worker would do so. Here the
controlling process (or the only one, without xdist) compiles them in four short processes side by
side before any test runs, so that the test processes load them from the cache. Nothing here changes
what a test computes; if the warm-up fails, the tests compile the kernels themselves (and show any
error).
"""

from __future__ import annotations

import subprocess
import sys

# one call per kernel variant the package uses: rows in one fire (the gas as a column) and rows in
# several fires (the gas as a matrix); bare rows, protected rows, and the conduction model
_HEAT = """
import numpy as np
from steelfire.models import heat
t = np.arange(0.0, 61.0, 5.0)
g = np.column_stack([np.linspace(20.0, 500.0, t.size), np.linspace(20.0, 400.0, t.size)])
for fire in ([0, 0], [0, 1]):
    rows = heat.uniform_rows(2, bare={bare}, section_factor_per_m=100.0, thickness_m=0.02, density=800.0,
                             specific_heat=1700.0, conductivity=0.2, fire=fire)
    heat.run(heat.Fires(t, g), rows, emissivity_resultant=0.7, steel_density_kg_m3=7850.0)
heat.expm1_scaled(0.1, heat.EXPM1_TERMS)
heat.heat_capacity_fraction(20.0, 7850.0, heat.SPECIFIC_HEAT_TERMS)
heat._chunking(10, 2)
"""
_CONDUCTION = """
import numpy as np
from steelfire.models import conduction
t = np.arange(0.0, 601.0, 60.0)
g = np.linspace(20.0, 500.0, t.size)
conduction.protected_steel_temperature(t, g, 200.0, 0.02, 800.0, 1700.0, 0.2, moisture_percent={moisture})
"""
# the conduction model has two kernels: dry members with a constant conductivity, and the others
WARM_UP = (_HEAT.format(bare=True), _HEAT.format(bare=False), _CONDUCTION.format(moisture=0.0),
           _CONDUCTION.format(moisture=5.0))


def _warm_numba_cache():
    procs = [subprocess.Popen([sys.executable, "-c", code], stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
             for code in WARM_UP]
    for p in procs:
        try:
            p.wait(timeout=600)
        except subprocess.TimeoutExpired:
            p.kill()


def pytest_configure(config):
    if hasattr(config, "workerinput"):  # an xdist worker: the controlling process has warmed the cache
        return
    if config.getoption("collectonly", False):
        return
    _warm_numba_cache()
