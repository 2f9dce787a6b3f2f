"""Nominal temperature-time curves, EN 1991-1-2 3.2.

Times in seconds at the interface, minutes inside the formulas as the standard writes them.
"""

from __future__ import annotations

import numpy as np

from steelfire.models.fire.design import DesignFire, FireSetup, convection


def standard_fire(time_s):
    """Gas temperature [C] of the standard temperature-time curve (ISO 834) at ``time_s`` [s].

    EN 1991-1-2 3.2.1, eq (3.4): theta_g = 20 + 345 log10(8 t + 1), t in minutes.
    """
    t_min = np.asarray(time_s, dtype=float) / 60.0
    return 20.0 + 345.0 * np.log10(8.0 * np.maximum(t_min, 0.0) + 1.0)


def external_fire(time_s):
    """Gas temperature [C] of the external fire curve at ``time_s`` [s].

    EN 1991-1-2 3.2.2, eq (3.5): theta_g = 660 (1 - 0.687 e^(-0.32 t) - 0.313 e^(-3.8 t)) + 20, t in minutes.
    """
    t_min = np.maximum(np.asarray(time_s, dtype=float) / 60.0, 0.0)
    return 660.0 * (1.0 - 0.687 * np.exp(-0.32 * t_min) - 0.313 * np.exp(-3.8 * t_min)) + 20.0


def hydrocarbon_fire(time_s):
    """Gas temperature [C] of the hydrocarbon curve at ``time_s`` [s].

    EN 1991-1-2 3.2.3, eq (3.6): theta_g = 1080 (1 - 0.325 e^(-0.167 t) - 0.675 e^(-2.5 t)) + 20, t in minutes.
    """
    t_min = np.maximum(np.asarray(time_s, dtype=float) / 60.0, 0.0)
    return 1080.0 * (1.0 - 0.325 * np.exp(-0.167 * t_min) - 0.675 * np.exp(-2.5 * t_min)) + 20.0


#: curve name -> function of time [s]; the case file's ``fire.curve`` values for nominal curves.
NOMINAL_CURVES = {
    "standard": standard_fire,
    "external": external_fire,
    "hydrocarbon": hydrocarbon_fire,
}


def design_fire(setup: FireSetup) -> DesignFire:
    """The nominal curve ``setup.curve`` (standard, external or hydrocarbon) as a design fire: heating
    only, alpha_c of EN 1991-1-2 3.2.1(3) / 3.2.2(2) / 3.2.3(2) unless the case sets its own."""
    return DesignFire(curve=setup.curve, gas_temperature_C=NOMINAL_CURVES[setup.curve],
                      alpha_c=convection(setup, f"alpha_c_{setup.curve}"), cools=False, nominal=True)
