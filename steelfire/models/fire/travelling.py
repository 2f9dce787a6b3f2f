"""Travelling fire on a large open floor: a band of fire that moves along the floor's length.

Sources (cited from memory, not checked against the papers here; every formula below says which):

* J. Stern-Gottfried and G. Rein, "Travelling fires for structural design - Part II: Design
  methodology", Fire Safety Journal 54 (2012) 96-112 (the "original" form, SG&R 2012);
* E. Rackauskaite, C. Hamel, A. Law and G. Rein, "Improved formulation of travelling fires and
  application to concrete and steel structures", Structures 3 (2015) 250-260 (the "improved" form,
  iTFM 2015).

The model (one dimension, along the floor's length L; the fire spans the width W):

* burning time of a point of the floor: t_b = q_f,d / RHR_f (SG&R 2012; q_f,d [MJ/m2] -> J, RHR_f
  [kW/m2] -> W), each point burns for t_b;
* spread rate s [m/s] and fire length L_f = s t_b (iTFM 2015), or the fire size as a share of the
  floor, L_f = share L, s = L_f / t_b (SG&R 2012);
* kinematics of iTFM 2015: the fire starts at x = 0; the leading edge is at min(s t, L), the trailing
  edge at max(0, s (t - t_b)); so the fire grows over t_b, travels, and shrinks at the far end; the
  whole fire lasts t_total = t_b + L / s (iTFM 2015, as remembered; SG&R 2012 write the same duration
  as t_b (1 + 1 / share), from memory). Every point burns for exactly t_b, so the energy released is
  q_f,d L W whatever s. The limit s -> infinity (``spread_rate_m_s=math.inf``) is the uniform fire:
  the whole floor burns at once for t_b. (In this form the 100 % fire is not that limit: its leading
  edge takes t_b to cross the floor, and every point still sees the near field for t_b.)
* near field: the gas over the burning band is at T_nf, 800 to 1200 C (iTFM 2015; SG&R 2012 took
  1200 C); input ``near_field_C``;
* far field: elsewhere, Alpert's ceiling-jet temperature (:mod:`ceilingjet`) with the band's total
  heat release Q = RHR_f W (leading - trailing edge), capped at T_nf (both papers). The distance r
  is measured from the band's centre by default: the centre is the axis of the equivalent plume,
  which is what Alpert's r is measured from, and it is what both papers did as far as remembered
  (not checked against their text).
  ``far_field_origin="edge"`` measures r from the nearer edge of the band instead: hotter (a
  conservative variant for long bands), not the papers' choice. The flapping of the flame beyond
  the band that iTFM 2015 adds to the near field (from memory) is not modelled here.
* before the fire starts and after it has burnt out, 20 C (no cooling phase, as in both papers).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from steelfire.errors import InputError, OutOfScopeError
from steelfire.models.fire import ceilingjet
from steelfire.models.fire.heatrelease import as_times_s

#: Ambient and initial gas temperature [C].
AMBIENT_C = 20.0
#: Near-field temperatures of iTFM 2015 [C] (from memory); SG&R 2012 used 1200 C.
NEAR_FIELD_MIN_C, NEAR_FIELD_MAX_C = 800.0, 1200.0
#: Fire sizes as shares of the floor, SG&R 2012 (from memory: 1, 2.5, 5, 10, 25, 50, 75, 100 %).
FIRE_SIZES = (0.01, 0.025, 0.05, 0.10, 0.25, 0.50, 0.75, 1.00)
FAR_FIELD_ORIGINS = ("centre", "edge")


def burning_time_s(design_fire_load_MJ_m2, heat_release_density_kW_m2) -> float:
    """Burning time of a point of the floor t_b = q_f,d / RHR_f [s] (SG&R 2012).

    Hand calculation: 570 MJ/m2 at 500 kW/m2 -> 570e6 / 500e3 = 1140 s (19 min).

    >>> burning_time_s(570.0, 500.0)
    1140.0
    """
    q = _positive("design_fire_load_MJ_m2", design_fire_load_MJ_m2, "MJ/m2")
    rhr = _positive("heat_release_density_kW_m2", heat_release_density_kW_m2, "kW/m2")
    return q * 1e6 / (rhr * 1e3)


def _positive(field, value, unit, allow_inf=False):
    ok = isinstance(value, (int, float, np.floating)) and not isinstance(value, bool) and value > 0
    ok = ok and (math.isfinite(value) or (allow_inf and value == math.inf))
    if not ok:
        raise InputError(field, value, f"must be a {'' if allow_inf else 'finite '}number > 0 [{unit}]")
    return float(value)


@dataclass(frozen=True)
class TravellingFire:
    """A travelling fire on a floor of ``length_m`` x ``width_m`` (see the module notes for the model)."""

    length_m: float                     # L [m], the direction of travel
    width_m: float                      # W [m], spanned by the fire
    ceiling_height_m: float             # H above the fuel [m]
    burning_time_s: float               # t_b [s]
    spread_rate_m_s: float              # s [m/s]; inf = the whole floor at once
    heat_release_density_kW_m2: float   # RHR_f [kW/m2]
    near_field_C: float                 # T_nf [C]
    far_field_origin: str = "centre"    # r from the band's "centre" or its nearer "edge"

    @property
    def fire_length_m(self) -> float:
        """Length of the burning band once fully grown, L_f = min(s t_b, L) [m]."""
        return min(self.spread_rate_m_s * self.burning_time_s, self.length_m)

    @property
    def share(self) -> float:
        """Fire size as a share of the floor, L_f / L [-]."""
        return self.fire_length_m / self.length_m

    @property
    def total_duration_s(self) -> float:
        """t_total = t_b + L / s [s] (iTFM 2015)."""
        return self.burning_time_s + self.length_m / self.spread_rate_m_s

    @property
    def fire_load_J(self) -> float:
        """Energy of the floor's fire load, q_f,d L W = RHR_f t_b L W [J]."""
        return self.heat_release_density_kW_m2 * 1e3 * self.burning_time_s * self.length_m * self.width_m

    def ignition_time_s(self, position_m):
        """Time the fire reaches ``position_m`` [s]: x / s (0 everywhere for s = inf)."""
        return self._positions(position_m) / self.spread_rate_m_s

    def key_times_s(self, position_m=()):
        """Times where the histories have kinks or steps, to put on a time grid: t_b, L/s, t_total,
        and the ignition and burnout times of the given positions."""
        ig = np.atleast_1d(self.ignition_time_s(position_m))
        times = np.concatenate([[self.burning_time_s, self.length_m / self.spread_rate_m_s, self.total_duration_s],
                                ig, ig + self.burning_time_s])
        return tuple(float(x) for x in np.unique(times))

    def edges_m(self, time_s):
        """(trailing edge, leading edge) of the burning band at ``time_s`` [m] (iTFM 2015 kinematics)."""
        t = as_times_s(time_s)
        s, tb, ln = self.spread_rate_m_s, self.burning_time_s, self.length_m
        if math.isinf(s):
            lead = np.full_like(t, ln)
            trail = np.where(t < tb, 0.0, ln)
        else:
            lead = np.minimum(s * t, ln)
            trail = np.clip(s * (t - tb), 0.0, ln)
        return trail, lead

    def heat_release_W(self, time_s):
        """Heat release of the burning band [W]: Q = RHR_f W (leading - trailing edge)."""
        trail, lead = self.edges_m(time_s)
        return self.heat_release_density_kW_m2 * 1e3 * self.width_m * (lead - trail)

    def gas_temperature_C(self, time_s, position_m):
        """Gas temperature [C] at ``position_m`` along the floor, shape (T,) for one position, (T, P)
        for P positions.

        T_nf while the point burns (x/s <= t < x/s + t_b); elsewhere, while some of the floor burns,
        min(T_nf, Alpert(Q, r, H)); 20 C before and after the fire (module notes give the sources).
        """
        t = as_times_s(time_s)
        x = self._positions(position_m)
        tt = t.reshape(t.shape + (1,) * x.ndim)
        trail, lead = (e.reshape(tt.shape) for e in self.edges_m(t))
        q = self.heat_release_density_kW_m2 * 1e3 * self.width_m * (lead - trail)
        ignition = x / self.spread_rate_m_s
        burning = (tt >= ignition) & (tt < ignition + self.burning_time_s)
        if self.far_field_origin == "centre":
            r = np.abs(x - 0.5 * (lead + trail))
        else:
            r = np.maximum(np.maximum(trail - x, x - lead), 0.0)
        far = np.minimum(ceilingjet.ceiling_jet_temperature_C(r, q, self.ceiling_height_m, AMBIENT_C),
                         self.near_field_C)
        return np.where(burning, self.near_field_C, np.where(q > 0.0, far, AMBIENT_C))

    def _positions(self, position_m):
        x = np.asarray(position_m, dtype=float)
        bad = ~np.isfinite(x) | (x < 0.0) | (x > self.length_m)
        if np.any(bad):
            raise InputError("position_m", x[bad].flat[0].item(),
                             f"must lie on the floor, 0 to {self.length_m:g} m along its length")
        return x


