"""The conduction model beside eq (4.27): the tables of docs/conduction.md.

    python benchmarks/conduction_compare.py

Standard fire (ISO 834, 240 min at 5 s) and two Annex A fires with cooling, members from light to
heavy protection; both models on the same grid, the conduction model refined by ``run_converged``
(peak and 550 C crossing to 0.5 C). Illustrative materials (generic classes, not products).
Prints markdown tables; asserts nothing.
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from steelfire.chain.fires import time_grid  # noqa: E402
from steelfire.models import conduction, heat  # noqa: E402
from steelfire.models.protection import moisture_delay_s  # noqa: E402
from steelfire.models.fire import nominal, parametric  # noqa: E402

MATERIALS = {  # density, specific heat, conductivity
    "board": (800.0, 1700.0, 0.2),
    "fibre-silicate": (600.0, 1200.0, 0.15),
    "heavy": (1200.0, 2200.0, 0.2),
    "concrete": (2300.0, 1000.0, 1.6),
}


def phi(apv, d, rho, cp, ca=600.0):
    return cp * rho * d * apv / (ca * 7850.0)


def both(t, g, members, threshold=550.0, moisture=None):
    n = len(members)
    moist = np.zeros(n) if moisture is None else np.asarray(moisture, dtype=float)
    inp = conduction.ConductionInputs(t, g.reshape(-1, 1), np.zeros(n, dtype=np.int64),
                                      np.array([m[0] for m in members]), np.array([m[1] for m in members]),
                                      np.array([m[2] for m in members]), np.array([m[3] for m in members]),
                                      np.full((n, 1), 20.0), np.array([[m[4]] for m in members]),
                                      np.ones(n, dtype=np.int64), moist, np.full(n, threshold))
    res = conduction.run_converged(inp, keep_history=True)
    delay = moisture_delay_s(moist, np.array([m[2] for m in members]), np.array([m[1] for m in members]),
                             np.array([m[4] for m in members]))
    rows = heat.uniform_rows(n, bare=False, section_factor_per_m=[m[0] for m in members],
                             thickness_m=[m[1] for m in members], density=[m[2] for m in members],
                             specific_heat=[m[3] for m in members], conductivity=[m[4] for m in members],
                             moisture_delay_s=delay)
    lumped = heat.run(heat.Fires(t, g[:, None]), rows, emissivity_resultant=0.7, steel_density_kg_m3=7850.0,
                      keep_history=True).history_C
    return res, lumped


def minutes(x):
    return "-" if not np.isfinite(x) else f"{x:.1f}"


def first(t, h, thr):
    if h.max() < thr:
        return np.nan
    k = int(np.argmax(h >= thr))
    return (t[k - 1] + (t[k] - t[k - 1]) * (thr - h[k - 1]) / (h[k] - h[k - 1])) / 60.0


def standard_table():
    t = np.arange(0.0, 240 * 60.0 + 1.0, 5.0)
    g = nominal.standard_fire(t)
    members, names = [], []
    for mat in ("board", "heavy", "concrete"):
        for apv in (100.0, 200.0, 300.0):
            for d in (0.02, 0.04, 0.06):
                rho, cp, lam = MATERIALS[mat]
                if phi(apv, d, rho, cp) >= 0.5:
                    members.append((apv, d, rho, cp, lam))
                    names.append(mat)
    res, lum = both(t, g, members)
    print("Standard fire, 240 min at 5 s; phi at c_a = 600 J/(kg K); temperatures [C] as eq (4.27) / conduction;")
    print("difference = conduction - eq (4.27), extremes over the 240 min; t550 [min]; cells x substeps used.\n")
    print("| material | A_p/V | d_p mm | phi | 60 min | 120 min | 240 min | difference min / max | t550 | resolution |")
    print("|---|---|---|---|---|---|---|---|---|---|")
    k60, k120 = 720, 1440
    for i, m in enumerate(members):
        c, lp = res.history_C[:, i], lum[:, i]
        dif = c - lp
        print(f"| {names[i]} | {m[0]:.0f} | {m[1] * 1000:.0f} | {phi(*m[:4]):.1f} | {lp[k60]:.0f} / {c[k60]:.0f} | "
              f"{lp[k120]:.0f} / {c[k120]:.0f} | {lp[-1]:.0f} / {c[-1]:.0f} | {dif.min():+.0f} / {dif.max():+.0f} | "
              f"{minutes(first(t, lp, 550.0))} / {minutes(first(t, c, 550.0))} | {res.cells[i]} x {res.substeps[i]} |")


def light_table():
    t = np.arange(0.0, 240 * 60.0 + 1.0, 5.0)
    g = nominal.standard_fire(t)
    members = []
    for mat in ("board", "fibre-silicate", "concrete"):
        rho, cp, lam = MATERIALS[mat]
        for apv in (50.0, 100.0, 200.0, 300.0):
            for d in (0.005, 0.01, 0.02, 0.04, 0.06):
                if phi(apv, d, rho, cp) < 0.5:
                    members.append((apv, d, rho, cp, lam))
    res, lum = both(t, g, members)
    worst_rel, worst_t, worst_abs, hotter = 0.0, 0.0, 0.0, 0.0
    for i in range(len(members)):
        c, lp = res.history_C[:, i], lum[:, i]
        hot = lp > 300.0
        if hot.any():
            worst_rel = max(worst_rel, float(np.max(np.abs(c - lp)[hot] / (lp[hot] - 20.0))))
        worst_abs = max(worst_abs, float(np.max(np.abs(c - lp))))
        hotter = max(hotter, float(np.max(c - lp)))
        for thr in (400.0, 550.0, 700.0):
            a, b = first(t, lp, thr), first(t, c, thr)
            if np.isfinite(a) and np.isfinite(b):
                worst_t = max(worst_t, abs(b - a) / a)
    print(f"\nLight protection (phi < 0.5), {len(members)} members, standard fire 240 min: largest difference "
          f"{worst_abs:.1f} C; above 300 C at most {100 * worst_rel:.1f} % of the rise; times to 400, 550, 700 C "
          f"within {100 * worst_t:.1f} %; conduction hotter than eq (4.27) by at most {hotter:.1f} C.")


def parametric_table():
    fires = {"office bay (fuel-controlled, peak 642 C at 20 min)":
             parametric.parametric_fire(0.08702534831350535, 1429.1716216924262, 98.72368184563005, 20.0 / 60.0),
             "invented compartment (O 0.06, b 1000, q_t,d 200: ventilation-controlled)":
             parametric.parametric_fire(0.06, 1000.0, 200.0, 20.0 / 60.0)}
    print("\nAnnex A fires with cooling, 240 min at 5 s: peak steel temperature [C] eq (4.27) / conduction, "
          "and the gas peak.\n")
    print("| fire | material | A_p/V | d_p mm | phi | gas peak | peak eq (4.27) | peak conduction | resolution |")
    print("|---|---|---|---|---|---|---|---|---|")
    for name, pf in fires.items():
        t = time_grid(240 * 60.0, 5.0, [pf.t_max_s, pf.burnout_time_s])
        g = pf.gas_temperature(t)
        members, mats = [], []
        for mat in ("board", "heavy"):
            rho, cp, lam = MATERIALS[mat]
            for apv, d in ((200.0, 0.01), (200.0, 0.02), (340.0, 0.04), (340.0, 0.06)):
                members.append((apv, d, rho, cp, lam))
                mats.append(mat)
        res, lum = both(t, g, members)
        for i, m in enumerate(members):
            print(f"| {name.split(' (')[0]} | {mats[i]} | {m[0]:.0f} | {m[1] * 1000:.0f} | {phi(*m[:4]):.1f} | "
                  f"{g.max():.0f} | {lum[:, i].max():.0f} | {res.peak_C[i]:.0f} | {res.cells[i]} x {res.substeps[i]} |")


def moisture_table():
    t = np.arange(0.0, 240 * 60.0 + 1.0, 5.0)
    g = nominal.standard_fire(t)
    print("\nFree water, standard fire: delay of 400 C against the dry member (conduction) beside the ECCS t_v "
          "(eq (4.27) holds the steel at 100 C for t_v); plateau = time from 60 to 150 C [min].\n")
    print("| member | p % | plateau | delay at 400 C | ECCS t_v | delay / t_v | resolution |")
    print("|---|---|---|---|---|---|---|")
    for label, (apv, d, mat) in {"board 20 mm, A_p/V 200": (200.0, 0.02, "board"),
                                 "fibre-silicate 30 mm, A_p/V 100": (100.0, 0.03, "fibre-silicate"),
                                 "board 15 mm, A_p/V 300": (300.0, 0.015, "board")}.items():
        rho, cp, lam = MATERIALS[mat]
        ps = [0.0, 2.0, 5.0, 10.0, 20.0]
        res, _ = both(t, g, [(apv, d, rho, cp, lam)] * len(ps), threshold=400.0, moisture=ps)
        for i, p in enumerate(ps):
            h = res.history_C[:, i]
            plateau = (t[np.argmax(h >= 150.0)] - t[np.argmax(h >= 60.0)]) / 60.0
            delay = (res.crossing_time_s[i] - res.crossing_time_s[0]) / 60.0
            tv = moisture_delay_s(p, rho, d, lam) / 60.0
            ratio = f"{delay / tv:.2f}" if tv > 0 else "-"
            print(f"| {label} | {p:.0f} | {plateau:.1f} | {delay:.1f} | {tv:.1f} | {ratio} | "
                  f"{res.cells[i]} x {res.substeps[i]} |")


if __name__ == "__main__":
    standard_table()
    light_table()
    parametric_table()
    moisture_table()
