"""Least protection thickness for a member schedule, by vectorised scan and bisection.

Two criteria per member (EN 1993-1-2 4.2.5.2 steel temperatures, 4.2.4 critical temperature):

* standard period: under the standard fire (EN 1991-1-2 3.2.1) the steel temperature at
  ``required_minutes`` is at most the critical temperature. Under the standard fire eq (4.27)
  heats the steel monotonically and a thicker layer is never hotter, so plain bisection applies:
  the member passes exactly when it reaches the critical temperature no earlier than required.
* burnout: the peak over the whole design fire, cooling phase included, is at most the critical
  temperature. Eq (4.27)'s cooling-phase term can make that peak rise with thickness for heavy
  protection (phi of about 2 and more), so the passing thicknesses need not form a half-line:
  the thickness range is scanned upward and the first passing interval is bisected.

All members advance together: every scan point and every bisection step is one call of the batch
kernel :func:`steelfire.heat.batch` over the whole schedule (not one root-find per member).
Results say how they ended (achievable, iterations, final bracket width).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from steelfire.models import heat

#: Bisection stops when the bracket is this narrow [m] (0.1 mm).
TOLERANCE_M = 1e-4
#: At most this many thicknesses per member in the burnout scan: the supplied thicknesses
#: themselves where there are no more, else this many spaced evenly in log(thickness) over the
#: supplied range (about 7 % apart over 0.5-100 mm). A passing window narrower than that spacing,
#: between two scan points that both fail, can be missed: the member is then reported not achievable.
SCAN_POINTS = 64


@dataclass
class ThermalSet:
    """Protected members as kernel arrays (thickness-free); ``moisture_percent`` and ``lam20``
    give the moisture delay at each trial thickness (:func:`steelfire.heat.moisture_delay_s`)."""

    ap_v: np.ndarray
    rho_p: np.ndarray
    c_p: np.ndarray
    lam_T: np.ndarray
    lam_v: np.ndarray
    lam_n: np.ndarray
    moisture_percent: np.ndarray
    lam20: np.ndarray

    def take(self, idx):
        return ThermalSet(*(getattr(self, f)[idx] for f in self.__dataclass_fields__))

    def __len__(self):
        return len(self.ap_v)


@dataclass
class Fire:
    """A gas curve on its grid with the convective coefficient that goes with it."""

    time_s: np.ndarray
    gas_C: np.ndarray
    alpha_c: float


@dataclass
class Criterion:
    """Per-member outcome of one criterion: least thickness [m] (NaN where none), and how it ended."""

    thickness_m: np.ndarray
    achievable: np.ndarray
    iterations: int
    bracket_m: np.ndarray
    failing_m: np.ndarray = None  # the failing end of the final bracket (NaN: passes at the least thickness)


class Problem:
    """The schedule's sizing problem: members, the two fires, limits and the constants of the kernel."""

    def __init__(self, members: ThermalSet, critical_C, required_s, standard: Fire, design: Fire | None,
                 eps_res: float, rho_a: float):
        self.m = members
        self.critical_C = np.asarray(critical_C, dtype=float)
        self.required_s = np.asarray(required_s, dtype=float)  # NaN: no standard period asked
        self.standard = standard
        self.design = design
        self.eps_res = eps_res
        self.rho_a = rho_a
        self.kernel_calls = 0

    def _run(self, fire: Fire, idx, d_m, threshold):
        s = self.m.take(idx)
        n = len(idx)
        delay = np.where(s.moisture_percent > 0.0,
                         60.0 * s.moisture_percent * s.rho_p * d_m ** 2 / (5.0 * s.lam20), 0.0)
        self.kernel_calls += 1
        return heat.batch(fire.time_s, fire.gas_C, np.zeros(n, dtype=np.bool_), s.ap_v, fire.alpha_c,
                          self.eps_res, self.rho_a, np.asarray(d_m, dtype=float), s.rho_p, s.c_p, s.lam_T,
                          s.lam_v, s.lam_n, delay, threshold, np.zeros(0, dtype=np.int64), False)

    def standard_passes(self, idx, d_m):
        """Reaches the critical temperature no earlier than required (standard fire)."""
        peak, _, cross = self._run(self.standard, idx, d_m, self.critical_C[idx])[:3]
        return np.isfinite(peak) & (np.isnan(cross) | (cross >= self.required_s[idx] - 1e-9))

    def burnout_passes(self, idx, d_m):
        """Peak over the whole design fire at most the critical temperature."""
        peak = self._run(self.design, idx, d_m, np.full(len(idx), np.inf))[0]
        return np.isfinite(peak) & (peak <= self.critical_C[idx])

    def passes(self, idx, d_m):
        """Both criteria that apply, at thicknesses ``d_m`` of the members ``idx``."""
        idx = np.asarray(idx)
        ok = np.ones(len(idx), dtype=bool)
        has_std = ~np.isnan(self.required_s[idx])
        if has_std.any():
            sub = idx[has_std]
            ok[has_std] &= self.standard_passes(sub, np.asarray(d_m)[has_std])
        if self.design is not None:
            ok &= self.burnout_passes(idx, np.asarray(d_m))
        return ok