def travelling_fire(length_m, width_m, ceiling_height_m, design_fire_load_MJ_m2, heat_release_density_kW_m2,
                    near_field_C, share=None, spread_rate_m_s=None, far_field_origin="centre",
                    allow_out_of_scope=False) -> TravellingFire:
    """A travelling fire given its size as a ``share`` of the floor (SG&R 2012) or its ``spread_rate_m_s``
    (iTFM 2015); exactly one of the two.

    share: L_f = share L, s = L_f / t_b; spread rate: L_f = min(s t_b, L). t_b = q_f,d / RHR_f.
    ``near_field_C`` outside 800-1200 C (iTFM 2015) raises OutOfScopeError unless ``allow_out_of_scope``.

    Examples
    --------
    A 10 % fire on a 100 m floor with t_b = 1140 s (hand calculation): L_f = 10 m,
    s = 10 / 1140 = 8.77 mm/s, t_total = 1140 + 100 / (10 / 1140) = 1140 + 11 400 = 12 540 s.

    >>> f = travelling_fire(100.0, 20.0, 3.5, 570.0, 500.0, 1200.0, share=0.10)
    >>> round(f.spread_rate_m_s * 1e3, 2), round(f.total_duration_s, 6)
    (8.77, 12540.0)
    """
    ln = _positive("length_m", length_m, "m")
    w = _positive("width_m", width_m, "m")
    h = _positive("ceiling_height_m", ceiling_height_m, "m")
    tb = burning_time_s(design_fire_load_MJ_m2, heat_release_density_kW_m2)
    tnf = near_field_C
    if isinstance(tnf, bool) or not isinstance(tnf, (int, float, np.floating)) or not math.isfinite(tnf) \
            or tnf <= AMBIENT_C:
        raise InputError("near_field_C", tnf, f"must be a finite temperature above {AMBIENT_C:g} C")
    if not (NEAR_FIELD_MIN_C <= tnf <= NEAR_FIELD_MAX_C) and not allow_out_of_scope:
        raise OutOfScopeError("near_field_C", tnf, f"the travelling fire models use {NEAR_FIELD_MIN_C:g} to "
                                                   f"{NEAR_FIELD_MAX_C:g} C")
    if far_field_origin not in FAR_FIELD_ORIGINS:
        raise InputError("far_field_origin", far_field_origin, "must be one of " + ", ".join(FAR_FIELD_ORIGINS))
    if (share is None) == (spread_rate_m_s is None):
        raise InputError("share", share, "give either share or spread_rate_m_s, not both or neither")
    if share is not None:
        if isinstance(share, bool) or not isinstance(share, (int, float, np.floating)) or not (0.0 < share <= 1.0):
            raise InputError("share", share, "must be a number in (0, 1], the fire's share of the floor")
        s = share * ln / tb
    else:
        s = _positive("spread_rate_m_s", spread_rate_m_s, "m/s", allow_inf=True)
    return TravellingFire(length_m=ln, width_m=w, ceiling_height_m=h, burning_time_s=tb, spread_rate_m_s=s,
                          heat_release_density_kW_m2=float(heat_release_density_kW_m2),
                          near_field_C=float(tnf), far_field_origin=far_field_origin)


