"""Added mass for a candidate: the ballast that brings a motor too strong for the target down to it, and the
nose weight that restores the stability margin; each candidate is flown again with it and every rule re-checked.

A failed rule is never dropped: the mass is advice shown beside the motor's own verdict.

numpy only.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from ..flight.airframe import Airframe
from ..flight.integrate import FlightSettings, simulate
from ..flight.pack import MotorPack
from ..flight.results import OK, FlightResults
from ..flight.stability import nose_weight_kg, stability_for_pack
from ..motor.listing import CatalogRow

if TYPE_CHECKING:
    from .rank import MatchSettings
from .figures import (_STABILITY_KEYS, _Flown, _broken, _choose_delays, _deployment_speeds, _figures,
                      _landing_descent_rate, _landing_distance, _rule_findings, flies_descent)

__all__: list[str] = []


def _solve_ballast(frame: Airframe, rows: list[CatalogRow], pack: MotorPack, figures: _Flown,
                   s: MatchSettings, fs: FlightSettings) -> None:
    """Added mass that brings every motor too strong for the target down to it, all motors solved together.

    Every completed flight above the target is solved, whatever rules it breaks without
    ballast (over the ceiling, an ejection too fast): the rules are re-checked with the
    solved mass, so the ranking shows which motors then pass. Apogee falls monotonically
    with added mass. A bracket [0, hi] is found by doubling, then the Illinois variant of
    regula falsi runs on every motor at once, one batched simulation per iteration, to
    0.02 % of the target.
    """
    target = s.target_m
    apogee0 = np.array([a if a is not None else np.nan for a in figures.columns["apogee_m"]])
    flew = np.array([status == OK for status in figures.status])
    idx = np.flatnonzero(flew & (apogee0 > target))
    if idx.size == 0:
        return
    sub = MotorPack(*(getattr(pack, f)[idx] for f in pack.__dataclass_fields__))
    liftoff = np.array([figures.columns["liftoff_mass_kg"][i] for i in idx])

    def apogee_with(mass: np.ndarray) -> np.ndarray:
        return simulate(frame, sub, fs, added_mass_kg=mass, descent=False).apogee_m

    lo, f_lo = np.zeros(idx.size), apogee0[idx] - target
    hi = 0.25 * liftoff
    f_hi = np.nan_to_num(apogee_with(hi), nan=-target) - target
    for _ in range(12):  # widen where the bracket does not hold the root yet
        short = f_hi > 0
        if not short.any():
            break
        hi = np.where(short, hi * 2.0, hi)
        f_hi = np.where(short, np.nan_to_num(apogee_with(hi), nan=-target) - target, f_hi)
    side = np.zeros(idx.size)
    mass = hi.copy()
    for _ in range(40):
        mass = np.where(f_lo != f_hi, (lo * f_hi - hi * f_lo) / (f_hi - f_lo), 0.5 * (lo + hi))
        f = np.nan_to_num(apogee_with(mass), nan=-target) - target
        if np.all(np.abs(f) <= 2e-4 * target):
            break
        right = f < 0  # too heavy: the root lies between lo and mass
        hi, f_hi = np.where(right, mass, hi), np.where(right, f, f_hi)
        lo, f_lo = np.where(right, lo, mass), np.where(right, f_lo, f)
        # Illinois: halve the stale end's value so that both ends keep moving
        f_lo = np.where(right & (side == 1), f_lo / 2, f_lo)
        f_hi = np.where(~right & (side == -1), f_hi / 2, f_hi)
        side = np.where(right, 1, -1)
    final = simulate(frame, sub, fs, added_mass_kg=mass, descent=flies_descent(frame, s))
    chosen, altitude, speed, _, _ = _choose_delays(sub, final, [rows[i].delays_s for i in idx])
    landing = _landing_descent_rate(frame, final, sub)
    deploy, distance = _deployment_speeds(frame, final, sub), _landing_distance(frame, final, sub)
    findings = _rule_findings(frame, [rows[i] for i in idx], final, s, chosen, speed, landing, deploy, distance,
                              altitude)
    for k, i in enumerate(idx):
        figures.columns["ballast_kg"][i] = float(mass[k])
        figures.columns["ballast_apogee_m"][i] = float(final.apogee_m[k])
        figures.columns["ballast_rail_exit_speed_m_s"][i] = float(final.rail_exit_speed_m_s[k])
        figures.columns["ballast_liftoff_thrust_to_weight"][i] = float(final.liftoff_thrust_to_weight[k])
        figures.columns["ballast_chosen_delay_s"][i] = float(chosen[k]) if np.isfinite(chosen[k]) else None
        figures.columns["ballast_optimal_delay_s"][i] = float(final.optimal_delay_s[k])
        figures.columns["ballast_ejection_speed_m_s"][i] = float(speed[k]) if np.isfinite(speed[k]) else None
        figures.columns["ballast_landing_speed_m_s"][i] = float(landing[k]) if np.isfinite(landing[k]) else None
        broken = _broken(findings[k])
        figures.columns["ballast_reasons"][i] = [text for _, text in broken]
        figures.columns["ballast_reason_codes"][i] = [code for code, _ in broken]


# ----------------------------------------------------------------------------- stability (issue 11)
_NOSE_WEIGHT_STEP_KG = 1e-4  # the solved nose weight is rounded up to 0.1 g: it then meets the margin, never misses


def _check_stability(frame: Airframe, rows: list[CatalogRow], pack: MotorPack, results: FlightResults,
                     figures: _Flown, s: MatchSettings, fs: FlightSettings) -> None:
    """Fail every motor that leaves the rocket under ``s.min_stability_cal``; solve its nose weight and re-fly.

    The margin is the smallest of liftoff, rail exit and burnout (:mod:`motorlib.flight.stability`),
    with the subsonic CP. A motor below it gets a reason with the code ``stability-low`` (``unstable`` below zero); the nose
    weight that restores the margin (closed form, at half the nose length) is flown again with
    every motor that needs one, in one batch, and every rule is checked again on that flight
    (``nose_weight_reasons``). The motor's own reason stays: a solved weight is advice, not a pass.
    Without a geometry the keys are None and nothing is checked.
    """
    n = len(rows)
    for key in _STABILITY_KEYS:
        figures.columns[key] = [None] * n
    if frame.geometry is None:
        return
    lengths = np.array([np.nan if r.length_m is None else r.length_m for r in rows], dtype=float)
    stability = stability_for_pack(frame, pack, lengths, rail_exit_time_s=results.rail_exit_time_s)
    margin = stability.min_margin_cal
    weight = nose_weight_kg(stability, s.min_stability_cal)
    weight = np.where(weight > 0.0, np.ceil(weight / _NOSE_WEIGHT_STEP_KG) * _NOSE_WEIGHT_STEP_KG, weight)
    for i in range(n):
        figures.columns["stability_margin_cal"][i] = float(margin[i]) if np.isfinite(margin[i]) else None
        reason = _stability_reason(margin[i], s.min_stability_cal, weight[i])
        if reason is not None:
            figures.reasons[i].append(reason)
    need = np.flatnonzero(np.isfinite(weight) & (weight > 0.0))
    if need.size:
        _refly_with_nose_weight(frame, rows, pack, lengths, need, weight[need], figures, s, fs)


def _stability_reason(margin_cal: float, required_cal: float, weight_kg: float) -> tuple[str, str] | None:
    """(code, message) when the least margin is unknown or below ``required_cal`` (the codes of ``fly``'s
    :func:`~motorlib.flight.stability.stability_warnings`: ``stability-unknown``, ``unstable``, ``stability-low``),
    with the nose weight that restores it; None when it holds (an over-stable rocket is not failed here)."""
    if not np.isfinite(margin_cal):
        return ("stability-unknown", "stability unknown: the motor's length or masses are not given")
    if margin_cal >= required_cal:
        return None
    code = "unstable" if margin_cal < 0.0 else "stability-low"
    what = (f"unstable: stability margin {margin_cal:.2f} cal, the CG lies behind the CP" if margin_cal < 0.0
            else f"stability margin {margin_cal:.2f} cal, below {required_cal:g} cal")
    if np.isinf(weight_kg):
        return (code, what + "; no nose weight can restore it (enlarge the fins)")
    return (code, what + f"; {weight_kg * 1e3:.1f} g of nose weight restores it")


def _refly_with_nose_weight(frame: Airframe, rows: list[CatalogRow], pack: MotorPack, lengths: np.ndarray,
                            idx: np.ndarray, weight_kg: np.ndarray, figures: _Flown, s: MatchSettings,
                            fs: FlightSettings) -> None:
    """Fly the motors ``idx`` again carrying their nose weight and check every rule, stability included."""
    sub = MotorPack(*(getattr(pack, f)[idx] for f in pack.__dataclass_fields__))
    sub_rows = [rows[i] for i in idx]
    final = simulate(frame, sub, fs, added_mass_kg=weight_kg, descent=flies_descent(frame, s))
    again = _figures(frame, sub_rows, sub, final, s)
    stability = stability_for_pack(frame, sub, lengths[idx], rail_exit_time_s=final.rail_exit_time_s,
                                   added_mass_kg=weight_kg)
    for k, i in enumerate(idx):
        margin = float(stability.min_margin_cal[k])
        broken = list(again.reasons[k])
        reason = _stability_reason(margin, s.min_stability_cal, np.inf)
        if reason is not None:  # the solve aims at the margin: this would be a defect, never hidden
            broken.append(reason)
        figures.columns["nose_weight_for_stability_kg"][i] = float(weight_kg[k])
        figures.columns["nose_weight_apogee_m"][i] = again.columns["apogee_m"][k]
        figures.columns["nose_weight_stability_margin_cal"][i] = margin if np.isfinite(margin) else None
        figures.columns["nose_weight_reasons"][i] = [text for _, text in broken]
        figures.columns["nose_weight_reason_codes"][i] = [code for code, _ in broken]
