"""The figures and reasons of flown candidates: the delay each motor gets, the speeds at each opening and at
landing, the landing distance, and every rule a flight breaks (one rule set: :class:`~motorlib.flight.rules.LaunchRules`).

Landing speed under the recovery device is the terminal descent rate at the pad,
√(2·m·g/(ρ·(Cd·A_device + Cd·A_body))), which the descent approaches well before
landing; the ``fly`` command integrates the whole descent instead. The first device's
opening speed comes from the flight; a later device's is the terminal speed under the
devices open before it, at the density of its opening height. The landing distance is
an estimate: the apogee's distance plus the drift under each device at that terminal
speed in the power-law wind.

numpy only.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np

from ..flight.airframe import Airframe
from ..flight.delays import nearest_delay_column
from ..flight.descent import terminal_speed_m_s
from ..flight.integrate import FlightSettings
from ..flight.pack import MotorPack
from ..flight.results import NO_LIFTOFF, OK, STUCK_ON_RAIL, FlightResults

if TYPE_CHECKING:
    from .rank import MatchSettings

__all__: list[str] = []

# the stability figures of a candidate (filled by .ballast)
_STABILITY_KEYS = ("stability_margin_cal", "nose_weight_for_stability_kg", "nose_weight_apogee_m",
                   "nose_weight_stability_margin_cal", "nose_weight_reasons", "nose_weight_reason_codes")


def _choose_delays(pack: MotorPack, results: FlightResults, listed: list[list[float]]) -> tuple[np.ndarray, ...]:
    """For every flight: the reported delay closest to the optimal one and its ejection state (vectorised)."""
    delays = pack.delays_s
    col, has = nearest_delay_column(delays, results.optimal_delay_s)
    rows = np.arange(delays.shape[0])
    chosen = np.where(has, delays[rows, col], np.nan)
    altitude = np.where(has, results.ejection_altitude_m[rows, col], np.nan)
    speed = np.where(has, results.ejection_speed_m_s[rows, col], np.nan)
    vertical = np.where(has, results.ejection_vertical_speed_m_s[rows, col], np.nan)
    adjusted = np.array([bool(np.isfinite(c)) and c not in lst for c, lst in zip(chosen, listed)])
    return chosen, altitude, speed, vertical, adjusted


def _landing_speed(frame: Airframe, results: FlightResults, pack: MotorPack) -> np.ndarray:
    if not frame.recovery_devices:
        return np.full(results.n_flights, np.nan)
    _, _, rho, _ = frame.launch.site.air(0.0)
    burnt_mass = results.liftoff_mass_kg - pack.propellant_mass_kg
    body = (frame.drag_cds[0] if frame.drag_table else frame.drag_coefficient) * frame.reference_area_m2
    extra = 0.0
    for device in frame.recovery_devices:  # the drag area open at landing: every device, or the last that replaces
        extra = device.drag_area_m2 + (0.0 if device.replaces else extra)
    return terminal_speed_m_s(burnt_mass, extra + body, float(rho))


def flies_descent(frame: Airframe, s: MatchSettings) -> bool:
    """Whether the ranking flies the whole descent rather than estimating it: for a recovery sequence, a device
    opened by electronics, or a field radius to check (then every opening speed and the landing point are the
    flown ones; a single ejection-charge device without a field radius keeps the fast estimate)."""
    devices = frame.recovery_devices
    return bool(devices) and (len(devices) > 1 or any(d.deploy != "ejection" for d in devices)
                              or s.rules.field_radius_m is not None)


def _deployment_speeds(frame: Airframe, results: FlightResults, pack: MotorPack) -> np.ndarray:
    """Opening speed of every device [m/s], shape (n, n_devices): the flown one where the descent was flown;
    else the first from the flight and a later one the terminal speed under the devices before it at its
    opening height (NaN where the first never opens)."""
    devices = frame.recovery_devices
    n = results.n_flights
    out = np.full((n, max(len(devices), 1)), np.nan)
    if not devices:
        return out
    flown = results.deployment_speed_m_s[:, : len(devices)]
    out[:, 0] = flown[:, 0]
    burnt_mass = results.liftoff_mass_kg - pack.propellant_mass_kg
    body = (frame.drag_cds[0] if frame.drag_table else frame.drag_coefficient) * frame.reference_area_m2
    height = results.deployment_altitude_m[:, 0]
    extra = 0.0
    for k in range(1, len(devices)):
        before = devices[k - 1]
        extra = before.drag_area_m2 + (0.0 if before.replaces else extra)
        if devices[k].deploy == "altitude":
            height = np.minimum(height, float(devices[k].deploy_altitude_m))  # type: ignore[arg-type]
        _, _, rho, _ = frame.launch.site.air(np.maximum(height, 0.0))
        out[:, k] = np.where(np.isfinite(out[:, 0]), terminal_speed_m_s(burnt_mass, body + extra, rho), np.nan)
    landed = np.isfinite(results.landing_east_m)[:, None]  # the descent was flown: its own opening speeds
    return np.where(landed & np.isfinite(flown), flown, out) if flown.shape == out.shape else out


def _landing_distance(frame: Airframe, results: FlightResults, pack: MotorPack) -> np.ndarray:
    """Estimated landing distance from the pad [m]: the apogee's downrange distance plus the drift under
    each device falling at its terminal speed (pad density) through the power-law wind w10·(z/10 m)^α,
    integrated in closed form over each device's height band. NaN where nothing opens."""
    devices = frame.recovery_devices
    n = results.n_flights
    if not devices:
        return np.full(n, np.nan)
    alpha = FlightSettings().wind_exponent
    _, _, rho0, _ = frame.launch.site.air(0.0)
    burnt_mass = results.liftoff_mass_kg - pack.propellant_mass_kg
    body = (frame.drag_cds[0] if frame.drag_table else frame.drag_coefficient) * frame.reference_area_m2
    tops = [np.maximum(results.deployment_altitude_m[:, 0], 0.0)]
    for device in devices[1:]:
        below = float(device.deploy_altitude_m) if device.deploy == "altitude" else np.inf  # type: ignore[arg-type]
        tops.append(np.minimum(tops[-1], below))
    drift = np.zeros(n)
    extra = 0.0
    for k, device in enumerate(devices):
        extra = device.drag_area_m2 + (0.0 if device.replaces else extra)
        top, bottom = tops[k], (tops[k + 1] if k + 1 < len(devices) else np.zeros(n))
        v_t = terminal_speed_m_s(burnt_mass, body + extra, float(rho0))
        # ∫ w(z) dz / v_t over [bottom, top] with w(z) = w10·(z/10)^α
        band = (top ** (alpha + 1.0) - bottom ** (alpha + 1.0)) / ((alpha + 1.0) * 10.0**alpha)
        drift += frame.launch.wind_speed_m_s * band / v_t
    estimate = np.abs(results.apogee_downrange_m + drift)
    flown = np.hypot(results.landing_east_m, results.landing_north_m)
    return np.where(np.isfinite(flown), flown, estimate)  # the flown landing point where the descent was flown


