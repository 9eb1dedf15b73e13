"""Step sizes of the batched flight: the error controller's step (integrate.py), shortened per flight to end on
what changes the dynamics.

Each rule shortens the step, never lengthens it: burn steps end on the thrust curve's samples, rail steps end on
rail exit (approached in two steps), a climbing coast's step ends just past its predicted apogee, steps with a
varying Cd(Mach) table change Mach by at most ``_MAX_MACH_STEP`` and end on the table's points, a falling
flight's step ends on the deployment altitude, and a pass after the ascent keeps its descent rules
(recovery_phase). Aimed steps overshoot their target by 1e-7 relative so that the event falls inside the step
(and is found by the test at its end) rather than a hair beyond it, which would cost a step of almost no length;
divisions are floored at 1e-300 instead of silenced with np.errstate, which costs more than the division on
arrays this size. numpy only.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

import numpy as np

from .dynamics import _Group
from .recovery_phase import _descent_step

if TYPE_CHECKING:
    from .integrate import FlightSettings

__all__: list[str] = []


def _step_size(g: _Group, a: dict, s: FlightSettings, deploy_altitude_m: float | None, descent: bool) -> np.ndarray:
    """Step of every active flight [s], shortened to end on rail exit and on the deployment altitude."""
    t, z, vz = a["t"], a["z"], a["vz"]
    h = a["h"]  # the error controller's step
    if descent:
        h = np.minimum(h, _descent_step(g, a, s))  # ends on curve samples while burning, and on the stop time
    elif np.count_nonzero(a["burning"]):
        h = np.where(a["burning"], np.minimum(h, a["seg_end"] - t), h)
    if a["any_rail"]:
        h = _rail_step(a, h)
    h = _apogee_step(a, h)
    if g.table_cd:
        h = _kink_step(g, a, h)
    if not g.calm and g.profile is None:
        h = _height_step(a, h, (g.wind_floor_m, g.wind_cap_m))
    if deploy_altitude_m is not None and np.count_nonzero(a["pending"]):
        falling = a["pending"] & a["apogee_found"] & (vz < 0.0)
        above = z - deploy_altitude_m
        # z + vz·h + ½·az·h² = altitude, the stable root (as on the rail); linear where it has none
        disc = vz * vz - 2.0 * a["az"] * above
        with np.errstate(divide="ignore", invalid="ignore"):
            h_dep = np.where(disc >= 0.0, 2.0 * above / (-vz + np.sqrt(np.maximum(disc, 0.0))), above / -vz)
            h_dep = np.where(falling, h_dep, np.inf) * (1.0 + 1e-7)
        h = np.where(falling & (h_dep < h) & (h_dep > 0.0), h_dep, h)
    return h


# A step that reaches apogee ends 1 % past its predicted instant (so apogee lies near the step's end, where the
# cubic Hermite interpolation that locates it is exact to 6e-4 of its mid-step error). Our choice, no published
# source: it brought the apogee time of tests/flight/test_integrate.py's boost-coast case from 1.3e-5 to 2.4e-7
# relative.
_APOGEE_OVERSHOOT = 0.01


def _apogee_step(a: dict, h: np.ndarray) -> np.ndarray:
    """Shorten the steps of coasting, climbing flights that would pass apogee to end just past it, predicted
    from the local motion (vz + az·h = 0)."""
    az = a["az"]
    climbing = ~a["apogee_found"] & ~a["burning"] & (a["vz"] > 0.0) & (az < 0.0)
    if not np.count_nonzero(climbing):  # all burning, or all past apogee: nothing to shorten
        return h
    # (a floor on -az instead of np.errstate, which costs more than the division on arrays this size)
    h_apogee = np.where(climbing, a["vz"] / np.maximum(-az, 1e-300), np.inf) * (1.0 + _APOGEE_OVERSHOOT)
    return np.minimum(h, h_apogee)


def _height_step(a: dict, h: np.ndarray, heights: tuple[float, ...]) -> np.ndarray:
    """Shorten steps to end on the heights where the power-law wind has a kink (its floor and its cap).

    The wind is constant below the floor and above the cap, so its slope jumps there; a step across
    one loses the method's order, and the error estimate misses it (a flight leaving a 0.9 m rail in a
    5.6 m/s wind erred 1.3e-4 in apogee, crossing the 1 m floor). The crossing is predicted from
    z + vz·h + ½·az·h² (stable root) and aimed at with a 1e-5 overshoot: with 1e-7, as the other events, the
    prediction fell a hair short of the 1 m floor on the rail in 137 of 1,000 synthetic flights (tests/
    synthetic.py, seed 7), each of which then took a step of about 1e-7 s to cross it; with 1e-5, in 54 (and,
    with the rail exit test of events._rail_exit, steps per flight 45.0 to 44.7, apogees unchanged to 1e-7; every
    descent crosses the floor just before landing: on 120 varied descents the landing descent rate moved by up to
    5.9e-5, its worst error against an independent DOP853 solution 1.57e-4 instead of 1.69e-4).
    Leaving a kink within 0.1 % of a step inside it instead moved a parachute's landing descent rate by 1.4e-4
    (tests/flight/test_descent_steps.py). Not stepping on the floor while on the rail saved 1.0 step a flight on
    those 1,000 flights, but with the first step of FlightSettings.burn_steps = 100 a slow rail exit (6.8 m/s) in a
    6.7 m/s wind then erred 2.8e-5 in apogee against 1.4e-6 (an independent DOP853 check): on the rail, at low speed,
    the wind is most of the air speed, so its kink is the drag's: not taken.
    """
    z, vz, az = a["z"], a["vz"], a["az"]
    z_end = z + (vz + 0.5 * az * h) * h
    for height in heights:
        if not math.isfinite(height):
            continue
        crosses = (z - height) * (z_end - height) < 0.0  # on the other side at the step's end
        if not np.count_nonzero(crosses):
            continue
        crosses &= a["wind"] != 0.0  # a calm flight in a windy group steps as it would alone
        at = np.flatnonzero(crosses)  # the few crossing flights only
        vz_c, az_c = vz[at], az[at]
        ahead = height - z[at]
        root = np.sqrt(np.maximum(vz_c * vz_c + 2.0 * az_c * ahead, 0.0))
        denom = vz_c + np.where(vz_c >= 0.0, root, -root)
        t_hit = np.where(denom != 0.0, 2.0 * ahead / np.where(denom == 0.0, 1.0, denom), np.inf)
        h_c = h[at]
        h = h.copy()
        h[at] = np.where((t_hit > 0.0) & (t_hit < h_c), t_hit * (1.0 + 1e-5), h_c)
    return h


# Largest change of Mach number in one step with a Cd(Mach) table: 0.02 brings the transonic case of
# tests/flight/test_oracle.py to 1e-7 of the solve_ivp apogee (0.05 gave 2e-5); our choice, no published source.
_MAX_MACH_STEP = 0.02


def _kink_step(g: _Group, a: dict, h: np.ndarray) -> np.ndarray:
    """Shorten steps to change Mach by at most ``_MAX_MACH_STEP`` and to end on the next point of the Cd(Mach)
    table that the Mach number will cross.

    Cd is linear between table points, so each point is a kink of the drag; a step
    across one loses the method's order (up to 1.1e-3 in apogee with a 2x-peaked table). The
    Mach rate is predicted from the local motion, dM/dt = M·(v·a)/|v|², and the step
    aimed at the point with a 1e-7 overshoot, as on the rail; a point within 0.1 % of
    the step is left inside it.
    """
    kinks = g.machs[g.machs > 0.0]
    if kinks.size == 0:
        return h
    mach = a["mach"]
    dot = a["vx"] * a["ax"] + a["vz"] * a["az"] + (0.0 if g.planar else a["vy"] * a["ay"])
    speed2 = a["vx"] * a["vx"] + a["vz"] * a["vz"] + (0.0 if g.planar else a["vy"] * a["vy"])
    rate = mach * dot / np.maximum(speed2, 1e-300)
    if np.ptp(g.cds) > 0.0 or (g.cds_powered is not None and np.ptp(g.cds_powered) > 0.0):
        with np.errstate(divide="ignore"):  # Cd changes with Mach: long coast steps would miss it
            h = np.minimum(h, _MAX_MACH_STEP / np.abs(rate))
    up = np.searchsorted(kinks, mach, side="right")
    down = np.searchsorted(kinks, mach, side="left") - 1
    rising = rate > 0.0
    valid = np.where(rising, up < kinks.size, down >= 0)
    target = kinks[np.clip(np.where(rising, up, down), 0, kinks.size - 1)]
    with np.errstate(divide="ignore", invalid="ignore"):
        h_kink = (target - mach) / rate * (1.0 + 1e-7)
    return np.where(valid & (h_kink > 1e-3 * h) & (h_kink < h), h_kink, h)


def _rail_step(a: dict, h: np.ndarray) -> np.ndarray:
    """Shorten the steps of flights on the rail to end on rail exit.

    The time to the rail's end solves s + v·h + a·h²/2 = L with the local motion. A step that would
    pass the end first stops 2 % short of the predicted time (the prediction ignores how the
    acceleration changes within the step: aimed straight at the end from afar, a 0.05 s step overshot
    the end by enough to cost 2e-4 in apogee), then a short final step aims at the end, overshooting
    by 1e-7 relative.
    """
    on_rail = a["on_rail"]
    ux, uy, uz = a["ux"], a["uy"], a["uz"]
    v_along = a["vx"] * ux + a["vy"] * uy + a["vz"] * uz
    a_along = a["ax"] * ux + a["ay"] * uy + a["az"] * uz
    remaining = a["rail_m"] - (a["x"] * ux + a["y"] * uy + a["z"] * uz)
    disc = v_along * v_along + 2.0 * a_along * remaining
    denom = v_along + np.sqrt(np.maximum(disc, 0.0))
    h_exit = np.where((disc >= 0.0) & (denom > 0.0), 2.0 * remaining / np.maximum(denom, 1e-300), np.inf)
    h_exit = np.where(h_exit < _FINAL_APPROACH * h, h_exit * (1.0 + 1e-7), h_exit * (1.0 - _APPROACH_SHORT))
    return np.where(on_rail, np.minimum(h, h_exit), h)


# Rail exit approach: stop 2 % short of the predicted exit, then aim at it once the step to the exit is below 3 %
# of the step the controller allows (so the final step is short and its prediction exact to ~1e-5 of the
# first's error). Our choice, no published source.
_APPROACH_SHORT = 0.02
_FINAL_APPROACH = 0.03
