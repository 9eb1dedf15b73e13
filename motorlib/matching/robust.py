"""Robust ranking: each candidate's probability of meeting every rule and landing inside the target windows.

Every candidate motor flies the same sampled conditions (common random numbers: sample j
draws the same standard normals for every motor, :mod:`motorlib.flight.dispersion`), so
differences between candidates are not sampling noise of their own: the standard error of a
difference comes from the paired outcomes and is usually much smaller than either
candidate's own standard error.

A sampled flight succeeds when it flies (status OK), breaks no launch rule of
:class:`~motorlib.matching.rank.MatchSettings` and lands inside every window given here
(apogee, flight duration from liftoff to landing). The rules are the rule book of ``fly`` and
``match`` (:func:`motorlib.flight.rulebook.code_masks`, evaluated for every sample in
:func:`~motorlib.flight.dispersion.fly_samples` with its own wind): rail exit, liftoff
thrust-to-weight, ceiling, the delay fitted before the flight against that flight's optimal
delay, each device's opening against its kind's limit, the descent rate under the device
(flown where ``match`` flies the descent, or for a window; else ``match``'s terminal estimate),
the field; and stability: each sample's own least margin (its sampled masses and CG,
:func:`~motorlib.flight.dispersion.sampled_margin_cal`) below ``min_stability_cal`` fails
``stability-low``, as ``match`` fails the nominal flight.
``failures`` counts each code's share of the samples: the rule book's codes
(:data:`~motorlib.flight.rules.RULE_CODES`) and :data:`WINDOW_CODES`.

numpy only.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any, Callable, Final, Sequence

import numpy as np

from ..flight.airframe import Airframe
from ..flight.dispersion import DispersionSettings, Uncertainty, _nominal, run_samples
from ..flight.integrate import OK, FlightSettings
from ..flight.rules import NOTE_CODES
from ..flight.sample_stats import rule_masks
from ..motor.record import FiringSpread, MotorRecord
from .figures import flies_descent
from .rank import MatchSettings

__all__ = ["RobustSettings", "WINDOW_CODES", "robust_rank"]


@dataclass(frozen=True)
class RobustSettings:
    """Sampling and windows of a robust ranking.

    Attributes
    ----------
    n_samples : int
        Sampled flights per candidate (default 500).
    seed : int
    altitude_window_m, duration_window_s : (float, float) or None
        Apogee [m above the pad] and flight duration from liftoff to landing [s] that count as a success.
    field_radius_m : float or None
        Landing farther than this from the pad fails [m].
    wind_from_rad, rail_azimuth_rad : float, float or None
        As in :class:`~motorlib.flight.dispersion.DispersionSettings`.
    chunk_size : int
    flight : FlightSettings
    """

    n_samples: int = 500
    seed: int = 0
    altitude_window_m: tuple[float, float] | None = None
    duration_window_s: tuple[float, float] | None = None
    field_radius_m: float | None = None
    wind_from_rad: float = 0.0
    rail_azimuth_rad: float | None = None
    chunk_size: int = 1000
    flight: FlightSettings = FlightSettings()

    def __post_init__(self) -> None:
        for name in ("altitude_window_m", "duration_window_s"):
            window = getattr(self, name)
            if window is not None and not (len(window) == 2 and 0.0 <= window[0] < window[1]):
                raise ValueError(f"`{name}` must be (low, high) with 0 <= low < high, got {window!r}")
        if self.n_samples < 2:
            raise ValueError(f"`n_samples` must be at least 2, got {self.n_samples!r}")

    @property
    def needs_descent(self) -> bool:
        return self.duration_window_s is not None or self.field_radius_m is not None


WINDOW_CODES: Final = {"apogee-outside-window": "apogee outside the altitude window",
                       "duration-outside-window": "flight duration (liftoff to landing) outside the window"}
"""The failure codes of the target windows, which only the robust ranking judges (the rules' codes are
:data:`~motorlib.flight.rules.RULE_CODES`)."""


def _failures(flights: dict[str, np.ndarray], robust: RobustSettings) -> dict[str, np.ndarray]:
    """Per-flight failure masks by code, shape (n_flights,) each: the rule book's codes each sample gets (as ``fly``
    gives them; notes on the model apart), then the windows; a flight succeeds when none is set."""
    out = {code: mask for code, mask in rule_masks(flights).items() if code not in NOTE_CODES}
    flown = flights["status"] == OK  # a window judges a flight that flew; NaN figures fail it
    apogee, duration = flights["apogee_m"], flights["flight_duration_s"]
    if robust.altitude_window_m is not None:
        low, high = robust.altitude_window_m
        out["apogee-outside-window"] = flown & ~((apogee >= low) & (apogee <= high))
    if robust.duration_window_s is not None:
        low, high = robust.duration_window_s
        out["duration-outside-window"] = flown & ~((duration >= low) & (duration <= high))
    return out


def _stability_flags(frame: Airframe, flights: dict[str, np.ndarray], match: MatchSettings) -> np.ndarray | None:
    """Every sampled flight whose own least margin (``sampled_margin_cal``: its masses and CG, liftoff, rail exit
    and burnout) is under ``match.min_stability_cal``, or unknown, fails ``stability-low`` (as in ``match``);
    shape (n_flights,). None without a geometry."""
    if frame.geometry is None:
        return None
    return ~(flights["sampled_margin_cal"] >= match.min_stability_cal)  # NaN (unknown) fails too


def _percentiles(values: np.ndarray) -> dict[str, float | None]:
    finite = values[np.isfinite(values)]
    if finite.size == 0:
        return {"p5": None, "p50": None, "p95": None, "mean": None}
    p5, p50, p95 = np.percentile(finite, (5, 50, 95))
    return {"p5": float(p5), "p50": float(p50), "p95": float(p95), "mean": float(finite.mean())}


def robust_rank(frame: Airframe, records: Sequence[MotorRecord], match: MatchSettings, uncertainty: Uncertainty,
                settings: RobustSettings, *, ids: Sequence[str] | None = None,
                spreads: Sequence[FiringSpread | None] | None = None, workers: int = 1,
                progress: Callable[[int, int], None] | None = None) -> dict[str, Any]:
    """Rank ``records`` by their probability of a successful flight under ``uncertainty``.

    Parameters
    ----------
    frame : Airframe
    records : sequence of MotorRecord
        Candidates that fit the airframe (see :func:`motorlib.matching.rank.rank` for the fit rules).
    match : MatchSettings
        Rules (ceiling, rail exit, thrust-to-weight, delay slack, deployment and landing speeds).
    uncertainty : Uncertainty
        A record's firing spread (or ``spreads[i]``) replaces its impulse and burn-time entries.
    settings : RobustSettings
    ids : sequence of str, optional
        Catalog ids reported with each candidate.
    workers : int
        Worker processes; the results do not depend on it.
    progress : callable, optional
        ``progress(done, total)`` over all sampled flights.

    Returns
    -------
    dict
        ``n_samples``, ``seed``, ``windows`` and ``candidates`` (best first), each with
        ``p_success`` and ``p_success_standard_error`` (√(p(1−p)/n)), ``apogee_m`` and
        ``flight_duration_s`` percentiles, the fitted ``delay_s``, the share of flights failing each
        rule (``failures``, keyed by rule-book code, :data:`WINDOW_CODES` and ``stability-low``), the sampled
        least stability margin's percentiles (``stability_margin_cal``, calibers) and the number of samples
        under ``min_stability_cal`` (``n_below_min_stability``; both None without a geometry), and
        ``p_difference_to_next_standard_error``, the paired standard error of the difference to the next candidate.
    """
    if len(records) == 0:
        raise ValueError("`records` must not be empty")
    n = settings.n_samples
    m = len(records)
    ds = DispersionSettings(n_samples=n, seed=settings.seed, wind_from_rad=settings.wind_from_rad,
                            rail_azimuth_rad=settings.rail_azimuth_rad, ceiling_m=match.ceiling_m,
                            field_radius_m=settings.field_radius_m, rules=match.rules,
                            chunk_size=settings.chunk_size, flight=settings.flight)
    spreads = list(spreads) if spreads is not None else [None] * m
    uncertainties = [uncertainty.for_motor(r.firing_spread or s) for r, s in zip(records, spreads)]
    delays, nominal_apogee = _nominal(frame, records, ds)
    motor_index = np.repeat(np.arange(m), n)
    sample_index = np.tile(np.arange(n), m)  # common random numbers: sample j is the same draw for every motor
    # the descent is flown where match flies it (a sequence, electronics, a field) and for the windows; else the
    # descent rate under the device is match's terminal estimate (flying every descent costs about 5x the time)
    descent = flies_descent(frame, match) or settings.needs_descent
    flights = run_samples(frame, records, uncertainties, motor_index, sample_index, ds, delays, descent=descent,
                          workers=workers, progress=progress)
    flags = _failures(flights, settings)
    stability = _stability_flags(frame, flights, match)
    if stability is not None:
        flags["stability-low"] = stability
    failed = np.zeros(m * n, dtype=bool)
    for bad in flags.values():
        failed |= bad
    ok = ~failed.reshape(m, n)
    candidates = []
    for i, record in enumerate(records):
        p = float(ok[i].mean())
        rows = slice(i * n, (i + 1) * n)
        candidates.append({
            "motor_id": ids[i] if ids else f"record-{i}", "designation": record.designation, "maker": record.maker,
            "p_success": p, "p_success_standard_error": math.sqrt(p * (1.0 - p) / n),
            "apogee_m": _percentiles(flights["apogee_m"][rows]),
            "nominal_apogee_m": float(nominal_apogee[i]) if np.isfinite(nominal_apogee[i]) else None,
            "flight_duration_s": _percentiles(flights["flight_duration_s"][rows]),
            "delay_s": float(delays[i]) if np.isfinite(delays[i]) else None,
            "failures": {rule: float(bad[rows].mean()) for rule, bad in flags.items()},
            "stability_margin_cal": None if stability is None else _percentiles(flights["sampled_margin_cal"][rows]),
            "n_below_min_stability": None if stability is None else int(np.count_nonzero(stability[rows])),
            "firing_spread_used": (record.firing_spread or spreads[i]) is not None,
        })
    target = None if settings.altitude_window_m is None else 0.5 * sum(settings.altitude_window_m)
    target = target if target is not None else match.target_m

    def key(c: dict[str, Any]) -> tuple:
        median = c["apogee_m"]["p50"]
        # a motor with no median apogee (most of its flights never leave the rail) is never "close": last of its kind
        closeness = math.inf if median is None else abs(median - target) if target is not None else 0.0
        return (-c["p_success"], median is None, closeness, c["designation"])

    order = sorted(range(m), key=lambda i: key(candidates[i]))
    for i, j in zip(order, order[1:] + [None]):
        if j is None:
            candidates[i]["p_difference_to_next_standard_error"] = None
        else:
            diff = ok[i].astype(float) - ok[j].astype(float)
            candidates[i]["p_difference_to_next_standard_error"] = float(np.std(diff, ddof=1) / math.sqrt(n))
    candidates = [candidates[i] for i in order]
    return {"n_samples": n, "seed": settings.seed, "descent_flown": descent,
            "windows": {"altitude_m": settings.altitude_window_m, "duration_s": settings.duration_window_s,
                        "field_radius_m": settings.field_radius_m},
            "uncertainty": uncertainty.as_dict(), "candidates": candidates}