def _bisect(test, idx, lo, hi, tol):
    """Vectorised bisection: ``test`` fails at ``lo`` and passes at ``hi`` for every member; returns
    the passing end of a bracket no wider than ``tol`` and the number of rounds."""
    lo, hi = lo.copy(), hi.copy()
    rounds = 0
    while True:
        open_ = (hi - lo) > tol
        if not open_.any():
            return hi, rounds, hi - lo
        sel = np.nonzero(open_)[0]
        mid = 0.5 * (lo[sel] + hi[sel])
        ok = test(idx[sel], mid)
        hi[sel[ok]] = mid[ok]
        lo[sel[~ok]] = mid[~ok]
        rounds += 1


def size_standard_period(p: Problem, d_min_m, d_max_m, tol_m=TOLERANCE_M) -> Criterion:
    """Least thickness meeting the standard period, members with a required period (others NaN)."""
    n = len(p.m)
    out = np.full(n, np.nan)
    failing = np.full(n, np.nan)
    achievable = np.ones(n, dtype=bool)
    bracket = np.zeros(n)
    idx = np.nonzero(~np.isnan(p.required_s))[0]
    if len(idx) == 0:
        return Criterion(out, achievable, 0, bracket, failing)
    lo, hi = np.asarray(d_min_m, float)[idx], np.asarray(d_max_m, float)[idx]
    ok_hi = p.standard_passes(idx, hi)
    ok_lo = p.standard_passes(idx, lo)
    achievable[idx[~ok_hi]] = False
    out[idx[ok_lo]] = lo[ok_lo]
    todo = ok_hi & ~ok_lo
    rounds = 0
    if todo.any():
        d, rounds, br = _bisect(p.standard_passes, idx[todo], lo[todo], hi[todo], tol_m)
        out[idx[todo]] = d
        bracket[idx[todo]] = br
        failing[idx[todo]] = d - br
    return Criterion(out, achievable, rounds, bracket, failing)


def scan_grid(supplied_m, points=SCAN_POINTS):
    """The burnout scan for one member: its supplied thicknesses, or ``points`` of them spread evenly
    in log(thickness) over the supplied range (both ends included)."""
    s = np.asarray(supplied_m, dtype=float)
    if len(s) <= points:
        return s
    g = np.exp(np.linspace(np.log(s[0]), np.log(s[-1]), points))
    g[0], g[-1] = s[0], s[-1]
    return g


def size_burnout(p: Problem, grids, tol_m=TOLERANCE_M) -> Criterion:
    """Least thickness whose design-fire peak (cooling included) is at most critical: the scan
    ``grids`` (one ascending array per member, :func:`scan_grid`) are tried upward in one batch,
    then the first passing interval is bisected."""
    n = len(p.m)
    out = np.full(n, np.nan)
    failing = np.full(n, np.nan)
    bracket = np.zeros(n)
    if p.design is None:
        return Criterion(out, np.ones(n, dtype=bool), 0, bracket, failing)
    k = max(len(g) for g in grids)
    grid = np.array([np.concatenate([g, np.full(k - len(g), g[-1])]) for g in grids])  # n x K, ends repeated
    idx_all = np.repeat(np.arange(n), k)
    ok = p.burnout_passes(idx_all, grid.ravel()).reshape(n, k)
    first = np.where(ok.any(axis=1), ok.argmax(axis=1), -1)
    achievable = first >= 0
    at_min = first == 0
    out[at_min] = grid[at_min, 0]
    todo = np.nonzero(first > 0)[0]
    rounds = 0
    if len(todo):
        lo = grid[todo, first[todo] - 1]
        hi = grid[todo, first[todo]]
        d, rounds, br = _bisect(p.burnout_passes, todo, lo, hi, tol_m)
        out[todo] = d
        bracket[todo] = br
        failing[todo] = d - br
    return Criterion(out, achievable, rounds, bracket, failing)


def round_up_and_verify(p: Problem, failing_m, achievable, supplied_m):
    """The least supplied thickness that passes BOTH criteria.

    ``failing_m`` is, per member, the largest thickness known to fail a criterion (the failing ends
    of the bisection brackets; NaN or below the supply where the least thickness passes), so the
    candidates are the supplied thicknesses above it, tried upward. ``supplied_m`` is a list (per
    member) of ascending supplied thicknesses [m]. Because the burnout peak need not fall with
    thickness, each candidate is checked with the kernel; members whose candidates all fail are not
    achievable. Returns (chosen_m with NaN where none, achievable).
    """
    n = len(failing_m)
    chosen = np.full(n, np.nan)
    ok_out = np.asarray(achievable, dtype=bool).copy()
    pos = np.zeros(n, dtype=np.int64)
    for i in range(n):
        if ok_out[i]:
            s = supplied_m[i]
            f = failing_m[i]
            pos[i] = 0 if np.isnan(f) else int(np.searchsorted(s, f, side="right"))
            if pos[i] >= len(s):
                ok_out[i] = False
    active = np.nonzero(ok_out)[0]
    while len(active):
        cand = np.array([supplied_m[i][pos[i]] for i in active])
        good = p.passes(active, cand)
        chosen[active[good]] = cand[good]
        nxt = []
        for i in active[~good]:
            pos[i] += 1
            if pos[i] >= len(supplied_m[i]):
                ok_out[i] = False
            else:
                nxt.append(i)
        active = np.array(nxt, dtype=np.int64)
    return chosen, ok_out