def _figures(frame: Airframe, rows: list[dict[str, Any]], pack: MotorPack, results: FlightResults,
             s: MatchSettings) -> dict[str, Any]:
    chosen, altitude, speed, vertical, adjusted = _choose_delays(pack, results, [r["delays_s"] for r in rows])
    landing = _landing_speed(frame, results, pack)
    deploy = _deployment_speeds(frame, results, pack)
    distance = _landing_distance(frame, results, pack)
    uses_charge = frame.recovery is None or frame.recovery.deploy == "ejection"
    reasons = [_reasons(results, i, chosen[i], speed[i], landing[i], uses_charge, s, rows[i],
                        _Recovered(frame, deploy[i], distance[i])) for i in range(len(rows))]

    def col(values: np.ndarray) -> list[float | None]:
        return [float(v) if np.isfinite(v) else None for v in values]

    return {
        "apogee_m": col(results.apogee_m), "time_to_apogee_s": col(results.apogee_time_s),
        "rail_exit_speed_m_s": col(results.rail_exit_speed_m_s),
        "liftoff_thrust_to_weight": col(results.liftoff_thrust_to_weight),
        "max_speed_m_s": col(results.max_speed_m_s), "max_mach": col(results.max_mach),
        "burnout_time_s": col(results.burnout_time_s), "optimal_delay_s": col(results.optimal_delay_s),
        "chosen_delay_s": col(chosen), "delay_adjusted": [bool(a) for a in adjusted],
        "ejection_altitude_m": col(altitude), "ejection_speed_m_s": col(speed),
        "ejection_vertical_speed_m_s": col(vertical), "landing_speed_m_s": col(landing),
        "max_deployment_speed_m_s": col(np.max(np.where(np.isnan(deploy), -np.inf, deploy), axis=1)),
        "landing_distance_m": col(distance),
        "liftoff_mass_kg": col(results.liftoff_mass_kg),
        "ballast_kg": [None] * len(rows), "ballast_apogee_m": [None] * len(rows),
        "ballast_rail_exit_speed_m_s": [None] * len(rows), "ballast_liftoff_thrust_to_weight": [None] * len(rows),
        "ballast_chosen_delay_s": [None] * len(rows), "ballast_optimal_delay_s": [None] * len(rows),
        "ballast_ejection_speed_m_s": [None] * len(rows), "ballast_landing_speed_m_s": [None] * len(rows),
        "ballast_reasons": [None] * len(rows), "ballast_reason_codes": [None] * len(rows),
        "_reasons": reasons, "_status": list(results.status),
    }


