"""Monte Carlo dispersion: sample uncertain inputs, fly the samples in batches, summarise the spread.

Model
-----
Each sampled flight perturbs the nominal airframe and motor by independent normal
draws (one standard deviation given by :class:`Uncertainty`):

* total impulse and burn time: the thrust curve is stretched in time by the burn
  time factor b and in thrust by i/b, so impulse scales by i and burn time by b;
  the propellant mass scales with the impulse (same specific impulse);
* airframe (empty) mass and motor loaded mass: relative normal errors;
* drag: a relative error on the constant Cd or a scale on the whole Cd(Mach) table;
* wind speed (absolute, clipped at 0) and wind direction; rail tilt and azimuth;
* pad temperature: air density at the pad changes as T_nominal/T at the measured
  (or standard) pad pressure;
* CG of the empty airframe (when a geometry is given): moves the stability margin; every sample's least
  margin, with its own masses and CG (:func:`sampled_margin_cal`), is what ``scatter`` spreads and what
  ``match --robust`` judges against the minimum margin;
* deployment altitude (``deploy = "altitude"`` only).

A drag scale and the pad-density ratio both act on the body's drag area, so they
are flown as a scaled reference area (A·k, the diameter times √k); this is exact
for drag, which is the only use of the reference area in the point-mass model.

Simplifications, stated so that results are read with them:

* every sample is a 3-D point-mass flight with its own wind direction and rail azimuth and tilt (a rail
  across or into the wind carries the landing point off the downwind line); the wind's direction is
  sampled once per flight, the same at every height (a measured profile is flown as the file gives it,
  unscaled);
* the pad temperature acts on the density of the body drag only (not on the speed of sound
  nor on the device's drag): at ±3 K the density aloft differs from the pad ratio by
  under 0.1 % per 500 m;
* the deployment altitude is rounded to a grid of a quarter of its standard deviation,
  so that flights with one rounded altitude are integrated together;
* a deployment's speed is known for ejection charges only (the speed at the fixed delay).

Reproducibility
---------------
Standard normal draws come from one stream per block of :data:`BLOCK_SIZE` samples,
``SeedSequence(seed, spawn_key=(block,))``; sample j always gets the same row whatever
the number of samples, the chunks or the worker processes. The same rows serve every
candidate motor (common random numbers).

Vectorisation: every chunk is one call of :func:`motorlib.flight.integrate.simulate`; the
chunks are cut by ``chunk_size`` alone, so the number of workers changes no digit.

numpy and the standard library only. The module runs past 500 lines on purpose: the sampled-input
model, its documented defaults and the chunked runner change together; the statistics of samples
live in :mod:`motorlib.flight.sample_stats`.
"""

from __future__ import annotations

import copy
import math
import os
from concurrent.futures import ProcessPoolExecutor
from dataclasses import dataclass, field, replace
from typing import Any, Callable, Final, Sequence

import numpy as np

from .airframe import RECOVERY_DEVICES, Airframe, Recovery
from .descent import landing_descent_rate_m_s
from .integrate import OK, FlightSettings, MotorPack, simulate
from .rulebook import FLIGHT_CODES, code_masks, flown_rule_inputs
from .rules import LaunchRules
from .stability import MIN_STABILITY_CAL
from ..motor.record import FiringSpread, MotorRecord
from .sample_stats import (CHI2_2DOF_95, _num, _percentiles, _probability, ellipse, failure_shares, inside_ellipse,
                           rule_masks)

__all__ = ["BLOCK_SIZE", "CHI2_2DOF_95", "MAX_RELATIVE_STD", "VARIABLES", "DispersionSettings", "Uncertainty", "catalog_spread",
           "default_workers", "ellipse", "fly_samples", "inside_ellipse", "nominal_delay_s", "run_samples", "run_scatter", "sampled_margin_cal", "stability_spread", "standard_normals", "summarize"]

VARIABLES: Final = ("total_impulse", "burn_time", "airframe_mass", "motor_mass", "drag", "wind_speed",
                    "wind_direction", "rail_angle", "rail_azimuth", "pad_temperature", "cg", "deploy_altitude")
"""Column order of the standard normal draws; new variables go at the end so old draws stay."""

BLOCK_SIZE: Final = 64  # samples per random stream; any value works, it only fixes the draws
MAX_RELATIVE_STD: Final = 0.3  # a relative spread at or above it: a draw 3.3 sigma low would reach zero or below
_MAX_RAIL_RAD: Final = math.radians(30.0)  # the Launch record's limit
_MAX_WIND_M_S: Final = 40.0  # the Launch record's limit


