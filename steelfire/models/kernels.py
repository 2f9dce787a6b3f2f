"""The compiled heat-transfer kernels: whether this machine has them, and preparing them side by side.

numba compiles the batch kernels of :mod:`steelfire.models.heat` (eq (4.25) bare, eq (4.27) protected) and
:mod:`steelfire.models.conduction` (dry members with a constant conductivity; the others) on first use and
keeps the machine code in its on-disk cache. Compiling takes 3 to 13 s a kernel on a 2-core machine (eq
(4.25) the least, the general conduction kernel the most), one after the other inside a run. On the first
run after installing, :func:`prepare` compiles the missing ones a run needs (:func:`needed`) in short
processes side by side instead, each by a tiny run with the argument types of the real runs, and the run
then loads them from the cache. Nothing here changes what a run computes: if a process fails, the run
compiles the kernel itself.
"""

from __future__ import annotations

import os
import subprocess
import sys

#: The kernels, by the name :func:`warm` takes.
NAMES = ("bare", "protected", "conduction_dry", "conduction_general")

#: A kernel process that takes longer than this is stopped (the run then compiles the kernel itself) [s].
TIMEOUT_S = 600.0


def _kernel(name):
    from steelfire.models import conduction, heat

    return {"bare": heat._bare_chunks, "protected": heat._protected_chunks,
            "conduction_dry": conduction._fast_chunk, "conduction_general": conduction._general_chunk}[name]


def missing() -> list[str]:
    """The kernels of :data:`NAMES` with no machine code in numba's cache for the current source (empty
    where all are there, or where numba caches nothing: then there is nothing to prepare ahead)."""
    out = []
    for name in NAMES:
        k = _kernel(name)
        try:
            if k.signatures:
                continue
            index = k._cache._cache_file._load_index()   # numba's on-disk index: {} when absent or stale
        except Exception:  # not compiled at all (NUMBA_DISABLE_JIT), caching off, or numba's layout changed
            return []
        if not index:
            out.append(name)
    return out


def needed(case) -> list[str]:
    """The kernels of :data:`NAMES` a check, sizing or sampling run of ``case`` calls: eq (4.25) for bare
    members, eq (4.27) for protected ones, and for protected members in a fire that cools (any but the
    nominal curves) or with ``protection_model = "conduction"`` the conduction kernel of their kind (dry
    with a constant conductivity, or the other)."""
    from steelfire.models.fire import MODELS, nominal

    out = set()
    protected = [m for m in case.members if m.protected]
    if len(protected) < len(case.members):
        out.add("bare")
    if protected:
        out.add("protected")
        if MODELS[case.fire.curve] is not nominal or case.analysis.protection_model == "conduction":
            for m in protected:
                mat = case.materials[m.protection]
                general = mat.credited_moisture_percent > 0.0 or len(mat.conductivity_table) > 1
                out.add("conduction_general" if general else "conduction_dry")
    return [n for n in NAMES if n in out]


def warm(name: str) -> None:
    """Compile kernel ``name`` (one of :data:`NAMES`) by a tiny run with the argument types of the real
    runs: rows in one fire and rows in several fires, the gas as a (time x fires) matrix."""
    import numpy as np

    if name in ("bare", "protected"):
        from steelfire.models import heat

        t = np.arange(0.0, 61.0, 5.0)
        g = np.column_stack([np.linspace(20.0, 500.0, t.size), np.linspace(20.0, 400.0, t.size)])
        for fire in ([0, 0], [0, 1]):
            rows = heat.uniform_rows(2, bare=name == "bare", section_factor_per_m=100.0, thickness_m=0.02,
                                     density=800.0, specific_heat=1700.0, conductivity=0.2, fire=fire)
            heat.run(heat.Fires(t, g), rows, emissivity_resultant=0.7, steel_density_kg_m3=7850.0)
        if name == "protected":   # the helpers the tests call on their own
            heat.expm1_scaled(0.1, heat.EXPM1_TERMS)
            heat.heat_capacity_fraction(20.0, 7850.0, heat.SPECIFIC_HEAT_TERMS)
    elif name in ("conduction_dry", "conduction_general"):
        from steelfire.models import conduction

        t = np.arange(0.0, 601.0, 60.0)
        conduction.protected_steel_temperature(t, np.linspace(20.0, 500.0, t.size), 200.0, 0.02, 800.0, 1700.0,
                                               0.2, moisture_percent=0.0 if name == "conduction_dry" else 5.0)
    else:
        raise ValueError(f"unknown kernel {name!r}: one of {', '.join(NAMES)}")


def prepare(names=NAMES, *, quiet: bool = False) -> bool:
    """Compile those of the kernels ``names`` that are :func:`missing` into numba's cache, each in its own
    process, side by side. Says so once on standard error unless ``quiet``. Returns whether all
    processes finished cleanly (False: the run compiles what is still missing itself)."""
    names = [n for n in missing() if n in names]
    if not names:
        return True
    if not quiet:
        from steelfire.models.heat import announce

        announce()
    root = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
    env = dict(os.environ)
    env["PYTHONPATH"] = root + (os.pathsep + env["PYTHONPATH"] if env.get("PYTHONPATH") else "")
    procs = []
    try:
        for name in names:
            procs.append(subprocess.Popen(
                [sys.executable, "-c", f"from steelfire.models.kernels import warm; warm({name!r})"],
                stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, stdin=subprocess.DEVNULL, env=env))
        ok = True
        for p in procs:
            try:
                ok &= p.wait(timeout=TIMEOUT_S) == 0
            except subprocess.TimeoutExpired:
                p.kill()
                ok = False
        return ok
    finally:   # interrupted (Ctrl-C) or failed to start one: leave no process behind
        for p in procs:
            if p.poll() is None:
                p.kill()
                p.wait()