# Flight status -> the reason code (and verdict word) a flyer reads at a glance.
_STATUS_CODES = {NO_LIFTOFF: "no liftoff", STUCK_ON_RAIL: "stuck on rail"}


@dataclass(frozen=True)
class _Recovered:
    """One flight's recovery figures checked by :func:`_reasons`: each device's opening speed [m/s] and the
    landing distance [m] (NaN: unknown)."""

    frame: Airframe
    deployment_speeds_m_s: np.ndarray
    landing_distance_m: float


def _reasons(results: FlightResults, i: int, chosen: float, ejection_speed: float, landing: float,
             uses_charge: bool, s: MatchSettings, row: dict[str, Any], recovered: _Recovered | None = None
             ) -> list[tuple[str, str]]:
    """(short code, message) for every rule the flight breaks."""
    r = s.rules
    if results.status[i] != OK:
        return [(_STATUS_CODES.get(int(results.status[i]), "not flown"), results.message(i))]
    out = []
    exit_speed = results.rail_exit_speed_m_s[i]
    wind = recovered.frame.launch.surface_wind_m_s if recovered is not None else 0.0
    need = r.rail_exit_needed_m_s(wind)
    if exit_speed < need:
        why = "" if need == r.min_rail_exit_speed_m_s else f" ({r.rail_exit_wind_ratio:g} x the {wind:g} m/s wind)"
        out.append(("rail", f"rail exit too slow: {exit_speed:.1f} m/s, below {need:g} m/s{why}"))
    ttw = results.liftoff_thrust_to_weight[i]
    if ttw < r.min_liftoff_thrust_to_weight:
        out.append(("T/W", f"thrust-to-weight too low: {ttw:.1f}, below {r.min_liftoff_thrust_to_weight:g}"))
    apogee = results.apogee_m[i]
    if s.ceiling_m is not None and apogee > s.ceiling_m:
        out.append(("ceiling", f"over the ceiling: apogee {apogee:.0f} m above {s.ceiling_m:.0f} m"))
    if uses_charge:
        optimal = results.optimal_delay_s[i]
        if not np.isfinite(chosen) and row.get("ejection") == "unknown":
            out.append(("delays unknown", "the motor's ejection delays are not given (add them to its record) and "
                                          "the airframe file has no electronics deployment"))
        elif not np.isfinite(chosen):
            out.append(("no charge", "no ejection charge (plugged or booster) and no electronics deployment in the airframe file"))
        elif abs(chosen - optimal) > s.delay_slack_s:
            out.append(("delay", f"no delay within {s.delay_slack_s:g} s of the optimal {optimal:.1f} s "
                       f"(closest {chosen:g} s)"))
        charged_device = recovered is not None and recovered.frame.recovery_devices and uses_charge
        if np.isfinite(ejection_speed) and ejection_speed > r.max_ejection_speed_m_s and not charged_device:
            out.append(("eject", f"ejection too fast: {ejection_speed:.0f} m/s at the {chosen:g} s delay "
                       f"(limit {r.max_ejection_speed_m_s:g} m/s)"))
        if np.isfinite(chosen) and not np.isfinite(ejection_speed):
            out.append(("lands first", f"lands before the {chosen:g} s delay fires"))
    if np.isfinite(landing) and landing > r.max_landing_speed_m_s:
        out.append(("descent", f"descent too fast: {landing:.1f} m/s under the device (limit {r.max_landing_speed_m_s:g} m/s)"))
    if recovered is not None:
        for device, speed in zip(recovered.frame.recovery_devices, recovered.deployment_speeds_m_s):
            limit = r.deployment_limit_m_s(device.device)
            if np.isfinite(speed) and speed > limit:
                out.append(("deploy", f"the {device.device} opens too fast: {speed:.0f} m/s (limit {limit:g} m/s)"))
        distance = recovered.landing_distance_m
        if r.field_radius_m is not None and np.isfinite(distance) and distance > r.field_radius_m:
            out.append(("field", f"lands outside the field: about {distance:.0f} m from the pad "
                                 f"(field radius {r.field_radius_m:.0f} m)"))
    return out