@dataclass(frozen=True)
class Uncertainty:
    """One standard deviation of every sampled input; 0 switches a variable off.

    Defaults, each marked by its origin (none is a published tolerance):

    ===========================  ========  =====================================================
    total_impulse_relative_std   0.03      from memory: certified motors deliver their impulse
                                           within a few per cent from unit to unit
    burn_time_relative_std       0.03      from memory, as above
    airframe_mass_relative_std   0.02      common practice: a kitchen scale and late changes
    motor_mass_relative_std      0.01      from memory: loaded masses vary by about 1 %
    drag_relative_std            0.05      common practice: a simulated Cd is good to 5-10 %
    wind_speed_std_m_s           1.0       common practice: gusts of ±1 m/s on a calm day
    wind_direction_std_rad       20 deg    common practice: a wind vane swings by tens of degrees
    rail_angle_std_rad           1 deg     common practice: rail set by eye or a phone level
    rail_azimuth_std_rad         5 deg     common practice
    pad_temperature_std_k        2.0       common practice: shade against sun at the pad
    cg_std_m                     0.01      common practice: balance point found by hand
    deploy_altitude_std_m        5.0       from memory: barometric altimeters, a few metres
    ===========================  ========  =====================================================

    A motor's measured :class:`~motorlib.motor.record.FiringSpread` replaces the
    impulse and burn-time defaults (:meth:`for_motor`).
    """

    total_impulse_relative_std: float = 0.03
    burn_time_relative_std: float = 0.03
    airframe_mass_relative_std: float = 0.02
    motor_mass_relative_std: float = 0.01
    drag_relative_std: float = 0.05
    wind_speed_std_m_s: float = 1.0
    wind_direction_std_rad: float = math.radians(20.0)
    rail_angle_std_rad: float = math.radians(1.0)
    rail_azimuth_std_rad: float = math.radians(5.0)
    pad_temperature_std_k: float = 2.0
    cg_std_m: float = 0.01
    deploy_altitude_std_m: float = 5.0

    def __post_init__(self) -> None:
        for name in self.__dataclass_fields__:
            value = float(getattr(self, name))
            if not (math.isfinite(value) and value >= 0.0):
                raise ValueError(f"`{name}` must be a finite number at least 0, got {value!r}")
            object.__setattr__(self, name, value)
        for name in ("total_impulse_relative_std", "burn_time_relative_std", "airframe_mass_relative_std",
                     "motor_mass_relative_std", "drag_relative_std"):
            if getattr(self, name) >= MAX_RELATIVE_STD:
                raise ValueError(f"`{name}` must be below {MAX_RELATIVE_STD:g}, got {getattr(self, name)!r}")

    @classmethod
    def zero(cls) -> Uncertainty:
        """Every variable switched off: every sample is the nominal flight."""
        return cls(**{name: 0.0 for name in cls.__dataclass_fields__})

    def for_motor(self, spread: FiringSpread | None) -> Uncertainty:
        """This uncertainty with a motor's measured firing spread in place of the impulse and burn-time defaults."""
        if spread is None:
            return self
        return replace(self, total_impulse_relative_std=min(spread.total_impulse_relative_std, 0.29),
                       burn_time_relative_std=min(spread.burn_time_relative_std, 0.29))

    def as_dict(self) -> dict[str, float]:
        return {name: getattr(self, name) for name in self.__dataclass_fields__}


@dataclass(frozen=True)
class DispersionSettings:
    """How a dispersion run is set up and judged.

    Attributes
    ----------
    n_samples : int
        Sampled flights per motor (default 2,000).
    seed : int
        Seed of the draws (any non-negative integer).
    wind_from_rad : float or None
        Azimuth the wind blows from, clockwise from north [rad]; None: the airframe file's.
    rail_azimuth_rad : float or None
        Azimuth the rail leans towards [rad]; None: the airframe file's, else downwind.
    ceiling_m, field_radius_m : float or None
        Altitude limit, and radius of the field around the pad [m].
    max_deploy_speed_m_s : float or None
        An opening above this speed counts as a failure, whatever the device; None: each device against its own
        kind's limit in ``rules`` (:meth:`~motorlib.flight.rules.LaunchRules.deployment_limit_m_s`, common practice).
    rules : LaunchRules
        The launch rules every sample is judged by (:func:`motorlib.flight.rulebook.code_masks`, the rule book of
        ``fly`` and ``match``); ``field_radius_m`` and ``max_deploy_speed_m_s`` above, when given, replace its field
        radius and deployment limits (:meth:`launch_rules`).
    chunk_size : int
        Flights per batched call (memory against per-call overhead); the unit of work of a worker process.
    flight : FlightSettings
    """

    n_samples: int = 2000
    seed: int = 0
    wind_from_rad: float | None = None
    rail_azimuth_rad: float | None = None
    ceiling_m: float | None = None
    field_radius_m: float | None = None
    max_deploy_speed_m_s: float | None = None
    chunk_size: int = 1000
    flight: FlightSettings = field(default_factory=FlightSettings)
    rules: LaunchRules = field(default_factory=LaunchRules)

    def __post_init__(self) -> None:
        if self.n_samples < 1:
            raise ValueError(f"`n_samples` must be at least 1, got {self.n_samples!r}")
        if self.seed < 0:
            raise ValueError(f"`seed` must not be negative, got {self.seed!r}")
        if self.chunk_size < 1:
            raise ValueError(f"`chunk_size` must be at least 1, got {self.chunk_size!r}")
        for name in ("ceiling_m", "field_radius_m"):
            value = getattr(self, name)
            if value is not None and not value > 0.0:
                raise ValueError(f"`{name}` must be positive, got {value!r}")

    def launch_rules(self) -> LaunchRules:
        """``rules`` with this run's field radius and, if given, one deployment limit for every device kind."""
        r = self.rules
        if self.field_radius_m is not None:
            r = replace(r, field_radius_m=self.field_radius_m)
        if self.max_deploy_speed_m_s is not None:
            limit = float(self.max_deploy_speed_m_s)
            kinds = {kind for kind, _ in r.max_deployment_speed_m_s} | set(RECOVERY_DEVICES)
            r = replace(r, max_ejection_speed_m_s=limit, max_deployment_speed_m_s=tuple((k, limit) for k in sorted(kinds)))
        return r


