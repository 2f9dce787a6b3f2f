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
class Option:
    """A key of a model's own ``[fire.<curve>]`` table: a number [``unit``] with lo < v <= hi (lo <= v where
    ``lo_open`` is False), a list of such numbers (``many``), required or with a ``default``."""

    key: str
    unit: str
    lo: float
    hi: float
    required: bool = True
    default: Any = None
    lo_open: bool = True
    many: bool = False
    help: str = ""


@dataclass
class Exposure:
    """What each member sees of a fire that differs from member to member: gas temperatures [C] on the
    run's grid, one column per exposure (T x F); ``member_columns[i]``: the columns member i is checked
    against (the worst governs); ``column_labels``: what each column is (e.g. the fire size).

    A heat-flux exposure enters as its adiabatic surface temperature (:mod:`.surface`), which gives the
    net flux of EN 1991-1-2 eq (3.1)/(C.9) exactly with the fire's alpha_c and emissivity."""

    gas_C: np.ndarray
    member_columns: list
    column_labels: list
    series: dict = field(default_factory=dict)


@dataclass(frozen=True)
class FireSetup:
    """What a fire model is built from (plain values: models never read the case file).

    ``severity``: the compartment's fire-severity values (:func:`steelfire.models.fire.compartment.
    fire_severity`) where the case gives a compartment and a fire load, else None; ``table`` a
    tabulated curve where the case gives one; ``options`` the model's own ``[fire.<curve>]`` table
    (:class:`Option` keys, read and checked by the case loader); ``heat_release`` a heat-release history
    read from a file; ``positions`` each member's ``position`` table (or None).
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
    heat_release: Any = None
    positions: tuple = ()
    emissivity_resultant: float = 0.7


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
    ``exposure(time_s)``: for a fire that differs from member to member, each member's exposure
    (:class:`Exposure`; ``gas_temperature_C`` then gives the hottest of them, for the outputs);
    ``series(time_s)``: histories the outputs plot (name -> array), e.g. the heat release.
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
    exposure: Callable[[np.ndarray], Exposure] | None = None
    series: Callable[[np.ndarray], dict] | None = None


def convection(setup: FireSetup, code_name: str) -> float:
    """alpha_c [W/(m2 K)]: the case's ``convection_coefficient`` if given, else the code value ``code_name``."""
    if setup.convection_coefficient is not None:
        return float(setup.convection_coefficient)
    return float(setup.code[code_name])
