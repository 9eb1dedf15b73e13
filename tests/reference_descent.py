"""An independent, slow reference for one flight to landing under its recovery devices: scipy's solve_ivp (DOP853).

The same model as the library, in 3-D (x east, y north, z up), built from the pieces of
tests/reference_flight.py and not from motorlib.flight: its forces (:class:`OwnModel`: own thrust and
impulse, air, gravity, wind speed, drag) and its rail phase (:func:`rail_exit`). Here the wind blows toward
the compass direction opposite the one it comes from, the same at every height; the rail leans toward its
azimuth (downwind when the record gives none); each open device adds its Cd·A to the drag (or replaces the
devices before it).

Devices open as the library's recovery sequence says (motorlib/flight/recovery_phase.py): the charge at
burnout plus ``delay_s``, apogee plus a delay, a height on the way down (at once when the rocket is already
below it, falling), or a timer after the previous device (after liftoff for the first). Timed openings and
thrust-curve samples end the integration segments, so no change of the forces sits inside a step; apogee,
the altitude triggers and the ground are terminal events, located by solve_ivp's root finder on the dense
output.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.integrate import solve_ivp

from motorlib import MotorRecord
from motorlib.flight.airframe import Airframe, Recovery

from .reference_flight import OwnModel, rail_exit

_MAX_SEGMENT_S = 4000.0  # longer than any flight here (the library's own limit is 4,000 s of flight)


def reference_descent(frame: Airframe, motor: MotorRecord, delay_s: float | None = None, *, rtol: float = 1e-10,
                      atol: float = 1e-10, wind_exponent: float = 1 / 7, wind_floor_m: float = 1.0,
                      vary_gravity: bool = True, wind_cap_m: float = 1000.0, start: dict | None = None) -> dict:
    """Apogee, every opening and the landing of one flight, from liftoff (or ``start``) to the ground.

    Parameters
    ----------
    frame, motor : the flight
    delay_s : float or None
        The ejection delay that fires the motor's charge [s]; None: the motor has no charge.
    start : dict, optional
        Fly from this state, the instant the first device opened (see :func:`opening_state`), instead of
        from liftoff: the descent alone, free of the ascent's errors.

    Returns
    -------
    dict
        ``apogee_m``, ``apogee_time_s``, ``openings`` (a list of (time [s], height [m], air speed [m/s]) per
        device opened), ``landing_time_s``, ``landing_east_m``, ``landing_north_m``, ``landing_speed_m_s``
        (ground speed) and ``landing_descent_rate_m_s``; NaN figures when the rocket never leaves the rail.

    Notes
    -----
    Past 80 lines on purpose: the right-hand side and the events close over the model and the loop's state.
    """
    model = OwnModel(frame, motor, wind_exponent=wind_exponent, wind_floor_m=wind_floor_m,
                     vary_gravity=vary_gravity, wind_cap_m=wind_cap_m)
    toward, u = _directions(frame)
    out: dict = {"openings": [], "apogee_m": math.nan, "apogee_time_s": math.nan}
    charge_t = math.inf if delay_s is None else model.burnout_s + delay_s
    devices = frame.recovery_devices

    def air_velocity(y: np.ndarray) -> np.ndarray:
        return y[3:] - model.wind_m_s(y[2]) * toward

    if start is None:
        exit_ = rail_exit(model, u, toward, rtol=rtol, atol=atol)
        if exit_ is None:
            return {**out, **{k: math.nan for k in ("landing_time_s", "landing_east_m", "landing_north_m",
                                                     "landing_speed_m_s", "landing_descent_rate_m_s")}}
        t, s, v = exit_
        state = np.concatenate((s * u, v * u))
        extra, k, previous_open_t = 0.0, 0, model.liftoff_s
    else:
        t = start["t"]
        state = np.array([start[key] for key in ("east", "north", "z", "v_east", "v_north", "v_up")], dtype=float)
        out.update(apogee_m=start["apogee_m"], apogee_time_s=start["apogee_time_s"])
        out["openings"].append((t, float(state[2]), float(np.linalg.norm(air_velocity(state)))))
        extra, k, previous_open_t = devices[0].drag_area_m2, 1, t

    def rhs(t_: float, y: np.ndarray, extra_m2: float) -> np.ndarray:
        rel = air_velocity(y)
        speed = math.hypot(*rel)
        acc = (model.thrust_n(t_) / speed - model.drag_per_v(y[2], speed, extra_m2)) / model.mass_kg(t_) * rel
        acc[2] -= model.gravity_m_s2(y[2])
        return np.concatenate((y[3:], acc))

    def at_apogee(t_: float, y: np.ndarray, _e: float) -> float:
        return y[5]

    def on_ground(t_: float, y: np.ndarray, _e: float) -> float:
        return y[2]

    at_apogee.terminal, at_apogee.direction = True, -1
    on_ground.terminal, on_ground.direction = True, -1
    reached = False
    while True:
        device = devices[k] if k < len(devices) else None
        falling = not math.isnan(out["apogee_time_s"])
        opens_at, level = _trigger(device, charge_t, previous_open_t, out["apogee_time_s"])
        if device is not None:
            if reached or opens_at <= t or (level is not None and state[2] <= level):
                out["openings"].append((t, float(state[2]), float(np.linalg.norm(air_velocity(state)))))
                extra = device.drag_area_m2 + (0.0 if device.replaces else extra)
                k, previous_open_t, reached = k + 1, t, False
                continue
        events = [on_ground] + ([] if falling else [at_apogee])
        if level is not None:
            def at_level(t_: float, y: np.ndarray, _e: float, level: float = level) -> float:
                return y[2] - level

            at_level.terminal, at_level.direction = True, -1
            events.append(at_level)
        end = min([t + _MAX_SEGMENT_S, opens_at] + [knot for knot in model.knots if t < knot <= model.burnout_s])
        sol = solve_ivp(rhs, (t, end), state, method="DOP853", rtol=rtol, atol=atol, args=(extra,), events=events)
        t, state = float(sol.t[-1]), sol.y[:, -1]
        if sol.t_events[0].size:  # the ground
            return {**out, "landing_time_s": t, "landing_east_m": float(state[0]), "landing_north_m": float(state[1]),
                    "landing_speed_m_s": float(math.hypot(*state[3:])), "landing_descent_rate_m_s": float(-state[5])}
        if not falling and sol.t_events[1].size:
            out["apogee_m"], out["apogee_time_s"] = float(state[2]), t
        reached = level is not None and sol.t_events[-1].size > 0


def _directions(frame: Airframe) -> tuple[np.ndarray, np.ndarray]:
    """Unit vectors (east, north, up) the wind blows toward and the rail leans along (downwind by default)."""
    launch = frame.launch
    downwind = launch.wind_direction_rad + math.pi
    azimuth = downwind if launch.rail_azimuth_rad is None else launch.rail_azimuth_rad
    lean = launch.rail_angle_rad
    return (np.array([math.sin(downwind), math.cos(downwind), 0.0]),
            np.array([math.sin(lean) * math.sin(azimuth), math.sin(lean) * math.cos(azimuth), math.cos(lean)]))


def _trigger(device: Recovery | None, charge_t: float, previous_open_t: float, apogee_t: float) -> tuple[float, float | None]:
    """When ``device`` (None: no device left) opens: its instant [s] (inf when not timed, or not yet known) and its
    height on the way down [m] (None unless an altitude trigger past apogee); ``apogee_t`` is NaN before apogee."""
    falling = not math.isnan(apogee_t)
    if device is None:
        return math.inf, None
    if device.deploy == "ejection":
        return charge_t, None
    if device.deploy == "after":
        return previous_open_t + device.delay_s, None
    if device.deploy == "apogee":
        return (apogee_t + device.delay_s if falling else math.inf), None
    return math.inf, (device.deploy_altitude_m if falling else None)


def opening_state(results, i: int, frame: Airframe) -> dict | None:
    """The library's state of flight ``i`` the instant its first device opened, as ``start`` of
    :func:`reference_descent` (east, north, up); None when no device opened.

    Read from the flight's trajectory (``simulate(..., trajectories=True)``): its first row flown under a
    device, with the speeds turned from the flight's axes (x downwind, y to its left) to east and north.
    """
    t_open = results.deploy_time_s[i]
    if not np.isfinite(t_open):
        return None
    path = results.trajectories[i]
    row = int(np.flatnonzero(path["descent"] & (path["time_s"] >= t_open))[0])
    downwind = frame.launch.wind_direction_rad + math.pi
    e1e, e1n = math.sin(downwind), math.cos(downwind)
    vx, vy = float(path["vx_m_s"][row]), float(path["vy_m_s"][row])
    return {"t": float(path["time_s"][row]), "east": float(path["east_m"][row]), "north": float(path["north_m"][row]),
            "z": float(path["altitude_m"][row]), "v_east": vx * e1e - vy * e1n, "v_north": vx * e1n + vy * e1e,
            "v_up": float(path["vz_m_s"][row]), "apogee_m": float(results.apogee_m[i]),
            "apogee_time_s": float(results.apogee_time_s[i]) if results.apogee_time_s[i] <= t_open else math.nan}