# ----------------------------------------------------------------------------- sampling
def standard_normals(seed: int, sample_index: np.ndarray | Sequence[int]) -> np.ndarray:
    """Standard normal draws of the given samples, shape (n, len(VARIABLES)).

    Row j depends only on (seed, j): block j // BLOCK_SIZE has its own stream.

    >>> a = standard_normals(7, np.arange(100))
    >>> bool(np.array_equal(a[70:75], standard_normals(7, [70, 71, 72, 73, 74])))
    True
    """
    index = np.asarray(sample_index, dtype=np.int64)
    if index.ndim != 1 or (index.size and index.min() < 0):
        raise ValueError("`sample_index` must be a 1-D array of non-negative integers")
    out = np.empty((index.size, len(VARIABLES)))
    blocks = index // BLOCK_SIZE
    for block in np.unique(blocks):
        stream = np.random.default_rng(np.random.SeedSequence(int(seed), spawn_key=(int(block),)))
        rows = stream.standard_normal((BLOCK_SIZE, len(VARIABLES)))
        here = blocks == block
        out[here] = rows[index[here] % BLOCK_SIZE]
    return out


def catalog_spread(records: Sequence[MotorRecord]) -> FiringSpread | None:
    """The spread of several records of one motor (one maker, one designation), or None for fewer than 2.

    Burn times are measured as :meth:`MotorRecord.burn_time_s` measures them.
    """
    if len(records) < 2:
        return None
    impulse = np.array([r.total_impulse_ns for r in records])
    burn = np.array([r.burn_time_s() for r in records])
    return FiringSpread(len(records), float(impulse.mean()), float(impulse.std(ddof=1)),
                        float(burn.mean()), float(burn.std(ddof=1)))


def _nominal_wind_from_rad(settings: DispersionSettings, frame: Airframe) -> float:
    return frame.launch.wind_direction_rad if settings.wind_from_rad is None else settings.wind_from_rad


def _downwind_rad(settings: DispersionSettings, frame: Airframe, z: np.ndarray, u: Uncertainty) -> np.ndarray:
    return (_nominal_wind_from_rad(settings, frame) + math.pi
            + u.wind_direction_std_rad * z[:, VARIABLES.index("wind_direction")])


