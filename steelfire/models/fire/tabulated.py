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
QUANTITIES = (Quantity("source_file", "table of the design fire", "", "", "case file, [fire] file"),
              Quantity("reversals_per_hour", "rise/fall reversals of the table", "", "1/h",
                       f"swings above {2.0:g} C counted (steelfire)"),
              Quantity("smoothing_s", "moving-average window applied", "", "s", "case file, [fire] smoothing_s"))

#: A rise and a fall of the gas count as a reversal when the swing between them exceeds this [C].
REVERSAL_SWING_C = 2.0
#: Above this many reversals per hour a measured curve is called jagged [1/h].
JAGGED_PER_HOUR = 6.0


def reversals_per_hour(time_s, temperature_C, swing_C=REVERSAL_SWING_C) -> float:
    """How often the curve turns between rising and falling by more than ``swing_C``, per hour (the swings of
    a measured curve's noise; EN 1993-1-2 eq (4.27) adds heat on every fall, common practice, no source)."""
    t = np.asarray(time_s, dtype=float)
    y = np.asarray(temperature_C, dtype=float)
    extreme = y[0]
    direction = 0
    count = 0
    for v in y[1:]:
        if direction >= 0 and v > extreme:
            extreme, direction = v, 1
        elif direction <= 0 and v < extreme:
            extreme, direction = v, -1
        elif abs(v - extreme) > swing_C:
            count += 1
            extreme, direction = v, -direction
    hours = (t[-1] - t[0]) / 3600.0
    return count / hours if hours > 0 else 0.0


def smoothed(fire: "TabulatedFire", window_s: float) -> "TabulatedFire":
    """The curve averaged over a centred moving window of ``window_s`` seconds (resampled every second; the
    ends use the part of the window inside the table). A documented filter for noisy measured curves."""
    t = np.arange(fire.time_s[0], fire.time_s[-1] + 0.5, 1.0)
    y = np.interp(t, fire.time_s, fire.temperature_C)
    half = max(int(round(window_s / 2.0)), 1)
    c = np.concatenate([[0.0], np.cumsum(y)])
    lo = np.clip(np.arange(len(t)) - half, 0, len(t))
    hi = np.clip(np.arange(len(t)) + half + 1, 0, len(t))
    return TabulatedFire(t, (c[hi] - c[lo]) / (hi - lo), fire.source)


def design_fire(setup: FireSetup) -> DesignFire:
    """A tabulated gas curve (``setup.table``, a :class:`TabulatedFire`) as a design fire: every table row
    on the grid, alpha_c of a natural fire (EN 1991-1-2 3.3.1.1(3)) unless the case sets its own; it
    cools if any row is lower than the one before."""
    tf = setup.table
    rev = reversals_per_hour(tf.time_s, tf.temperature_C)
    window = float(setup.options.get("smoothing_s") or 0.0)
    warnings = []
    if rev > JAGGED_PER_HOUR:
        warnings.append(
            f"The tabulated fire {tf.source} is jagged ({rev:.0f} rise/fall reversals per hour above {REVERSAL_SWING_C:g} C): "
            "EN 1993-1-2 eq (4.27) adds heat to protected steel on every fall of the gas, so its results on such a "
            "curve are doubtful; the conduction model is run beside it, and [fire] smoothing_s can filter the noise.")
    key = tuple(tf.time_s)
    if window > 0.0:
        tf = smoothed(tf, window)
        key = ()
        warnings.append(f"The tabulated fire is smoothed by a {window:g} s moving average ([fire] smoothing_s).")
    return DesignFire(curve="table", gas_temperature_C=tf.gas_temperature, alpha_c=convection(setup, "alpha_c_natural"),
                      cools=bool(np.any(np.diff(tf.temperature_C) < 0)), key_times_s=key,
                      values={"source_file": tf.source, "reversals_per_hour": rev, "smoothing_s": window},
                      quantities=QUANTITIES, warnings=warnings)


#: What a tabulated fire needs from the case.
NEEDS = ("table",)
