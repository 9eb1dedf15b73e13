"""Rank candidate motors for an airframe: fit, one batched flight of all, delays, pass/fail reasons, ballast.

Every candidate gets the list of reasons it fails; a failed safety rule is never
dropped to improve a ranking. The rules are settings (:class:`MatchSettings`);
each default names its source. With a target altitude the ranking is by
closeness to it, otherwise by apogee (under the ceiling); good choices first.
Each candidate gets a verdict word (:mod:`.verdicts`): a motor that flies safely
but misses the target's tolerance band is ``off target``, not ``pass``; notes
(an adapter, a missed target) are kept apart from failures.

Landing speed under the recovery device is the terminal descent rate at the pad,
√(2·m·g/(ρ·(Cd·A_device + Cd·A_body))), which the descent approaches well before
landing (see :mod:`motorlib.recovery`); the ``fly`` command integrates the whole
descent instead. The first device's opening speed comes from the flight; a later
device's is the terminal speed under the devices open before it, at the density
of its opening height. The landing distance is an estimate: the apogee's
distance plus the drift under each device at that terminal speed in the
power-law wind.

numpy only; pandas, scipy and matplotlib are not imported here.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any, Sequence

import numpy as np

from ..flight.airframe import Airframe
from ..motor.classes import CLASS_LETTERS
from ..motor.record import MotorRecord
from ..flight.integrate import FlightSettings, simulate
from ..flight.pack import MotorPack
from ..flight.results import NO_LIFTOFF, OK, STUCK_ON_RAIL, FlightResults
from ..flight.rules import LaunchRules
from ..flight.stability import MIN_STABILITY_CAL, nose_weight_kg, stability_for_pack
from ..units import STANDARD_GRAVITY_M_S2
from .adapters import adapter_steps, adapter_text
from .verdicts import classify, verdict_order

__all__ = ["MatchResult", "MatchSettings", "candidate_rows", "rank"]


@dataclass(frozen=True)
class MatchSettings:
    """What the ranking asks of a motor.

    Attributes
    ----------
    target_m, ceiling_m : float or None
        Aim altitude, and the field's altitude limit that no motor may exceed [m above the pad].
    max_class : str or None
        Highest impulse class allowed (the flyer's certification).
    rules : LaunchRules
        Rail exit speed, thrust-to-weight, ejection speed and descent rules (defaults: common practice).
    delay_slack_s : float
        How far the chosen delay may be from the optimal one [s]; default 2 s (common practice, no published source).
    allow_smaller_motors : bool
        Motors narrower than the mount fit with an adapter, up to ``adapter_steps`` standard sizes down.
    adapter_steps : int
        How many standard motor sizes below the mount an adapter may step down (default 2: a 24 or an
        18 mm motor in a 29 mm mount; common practice, no published source).
    diameter_tolerance_m : float
        Diameters within this are equal (0.5 mm).
    ballast : bool
        Solve the nose weight that brings every motor too strong for the target or the ceiling down to the
        target, and re-check every rule with it aboard.
    target_tolerance : float
        Half-width of the target band as a fraction of the target (default 0.05, ±5 %); a safe motor outside
        it is ``off target``.
    min_stability_cal : float
        Least static margin over the powered flight [calibers] when the airframe has a
        geometry; default 1 caliber (common practice, no published source).
    """

    target_m: float | None = None
    ceiling_m: float | None = None
    max_class: str | None = None
    rules: LaunchRules = field(default_factory=LaunchRules)
    delay_slack_s: float = 2.0
    allow_smaller_motors: bool = False
    diameter_tolerance_m: float = 0.0005
    ballast: bool = False
    target_tolerance: float = 0.05
    adapter_steps: int = 2
    min_stability_cal: float = MIN_STABILITY_CAL

    def __post_init__(self) -> None:
        if not 0.0 < self.target_tolerance < 1.0:
            raise ValueError(f"`target_tolerance` must be a fraction between 0 and 1, got {self.target_tolerance!r}")
        if int(self.adapter_steps) != self.adapter_steps or self.adapter_steps < 1:
            raise ValueError(f"`adapter_steps` must be a whole number of at least 1, got {self.adapter_steps!r}")
        if not (math.isfinite(self.min_stability_cal) and self.min_stability_cal >= 0.0):
            raise ValueError(f"`min_stability_cal` must be finite and >= 0, got {self.min_stability_cal!r}")
        if self.max_class is not None and self.max_class not in CLASS_LETTERS:
            raise ValueError(f"`max_class` must be one of {', '.join(CLASS_LETTERS)}, got {self.max_class!r}")
        if self.ballast and self.target_m is None:
            raise ValueError("ballast needs a target altitude")
        for name in ("target_m", "ceiling_m"):
            value = getattr(self, name)
            if value is not None and not value > 0:
                raise ValueError(f"`{name}` must be positive, got {value!r}")
        if self.target_m is not None and self.ceiling_m is not None and self.target_m > self.ceiling_m:
            raise ValueError(f"the target ({self.target_m:g} m) is above the ceiling ({self.ceiling_m:g} m): no "
                             "motor can reach one without breaking the other")


@dataclass(frozen=True)
class MatchResult:
    """The ranking: ``candidates`` (dicts, good choices first) plus the conditions that produced it."""

    airframe: dict[str, Any]
    conditions: dict[str, Any]
    candidates: list[dict[str, Any]]

    @property
    def passing(self) -> list[dict[str, Any]]:
        """Candidates with the verdict ``pass`` (every rule, on target, no ballast needed)."""
        return [c for c in self.candidates if c["passes"]]

    @property
    def with_ballast(self) -> list[dict[str, Any]]:
        """Candidates with the verdict ``pass with ballast``."""
        return [c for c in self.candidates if c["verdict"] == "pass with ballast"]

    def as_dict(self) -> dict[str, Any]:
        return {"airframe": self.airframe, "conditions": self.conditions, "candidates": self.candidates}


def candidate_rows(records: Sequence[MotorRecord], ids: Sequence[str] | None = None) -> list[dict[str, Any]]:
    """Rows in the catalog's layout for plain records (for ranking records that are not in a catalog)."""
    rows = []
    for i, r in enumerate(records):
        cls = r.impulse_class
        rows.append({
            "motor_id": ids[i] if ids else f"record-{i}", "designation": r.designation, "maker": r.maker,
            "impulse_class": cls.letter if cls else None, "total_impulse_ns": r.total_impulse_ns,
            "diameter_m": r.diameter_m, "length_m": r.length_m, "total_mass_kg": r.total_mass_kg,
            "propellant_mass_kg": r.propellant_mass_kg, "delays_s": list(r.delays_s),
            "delay_adjustable": r.delay_adjustable, "ejection": r.ejection, "handle": r.designation,
        })
    return rows


def _fits(frame: Airframe, row: dict[str, Any], s: MatchSettings) -> tuple[list[tuple[str, str]], str | None]:
    """(code, message) for every reason the motor cannot be flown in ``frame``, and the adapter it needs."""
    reasons = []
    adapter = None
    if s.max_class is not None:
        cls = row["impulse_class"]
        if cls is None or CLASS_LETTERS.index(cls) > CLASS_LETTERS.index(s.max_class):
            reasons.append(("above class", f"class {cls or 'above O'} is above the limit {s.max_class}"))
    d, mount = row["diameter_m"], frame.mount_diameter_m
    if mount is not None:
        size = f"{d * 1e3:.4g} mm motor in a {mount * 1e3:.4g} mm mount" if d is not None else ""
        if d is None:
            reasons.append(("no fit", "does not fit: the motor's diameter is unknown"))
        elif d > mount + s.diameter_tolerance_m:
            reasons.append(("no fit", f"does not fit: {size}"))
        elif d < mount - s.diameter_tolerance_m:
            steps = adapter_steps(d, mount, s.diameter_tolerance_m)
            if not s.allow_smaller_motors:
                reasons.append(("no fit", f"does not fit: {size} (adapters not allowed)"))
            elif steps > s.adapter_steps:
                reasons.append(("no fit", f"does not fit: {size} is {steps} standard sizes down (adapters up to "
                                          f"{s.adapter_steps} allowed)"))
            else:
                adapter = adapter_text(d, mount)
    if frame.mount_length_m is not None:
        if row["length_m"] is None:
            reasons.append(("no fit", "does not fit: the motor's length is unknown"))
        elif row["length_m"] > frame.mount_length_m + 1e-9:
            reasons.append(("no fit", f"does not fit: {row['length_m'] * 1e3:.4g} mm long, the mount takes "
                                      f"{frame.mount_length_m * 1e3:.4g} mm"))
    if row["total_mass_kg"] is None or row["propellant_mass_kg"] is None:
        reasons.append(("no masses", "cannot be flown: no total or propellant mass"))
    return reasons, adapter


def rank(frame: Airframe, rows: Any, pack_for: Any = None, settings: MatchSettings | None = None,
         flight_settings: FlightSettings | None = None) -> MatchResult:
    """Rank every candidate for ``frame``.

    The common case is one call, ``rank(airframe, catalog, settings)``; a motor record or a list of them
    works in place of the catalog.

    Parameters
    ----------
    frame : Airframe
    rows : Catalog, MotorRecord, sequence of MotorRecord, or sequence of dict
        The candidates: a catalog (all its motors), records, or metadata in the catalog's row layout
        (:meth:`Catalog.rows` or :func:`candidate_rows`), which then needs ``pack_for``.
    pack_for : callable, optional
        ``pack_for(rows) -> MotorPack`` for the rows that fit (the catalog builds it from its index); not
        needed for a catalog or records. A :class:`MatchSettings` here is taken as ``settings``.
    settings : MatchSettings, optional
    flight_settings : FlightSettings, optional

    Returns
    -------
    MatchResult

    Examples
    --------
    >>> import motorlib
    >>> from motorlib.files.curvefiles import sample_catalog_dir
    >>> frame = motorlib.load_airframe(sample_catalog_dir() / "airframes" / "quibble-41.toml")
    >>> catalog = motorlib.Catalog(sample_catalog_dir(), read_only=True)
    >>> result = motorlib.rank(frame, catalog, motorlib.MatchSettings(target_m=400.0, ceiling_m=800.0))
    >>> len(result.candidates), result.candidates[0]["designation"], result.candidates[0]["verdict"]
    (27, 'F51-10', 'off target')
    """
    if isinstance(pack_for, MatchSettings):  # rank(airframe, catalog, settings)
        settings, pack_for = pack_for, None
    s = settings or MatchSettings()
    fs = flight_settings or FlightSettings()
    rows, pack_for = _candidates(rows, pack_for, fs.drill_step_s)
    fit_reasons, adapters = zip(*[_fits(frame, row, s) for row in rows]) if rows else ((), ())
    fitting = [i for i, reasons in enumerate(fit_reasons) if not reasons]
    flown: dict[int, dict[str, Any]] = {}
    if fitting:
        sub = [rows[i] for i in fitting]
        pack = pack_for(sub)
        results = simulate(frame, pack, fs, descent=False)
        figures = _figures(frame, sub, pack, results, s)
        _check_stability(frame, sub, pack, results, figures, s, fs)
        if s.ballast:
            _solve_ballast(frame, sub, pack, figures, s, fs)
        for k, i in enumerate(fitting):
            flown[i] = {key: value[k] for key, value in figures.items()}
    candidates = []
    for i, row in enumerate(rows):
        base = {"motor_id": row["motor_id"], "handle": row.get("handle"), "designation": row["designation"],
                "maker": row["maker"], "impulse_class": row["impulse_class"],
                "total_impulse_ns": row["total_impulse_ns"], "diameter_m": row["diameter_m"],
                "length_m": row["length_m"], "fits": not fit_reasons[i], "adapter": adapters[i]}
        if i in flown:
            f = flown[i]
            base.update({k: v for k, v in f.items() if not k.startswith("_")})
            base["reasons"] = [text for _, text in f["_reasons"]]
            base["reason_codes"] = [code for code, _ in f["_reasons"]]
        else:
            base.update({k: None for k in _FIGURE_KEYS})
            base["reasons"] = [text for _, text in fit_reasons[i]]
            base["reason_codes"] = [code for code, _ in fit_reasons[i]]
        _judge(base, s)
        candidates.append(base)
    candidates.sort(key=lambda c: _sort_key(c, s))
    conditions = _conditions(frame, s)
    airframe = {"name": frame.name, "mass_kg": frame.mass_kg, "diameter_m": frame.diameter_m,
                "mount_diameter_m": frame.mount_diameter_m, "mount_length_m": frame.mount_length_m}
    return MatchResult(airframe, conditions, candidates)


def _candidates(rows: Any, pack_for: Any, drill_step_s: float) -> tuple[list[dict[str, Any]], Any]:
    """Rows and a pack function for whatever :func:`rank` was given (a catalog, records or rows)."""
    if hasattr(rows, "rows") and hasattr(rows, "motor_pack"):  # a Catalog (duck-typed: catalog/ is a layer above)
        return rows.rows(), pack_for or rows.motor_pack
    if isinstance(rows, MotorRecord):
        rows = [rows]
    rows = list(rows)
    if rows and all(isinstance(r, MotorRecord) for r in rows):
        records = rows
        by_id = {f"record-{i}": r for i, r in enumerate(records)}
        return candidate_rows(records), pack_for or (
            lambda sub: MotorPack.from_records([by_id[r["motor_id"]] for r in sub], drill_step_s))
    if pack_for is None:
        raise TypeError("`pack_for` is needed when `rows` are catalog rows (or pass a Catalog or motor records)")
    return rows, pack_for


_FIGURE_KEYS = ("apogee_m", "time_to_apogee_s", "rail_exit_speed_m_s", "liftoff_thrust_to_weight", "max_speed_m_s",
                "max_mach", "burnout_time_s", "optimal_delay_s", "chosen_delay_s", "delay_adjusted",
                "ejection_altitude_m", "ejection_speed_m_s", "ejection_vertical_speed_m_s", "landing_speed_m_s",
                "max_deployment_speed_m_s", "landing_distance_m",
                "liftoff_mass_kg", "ballast_kg", "ballast_apogee_m", "ballast_rail_exit_speed_m_s",
                "ballast_liftoff_thrust_to_weight", "ballast_chosen_delay_s", "ballast_optimal_delay_s",
                "ballast_ejection_speed_m_s", "ballast_landing_speed_m_s", "ballast_reasons", "ballast_reason_codes")


def _judge(c: dict[str, Any], s: MatchSettings) -> None:
    """The candidate's verdict and notes (:func:`.verdicts.classify`), with the adapter it needs as a note."""
    if c["adapter"] is not None and c["fits"]:
        c["notes"], c["note_codes"] = [f"needs a {c['adapter']} adapter"], ["adapter"]
    classify(c, s.target_m, s.target_tolerance)


_STABILITY_KEYS = ("stability_margin_cal", "nose_weight_for_stability_kg", "nose_weight_apogee_m",
                   "nose_weight_stability_margin_cal", "nose_weight_reasons", "nose_weight_reason_codes")
_FIGURE_KEYS += _STABILITY_KEYS


def _sort_key(c: dict[str, Any], s: MatchSettings) -> tuple:
    """Good choices first (by verdict), then closeness to the target (least ballast with ballast), or apogee."""
    group = verdict_order(c["verdict"])
    apogee = c["apogee_m"]
    if apogee is None or not math.isfinite(apogee):
        return (group, 0.0, c["designation"])
    if c["verdict"] == "pass with ballast":
        return (group, c["ballast_kg"], c["designation"])
    if s.target_m is not None:
        return (group, abs(apogee - s.target_m), c["designation"])
    return (group, -apogee, c["designation"])


def _choose_delays(pack: MotorPack, results: FlightResults, listed: list[list[float]]) -> tuple[np.ndarray, ...]:
    """For every flight: the reported delay closest to the optimal one and its ejection state (vectorised)."""
    delays = pack.delays_s
    optimal = results.optimal_delay_s
    distance = np.abs(delays - optimal[:, None])
    distance = np.where(np.isnan(distance), np.inf, distance)
    col = np.argmin(distance, axis=1)
    rows = np.arange(delays.shape[0])
    has = np.isfinite(distance[rows, col])
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
    return np.sqrt(2.0 * burnt_mass * STANDARD_GRAVITY_M_S2 / (float(rho) * (extra + body)))


def _deployment_speeds(frame: Airframe, results: FlightResults, pack: MotorPack) -> np.ndarray:
    """Opening speed of every device [m/s], shape (n, n_devices): the first from the flight, a later one the
    terminal speed under the devices before it at its opening height (NaN where the first never opens)."""
    devices = frame.recovery_devices
    n = results.n_flights
    out = np.full((n, max(len(devices), 1)), np.nan)
    if not devices:
        return out
    out[:, 0] = results.deployment_speed_m_s[:, 0]
    weight = (results.liftoff_mass_kg - pack.propellant_mass_kg) * STANDARD_GRAVITY_M_S2
    body = (frame.drag_cds[0] if frame.drag_table else frame.drag_coefficient) * frame.reference_area_m2
    height = results.deployment_altitude_m[:, 0]
    extra = 0.0
    for k in range(1, len(devices)):
        before = devices[k - 1]
        extra = before.drag_area_m2 + (0.0 if before.replaces else extra)
        if devices[k].deploy == "altitude":
            height = np.minimum(height, float(devices[k].deploy_altitude_m))  # type: ignore[arg-type]
        _, _, rho, _ = frame.launch.site.air(np.maximum(height, 0.0))
        out[:, k] = np.where(np.isfinite(out[:, 0]), np.sqrt(2.0 * weight / (rho * (body + extra))), np.nan)
    return out


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
    weight = (results.liftoff_mass_kg - pack.propellant_mass_kg) * STANDARD_GRAVITY_M_S2
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
        v_t = np.sqrt(2.0 * weight / (float(rho0) * (body + extra)))
        # ∫ w(z) dz / v_t over [bottom, top] with w(z) = w10·(z/10)^α
        band = (top ** (alpha + 1.0) - bottom ** (alpha + 1.0)) / ((alpha + 1.0) * 10.0**alpha)
        drift += frame.launch.wind_speed_m_s * band / v_t
    return np.abs(results.apogee_downrange_m + drift)


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
    wind = recovered.frame.launch.wind_speed_m_s if recovered is not None else 0.0
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


def _solve_ballast(frame: Airframe, rows: list[dict[str, Any]], pack: MotorPack, figures: dict[str, Any],
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
    apogee0 = np.array([a if a is not None else np.nan for a in figures["apogee_m"]])
    flew = np.array([status == OK for status in figures["_status"]])
    idx = np.flatnonzero(flew & (apogee0 > target))
    if idx.size == 0:
        return
    sub = MotorPack(*(getattr(pack, f)[idx] for f in pack.__dataclass_fields__))
    liftoff = np.array([figures["liftoff_mass_kg"][i] for i in idx])

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
    final = simulate(frame, sub, fs, added_mass_kg=mass, descent=False)
    chosen, _, speed, _, _ = _choose_delays(sub, final, [rows[i]["delays_s"] for i in idx])
    landing = _landing_speed(frame, final, sub)
    deploy, distance = _deployment_speeds(frame, final, sub), _landing_distance(frame, final, sub)
    uses_charge = frame.recovery is None or frame.recovery.deploy == "ejection"
    for k, i in enumerate(idx):
        figures["ballast_kg"][i] = float(mass[k])
        figures["ballast_apogee_m"][i] = float(final.apogee_m[k])
        figures["ballast_rail_exit_speed_m_s"][i] = float(final.rail_exit_speed_m_s[k])
        figures["ballast_liftoff_thrust_to_weight"][i] = float(final.liftoff_thrust_to_weight[k])
        figures["ballast_chosen_delay_s"][i] = float(chosen[k]) if np.isfinite(chosen[k]) else None
        figures["ballast_optimal_delay_s"][i] = float(final.optimal_delay_s[k])
        figures["ballast_ejection_speed_m_s"][i] = float(speed[k]) if np.isfinite(speed[k]) else None
        figures["ballast_landing_speed_m_s"][i] = float(landing[k]) if np.isfinite(landing[k]) else None
        broken = _reasons(final, k, chosen[k], speed[k], landing[k], uses_charge, s, rows[i],
                          _Recovered(frame, deploy[k], distance[k]))
        figures["ballast_reasons"][i] = [text for _, text in broken]
        figures["ballast_reason_codes"][i] = [code for code, _ in broken]


# ----------------------------------------------------------------------------- stability (issue 11)
_NOSE_WEIGHT_STEP_KG = 1e-4  # the solved nose weight is rounded up to 0.1 g: it then meets the margin, never misses


def _check_stability(frame: Airframe, rows: list[dict[str, Any]], pack: MotorPack, results: FlightResults,
                     figures: dict[str, Any], s: MatchSettings, fs: FlightSettings) -> None:
    """Fail every motor that leaves the rocket under ``s.min_stability_cal``; solve its nose weight and re-fly.

    The margin is the smallest of liftoff, rail exit and burnout (:mod:`motorlib.flight.stability`),
    with the subsonic CP. A motor below it gets a reason with the code ``stability``; the nose
    weight that restores the margin (closed form, at half the nose length) is flown again with
    every motor that needs one, in one batch, and every rule is checked again on that flight
    (``nose_weight_reasons``). The motor's own reason stays: a solved weight is advice, not a pass.
    Without a geometry the keys are None and nothing is checked.
    """
    n = len(rows)
    for key in _STABILITY_KEYS:
        figures[key] = [None] * n
    if frame.geometry is None:
        return
    lengths = np.array([np.nan if r["length_m"] is None else r["length_m"] for r in rows], dtype=float)
    stability = stability_for_pack(frame, pack, lengths, rail_exit_time_s=results.rail_exit_time_s)
    margin = stability.min_margin_cal
    weight = nose_weight_kg(stability, s.min_stability_cal)
    weight = np.where(weight > 0.0, np.ceil(weight / _NOSE_WEIGHT_STEP_KG) * _NOSE_WEIGHT_STEP_KG, weight)
    for i in range(n):
        figures["stability_margin_cal"][i] = float(margin[i]) if np.isfinite(margin[i]) else None
        reason = _stability_reason(margin[i], s.min_stability_cal, weight[i])
        if reason is not None:
            figures["_reasons"][i].append(reason)
    need = np.flatnonzero(np.isfinite(weight) & (weight > 0.0))
    if need.size:
        _refly_with_nose_weight(frame, rows, pack, lengths, need, weight[need], figures, s, fs)


def _stability_reason(margin_cal: float, required_cal: float, weight_kg: float) -> tuple[str, str] | None:
    """("stability", message) when the least margin is unknown or below ``required_cal``; None when it holds."""
    if not np.isfinite(margin_cal):
        return ("stability", "stability unknown: the motor's length or masses are not given")
    if margin_cal >= required_cal:
        return None
    what = (f"unstable: stability margin {margin_cal:.2f} cal, the CG lies behind the CP" if margin_cal < 0.0
            else f"stability margin {margin_cal:.2f} cal, below {required_cal:g} cal")
    if np.isinf(weight_kg):
        return ("stability", what + "; no nose weight can restore it (enlarge the fins)")
    return ("stability", what + f"; {weight_kg * 1e3:.1f} g of nose weight restores it")


def _refly_with_nose_weight(frame: Airframe, rows: list[dict[str, Any]], pack: MotorPack, lengths: np.ndarray,
                            idx: np.ndarray, weight_kg: np.ndarray, figures: dict[str, Any], s: MatchSettings,
                            fs: FlightSettings) -> None:
    """Fly the motors ``idx`` again carrying their nose weight and check every rule, stability included."""
    sub = MotorPack(*(getattr(pack, f)[idx] for f in pack.__dataclass_fields__))
    sub_rows = [rows[i] for i in idx]
    final = simulate(frame, sub, fs, added_mass_kg=weight_kg, descent=False)
    again = _figures(frame, sub_rows, sub, final, s)
    stability = stability_for_pack(frame, sub, lengths[idx], rail_exit_time_s=final.rail_exit_time_s,
                                   added_mass_kg=weight_kg)
    for k, i in enumerate(idx):
        margin = float(stability.min_margin_cal[k])
        broken = list(again["_reasons"][k])
        reason = _stability_reason(margin, s.min_stability_cal, np.inf)
        if reason is not None:  # the solve aims at the margin: this would be a defect, never hidden
            broken.append(reason)
        figures["nose_weight_for_stability_kg"][i] = float(weight_kg[k])
        figures["nose_weight_apogee_m"][i] = again["apogee_m"][k]
        figures["nose_weight_stability_margin_cal"][i] = margin if np.isfinite(margin) else None
        figures["nose_weight_reasons"][i] = [text for _, text in broken]
        figures["nose_weight_reason_codes"][i] = [code for code, _ in broken]


def _conditions(frame: Airframe, s: MatchSettings) -> dict[str, Any]:
    launch = frame.launch
    site = launch.site
    return {
        "target_m": s.target_m, "ceiling_m": s.ceiling_m, "max_class": s.max_class,
        "min_rail_exit_speed_m_s": s.rules.min_rail_exit_speed_m_s,
        "rail_exit_needed_m_s": s.rules.rail_exit_needed_m_s(launch.wind_speed_m_s),
        "wind_m_s": launch.wind_speed_m_s, "rail_exit_wind_ratio": s.rules.rail_exit_wind_ratio,
        "min_liftoff_thrust_to_weight": s.rules.min_liftoff_thrust_to_weight,
        "delay_slack_s": s.delay_slack_s, "max_ejection_speed_m_s": s.rules.max_ejection_speed_m_s,
        "max_landing_speed_m_s": s.rules.max_landing_speed_m_s, "allow_smaller_motors": s.allow_smaller_motors,
        "adapter_steps": s.adapter_steps, "target_tolerance": s.target_tolerance,
        "max_deployment_speed_m_s": dict(s.rules.max_deployment_speed_m_s), "field_radius_m": s.rules.field_radius_m,
        "drag": ("estimated from the shape, Cd(Mach) powered and coasting" if frame.drag_source == "estimated"
                 else f"Cd table over Mach {frame.drag_machs[0]:g}-{frame.drag_machs[-1]:g}" if frame.drag_table
                 else f"Cd {frame.drag_coefficient:g}") + f" on {frame.diameter_m * 1e3:.4g} mm",
        "drag_source": frame.drag_source,
        "min_stability_cal": s.min_stability_cal if frame.geometry is not None else None,
        "atmosphere": "U.S. Standard Atmosphere 1976" + (f", {site.elevation_m:.0f} m elevation" if site.elevation_m else "")
                      + (f", {site.temperature_k - 273.15:.1f} degC at the pad" if site.temperature_k else "")
                      + (f", {site.pressure_pa / 100:.0f} hPa at the pad" if site.pressure_pa else ""),
        "wind": f"{launch.wind_speed_m_s:g} m/s at 10 m, power law 1/7",
        "rail": f"{launch.rail_length_m:g} m at {math.degrees(launch.rail_angle_rad):g} deg from vertical",
        "recovery": (f"{frame.recovery.device}, deployed at {frame.recovery.deploy}" if frame.recovery else "none given"),
    }