def _build(frame: Airframe, records: Sequence[MotorRecord], uncertainties: Sequence[Uncertainty],
           motor_index: np.ndarray, z: np.ndarray, settings: DispersionSettings
           ) -> tuple[list[Airframe], MotorPack, dict[str, np.ndarray]]:
    """Per-flight airframes and a motor pack for the sampled flights (one Python pass to build records)."""
    col = {name: z[:, k] for k, name in enumerate(VARIABLES)}
    n = motor_index.size

    def per_motor(name: str) -> np.ndarray:
        return np.array([getattr(u, name) for u in uncertainties])[motor_index]

    impulse = 1.0 + per_motor("total_impulse_relative_std") * col["total_impulse"]
    burn = 1.0 + per_motor("burn_time_relative_std") * col["burn_time"]
    motor_mass = 1.0 + per_motor("motor_mass_relative_std") * col["motor_mass"]
    u0 = uncertainties[0]  # airframe and weather uncertainties are the airframe's, the same for every motor
    mass = frame.mass_kg * (1.0 + u0.airframe_mass_relative_std * col["airframe_mass"])
    drag = 1.0 + u0.drag_relative_std * col["drag"]
    site = frame.launch.site
    t_nominal = site.temperature_k if site.temperature_k is not None else float(site.air(0.0)[0])
    t_pad = t_nominal + u0.pad_temperature_std_k * col["pad_temperature"]
    density_ratio = t_nominal / t_pad  # same pad pressure: ρ = p/(R·T)
    if frame.drag_table:  # a scale on the whole table: flown as a scaled area
        area_factor, cd = density_ratio * drag, np.full(n, frame.drag_coefficient)
    else:
        area_factor, cd = density_ratio, frame.drag_coefficient * drag
    diameter = frame.diameter_m * np.sqrt(area_factor)
    wind = np.clip(frame.launch.wind_speed_m_s + u0.wind_speed_std_m_s * col["wind_speed"], 0.0, _MAX_WIND_M_S)
    downwind = _downwind_rad(settings, frame, z, u0)
    rail_az_nominal = (settings.rail_azimuth_rad if settings.rail_azimuth_rad is not None
                       else frame.launch.rail_azimuth_rad if frame.launch.rail_azimuth_rad is not None
                       else _nominal_wind_from_rad(settings, frame) + math.pi)
    rail_az = rail_az_nominal + u0.rail_azimuth_std_rad * col["rail_azimuth"]
    tilt = np.clip(frame.launch.rail_angle_rad + u0.rail_angle_std_rad * col["rail_angle"], 0.0, _MAX_RAIL_RAD)
    recoveries = _recoveries(frame.recovery, u0.deploy_altitude_std_m * col["deploy_altitude"], u0.deploy_altitude_std_m)
    base = replace(frame, geometry=None)  # the geometry's nose must match the diameter; the flight never reads it
    frames = [_copy_with(base, mass_kg=float(mass[i]), diameter_m=float(diameter[i]), drag_coefficient=float(cd[i]),
                         launch=_copy_with(frame.launch, rail_angle_rad=float(tilt[i]), wind_speed_m_s=float(wind[i]),
                                           wind_direction_rad=float((downwind[i] - math.pi) % (2.0 * math.pi)),
                                           rail_azimuth_rad=float(rail_az[i] % (2.0 * math.pi))),
                         recovery=recoveries[i])
              for i in range(n)]
    # the motors: each record packed once, then its rows scaled per flight (time by b, thrust by i/b)
    nominal = MotorPack.from_records(list(records), settings.flight.drill_step_s)
    rows = motor_index
    total = nominal.total_mass_kg[rows] * motor_mass
    pack = MotorPack(
        time_s=nominal.time_s[rows] * burn[:, None], thrust_n=nominal.thrust_n[rows] * (impulse / burn)[:, None],
        cumulative_ns=nominal.cumulative_ns[rows] * impulse[:, None], n_samples=nominal.n_samples[rows],
        total_impulse_ns=nominal.total_impulse_ns[rows] * impulse, total_mass_kg=total,
        propellant_mass_kg=np.minimum(nominal.propellant_mass_kg[rows] * impulse, 0.999 * total),
        burnout_s=nominal.burnout_s[rows] * burn, delays_s=nominal.delays_s[rows], has_mass=nominal.has_mass[rows])
    return frames, pack, {"downwind_rad": downwind, "cg_shift_m": u0.cg_std_m * col["cg"]}


def _copy_with(record: Any, **values: Any) -> Any:
    """A copy of a frozen record with some fields changed, without re-running its checks.

    For the per-flight airframes of a sample: their values are clipped to the records' ranges
    where it matters to the integrator, and ``dataclasses.replace`` would cost tens of µs a flight.
    """
    out = copy.copy(record)
    for name, value in values.items():
        object.__setattr__(out, name, value)
    return out


def _recoveries(recovery: Recovery | None, shift_m: np.ndarray, std_m: float) -> list[Recovery | None]:
    """One recovery record per flight; altitude deployments on a grid of a quarter sigma (shared records)."""
    if recovery is None or recovery.deploy != "altitude" or std_m == 0.0:
        return [recovery] * shift_m.size
    spacing = std_m / 4.0  # from the stated sigma, never from the chunk's draws: chunks must not matter
    nominal = float(recovery.deploy_altitude_m)  # type: ignore[arg-type]
    cache: dict[float, Recovery] = {}
    out: list[Recovery | None] = []
    for shift in shift_m:
        level = max(round(nominal + round(float(shift) / spacing) * spacing, 6), 1.0)
        if level not in cache:
            cache[level] = replace(recovery, deploy_altitude_m=level)
        out.append(cache[level])
    return out


# ----------------------------------------------------------------------------- flying
_OUTPUTS: Final = ("status", "apogee_m", "apogee_time_s", "liftoff_time_s", "rail_exit_speed_m_s",
                   "liftoff_thrust_to_weight", "optimal_delay_s", "deploy_delay_s", "deploy_speed_m_s",
                   "landing_time_s", "landing_speed_m_s", "flight_duration_s", "landing_east_m",
                   "landing_north_m", "cg_shift_m", "sampled_margin_cal", "max_mach", "wind_speed_m_s", "broken")


