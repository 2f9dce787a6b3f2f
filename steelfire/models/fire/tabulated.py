"""A gas temperature-time curve given as a table (measured or from a fire model), read from CSV."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from steelfire.models.fire.design import DesignFire, FireSetup, Quantity, convection


@dataclass(frozen=True)
class TabulatedFire:
    """Gas temperature linear between the points of a table; held at its last value past the end."""

    time_s: np.ndarray
    temperature_C: np.ndarray
    source: str

    def gas_temperature(self, time_s):
        """Gas temperature [C] at ``time_s`` [s], linear between the tabulated points."""
        return np.interp(np.asarray(time_s, dtype=float), self.time_s, self.temperature_C)


#: What the outputs show of a tabulated fire besides the gas curve.
QUANTITIES = (Quantity("source_file", "table of the design fire", "", "", "case file, [fire] file"),)


def design_fire(setup: FireSetup) -> DesignFire:
    """A tabulated gas curve (``setup.table``, a :class:`TabulatedFire`) as a design fire: every table row
    on the grid, alpha_c of a natural fire (EN 1991-1-2 3.3.1.1(3)) unless the case sets its own; it
    cools if any row is lower than the one before."""
    tf = setup.table
    return DesignFire(curve="table", gas_temperature_C=tf.gas_temperature, alpha_c=convection(setup, "alpha_c_natural"),
                      cools=bool(np.any(np.diff(tf.temperature_C) < 0)), key_times_s=tuple(tf.time_s),
                      values={"source_file": tf.source}, quantities=QUANTITIES)


#: What a tabulated fire needs from the case.
NEEDS = ("table",)
