"""Design fires: nominal curves, the Annex A parametric fire, compartment quantities, fire loads."""

from steelfire.models.fire import compartment, fireload, nominal, parametric, tabulated  # noqa: F401
