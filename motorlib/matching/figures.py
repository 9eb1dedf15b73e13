"""The figures and reasons of flown candidates: the delay each motor gets, the speeds at each opening and at
landing, the landing distance, and every rule a flight breaks (one rule set: :class:`~motorlib.flight.rules.LaunchRules`).

Landing speed under the recovery device is the descent rate at landing: where the descent is
not flown, the terminal descent rate at the pad, √(2·m·g/(ρ·(Cd·A_device + Cd·A_body))), which
the descent approaches well before landing (``fly`` integrates the whole descent). The first device's
opening speed comes from the flight; a later device's is the terminal speed under the
devices open before it, at the density of its opening height. The landing distance is
an estimate: the apogee's distance plus the drift under each device at that terminal
speed in the power-law wind. Where the descent was flown, every figure is the flown one.
The rules are those ``fly`` applies, evaluated once for all candidates
(:mod:`motorlib.flight.rulebook`).

Two speeds, not to be confused: ``ejection_speed_m_s`` is the speed over the ground when the chosen
delay fires; ``max_deployment_speed_m_s`` the fastest opening of a device, through the air (relative
to the wind), the figure the ``deployment-fast`` rule judges and the match table's "opens" column.

numpy only.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np

from ..flight.airframe import Airframe
from ..flight.delays import nearest_delay_column
from ..flight.descent import landing_descent_rate_m_s, terminal_speed_m_s
from ..flight.integrate import FlightSettings
from ..flight.pack import MotorPack
from ..flight.results import FlightResults
from ..flight.rulebook import flown_rule_inputs, rule_entries
from ..motor.listing import CatalogRow

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
    adjusted = np.array([c == c and c not in lst for c, lst in zip(chosen.tolist(), listed)], dtype=bool)  # c == c: not NaN
    return chosen, altitude, speed, vertical, adjusted


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


@dataclass
class _Flown:
    """The ranking's workspace for n flown motors: one list of length n per figure (``columns``, keyed by the
    :class:`~motorlib.matching.candidate.Candidate` field it fills), and per motor the (code, message) of every
    rule broken, its notes, and the flight's status code. The ballast and stability steps fill it further."""

    columns: dict[str, list[Any]]
    reasons: list[list[tuple[str, str]]]
    notes: list[list[tuple[str, str]]]
    status: list[int]


def _figures(frame: Airframe, rows: list[CatalogRow], pack: MotorPack, results: FlightResults,
             s: MatchSettings) -> _Flown:
    chosen, altitude, speed, vertical, adjusted = _choose_delays(pack, results, [r.delays_s for r in rows])
    landing = _landing_descent_rate(frame, results, pack)
    deploy = _deployment_speeds(frame, results, pack)
    distance = _landing_distance(frame, results, pack)
    findings = _rule_findings(frame, rows, results, s, chosen, speed, landing, deploy, distance, altitude)

    def col(values: np.ndarray) -> list[float | None]:  # Python floats, None for NaN and ±inf
        array = np.asarray(values, dtype=float)
        out: list[float | None] = array.tolist()
        for i in np.flatnonzero(~np.isfinite(array)).tolist():
            out[i] = None
        return out

    columns: dict[str, list[Any]] = {
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
    }
    reasons, notes = _split(findings)
    return _Flown(columns, reasons, notes, results.status.astype(int).tolist())


def _split(findings: list[list[tuple[str, str, str]]]
           ) -> tuple[list[list[tuple[str, str]]], list[list[tuple[str, str]]]]:
    """(code, message) of each flight's findings that fail it (as :func:`_broken`) and of its notes, each flight
    with lists of its own; one loop over all of them (a comprehension per flight and kind was a frame each)."""
    reasons: list[list[tuple[str, str]]] = []
    notes: list[list[tuple[str, str]]] = []
    for found in findings:
        broken: list[tuple[str, str]] = []
        noted: list[tuple[str, str]] = []
        for severity, code, message in found:
            (noted if severity == "note" else broken).append((code, message))
        reasons.append(broken)
        notes.append(noted)
    return reasons, notes


def _rule_findings(frame: Airframe, rows: list[CatalogRow], results: FlightResults, s: MatchSettings,
                   chosen: np.ndarray, speed: np.ndarray, landing: np.ndarray, deploy: np.ndarray,
                   distance: np.ndarray, altitude: np.ndarray) -> list[list[tuple[str, str, str]]]:
    """Every rule each flight breaks, as (severity, code, message) (:func:`motorlib.flight.rulebook.rule_entries`:
    the rules ``fly`` applies), with this module's figures where the descent was not flown."""
    inputs = flown_rule_inputs(frame, results, chosen_delay_s=chosen, ejection_speed_m_s=speed, ejection_altitude_m=altitude,
                               landing_descent_rate_m_s=landing, landing_distance_m=distance,
                               deployment_speed_m_s=deploy,
                               delays_known=np.array([r.ejection != "unknown" for r in rows], dtype=bool),
                               delay_adjustable=np.array([r.delay_adjustable for r in rows], dtype=bool))
    return rule_entries(inputs, s.rules, ceiling_m=s.ceiling_m)


def _broken(findings: list[tuple[str, str, str]]) -> list[tuple[str, str]]:
    """(code, message) of the (severity, code, message) findings that fail a motor (notes on the model apart)."""
    return [(code, message) for severity, code, message in findings if severity != "note"]


def _landing_descent_rate(frame: Airframe, results: FlightResults, pack: MotorPack) -> np.ndarray:
    """Descent rate under the device(s) at landing [m/s]: the flown one where the descent was flown, else the
    terminal estimate at the pad; the figure ``fly`` reports as ``landing_speed_m_s`` too. NaN where no device
    opened (plugged, landed before the charge, no liftoff): there is no descent under a device to rate."""
    estimate = landing_descent_rate_m_s(frame, results.liftoff_mass_kg - pack.propellant_mass_kg)
    if not frame.recovery_devices:
        return estimate
    flown = results.landing_descent_rate_m_s
    opened = np.isfinite(results.deployment_time_s).any(axis=1)
    return np.where(opened, np.where(np.isfinite(flown), flown, estimate), np.nan)