def fly_samples(frame: Airframe, records: Sequence[MotorRecord], uncertainties: Sequence[Uncertainty],
                motor_index: np.ndarray, sample_index: np.ndarray, settings: DispersionSettings,
                delays_s: Sequence[float] | None = None, *, descent: bool = True) -> dict[str, np.ndarray]:
    """Fly the sampled flights (motor ``motor_index[k]``, draw ``sample_index[k]``) in one batched call, and judge
    each by the launch rules.

    Parameters
    ----------
    frame : Airframe
        The nominal airframe.
    records : sequence of MotorRecord
    uncertainties : sequence of Uncertainty
        One per record (a motor's firing spread may differ); the airframe and weather
        entries of the first one are used for every flight.
    motor_index, sample_index : array of int, shape (n,)
    settings : DispersionSettings
    delays_s : sequence of float, optional
        The ejection delay chosen before the flight for each record (see :func:`nominal_delay_s`);
        None lets each flight pick its best delay.
    descent : bool
        Fly the descent (landing point, speed and time); without it the descent rate under the device is the
        terminal estimate ``match`` judges (:func:`~motorlib.flight.descent.landing_descent_rate_m_s`) and the
        landing point unknown.

    Returns
    -------
    dict of str to array, shape (n,)
        The keys of ``_OUTPUTS``: apogee, times, rail exit speed, deployment and landing figures
        (``landing_speed_m_s`` is the descent rate under the device at landing, as ``fly`` and ``match`` report
        it), and
        ``sampled_margin_cal``: each flight's least static margin [calibers] with its own masses and CG
        (:func:`sampled_margin_cal`; NaN without a geometry or a motor length), and
        ``broken``, shape (n, len(FLIGHT_CODES)): the codes of :data:`~motorlib.flight.rulebook.FLIGHT_CODES`
        each flight gets from :func:`~motorlib.flight.rulebook.code_masks` under ``settings.launch_rules()``,
        with its own wind, exactly as ``fly`` judges one flight (read them with
        :func:`~motorlib.flight.sample_stats.sample_codes`).
    """
    motor_index = np.asarray(motor_index, dtype=np.int64)
    z = standard_normals(settings.seed, sample_index)
    frames, pack, extra = _build(frame, records, uncertainties, motor_index, z, settings)
    wanted = None if delays_s is None else np.asarray(delays_s, dtype=float)[motor_index]
    res = simulate(frames, pack, settings.flight, deploy_delay_s=wanted, descent=descent)
    rows = np.arange(res.n_flights)
    # the delay each charge fires at: the one fitted before the flight, as `fly --delay` is given it
    chosen = wanted if wanted is not None else np.array([res.chosen_delay_s(i) for i in rows])
    rate = res.landing_descent_rate_m_s
    if not descent:  # the estimate match judges where it does not fly the descent, with each sample's drag
        body = np.array([(f.drag_cds[0] if f.drag_table else f.drag_coefficient) * f.reference_area_m2 for f in frames])
        rate = landing_descent_rate_m_s(frame, res.liftoff_mass_kg - pack.propellant_mass_kg, body)
    inputs = flown_rule_inputs(frame, res, chosen_delay_s=chosen, landing_descent_rate_m_s=rate,
                               delays_known=np.array([r.ejection != "unknown" for r in records])[motor_index],
                               wind_speed_m_s=np.array([f.launch.surface_wind_m_s for f in frames]))
    masks = code_masks(inputs, settings.launch_rules(), ceiling_m=settings.ceiling_m)
    # the fastest opening: of the devices where the descent was flown, else the charge's (its speed at the delay)
    speeds = inputs.deployment_speed_m_s
    opened = np.isfinite(speeds).any(axis=1)
    fastest = np.max(np.where(np.isfinite(speeds), speeds, -np.inf), axis=1, initial=-np.inf)
    charge = frame.recovery is None or frame.recovery.deploy == "ejection"
    deploy_speed = np.where(opened, fastest, inputs.ejection_speed_m_s if charge else np.nan)
    return {
        "status": res.status, "apogee_m": res.apogee_m, "apogee_time_s": res.apogee_time_s,
        "liftoff_time_s": res.liftoff_time_s, "rail_exit_speed_m_s": res.rail_exit_speed_m_s,
        "liftoff_thrust_to_weight": res.liftoff_thrust_to_weight, "optimal_delay_s": res.optimal_delay_s,
        "deploy_delay_s": (res.deploy_delay_s if wanted is None or descent else wanted),
        "deploy_speed_m_s": deploy_speed, "landing_time_s": res.landing_time_s,
        "landing_speed_m_s": rate, "flight_duration_s": res.landing_time_s - res.liftoff_time_s,
        "landing_east_m": res.landing_east_m, "landing_north_m": res.landing_north_m,
        "cg_shift_m": extra["cg_shift_m"],
        "sampled_margin_cal": sampled_margin_cal(frame, records, motor_index, pack, frames, extra["cg_shift_m"],
                                                 res.rail_exit_time_s),
        "max_mach": res.max_mach, "wind_speed_m_s": inputs.wind_speed_m_s,
        "broken": np.column_stack([masks[code] for code in FLIGHT_CODES]),
    }


