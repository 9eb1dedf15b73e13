"""An independent, slow reference for one flight: scipy's solve_ivp (DOP853) on the same model.

Written separately from motorlib.flight: the pad wait is found with brentq, the
rail phase integrates the 1-D motion along the rail with a terminal event at its
end, free flight integrates the 2-D equations between thrust-curve samples
(restarting at each sample so the kinks of the piecewise-linear thrust never sit
inside a step) and stops at apogee with a terminal event. The forces
(:class:`OwnModel`) and the rail phase (:func:`rail_exit`) also serve the flight to
landing of tests/reference_descent.py.

The oracle shares no code with the library beyond the records' data (samples,
masses, site and airframe figures): thrust, impulse, air and gravity are its own
(:class:`OwnMotor`, :class:`OwnAir`), so a mistake in the library's versions
cannot pass both.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

from motorlib import MotorRecord
from motorlib.flight.airframe import Airframe
from motorlib.flight.atmosphere import Site

# U.S. Standard Atmosphere 1976 (NOAA-S/T 76-1562), constants and table 4 layer bases, re-typed here
G0 = 9.80665  # m/s², standard gravity (exact, 3rd CGPM 1901)
R_STAR = 8314.32  # J/(kmol K), the 1976 value
M0 = 28.9644  # kg/kmol, sea-level molar mass of air
R_AIR = R_STAR / M0  # J/(kg K)
GAMMA = 1.4
R0 = 6_356_766.0  # m, effective earth radius of the geopotential
P_SEA = 101_325.0  # Pa
LAYERS = [(0.0, 288.15, -6.5e-3), (11_000.0, 216.65, 0.0), (20_000.0, 216.65, 1.0e-3), (32_000.0, 228.65, 2.8e-3),
          (47_000.0, 270.65, 0.0), (51_000.0, 270.65, -2.8e-3), (71_000.0, 214.65, -2.0e-3)]  # (Hb m, Tb K, L K/m)


class OwnAir:
    """Air above a site: T = T_std(H) + ΔT at every geopotential height H, p hydrostatic from the pad.

    ln(p/p_pad) = -(g0/R) ∫ dH / T(H), in closed form per layer (USSA 1976 eqs. 33a and 33b with the
    shifted temperature); geometric height Z to H by H = r0 Z / (r0 + Z).
    """

    def __init__(self, site: Site) -> None:
        self.elevation_m = site.elevation_m
        pad_h = self._geopotential(site.elevation_m)
        self.offset_k = 0.0 if site.temperature_k is None else site.temperature_k - self._t_std(pad_h)
        standard_pad = P_SEA * math.exp(self._log_ratio(pad_h, 0.0))
        self.pad_pa = standard_pad if site.pressure_pa is None else site.pressure_pa
        self.pad_log = self._log_ratio(pad_h, self.offset_k)

    @staticmethod
    def _geopotential(z: float) -> float:
        return R0 * z / (R0 + z)

    @staticmethod
    def _layer(h: float) -> tuple[float, float, float]:
        return [layer for layer in LAYERS if layer[0] <= h][-1] if h >= 0.0 else LAYERS[0]

    def _t_std(self, h: float) -> float:
        hb, tb, lapse = self._layer(h)
        return tb + lapse * (h - hb)

    def _log_ratio(self, h: float, offset: float) -> float:
        """ln(p(H) / p(0)) in the shifted column: -(g0/R) ∫ dH / T from 0 to H, layer by layer (H may be < 0)."""
        total = 0.0
        for k, (hb, tb, lapse) in enumerate(LAYERS):
            top = LAYERS[k + 1][0] if k + 1 < len(LAYERS) else math.inf
            end = min(h, top)  # below sea level only the first layer is used, extended downwards
            t_start, t_end = tb + offset, tb + offset + lapse * (end - hb)
            part = (end - hb) / t_start if lapse == 0.0 else math.log(t_end / t_start) / lapse
            total -= G0 / R_AIR * part
            if h <= top:
                break
        return total

    def __call__(self, height_m: float) -> tuple[float, float]:
        """Density [kg/m³] and speed of sound [m/s] at ``height_m`` above the pad."""
        h = self._geopotential(self.elevation_m + height_m)
        t = self._t_std(h) + self.offset_k
        p = self.pad_pa * math.exp(self._log_ratio(h, self.offset_k) - self.pad_log)
        return p / (R_AIR * t), math.sqrt(GAMMA * R_AIR * t)


class OwnMotor:
    """Thrust linear between the samples (0 N outside them) and the impulse delivered so far, exactly."""

    def __init__(self, motor: MotorRecord) -> None:
        self.t = [float(x) for x in motor.time_s]
        self.f = [float(x) for x in motor.thrust_n]
        self.cumulative = [0.0]
        for k in range(len(self.t) - 1):  # area of each trapezoid, by hand
            self.cumulative.append(self.cumulative[-1] + 0.5 * (self.f[k] + self.f[k + 1]) * (self.t[k + 1] - self.t[k]))
        self.total_ns = self.cumulative[-1]

    def _segment(self, time: float) -> int:
        k = 0
        while k + 2 < len(self.t) and self.t[k + 1] <= time:
            k += 1
        return k

    def thrust_n(self, time: float) -> float:
        if time < self.t[0] or time > self.t[-1]:
            return 0.0
        k = self._segment(time)
        return self.f[k] + (self.f[k + 1] - self.f[k]) * (time - self.t[k]) / (self.t[k + 1] - self.t[k])

    def impulse_ns(self, time: float) -> float:
        if time <= self.t[0]:
            return 0.0
        if time >= self.t[-1]:
            return self.total_ns
        k = self._segment(time)
        return self.cumulative[k] + 0.5 * (self.f[k] + self.thrust_n(time)) * (time - self.t[k])


class OwnModel:
    """The forces on one (airframe, motor) flight, written here: thrust, mass, gravity, wind and drag.

    The pieces every reference flight in the tests is built from (this module's ascent, and the flight to
    landing of tests/reference_descent.py). Thrust is the curve's (0 N after burnout), mass falls with the
    impulse delivered, gravity is inverse-square in the height above sea level (or g0), the wind's speed
    follows the power law from its floor to its cap, drag is ½·ρ·|v|²·(Cd·A + ``extra_m2``) with Cd from
    the airframe's table by Mach number (or its constant), and the rocket lifts off at the first instant
    thrust exceeds the weight along the rail (found with brentq).
    """

    def __init__(self, frame: Airframe, motor: MotorRecord, *, wind_exponent: float = 1 / 7,
                 wind_floor_m: float = 1.0, vary_gravity: bool = True, wind_cap_m: float = 1000.0) -> None:
        self.frame, self.motor = frame, motor
        self.elevation_m = frame.launch.site.elevation_m
        self.area_m2 = math.pi * frame.diameter_m**2 / 4.0
        self.own = OwnMotor(motor)
        self.air = OwnAir(frame.launch.site)
        self.wind_exponent, self.wind_floor_m, self.wind_cap_m = wind_exponent, wind_floor_m, wind_cap_m
        self.vary_gravity = vary_gravity
        thrust = motor.thrust_n
        self.burnout_s = float(motor.time_s[np.flatnonzero(thrust > 0)[-1] + 1] if thrust[-1] == 0 else motor.time_s[-1])
        # ---- pad: first time thrust exceeds weight along the rail ----
        uz = math.cos(frame.launch.rail_angle_rad)

        def margin(t: float) -> float:
            return self.own.thrust_n(t) - self.mass_kg(t) * G0 * uz

        ts = motor.time_s
        k = next(i for i, t in enumerate(ts) if margin(t) > 0)
        self.liftoff_s = float(ts[0] if k == 0 else brentq(margin, ts[k - 1], ts[k], xtol=1e-15, rtol=1e-15))
        self.knots = [float(t) for t in ts if t > self.liftoff_s] + [math.inf]  # the thrust's kinks ahead

    def mass_kg(self, t: float) -> float:
        return self.frame.mass_kg + self.motor.total_mass_kg - self.motor.propellant_mass_kg * self.own.impulse_ns(t) / self.own.total_ns

    def thrust_n(self, t: float) -> float:
        return self.own.thrust_n(t) if t < self.burnout_s else 0.0

    def gravity_m_s2(self, z: float) -> float:
        return G0 * (R0 / (R0 + self.elevation_m + z)) ** 2 if self.vary_gravity else G0

    def wind_m_s(self, z: float) -> float:
        """The wind's speed at height ``z``: the power law, held below its floor and above its cap (1,000 m by
        default, as motorlib.flight.wind)."""
        return self.frame.launch.wind_speed_m_s * (min(max(z, self.wind_floor_m), self.wind_cap_m) / 10.0) ** self.wind_exponent

    def drag_per_v(self, z: float, speed: float, extra_m2: float = 0.0) -> float:
        """Drag force over air speed [N/(m/s)]; ``extra_m2`` is the Cd·A of the open recovery devices."""
        frame = self.frame
        rho, a = self.air(z)
        cd = np.interp(speed / a, frame.drag_machs, frame.drag_cds) if frame.drag_table else frame.drag_coefficient
        return 0.5 * rho * speed * (cd * self.area_m2 + extra_m2)


def rail_exit(model: OwnModel, u: np.ndarray, toward: np.ndarray, *, rtol: float, atol: float,
              method: str = "DOP853", on_piece=None) -> tuple[float, float, float] | None:
    """Time [s], distance along the rail [m] (its length, to the event's precision) and speed [m/s] at the
    rail's end, or None when the rocket never leaves it.

    The rail phase integrates the 1-D motion (distance, speed) along the rail's unit vector ``u`` (3 components,
    the last one up) from liftoff, with the wind blowing along the unit vector ``toward``, restarting at every
    thrust-curve sample, with a terminal event at the rail's end.
    """
    rail_m = model.frame.launch.rail_length_m

    def rhs(t: float, y: np.ndarray) -> list[float]:
        s, v = y
        rel = v * u - model.wind_m_s(s * u[2]) * toward
        d = model.drag_per_v(s * u[2], math.hypot(*rel))
        return [v, (model.own.thrust_n(t) - d * float(rel @ u)) / model.mass_kg(t) - model.gravity_m_s2(s * u[2]) * u[2]]

    def at_end(t: float, y: np.ndarray) -> float:
        return y[0] - rail_m

    at_end.terminal, at_end.direction = True, 1
    y, t = np.array([0.0, 0.0]), model.liftoff_s
    for t_next in model.knots:
        end = min(t_next, t + 100.0)
        sol = solve_ivp(rhs, (t, end), y, method=method, rtol=rtol, atol=atol, events=at_end,
                        dense_output=on_piece is not None)
        if on_piece is not None:  # the piece's dense output (distance, speed along the rail) and its span
            on_piece(sol.sol, t, float(sol.t[-1]))
        if sol.t_events[0].size:
            return float(sol.t_events[0][0]), float(sol.y_events[0][0][0]), float(sol.y_events[0][0][1])
        t, y = end, sol.y[:, -1]
    return None


def reference_flight(frame: Airframe, motor: MotorRecord, *, rtol: float = 1e-10, atol: float = 1e-10,
                     method: str = "DOP853", wind_exponent: float = 1 / 7, wind_floor_m: float = 1.0,
                     vary_gravity: bool = True, wind_cap_m: float = 1000.0, maxima: bool = False) -> dict[str, float]:
    """Liftoff, rail exit and apogee of one flight in 2-D (x downwind, z up; the rail leans downwind).

    With ``maxima``, also the largest speed over the ground [m/s], dynamic pressure ½·ρ·|v_rel|² [Pa] and Mach
    number |v_rel|/a from liftoff to apogee (``max_speed_m_s``, ``max_dynamic_pressure_pa``, ``max_mach``):
    each piece of the flight (on the rail, the motion along it as a 2-D state) is solved with its dense output,
    sampled 400 times, and the best sample refined by a bounded scalar search (scipy's minimize_scalar) between
    its neighbours.
    """
    model = OwnModel(frame, motor, wind_exponent=wind_exponent, wind_floor_m=wind_floor_m,
                     vary_gravity=vary_gravity, wind_cap_m=wind_cap_m)
    theta = frame.launch.rail_angle_rad
    ux, uz = math.sin(theta), math.cos(theta)
    t0, burnout = model.liftoff_s, model.burnout_s
    peaks = _Peaks(model) if maxima else None

    def on_rail(dense, a: float, b: float) -> None:  # the rail phase counts too (a motor may burn out on it)
        def state(tk: float) -> np.ndarray:
            along, speed = dense(tk)
            return np.array([along * ux, along * uz, speed * ux, speed * uz])

        peaks.search(state, a, b)

    exit_ = rail_exit(model, np.array([ux, 0.0, uz]), np.array([1.0, 0.0, 0.0]), rtol=rtol, atol=atol, method=method,
                      on_piece=None if peaks is None else on_rail)
    if exit_ is None:
        return {"rail_exit_speed_m_s": math.nan, "apogee_m": math.nan, "apogee_time_s": math.nan,
                "liftoff_time_s": t0, "rail_exit_time_s": math.nan, "apogee_downrange_m": math.nan}
    exit_t, exit_s, exit_v = exit_
    state = np.array([exit_s * ux, exit_s * uz, exit_v * ux, exit_v * uz])

    # ---- free flight ----
    def rhs(t: float, y: np.ndarray) -> list[float]:
        x, z, vx, vz = y
        vrx, vrz = vx - model.wind_m_s(z), vz
        speed = math.hypot(vrx, vrz)
        along = model.thrust_n(t) / speed - model.drag_per_v(z, speed)
        m = model.mass_kg(t)
        return [vx, vz, along * vrx / m, along * vrz / m - model.gravity_m_s2(z)]

    def at_apogee(t: float, y: np.ndarray) -> float:
        return y[3]

    at_apogee.terminal, at_apogee.direction = True, -1
    t = exit_t
    free_knots = [k_ for k_ in model.knots if k_ > exit_t and k_ <= burnout] + [math.inf]
    for t_next in free_knots:
        end = t_next if math.isfinite(t_next) else t + 2000.0
        sol = solve_ivp(rhs, (t, end), state, method=method, rtol=rtol, atol=atol, events=at_apogee,
                        dense_output=maxima)
        if peaks is not None:
            peaks.search(sol.sol, t, float(sol.t[-1]))
        if sol.t_events[0].size:
            out = {"apogee_m": float(sol.y_events[0][0][1]), "apogee_time_s": float(sol.t_events[0][0]),
                   "rail_exit_speed_m_s": exit_v, "rail_exit_time_s": exit_t, "liftoff_time_s": t0,
                   "apogee_downrange_m": float(sol.y_events[0][0][0])}
            return out if peaks is None else {**out, **peaks.best}
        t, state = end, sol.y[:, -1]
    raise RuntimeError("no apogee")


class _Peaks:
    """Running maxima of speed, dynamic pressure and Mach over the dense output of a 2-D free flight."""

    def __init__(self, model: OwnModel) -> None:
        self.model = model
        self.best = {"max_speed_m_s": 0.0, "max_dynamic_pressure_pa": 0.0, "max_mach": 0.0}

    def figures(self, y: np.ndarray) -> dict[str, float]:
        x, z, vx, vz = y
        rel = math.hypot(vx - self.model.wind_m_s(z), vz)
        rho, a = self.model.air(z)
        return {"max_speed_m_s": math.hypot(vx, vz), "max_dynamic_pressure_pa": 0.5 * rho * rel * rel,
                "max_mach": rel / a}

    def search(self, dense, t0: float, t1: float) -> None:
        from scipy.optimize import minimize_scalar

        grid = np.linspace(t0, t1, 401)
        for key in self.best:
            values = [self.figures(dense(tk))[key] for tk in grid]
            k = int(np.argmax(values))
            self.best[key] = max(self.best[key], values[k])
            lo, hi = grid[max(k - 1, 0)], grid[min(k + 1, grid.size - 1)]
            if hi > lo:
                found = minimize_scalar(lambda tk: -self.figures(dense(tk))[key], bounds=(lo, hi), method="bounded",
                                        options={"xatol": 1e-12 * max(1.0, abs(hi))})
                self.best[key] = max(self.best[key], -float(found.fun))
