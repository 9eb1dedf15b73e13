"""The flight under the recovery device: where each descent starts, and its step size.

The device deploys at apogee, at an altitude on the way down, or when the motor's
ejection charge fires (burnout plus the chosen delay); from that state the
integrator flies the descent with the device's drag area added, until landing
(:func:`motorlib.flight.integrate._descend`). The closed-form fall formulas
(still air, constant density) are in :mod:`motorlib.flight.descent`.

numpy only.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from .airframe import Recovery
from .dynamics import _Group
from .pack import MotorPack
from .results import OK

if TYPE_CHECKING:  # annotation only: integrate imports this module
    from .integrate import FlightSettings


def _deployment_start(pack: MotorPack, recovery: Recovery, ascent: dict, idx: np.ndarray,
                      out: dict[str, np.ndarray], wanted_delay: np.ndarray | None
                      ) -> tuple[np.ndarray, dict[str, np.ndarray]]:
    """Choose the deployment instant of every flight and write ``deploy_*`` to ``out``.

    ``ascent`` holds the located states of the ascent pass (apogee, deployment
    altitude, ejection delays) by position in ``idx``. Returns the positions of
    the flights that deploy and their states at deployment (t, x, z, vx, vz),
    shape (n_deploying,) each.
    """
    n = idx.size
    start = {k: np.full(n, np.nan) for k in ("t", "x", "z", "vx", "vz")}
    delay_used = np.full(n, np.nan)
    if recovery.deploy == "apogee":
        for k in ("t", "x", "z", "vx"):
            start[k] = ascent["apogee"][k].copy()
        start["vz"] = np.zeros(n)
    elif recovery.deploy == "altitude":
        for k in start:
            start[k] = ascent["deploy"][k].copy()
    else:
        delays = pack.delays_s[idx]
        optimal = ascent["apogee"]["t"] - pack.burnout_s[idx]
        target = optimal if wanted_delay is None else wanted_delay[idx]
        col = np.argmin(np.where(np.isnan(delays), np.inf, np.abs(delays - target[:, None])), axis=1)
        rows = np.arange(n)
        has = ~np.all(np.isnan(delays), axis=1)  # plugged or booster: no charge, nothing deploys
        delay_used = np.where(has, delays[rows, col], np.nan)
        start["t"] = np.where(has, pack.burnout_s[idx] + delay_used, np.nan)
        for k in ("x", "z", "vx", "vz"):
            start[k] = np.where(has, ascent["ejection"][k][rows, col], np.nan)
    # a delay that fires inside the step that reaches the ground gives a state below the pad: nothing deploys
    ok = np.isfinite(start["t"]) & (start["z"] > 0.0) & (out["status"][idx] == OK)
    out["deploy_time_s"][idx] = np.where(ok, start["t"], np.nan)
    out["deploy_altitude_m"][idx] = np.where(ok, start["z"], np.nan)
    out["deploy_delay_s"][idx] = np.where(ok, delay_used, np.nan)
    keep = np.flatnonzero(ok)
    return keep, {k: v[keep] for k, v in start.items()}


def _descent_step(g: _Group, a: dict[str, np.ndarray], z, vx, vz, s: FlightSettings) -> np.ndarray:
    """Step under a deployed device, bounded by the drag time scale m/(k·v).

    With k = ½ρ(Cd·A) and v = max(|v|, v_t), the time scale is v_t/g at terminal
    speed and much shorter just after a fast deployment; RK4 is stable below
    2.78 time scales, and ``descent_step_fraction`` keeps it accurate. A step is
    also at most 1/30 of the time left to fall.
    """
    rho, _, grav, shape = g.lookup(z)
    mass = a["m_full"] - a["m_prop"]
    cd = g.cds[0] if g.table_cd else a["cd"]
    k = 0.5 * rho * (cd * a["area"] + a["extra"])
    v_t = np.sqrt(mass * grav / k)
    speed = np.maximum(np.hypot(vx - a["wind"] * shape, vz), v_t)
    time_scale = mass / (k * speed)
    time_left = np.maximum(z, 1.0) / np.maximum(np.maximum(-vz, v_t), 0.1)
    return np.clip(np.minimum(s.descent_step_fraction * time_scale, time_left / 30.0), 1e-5, 10.0)
