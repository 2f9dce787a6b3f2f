"""Time equivalence of many fires at once: :mod:`steelfire.models.equivalence` over arrays.

EN 1991-1-2 Annex F eq (F.1)-(F.2) and the CIB W14 formula for fires that differ in their design fire
load q_f,d, open vertical opening area A_v, thermal inertia b and opening factor O (sampled fires; the
compartment's A_f, H, A_t, h_eq and A_h are common). Each factor is taken from the one-fire module's own
functions (Table F.2 k_b, eq (F.2) w_f, Table F.1 k_c, the CIB W14 c and w), called once per distinct
input value, and multiplied as the one-fire functions multiply them, so every time equals
:func:`~steelfire.models.equivalence.annex_f_time_equivalence` /
:func:`~steelfire.models.equivalence.cib_w14_time_equivalence` of that fire to the bit (held in
tests/test_sampling.py); no formula is restated here. The eq (F.3) small-compartment alternative is not
evaluated.

Cost: one call per distinct value, about 15 us per fire when every fire differs (100,000 fires in
about 1.5 s), nothing when a variable is not sampled. Inputs are assumed clean (positive, finite):
they come from the sampling chain, which validated the case and draws positive values.
"""

from __future__ import annotations

import numpy as np

from steelfire.models import equivalence as eq


def _per_distinct(x, fn) -> np.ndarray:
    """``fn`` of each element of ``x``, called once per distinct value."""
    x = np.asarray(x, dtype=float)
    u, inv = np.unique(x, return_inverse=True)
    return np.array([fn(float(v)) for v in u], dtype=float)[inv.reshape(x.shape)]


def annex_f_times_min(design_fire_load_MJ_m2, vertical_opening_area_m2, thermal_inertia, opening_factor_m05, *,
                      floor_area_m2: float, height_m: float, roof_opening_area_m2: float = 0.0,
                      protected: bool = True, code=None):
    """Equivalent times t_e,d = (q_f,d k_b w_f) k_c [min] of many fires, EN 1991-1-2 Annex F eq (F.1).

    k_b from b (:func:`~steelfire.models.equivalence.annex_f_conversion_factor`), w_f from A_v by eq (F.2)
    with its validity handling (:func:`~steelfire.models.equivalence.annex_f_ventilation_factor`), k_c = 1
    for protected steel or 13.7 O for bare steel (:func:`~steelfire.models.equivalence.
    annex_f_correction_factor`).

    Parameters
    ----------
    design_fire_load_MJ_m2, vertical_opening_area_m2, thermal_inertia, opening_factor_m05 : array_like
        Per fire: q_f,d [MJ/m2 of floor], open A_v [m2], b [J/(m2 s^0.5 K)], O [m^0.5] (bare steel only).
    floor_area_m2, height_m, roof_opening_area_m2 : float
        A_f [m2], H [m], A_h [m2] of the compartment.
    protected : bool
        Protected steel or bare steel.
    code : mapping, optional
        Code values (the case's ``[code]``); the recommended values where absent.

    Returns
    -------
    (t_e_min, alpha_v_raw) : arrays
        The equivalent times [min], and A_v / A_f per fire (eq (F.2) holds for 0.025 <= alpha_v <= 0.25:
        the caller counts the fires outside it).

    Examples
    --------
    Hand calculation (A_f = 100 m2, H = 6 m, A_v = 20 m2, no roof openings, b = 1000, protected,
    q_f,d = 600 MJ/m2): alpha_v = 0.2, w_f = 0.62 + 90 x 0.2^4 = 0.764, k_b = 0.055,
    t_e,d = 600 x 0.055 x 0.764 = 25.212 min:

    >>> t, a = annex_f_times_min([600.0], [20.0], [1000.0], [0.04], floor_area_m2=100.0, height_m=6.0)
    >>> round(float(t[0]), 6), float(a[0])
    (25.212, 0.2)
    """
    v = eq._code_values(code, eq._ANNEX_F_PREFIX)
    q = np.asarray(design_fire_load_MJ_m2, dtype=float)
    a_v = np.asarray(vertical_opening_area_m2, dtype=float)
    k_b = _per_distinct(thermal_inertia, lambda b: eq._annex_f_kb(b, v)[0])
    w_f = _per_distinct(a_v, lambda x: eq._annex_f_wf(floor_area_m2, height_m, x, roof_opening_area_m2, v).w_f)
    if protected:
        k_c = eq._annex_f_kc(True, "steel", None, v)[0]
    else:
        k_c = _per_distinct(opening_factor_m05, lambda o: eq._annex_f_kc(False, "steel", o, v)[0])
    return q * k_b * w_f * k_c, a_v / floor_area_m2  # eq (F.1), in the one-fire function's order


def cib_w14_times_min(design_fire_load_MJ_m2, vertical_opening_area_m2, thermal_inertia, *, floor_area_m2: float,
                      total_area_m2: float, opening_height_m: float, code=None):
    """Equivalent times t_e = c w q_f,d [min] of many fires by the CIB W14 formula (protected members only),
    w = A_f / sqrt(A_v A_t sqrt(h_eq)) [m^-0.25] (:func:`~steelfire.models.equivalence.
    cib_w14_ventilation_factor`), c by thermal-inertia band (:func:`~steelfire.models.equivalence.
    cib_w14_conversion_factor`; CIB W14 design guide, 1986, values from memory). Roof openings have no term
    in the formula.

    >>> t = cib_w14_times_min([400.0], [16.0], [1000.0], floor_area_m2=100.0, total_area_m2=400.0,
    ...                       opening_height_m=1.0)
    >>> round(float(t[0]), 6)  # hand calculation: w = 100 / sqrt(16 x 400 x 1) = 1.25; 0.07 x 1.25 x 400
    35.0
    """
    v = eq._code_values(code, eq._CIB_W14_PREFIX)
    q = np.asarray(design_fire_load_MJ_m2, dtype=float)
    c = _per_distinct(thermal_inertia, lambda b: eq._cib_c(b, v)[0])
    w = _per_distinct(vertical_opening_area_m2, lambda a_v: eq.cib_w14_ventilation_factor(
        floor_area_m2=floor_area_m2, vertical_opening_area_m2=a_v, total_area_m2=total_area_m2,
        opening_height_m=opening_height_m))
    return c * w * q  # in the one-fire function's order
