"""An independent, slow reference for one flight: scipy's solve_ivp (DOP853) on the same model.

Written separately from motorlib.flight: the pad wait is found with brentq, the
rail phase integrates the 1-D motion along the rail with a terminal event at its
end, free flight integrates the 2-D equations between thrust-curve samples
(restarting at each sample so the kinks of the piecewise-linear thrust never sit
inside a step) and stops at apogee with a terminal event.

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


def reference_flight(frame: Airframe, motor: MotorRecord, *, rtol: float = 1e-10, atol: float = 1e-10,
                     method: str = "DOP853", wind_exponent: float = 1 / 7, wind_floor_m: float = 1.0,
                     vary_gravity: bool = True, wind_cap_m: float = 1000.0) -> dict[str, float]:
    site = frame.launch.site
    theta = frame.launch.rail_angle_rad
    ux, uz = math.sin(theta), math.cos(theta)
    area = math.pi * frame.diameter_m**2 / 4.0
    own = OwnMotor(motor)
    itot = own.total_ns
    dry = frame.mass_kg
    air = OwnAir(site)

    def mass(t: float) -> float:
        return dry + motor.total_mass_kg - motor.propellant_mass_kg * own.impulse_ns(t) / itot

    def gravity(z: float) -> float:
        return G0 * (R0 / (R0 + site.elevation_m + z)) ** 2 if vary_gravity else G0

    def wind(z: float) -> float:
        # the power law, held above its cap (1,000 m by default, as motorlib.flight.wind)
        return frame.launch.wind_speed_m_s * (min(max(z, wind_floor_m), wind_cap_m) / 10.0) ** wind_exponent

    def drag_per_v(z: float, speed: float) -> float:
        rho, a = air(z)
        cd = np.interp(speed / a, frame.drag_machs, frame.drag_cds) if frame.drag_table else frame.drag_coefficient
        return 0.5 * rho * speed * cd * area

    # ---- pad: first time thrust exceeds weight along the rail ----
    def margin(t: float) -> float:
        return own.thrust_n(t) - mass(t) * G0 * uz

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
        a = (own.thrust_n(t) - d * (vrx * ux + vrz * uz)) / mass(t) - gravity(z) * uz
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
        thrust = own.thrust_n(t) if t < burnout else 0.0
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