def sampled_margin_cal(frame: Airframe, records: Sequence[MotorRecord], motor_index: np.ndarray, pack: MotorPack,
                       frames: Sequence[Airframe], cg_shift_m: np.ndarray, rail_exit_time_s: np.ndarray) -> np.ndarray:
    """The least static margin [calibers] of every sampled flight: liftoff, rail exit and burnout, as ``match``
    judges it (:func:`~motorlib.flight.stability.stability_for_pack`), with the sample's own masses and CG.

    Parameters
    ----------
    frame : Airframe
        The nominal airframe; its ``geometry`` gives the CP (subsonic, the cautious choice) and the balance point.
    records : sequence of MotorRecord
        The motors (their lengths place the motor).
    motor_index : array of int, shape (n,)
    pack : MotorPack
        The sampled motors, one row per flight (sampled loaded and propellant masses, scaled thrust curves).
    frames : sequence of Airframe
        The sampled airframes (their ``mass_kg`` is the sampled empty mass).
    cg_shift_m : array, shape (n,)
        The sampled shift of the empty airframe's balance point [m], positive aft.
    rail_exit_time_s : array, shape (n,)
        Each flight's rail exit [s from ignition] (the propellant burnt by then sets the rail-exit CG).

    Returns
    -------
    array, shape (n,)
        NaN without a geometry, or for a motor without its length or masses (a guessed length would give a
        guessed margin).

    Notes
    -----
    A shift δ of the empty airframe's CG moves the rocket's CG by δ·m_a/M at each point of mass M
    (x_CG = Σ m·x / M), so each margin falls by δ·m_a/(M·d) from the one with the nominal balance point.
    """
    n = motor_index.size
    if frame.geometry is None:
        return np.full(n, np.nan)
    from .stability import stability_for_pack  # numpy only; imported where the margin is wanted

    lengths = np.array([np.nan if r.length_m is None else r.length_m for r in records], dtype=float)[motor_index]
    airframe_kg = np.array([f.mass_kg for f in frames], dtype=float)
    s = stability_for_pack(frame, pack, lengths, rail_exit_time_s=rail_exit_time_s, airframe_mass_kg=airframe_kg)
    d = frame.diameter_m
    shift = airframe_kg * np.asarray(cg_shift_m, dtype=float) / d
    lift = s.margin_liftoff_cal - shift / s.mass_liftoff_kg
    rail = s.margin_rail_exit_cal - shift / s.mass_rail_exit_kg
    burn = s.margin_burnout_cal - shift / s.mass_burnout_kg
    return np.fmin(np.fmin(lift, burn), rail)  # fmin skips a rail exit never reached, as Stability.min_margin_cal


def nominal_delay_s(frame: Airframe, records: Sequence[MotorRecord], settings: DispersionSettings) -> list[float]:
    """The listed (or drillable) delay closest to each record's nominal optimal delay; NaN without a charge."""
    return _nominal(frame, records, settings)[0]


def _nominal(frame: Airframe, records: Sequence[MotorRecord], settings: DispersionSettings,
             delays_s: Sequence[float] | None = None) -> tuple[list[float], np.ndarray]:
    """Nominal flights of every record: the delay each flies (``delays_s``, else the one closest to the optimal
    delay) and the apogee [m] with that delay (a charge that fires while the rocket climbs ends the climb)."""
    wanted = None if delays_s is None else np.asarray(delays_s, dtype=float)
    res = simulate(frame, list(records), settings.flight, deploy_delay_s=wanted, descent=False)
    return [res.chosen_delay_s(i) for i in range(res.n_flights)], res.apogee_m


def _fly_chunk(job: tuple) -> dict[str, np.ndarray]:
    """Worker entry point: one chunk of flights (a top-level function, so that it pickles)."""
    frame, records, uncertainties, motor_index, sample_index, settings, delays, descent = job
    return fly_samples(frame, records, uncertainties, motor_index, sample_index, settings, delays, descent=descent)