def gas_temperature_C(time_s, position_m, length_m, width_m, ceiling_height_m, design_fire_load_MJ_m2,
                      heat_release_density_kW_m2, near_field_C, share=None, spread_rate_m_s=None,
                      far_field_origin="centre", allow_out_of_scope=False):
    """Gas temperature history [C], shape (T,), at ``position_m`` along the floor for one fire size.

    :func:`travelling_fire` then :meth:`TravellingFire.gas_temperature_C`; see the module notes.
    """
    fire = travelling_fire(length_m, width_m, ceiling_height_m, design_fire_load_MJ_m2, heat_release_density_kW_m2,
                           near_field_C, share=share, spread_rate_m_s=spread_rate_m_s,
                           far_field_origin=far_field_origin, allow_out_of_scope=allow_out_of_scope)
    return fire.gas_temperature_C(time_s, float(position_m))


def family_gas_temperature_C(time_s, positions_m, length_m, width_m, ceiling_height_m, design_fire_load_MJ_m2,
                             heat_release_density_kW_m2, near_field_C, shares=FIRE_SIZES, spread_rates_m_s=None,
                             far_field_origin="centre", allow_out_of_scope=False):
    """Gas temperature histories [C] of a family of fire sizes at several positions, shape (T, S x P).

    Column ``i * P + j`` is fire size i (``shares``, default the SG&R 2012 family :data:`FIRE_SIZES`;
    or ``spread_rates_m_s`` [m/s], the iTFM 2015 way) at position j of ``positions_m``.
    ``.reshape(T, S, P)`` gives them by size and position.
    """
    x = np.atleast_1d(np.asarray(positions_m, dtype=float))
    if x.ndim != 1 or x.size == 0:
        raise InputError("positions_m", positions_m, "must be a non-empty list of positions [m]")
    if spread_rates_m_s is not None:
        fires = [travelling_fire(length_m, width_m, ceiling_height_m, design_fire_load_MJ_m2,
                                 heat_release_density_kW_m2, near_field_C, spread_rate_m_s=s,
                                 far_field_origin=far_field_origin, allow_out_of_scope=allow_out_of_scope)
                 for s in spread_rates_m_s]
    else:
        fires = [travelling_fire(length_m, width_m, ceiling_height_m, design_fire_load_MJ_m2,
                                 heat_release_density_kW_m2, near_field_C, share=a,
                                 far_field_origin=far_field_origin, allow_out_of_scope=allow_out_of_scope)
                 for a in shares]
    if not fires:
        raise InputError("shares", shares, "must hold at least one fire size")
    t = as_times_s(time_s)
    return np.concatenate([f.gas_temperature_C(t, x) for f in fires], axis=1)


