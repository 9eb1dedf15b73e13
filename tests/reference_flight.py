"""An independent, slow reference for one flight: scipy's solve_ivp (DOP853) on the same model.

Written separately from motorlib.flight: the pad wait is found with brentq, the
rail phase integrates the 1-D motion along the rail with a terminal event at its
end, free flight integrates the 2-D equations between thrust-curve samples
(restarting at each sample so the kinks of the piecewise-linear thrust never sit
inside a step) and stops at apogee with a terminal event. Air properties come
from the exact U.S. Standard Atmosphere functions, not from a table.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

from motorlib import MotorRecord
from motorlib.flight.airframe import Airframe
from motorlib.flight.atmosphere import EARTH_RADIUS_M
from motorlib.units import STANDARD_GRAVITY_M_S2 as G0


def reference_flight(frame: Airframe, motor: MotorRecord, *, rtol: float = 1e-10, atol: float = 1e-10,
                     method: str = "DOP853", wind_exponent: float = 1 / 7, wind_floor_m: float = 1.0,
                     vary_gravity: bool = True, wind_cap_m: float = 1000.0) -> dict[str, float]:
    site = frame.launch.site
    theta = frame.launch.rail_angle_rad
    ux, uz = math.sin(theta), math.cos(theta)
    area = frame.reference_area_m2
    itot = motor.total_impulse_ns
    dry = frame.mass_kg

    def mass(t: float) -> float:
        return dry + motor.total_mass_kg - motor.propellant_mass_kg * float(motor.impulse_at_ns(t)) / itot

    def air(z: float) -> tuple[float, float]:
        _, _, rho, a = site.air(z)
        return float(rho), float(a)

    def gravity(z: float) -> float:
        return G0 * (EARTH_RADIUS_M / (EARTH_RADIUS_M + site.elevation_m + z)) ** 2 if vary_gravity else G0

    def wind(z: float) -> float:
        # the power law, held above its cap (1,000 m by default, as motorlib.flight.wind)
        return frame.launch.wind_speed_m_s * (min(max(z, wind_floor_m), wind_cap_m) / 10.0) ** wind_exponent

    def drag_per_v(z: float, speed: float) -> float:
        rho, a = air(z)
        cd = np.interp(speed / a, frame.drag_machs, frame.drag_cds) if frame.drag_table else frame.drag_coefficient
        return 0.5 * rho * speed * cd * area

    # ---- pad: first time thrust exceeds weight along the rail ----
    def margin(t: float) -> float:
        return float(motor.thrust_at_n(t)) - mass(t) * G0 * uz

    ts = motor.time_s
    margins = [margin(t) for t in ts]
    k = next(i for i, m in enumerate(margins) if m > 0)
    t0 = ts[0] if k == 0 else brentq(margin, ts[k - 1], ts[k], xtol=1e-15, rtol=1e-15)
    knots = [float(t) for t in ts if t > t0] + [math.inf]
    burnout = motor.time_s[np.flatnonzero(motor.thrust_n > 0)[-1] + 1] if motor.thrust_n[-1] == 0 else motor.time_s[-1]

    # ---- rail: state (s, v) along the rail ----
    def rail_rhs(t: float, y: np.ndarray) -> list[float]:
        s, v = y
        z = s * uz
        vrx, vrz = v * ux - wind(z), v * uz
        speed = math.hypot(vrx, vrz)
        d = drag_per_v(z, speed)
        a = (float(motor.thrust_at_n(t)) - d * (vrx * ux + vrz * uz)) / mass(t) - gravity(z) * uz
        return [v, a]

    def at_rail_end(t: float, y: np.ndarray) -> float:
        return y[0] - frame.launch.rail_length_m

    at_rail_end.terminal, at_rail_end.direction = True, 1
    y = np.array([0.0, 0.0])
    t = t0
    exit_t = exit_v = None
    for t_next in knots:
        end = min(t_next, t + 100.0)
        sol = solve_ivp(rail_rhs, (t, end), y, method=method, rtol=rtol, atol=atol, events=at_rail_end)
        if sol.t_events[0].size:
            exit_t, y_exit = float(sol.t_events[0][0]), sol.y_events[0][0]
            exit_v = float(y_exit[1])
            break
        t, y = end, sol.y[:, -1]
    if exit_t is None:
        return {"rail_exit_speed_m_s": math.nan, "apogee_m": math.nan, "apogee_time_s": math.nan,
                "liftoff_time_s": float(t0), "rail_exit_time_s": math.nan, "apogee_downrange_m": math.nan}
    state = np.array([y_exit[0] * ux, y_exit[0] * uz, exit_v * ux, exit_v * uz])

    # ---- free flight ----
    def rhs(t: float, y: np.ndarray) -> list[float]:
        x, z, vx, vz = y
        vrx, vrz = vx - wind(z), vz
        speed = math.hypot(vrx, vrz)
        m = mass(t)
        thrust = float(motor.thrust_at_n(t)) if t < burnout else 0.0
        along = thrust / speed - drag_per_v(z, speed)
        return [vx, vz, along * vrx / m, along * vrz / m - gravity(z)]

    def at_apogee(t: float, y: np.ndarray) -> float:
        return y[3]

    at_apogee.terminal, at_apogee.direction = True, -1
    t = exit_t
    free_knots = [k_ for k_ in knots if k_ > exit_t and k_ <= burnout] + [math.inf]
    for t_next in free_knots:
        end = t_next if math.isfinite(t_next) else t + 2000.0
        sol = solve_ivp(rhs, (t, end), state, method=method, rtol=rtol, atol=atol, events=at_apogee)
        if sol.t_events[0].size:
            return {"apogee_m": float(sol.y_events[0][0][1]), "apogee_time_s": float(sol.t_events[0][0]),
                    "rail_exit_speed_m_s": exit_v, "rail_exit_time_s": exit_t, "liftoff_time_s": float(t0),
                    "apogee_downrange_m": float(sol.y_events[0][0][0])}
        t, state = end, sol.y[:, -1]
    raise RuntimeError("no apogee")
