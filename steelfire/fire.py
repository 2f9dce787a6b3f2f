"""The design-fire models under their short import name: ``from steelfire.fire import parametric``.

They live in :mod:`steelfire.models.fire`; this module only names them.
"""

from steelfire.models.fire import compartment, fireload, nominal, parametric, tabulated  # noqa: F401