def fire_label(share=None, spread_rate_mm_s=None, short=False) -> str:
    """The name of one fire of a family: by its ``share`` of the floor or its ``spread_rate_mm_s`` [mm/s].

    The long form names the columns of the exposure (and so each member's governing fire in the
    outputs); the short form is for the figures' panel titles and labels.

    >>> fire_label(share=0.1), fire_label(share=0.1, short=True), fire_label(spread_rate_mm_s=5.0)
    ('0.1 of the floor (10 %)', '10 % fire', 'spread 5 mm/s')
    """
    if (share is None) == (spread_rate_mm_s is None):
        raise InputError("share", share, "give either share or spread_rate_mm_s, not both or neither")
    if spread_rate_mm_s is not None:
        return f"spread {spread_rate_mm_s:g} mm/s"
    return f"{share * 100:g} % fire" if short else f"{share:.3g} of the floor ({share * 100:g} %)"


def exposure_label(fire_label_text, along_m) -> str:
    """The label of one exposure column: a fire of the family (:func:`fire_label`) at ``along_m`` [m].

    >>> exposure_label("0.1 of the floor (10 %)", 6.0)
    '0.1 of the floor (10 %) at x = 6 m'
    """
    return f"{fire_label_text} at x = {along_m:g} m"


# ---------------------------------------------------------------------------------------------------
# the travelling fire as a design fire (the registry's "travelling" curve)

from steelfire.models.fire.design import DesignFire, Exposure, FireSetup, Option, Quantity, convection  # noqa: E402