def run_samples(frame: Airframe, records: Sequence[MotorRecord], uncertainties: Sequence[Uncertainty],
                motor_index: np.ndarray, sample_index: np.ndarray, settings: DispersionSettings,
                delays_s: Sequence[float] | None = None, *, descent: bool = True, workers: int = 1,
                progress: Callable[[int, int], None] | None = None) -> dict[str, np.ndarray]:
    """:func:`fly_samples` in chunks of ``settings.chunk_size``, on ``workers`` processes.

    The chunks' results are joined in flight order, and each flight is integrated as it would be
    alone (its own steps, and in-step root solves of a fixed iteration count), so the arrays are
    identical, bit for bit, for any number of workers and any chunk size.
    ``progress(done, total)`` is called after each chunk.
    """
    motor_index = np.asarray(motor_index, dtype=np.int64)
    sample_index = np.asarray(sample_index, dtype=np.int64)
    total = motor_index.size
    size = settings.chunk_size
    bounds = [(a, min(a + size, total)) for a in range(0, total, size)]
    jobs = [(frame, list(records), list(uncertainties), motor_index[a:b], sample_index[a:b], settings,
             None if delays_s is None else list(delays_s), descent) for a, b in bounds]
    parts: list[dict[str, np.ndarray]] = []
    done = 0
    if workers <= 1 or len(jobs) == 1:
        for job, (a, b) in zip(jobs, bounds):
            parts.append(_fly_chunk(job))
            done += b - a
            if progress:
                progress(done, total)
    else:
        with ProcessPoolExecutor(max_workers=min(workers, len(jobs))) as pool:
            for part, (a, b) in zip(pool.map(_fly_chunk, jobs), bounds):
                parts.append(part)
                done += b - a
                if progress:
                    progress(done, total)
    return {name: np.concatenate([p[name] for p in parts]) for name in parts[0]}


def default_workers() -> int:
    """The number of processors this process may use."""
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except AttributeError:  # not on Linux
        return max(1, os.cpu_count() or 1)


# ----------------------------------------------------------------------------- statistics
def summarize(flights: dict[str, np.ndarray], settings: DispersionSettings, *, target_m: float | None = None,
              stability: dict[str, float] | None = None) -> dict[str, Any]:
    """The statistics of one motor's sampled flights (the ``scatter --json`` layout, SI units).

    Keys: ``n_flights``, ``n_failed``, ``seed``, ``apogee_m`` (p5, p50, p95, mean, std,
    standard_error), ``p_over_ceiling``, ``p_deploy_too_fast``, ``p_outside_field`` (each
    with a ``*_standard_error`` twin), ``deploy_speed_m_s`` and ``landing_speed_m_s`` (the
    descent rate under the device at landing, as in ``fly``) percentiles, ``flight_duration_s``
    percentiles, ``landing`` (points' mean and ``ellipse95``) and ``failures``: the share of the
    flights that break each rule, keyed by the rule book's codes (:func:`~motorlib.flight.sample_stats.failure_shares`).
    The events are the rule book's (``over-ceiling``, ``deployment-fast`` or ``ejection-fast``,
    ``lands-outside-field``). Probabilities are None when they cannot be judged (no ceiling given,
    no deployment speed known, no landing computed).
    """
    status = flights["status"]
    ok = status == OK
    apogee = np.where(ok, flights["apogee_m"], np.nan)
    finite = np.isfinite(apogee)
    n = int(status.size)
    m = int(finite.sum())
    mean = float(np.mean(apogee[finite])) if m else math.nan
    std = float(np.std(apogee[finite], ddof=1)) if m > 1 else math.nan
    out: dict[str, Any] = {
        "n_flights": n, "n_failed": int(n - ok.sum()), "seed": settings.seed,
        "apogee_m": {**_percentiles(apogee), "mean": _num(mean), "std": _num(std),
                     "standard_error": _num(std / math.sqrt(m)) if m > 1 else None},
    }
    if target_m is not None:
        out["target_m"] = target_m
    masks = rule_masks(flights)  # the rule book's codes of every sample (fly_samples)
    out["ceiling_m"] = settings.ceiling_m
    if settings.ceiling_m is not None:
        p = _probability(masks["over-ceiling"], finite)
    else:
        p = {"p": None, "standard_error": None}
    out["p_over_ceiling"], out["p_over_ceiling_standard_error"] = p["p"], p["standard_error"]
    speed = flights["deploy_speed_m_s"]
    known = np.isfinite(speed)
    too_fast = masks["deployment-fast"] | masks["ejection-fast"]
    p = _probability(too_fast, known) if known.any() else {"p": None, "standard_error": None}
    out["max_deploy_speed_m_s"] = settings.max_deploy_speed_m_s
    out["p_deploy_too_fast"], out["p_deploy_too_fast_standard_error"] = p["p"], p["standard_error"]
    out["deploy_speed_m_s"] = _percentiles(speed)
    out["n_landed_before_ejection"] = int(masks["lands-before-ejection"].sum())  # the charge deploys nothing
    out["landing_speed_m_s"] = _percentiles(flights["landing_speed_m_s"])  # the descent rate under the device
    out["flight_duration_s"] = _percentiles(flights["flight_duration_s"])
    east, north = flights["landing_east_m"], flights["landing_north_m"]
    landed = np.isfinite(east) & np.isfinite(north)
    out["field_radius_m"] = radius = settings.launch_rules().field_radius_m
    if radius is not None and landed.any():
        p = _probability(masks["lands-outside-field"], landed)
    else:
        p = {"p": None, "standard_error": None}
    out["p_outside_field"], out["p_outside_field_standard_error"] = p["p"], p["standard_error"]
    out["failures"] = failure_shares(masks)
    distance = np.hypot(east, north)
    out["landing"] = {"n_points": int(landed.sum()), "distance_m": _percentiles(distance),
                      "ellipse95": ellipse(east, north)}
    if stability is not None:
        out["stability"] = stability
    return out


