"""What every fire model returns: a design fire with its intermediate values and their report rows.

A fire model is one module of :mod:`steelfire.models.fire` with a function ``design_fire(setup)``
taking a :class:`FireSetup` and returning a :class:`DesignFire`; the registry
(:data:`steelfire.models.fire.MODELS`) maps each ``[fire] curve`` name to its module. The analysis
chain, the JSON document, the terminal table, the report and the plots read the design fire and its
:class:`Quantity` rows, and need no edit when a model is added.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, Callable, Mapping

import numpy as np


@dataclass(frozen=True)
class Quantity:
    """One intermediate value of a design fire, as the outputs show it.

    ``key`` names it in the JSON ``fire`` object; ``digits`` is the number of decimals it is given to
    (None: six significant figures).
    """

    key: str
    label: str
    symbol: str
    unit: str
    clause: str
    digits: int | None = None


@dataclass(frozen=True)
class FireSetup:
    """What a fire model is built from (plain values: models never read the case file).

    ``severity``: the compartment's fire-severity values (:func:`steelfire.models.fire.compartment.
    fire_severity`) where the case gives a compartment and a fire load, else None; ``table`` a
    tabulated curve where the case gives one; ``options`` the model's own ``[fire.<curve>]`` table.
    """

    curve: str
    duration_min: float
    code: Mapping[str, float]
    convection_coefficient: float | None = None
    allow_out_of_scope: bool = False
    compartment: Any = None
    fire_load: Any = None
    severity: Mapping[str, Any] | None = None
    table: Any = None
    options: Mapping[str, Any] = field(default_factory=dict)


@dataclass
class DesignFire:
    """A design fire: gas temperature against time and what the outputs say about it.

    ``gas_temperature_C(time_s)`` gives the gas temperature [C] at times [s] (a fire the same for every
    member); ``key_times_s`` are times the grid must hold (t_max, burnout, table rows); ``alpha_c``
    the convective coefficient [W/(m2 K)]; ``cools`` whether the fire has a cooling phase; ``nominal``
    whether it is a nominal curve (members judged against their required period; EN 1993-1-2 eq
    (4.26a) for the shadow factor). ``values``: the intermediate values by key, shown in the order of
    ``quantities``; ``out_of_scope``: findings computed anyway (allow_out_of_scope); ``equivalence``:
    None where the time-equivalence formulas may be set beside it, else the reason they may not.
    """

    curve: str
    gas_temperature_C: Callable[[np.ndarray], np.ndarray]
    alpha_c: float
    cools: bool
    nominal: bool = False
    key_times_s: tuple = ()
    values: dict = field(default_factory=dict)
    quantities: tuple = ()
    warnings: list = field(default_factory=list)
    out_of_scope: list = field(default_factory=list)
    equivalence: str | None = None


def convection(setup: FireSetup, code_name: str) -> float:
    """alpha_c [W/(m2 K)]: the case's ``convection_coefficient`` if given, else the code value ``code_name``."""
    if setup.convection_coefficient is not None:
        return float(setup.convection_coefficient)
    return float(setup.code[code_name])