#: What the travelling fire needs from the case, and its ``[fire.travelling]`` keys.
NEEDS = ("fire_load", "positions")
OPTIONS = (
    Option("length_m", "m", 0.0, 2000.0, help="L, the floor's length along which the fire travels"),
    Option("width_m", "m", 0.0, 2000.0, help="W, the floor's width the fire spans"),
    Option("ceiling_height_m", "m", 0.0, 100.0, help="H, floor to ceiling"),
    Option("near_field_C", "C", 20.0, 1500.0, required=False, default=NEAR_FIELD_MAX_C,
           help="T_nf over the burning band (800-1200 C; default 1200 C, the hotter end)"),
    Option("spread_rate_mm_s", "mm/s", 0.0, 1e4, required=False, many=True,
           help="spread rates s to run (one fire each); default: the fire sizes"),
    Option("fire_sizes", "-", 0.0, 1.0, required=False, many=True,
           help="fire sizes as shares of the floor (one fire each); default 1, 2.5, 5, 10, 25, 50, 75, 100 %"),
)
#: The keys of a member's ``position`` table under a travelling fire.
POSITION_KEYS = ("along_m",)

QUANTITIES = (
    Quantity("design_fire_load_MJ_m2", "design fire load density", "q_f,d", "MJ/m2", "EN 1991-1-2 E.(1)"),
    Quantity("heat_release_density_kW_m2", "heat release rate density", "RHR_f", "kW/m2", "EN 1991-1-2 Table E.5"),
    Quantity("burning_time_min", "burning time of a point of the floor", "t_b = q_f,d / RHR_f", "min",
             "Stern-Gottfried and Rein 2012", digits=2),
    Quantity("length_m", "floor length (direction of travel)", "L", "m", "case"),
    Quantity("width_m", "floor width", "W", "m", "case"),
    Quantity("ceiling_height_m", "ceiling height", "H", "m", "case"),
    Quantity("near_field_C", "near-field temperature", "T_nf", "C", "Rackauskaite et al. 2015: 800-1200 C"),
    Quantity("fire_family", "fires run (the worst governs each member)", "", "",
             "Stern-Gottfried and Rein 2012; Rackauskaite et al. 2015"),
    Quantity("longest_duration_min", "longest total duration of the family", "t_b + L / s", "min",
             "Rackauskaite et al. 2015", digits=2),
)

EQUIVALENCE_NOTE = ("a travelling fire is not the fully developed fire of a small compartment, which the formulas "
                    "of EN 1991-1-2 Annex F and CIB W14 were derived for.")


