"""Design-fire models, one module each, and the registry that maps a ``[fire] curve`` name to its model.

Each model module has ``design_fire(setup: FireSetup) -> DesignFire`` (:mod:`.design`) and may say
what it needs from the case in ``NEEDS`` (``"compartment"``, ``"fire_load"``, ``"table"``). Adding a
model is one module and one line of :data:`MODELS`.
"""

from steelfire.models.fire import localised, nominal, parametric, tabulated, travelling
from steelfire.models.fire.design import DesignFire, FireSetup, Quantity  # noqa: F401

#: curve name -> model module.
MODELS = {
    "parametric": parametric,
    "standard": nominal,
    "hydrocarbon": nominal,
    "external": nominal,
    "table": tabulated,
    "localised": localised,
    "travelling": travelling,
}


def design_fire(setup: FireSetup) -> DesignFire:
    """The design fire of ``setup.curve`` (see :data:`MODELS`)."""
    return MODELS[setup.curve].design_fire(setup)


def needs(curve: str) -> tuple:
    """What the model of ``curve`` needs from the case: names of case tables."""
    return tuple(getattr(MODELS[curve], "NEEDS", ()))


def options(curve: str) -> tuple:
    """The keys of the model's own ``[fire.<curve>]`` table (:class:`.design.Option`)."""
    return tuple(getattr(MODELS[curve], "OPTIONS", ()))


def position_keys(curve: str) -> tuple:
    """The keys of a member's ``position`` table the model needs (empty: no position)."""
    return tuple(getattr(MODELS[curve], "POSITION_KEYS", ()))