def stability_spread(margin_cal: np.ndarray, min_margin_cal: float = MIN_STABILITY_CAL) -> dict[str, Any] | None:
    """Percentiles of the sampled least stability margins [calibers] and P(margin below ``min_margin_cal``).

    ``margin_cal`` is :func:`sampled_margin_cal` of every sample (``fly_samples``' ``sampled_margin_cal``), the
    figure ``match --robust`` judges too. None when no sample's margin is known (no geometry, no motor length
    or masses: a guessed length would give a guessed margin). ``n_under_min_margin`` counts the samples below.
    """
    margin = np.asarray(margin_cal, dtype=float)
    known = np.isfinite(margin)
    if not known.any():
        return None
    below = known & (margin < min_margin_cal)
    p = _probability(below, known)
    return {"margin_cal": _percentiles(margin), "min_margin_cal": min_margin_cal,
            "p_under_min_margin": p["p"], "p_under_min_margin_standard_error": p["standard_error"],
            "n_under_min_margin": int(below.sum())}


def run_scatter(frame: Airframe, record: MotorRecord, uncertainty: Uncertainty, settings: DispersionSettings, *,
                delay_s: float | None = None, target_m: float | None = None, spread: FiringSpread | None = None,
                workers: int = 1, progress: Callable[[int, int], None] | None = None
                ) -> tuple[dict[str, Any], dict[str, np.ndarray]]:
    """Sample ``settings.n_samples`` flights of one airframe with one motor; their summary and per-flight arrays.

    Parameters
    ----------
    frame : Airframe
    record : MotorRecord
    uncertainty : Uncertainty
        The record's firing spread, when it has one, replaces the impulse and burn-time entries.
    settings : DispersionSettings
    delay_s : float, optional
        The ejection delay fitted before the flight; default: the one closest to the nominal optimal delay.
    target_m : float, optional
        Only reported back (the plot marks it).
    spread : FiringSpread, optional
        A spread measured elsewhere (several catalog records of the motor, :func:`catalog_spread`);
        the record's own ``firing_spread`` comes first.
    workers : int
        Worker processes; results do not depend on it.
    progress : callable, optional
        ``progress(done, total)`` after each chunk.

    Returns
    -------
    summary : dict
        :func:`summarize` plus ``delay_s``, ``uncertainty`` and ``nominal_apogee_m`` (the apogee of the
        flight without any sampled variation, with ``delay_s``: the flight ``fly --delay`` gives).
    flights : dict of str to array, shape (n_samples,)
    """
    used = record.firing_spread or spread
    u = uncertainty.for_motor(used)
    delays, nominal_apogee = _nominal(frame, [record], settings, None if delay_s is None else [delay_s])
    delay = delays[0] if delay_s is None else float(delay_s)
    flights = run_samples(frame, [record], [u], np.zeros(settings.n_samples, dtype=np.int64),
                          np.arange(settings.n_samples), settings, [delay], workers=workers, progress=progress)
    summary = summarize(flights, settings, target_m=target_m,
                        stability=stability_spread(flights["sampled_margin_cal"]))
    summary["delay_s"] = _num(delay)
    summary["nominal_apogee_m"] = _num(float(nominal_apogee[0]))
    summary["uncertainty"] = u.as_dict()
    summary["firing_spread"] = None if used is None else {
        "n_firings": used.n_firings, "total_impulse_relative_std": used.total_impulse_relative_std,
        "burn_time_relative_std": used.burn_time_relative_std,
        "source": "motor record" if record.firing_spread is not None else "catalog records"}
    summary["landing_model"] = (
        "3-D: the airframe file's measured wind profile flown as given in every sample (wind speed and direction "
        "are not sampled); rail tilt and azimuth sampled" if frame.launch.wind_profile is not None else
        "3-D: each sample flown with its own wind direction, rail tilt and rail azimuth; the wind's direction is "
        "the same at every height")
    return summary, flights