def design_fire(setup: FireSetup) -> DesignFire:
    """A family of travelling fires (one per fire size or spread rate) as a design fire: each member at its
    position ``along_m`` is run in every fire of the family, and the worst governs it (Stern-Gottfried and
    Rein 2012 ask for the worst of several sizes); near field at ``near_field_C``, far field by Alpert's
    ceiling jet capped at it; alpha_c of a natural fire.

    Its ``series(time_s)`` holds, for the report's figures, the heat release Q = RHR_f W (leading -
    trailing edge) of each fire of the family [MW] (T x S), the fires' long and short labels
    (:func:`fire_label`) and each member's position ``member_along_m`` [m] in schedule order."""
    from steelfire.models.fire import fireload

    o = setup.options
    fl = setup.fire_load
    ln, w, h, tnf = o["length_m"], o["width_m"], o["ceiling_height_m"], o["near_field_C"]
    qfd, _ = fireload.design_density(fl, ln * w, setup.code)
    rhr = fl.heat_release_density_kW_m2
    if rhr is None:
        raise InputError("fire_load.heat_release_density_kW_m2", None,
                         "is missing; a travelling fire needs RHR_f (EN 1991-1-2 Table E.5)")
    if o.get("spread_rate_mm_s") is not None and o.get("fire_sizes") is not None:
        raise InputError("fire.travelling.fire_sizes", o["fire_sizes"], "give fire_sizes or spread_rate_mm_s, not both")
    oos = []
    if not NEAR_FIELD_MIN_C <= tnf <= NEAR_FIELD_MAX_C:
        if not setup.allow_out_of_scope:
            raise OutOfScopeError("fire.travelling.near_field_C", tnf,
                                  f"the travelling-fire methods use {NEAR_FIELD_MIN_C:g} to {NEAR_FIELD_MAX_C:g} C "
                                  "(set analysis.allow_out_of_scope = true to compute anyway)")
        oos.append(f"OUT OF SCOPE of the travelling-fire methods: near_field_C = {tnf:g}")
    if o.get("spread_rate_mm_s") is not None:
        fires = [travelling_fire(ln, w, h, qfd, rhr, tnf, spread_rate_m_s=s * 1e-3, allow_out_of_scope=True)
                 for s in o["spread_rate_mm_s"]]
        labels = [fire_label(spread_rate_mm_s=s) for s in o["spread_rate_mm_s"]]
        short_labels = [fire_label(spread_rate_mm_s=s, short=True) for s in o["spread_rate_mm_s"]]
    else:
        shares = o.get("fire_sizes") or FIRE_SIZES
        fires = [travelling_fire(ln, w, h, qfd, rhr, tnf, share=a, allow_out_of_scope=True) for a in shares]
        labels = [fire_label(share=a) for a in shares]
        short_labels = [fire_label(share=a, short=True) for a in shares]
    positions = [p["along_m"] for p in setup.positions]
    for i, x in enumerate(positions):
        if not 0.0 <= x <= ln:
            raise InputError(f"member[{i + 1}].position.along_m", x, f"must lie on the floor, 0 to {ln:g} m")
    distinct = sorted(set(positions))
    where = {x: k for k, x in enumerate(distinct)}
    n_p = len(distinct)

    def exposure(time_s):
        t = np.asarray(time_s, dtype=float)
        gas = np.concatenate([f.gas_temperature_C(t, np.array(distinct)) for f in fires], axis=1)
        return Exposure(gas_C=gas, member_columns=[[s * n_p + where[x] for s in range(len(fires))] for x in positions],
                        column_labels=[exposure_label(lab, x) for lab in labels for x in distinct],
                        series={"fire_labels": labels})

    def gas(time_s):
        return exposure(time_s).gas_C.max(axis=1)

    def series(time_s):
        t = as_times_s(time_s)
        return {"heat_release_MW": np.column_stack([f.heat_release_W(t) for f in fires]) / 1e6,
                "fire_labels": list(labels), "fire_short_labels": list(short_labels),
                "member_along_m": np.asarray(positions, dtype=float)}

    key = sorted({k for f in fires for k in f.key_times_s(distinct)})
    longest = max(f.total_duration_s for f in fires)
    warnings = []
    if longest > setup.duration_min * 60.0:
        # a member the fire has not reached by the end of the run stays at 20 C and would pass: refused
        short = [lab for lab, f in zip(labels, fires) if f.total_duration_s > setup.duration_min * 60.0]
        allowed = (f"at least {math.ceil(longest / 60.0):g} min: {', '.join(short)} of the family "
                   f"ha{'s' if len(short) == 1 else 've'} not burnt out by then, so members far along the floor may "
                   "not have seen the fire yet")
        if not setup.allow_out_of_scope:
            raise OutOfScopeError("fire.duration_min", setup.duration_min,
                                  allowed + " (set analysis.allow_out_of_scope = true to compute anyway)")
        oos.append(f"OUT OF SCOPE of the travelling fire: fire.duration_min = {setup.duration_min:g}; {allowed}")
        warnings.append(f"Travelling fire: {', '.join(short)} ha{'s' if len(short) == 1 else 've'} not burnt out "
                        f"at duration_min = {setup.duration_min:g} min (longest {longest / 60:.0f} min): the members "
                        "far along the floor may not have seen the fire yet; extend fire.duration_min.")
    warnings.append("Travelling fire: near field and far field as published (Stern-Gottfried and Rein 2012, "
                    "Rackauskaite et al. 2015, from memory); the gas returns to 20 C at once where the fire has "
                    "passed (no cooling phase).")
    values = {"design_fire_load_MJ_m2": qfd, "heat_release_density_kW_m2": rhr,
              "burning_time_min": burning_time_s(qfd, rhr) / 60.0, "length_m": ln, "width_m": w,
              "ceiling_height_m": h, "near_field_C": tnf, "fire_family": "; ".join(labels),
              "longest_duration_min": longest / 60.0}
    return DesignFire(curve="travelling", gas_temperature_C=gas, alpha_c=convection(setup, "alpha_c_natural"),
                      cools=True, key_times_s=tuple(key), values=values, quantities=QUANTITIES, warnings=warnings,
                      out_of_scope=oos, equivalence=EQUIVALENCE_NOTE, exposure=exposure, series=series)
