"""Batched 2-D point-mass flight of many (airframe, motor) pairs at once.

Model
-----
State per flight: downrange x, altitude z above the pad, and their speeds
(m, m/s); time is motor time, 0 at ignition. Forces:

* thrust along the body axis; the motor record gives thrust (linear between
  samples) and mass (propellant consumed in proportion to impulse delivered);
* gravity g(Z) = g0·(r0/(r0+Z))² at geometric altitude Z (or constant g0);
* drag D = ½·ρ·|v_rel|²·(Cd·A + Cd·A of a deployed device) against the
  air-relative velocity v_rel = v − wind; Cd constant or linear in Mach;
* air from the U.S. Standard Atmosphere 1976 with the site's offsets
  (:mod:`motorlib.atmosphere`), read from a 5 m table of ρ and a;
* wind blowing downrange, w(z) = w10·(max(z, z_floor)/10 m)^(1/7), the usual
  power-law profile (common practice, no published source).

Phases: the rocket waits on the pad until thrust exceeds the weight component
along the rail (solved exactly on the curve, so the pad wait is not
integrated); on the rail it moves only along the rail (no friction); after
rail exit the body axis follows v_rel (a stable rocket weathercocks into the
wind); after deployment the device's drag area is added.

Integrator (the performance core): classic RK4 on arrays of shape
(n_active,), one numpy loop over time steps and never over motors. Each flight
has its own step: a fraction of its burn time during the burn, with a step
boundary at every thrust-curve sample (so thrust is smooth inside every step),
then a fraction of its estimated coast time. Steps that would cross a change
of dynamics (rail exit, apogee deployment, altitude deployment) are shortened
to end on it (predicted from the local motion, with a tiny overshoot).
Apogee, landing and ejection-delay instants are located inside a step by
cubic Hermite interpolation of position and speed, using the derivatives at
both ends. Finished flights are compacted out of the arrays.

Vectorisation contract: k flights simulated together give the same numbers
as k single runs (each flight's steps depend only on its own state).

numpy only (scipy is used by the tests as the reference, never here).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Final, Sequence

import numpy as np

from .airframe import Airframe, Recovery
from .atmosphere import EARTH_RADIUS_M
from ..motor.record import MotorRecord
from ..errors import SimulationInputError
from ..units import STANDARD_GRAVITY_M_S2

__all__ = ["MESSAGES", "FlightResults", "FlightSettings", "MotorPack", "simulate"]

OK: Final = 0
NO_LIFTOFF: Final = 1
STUCK_ON_RAIL: Final = 2
NO_MASS: Final = 3
STEP_LIMIT: Final = 4
MESSAGES: Final = {
    OK: "flight completed",
    NO_LIFTOFF: "thrust never exceeds the weight along the rail: the rocket does not lift off",
    STUCK_ON_RAIL: "the rocket stops and slides back before leaving the rail",
    NO_MASS: "the motor record has no total or propellant mass, so it cannot be flown",
    STEP_LIMIT: "the simulation reached its step or time limit before finishing",
}

_TABLE_STEP_M: Final = 5.0  # air-table spacing [m]; linear interpolation of ρ errs by ~4e-8 relative
_TINY: Final = 1e-12


@dataclass(frozen=True)
class FlightSettings:
    """Integrator and model settings.

    Attributes
    ----------
    burn_steps : int
        Steps per burn time (plus one step boundary at every curve sample).
    coast_steps : int
        Steps per estimated coast time (v_burnout / g).
    rail_steps : int
        On the rail, a step covers at most this fraction of the rail's length.
    post_apogee_steps : int
        Steps from apogee to the last ejection delay (ejection states only).
    descent_step_fraction : float
        Under a deployed device, a step is at most this fraction of the drag
        time scale m/(½ρ·Cd·A·v) (v_t/g at terminal speed).
    wind_exponent : float
        Power-law exponent of the wind profile, 1/7 (common practice, no published source).
    wind_floor_m : float
        Below this height the wind is that at this height [m].
    vary_gravity : bool
        Inverse-square gravity with altitude; False for constant g0.
    uniform_air : bool
        Hold density and speed of sound at their pad values at every height
        (for textbook checks with constant density); False for the standard atmosphere.
    drill_step_s : float
        Adjustable delays can be drilled down in steps of this size [s] (common practice).
    max_time_s, max_steps : float, int
        Safety limits of one flight.
    """

    burn_steps: int = 80
    coast_steps: int = 60
    rail_steps: int = 20
    post_apogee_steps: int = 20
    descent_step_fraction: float = 0.8
    wind_exponent: float = 1.0 / 7.0
    wind_floor_m: float = 1.0
    vary_gravity: bool = True
    uniform_air: bool = False
    drill_step_s: float = 1.0
    max_time_s: float = 4000.0
    max_steps: int = 200_000

    def __post_init__(self) -> None:
        if self.burn_steps < 4 or self.coast_steps < 4:
            raise ValueError("`burn_steps` and `coast_steps` must be at least 4")
        if not 0.0 < self.descent_step_fraction <= 1.0:
            raise ValueError("`descent_step_fraction` must lie in (0, 1]")


@dataclass(frozen=True, eq=False)
class MotorPack:
    """Thrust curves and masses of n motors packed into padded arrays.

    Arrays of shape (n, n_samples_max) are padded with the last time and zero
    thrust; ``delays_s`` has shape (n, n_delays_max), padded with NaN, and holds
    every delay an ejection state is reported for (listed delays, plus the
    drillable ones of adjustable motors).
    """

    time_s: np.ndarray
    thrust_n: np.ndarray
    cumulative_ns: np.ndarray
    n_samples: np.ndarray
    total_impulse_ns: np.ndarray
    total_mass_kg: np.ndarray
    propellant_mass_kg: np.ndarray
    burnout_s: np.ndarray
    delays_s: np.ndarray
    has_mass: np.ndarray

    @property
    def n_motors(self) -> int:
        return int(self.n_samples.size)

    @classmethod
    def from_records(cls, records: Sequence[MotorRecord] | MotorRecord, drill_step_s: float = 1.0) -> MotorPack:
        """Pack motor records, or one record (one Python pass to copy samples; the flight loop never iterates motors)."""
        if isinstance(records, MotorRecord):
            records = [records]
        if len(records) == 0:
            raise ValueError("`records` must not be empty")
        return cls.from_samples(
            [(r.time_s, r.thrust_n) for r in records],
            total_mass_kg=[r.total_mass_kg for r in records],
            propellant_mass_kg=[r.propellant_mass_kg for r in records],
            delays_s=[r.delays_s for r in records],
            delay_adjustable=[r.delay_adjustable for r in records],
            drill_step_s=drill_step_s,
        )

    @classmethod
    def from_samples(cls, samples: Sequence[tuple[np.ndarray, np.ndarray]], *,
                     total_mass_kg: Sequence[float | None], propellant_mass_kg: Sequence[float | None],
                     delays_s: Sequence[Sequence[float]], delay_adjustable: Sequence[bool],
                     drill_step_s: float = 1.0) -> MotorPack:
        """Pack (time [s], thrust [N]) arrays of valid curves with their masses [kg] and delays [s]."""
        n = len(samples)
        if n == 0:
            raise ValueError("`samples` must not be empty")
        counts = np.array([t.size for t, _ in samples], dtype=np.int64)
        width = int(counts.max())
        delay_lists = [_report_delays(d, a, drill_step_s) for d, a in zip(delays_s, delay_adjustable)]
        n_delays = max(1, max(len(d) for d in delay_lists))
        time = np.empty((n, width))
        thrust = np.zeros((n, width))
        delays = np.full((n, n_delays), np.nan)
        for i, ((t, f), d) in enumerate(zip(samples, delay_lists)):
            k = t.size
            time[i, :k] = t
            time[i, k:] = t[-1]
            thrust[i, :k] = f
            delays[i, : len(d)] = d
        has_mass = np.array([m is not None and p is not None for m, p in zip(total_mass_kg, propellant_mass_kg)])
        total = np.array([m if ok else 1.0 for m, ok in zip(total_mass_kg, has_mass)], dtype=float)
        propellant = np.array([p if ok else 0.0 for p, ok in zip(propellant_mass_kg, has_mass)], dtype=float)
        steps = 0.5 * (thrust[:, 1:] + thrust[:, :-1]) * np.diff(time, axis=1)
        cumulative = np.concatenate((np.zeros((n, 1)), np.cumsum(steps, axis=1)), axis=1)
        last_burning = width - 1 - np.argmax((thrust > 0.0)[:, ::-1], axis=1)
        burnout = time[np.arange(n), np.minimum(last_burning + 1, counts - 1)]
        return cls(time, thrust, cumulative, counts, cumulative[:, -1].copy(), total, propellant, burnout, delays,
                   has_mass)


def _report_delays(delays_s: Sequence[float], adjustable: bool, drill_step_s: float) -> list[float]:
    listed = sorted(delays_s)
    if not adjustable or not listed:
        return listed
    drilled = list(np.arange(drill_step_s, listed[-1], drill_step_s))
    return sorted(set(listed) | {round(d, 9) for d in drilled})


@dataclass(frozen=True, eq=False)
class FlightResults:
    """Results of a batch; every array has shape (n_flights,) unless stated. Times from ignition [s].

    ``ejection_*`` arrays have shape (n_flights, n_delays) aligned with
    ``ejection_delay_s`` (NaN where a motor has fewer delays, or where the
    rocket lands before that delay). ``landing_*`` and ``descent_*`` are NaN
    when the airframe has no recovery device.

    Definitions: ``liftoff_thrust_to_weight`` is the highest thrust in the first
    0.1 s of the curve over the liftoff weight (m·g0); ``average_thrust_to_weight``
    the total impulse over the time from the first sample to burnout, over the same
    weight; ``max_acceleration_m_s2`` the largest magnitude of the trajectory's
    (kinematic) acceleration; maxima are sampled at step ends, and every curve
    sample is a step end. ``burnout_time_s`` is where the thrust curve reaches
    zero for good, and ejection delays count from it.
    """

    status: np.ndarray
    liftoff_time_s: np.ndarray
    rail_exit_time_s: np.ndarray
    rail_exit_speed_m_s: np.ndarray
    burnout_time_s: np.ndarray
    apogee_m: np.ndarray
    apogee_time_s: np.ndarray
    apogee_downrange_m: np.ndarray
    max_speed_m_s: np.ndarray
    max_mach: np.ndarray
    max_acceleration_m_s2: np.ndarray
    max_dynamic_pressure_pa: np.ndarray
    liftoff_mass_kg: np.ndarray
    liftoff_thrust_to_weight: np.ndarray
    average_thrust_to_weight: np.ndarray
    ejection_delay_s: np.ndarray
    ejection_altitude_m: np.ndarray
    ejection_speed_m_s: np.ndarray
    ejection_vertical_speed_m_s: np.ndarray
    deploy_time_s: np.ndarray
    deploy_altitude_m: np.ndarray
    deploy_delay_s: np.ndarray
    landing_time_s: np.ndarray
    landing_speed_m_s: np.ndarray
    landing_descent_rate_m_s: np.ndarray
    descent_time_s: np.ndarray
    drift_m: np.ndarray
    trajectories: tuple[dict[str, np.ndarray], ...] | None = None

    @property
    def optimal_delay_s(self) -> np.ndarray:
        """Apogee time minus burnout time [s]: the delay that fires the charge at apogee."""
        return self.apogee_time_s - self.burnout_time_s

    @property
    def n_flights(self) -> int:
        return int(self.status.size)

    def message(self, i: int) -> str:
        return MESSAGES[int(self.status[i])]

    def __repr__(self) -> str:
        """A one-line summary (the arrays themselves are attributes; :meth:`to_frame` tabulates them)."""
        ok = int(np.count_nonzero(self.status == OK))
        apogee = self.apogee_m[np.isfinite(self.apogee_m)]
        span = (f"apogee_m {float(apogee.min()):.6g}" + (f"..{float(apogee.max()):.6g}" if apogee.size > 1 else "")
                if apogee.size else "no apogee")
        return (f"FlightResults({self.n_flights} flights, {ok} ok; {span}; "
                f"trajectories {'kept' if self.trajectories is not None else 'not kept'})")

    def to_frame(self, index: Sequence[object] | None = None) -> "pandas.DataFrame":  # noqa: F821
        """One row per flight with every per-flight figure (SI, as the attribute names say).

        pandas is imported only here. ``index`` labels the rows (e.g. the motors' designations); by default
        rows are numbered like the flights. Ejection states (one column per delay) stay on the object.
        """
        import pandas as pd  # a lazy bridge: importing motorlib.flight never loads pandas

        columns: dict[str, object] = {"status": [int(v) for v in self.status],
                                      "message": [self.message(i) for i in range(self.n_flights)]}
        for name in self.__dataclass_fields__:
            value = getattr(self, name)
            if name != "status" and isinstance(value, np.ndarray) and value.ndim == 1:
                columns[name] = value
        columns["optimal_delay_s"] = self.optimal_delay_s
        return pd.DataFrame(columns, index=list(index) if index is not None else None)

    def chosen_delay_s(self, i: int) -> float:
        """The delay used for deployment, else the reported delay closest to the optimal one (NaN if none)."""
        if np.isfinite(self.deploy_delay_s[i]):
            return float(self.deploy_delay_s[i])
        delays = self.ejection_delay_s[i]
        if np.all(np.isnan(delays)) or not np.isfinite(self.optimal_delay_s[i]):
            return math.nan
        return float(delays[np.nanargmin(np.abs(delays - self.optimal_delay_s[i]))])

    def summary(self, i: int, listed_delays_s: Sequence[float] | None = None) -> dict[str, object]:
        """Flight ``i`` as a plain dict of SI figures (the ``fly --json`` layout). Times from ignition.

        ``listed_delays_s`` limits ``ejections`` to the motor's listed delays (and the chosen one),
        leaving out the drillable values of adjustable motors.
        """
        def num(value: float) -> float | None:
            return float(value) if np.isfinite(value) else None

        chosen = self.chosen_delay_s(i)
        ejections = []
        chosen_speed = None
        for k, delay in enumerate(self.ejection_delay_s[i]):
            if np.isnan(delay):
                continue
            if listed_delays_s is not None and delay not in listed_delays_s and delay != chosen:
                continue
            entry = {"delay_s": float(delay), "altitude_m": num(self.ejection_altitude_m[i, k]),
                     "speed_m_s": num(self.ejection_speed_m_s[i, k]),
                     "vertical_speed_m_s": num(self.ejection_vertical_speed_m_s[i, k])}
            ejections.append(entry)
            if delay == chosen:
                chosen_speed = entry["speed_m_s"]
        return {
            "status": "ok" if self.status[i] == OK else "failed",
            "message": self.message(i),
            "liftoff_time_s": num(self.liftoff_time_s[i]),
            "rail_exit_time_s": num(self.rail_exit_time_s[i]),
            "rail_exit_speed_m_s": num(self.rail_exit_speed_m_s[i]),
            "burnout_time_s": num(self.burnout_time_s[i]),
            "apogee_m": num(self.apogee_m[i]),
            "time_to_apogee_s": num(self.apogee_time_s[i]),
            "apogee_downrange_m": num(self.apogee_downrange_m[i]),
            "optimal_delay_s": num(self.optimal_delay_s[i]),
            "chosen_delay_s": num(chosen),
            "chosen_ejection_speed_m_s": chosen_speed,
            "max_speed_m_s": num(self.max_speed_m_s[i]),
            "max_mach": num(self.max_mach[i]),
            "max_acceleration_m_s2": num(self.max_acceleration_m_s2[i]),
            "max_dynamic_pressure_pa": num(self.max_dynamic_pressure_pa[i]),
            "liftoff_mass_kg": num(self.liftoff_mass_kg[i]),
            "liftoff_thrust_to_weight": num(self.liftoff_thrust_to_weight[i]),
            "average_thrust_to_weight": num(self.average_thrust_to_weight[i]),
            "ejections": ejections,
            "deploy_time_s": num(self.deploy_time_s[i]),
            "deploy_altitude_m": num(self.deploy_altitude_m[i]),
            "landing_speed_m_s": num(self.landing_speed_m_s[i]),
            "landing_descent_rate_m_s": num(self.landing_descent_rate_m_s[i]),
            "descent_time_s": num(self.descent_time_s[i]),
            "drift_m": num(self.drift_m[i]),
        }


# ----------------------------------------------------------------------------- set-up helpers
def _liftoff(pack: MotorPack, idx: np.ndarray, dry_kg: np.ndarray, cos_rail: np.ndarray, g0: float
             ) -> tuple[np.ndarray, np.ndarray]:
    """Liftoff time and its curve segment: first t with F(t) > m(t)·g·cos(rail angle).

    On each segment F is linear and m quadratic in time (impulse is quadratic), so
    the crossing is the root of a quadratic, solved exactly.
    """
    t = pack.time_s[idx]
    f = pack.thrust_n[idx]
    c = pack.cumulative_ns[idx]
    itot = pack.total_impulse_ns[idx][:, None]
    m0 = (dry_kg + pack.total_mass_kg[idx])[:, None]
    mp = pack.propellant_mass_kg[idx][:, None]
    cos_rail = np.asarray(cos_rail, dtype=float)[:, None]
    margin = f - g0 * cos_rail * (m0 - mp * c / itot)
    n = idx.size
    width = t.shape[1]
    valid = np.arange(width)[None, :] < pack.n_samples[idx][:, None]
    above = (margin > 0.0) & valid
    lifts = above.any(axis=1)
    k = np.argmax(above, axis=1)
    rows = np.arange(n)
    time = t[rows, k].copy()
    seg = np.maximum(k - 1, 0)
    inner = lifts & (k > 0)
    if inner.any():
        r, j = rows[inner], k[inner] - 1
        t0, f0, f1 = t[r, j], f[r, j], f[r, j + 1]
        dt = t[r, j + 1] - t0
        slope = (f1 - f0) / dt
        mp_c, it_c = mp[r, 0], itot[r, 0]
        w = g0 * cos_rail[r, 0]
        # margin(τ) = a0 + a1 τ + a2 τ², τ = t − t0
        a0 = margin[r, j]
        a1 = slope + w * mp_c * f0 / it_c
        a2 = 0.5 * w * mp_c * slope / it_c
        disc = np.maximum(a1 * a1 - 4.0 * a2 * a0, 0.0)
        # stable root of the rising crossing; a0 <= 0 < margin at τ = dt
        with np.errstate(divide="ignore", invalid="ignore"):
            tau = np.where(np.abs(a2) > 1e-15 * np.abs(a1) + 1e-300, (2.0 * -a0) / (a1 + np.sqrt(disc)), -a0 / a1)
        tau = np.clip(np.nan_to_num(tau, nan=0.0), 0.0, dt)
        time[inner] = t0 + tau
        seg[inner] = j
    seg = np.where(lifts & (k == 0), 0, seg)
    return np.where(lifts, time, np.nan), seg


def _thrust_to_weight(pack: MotorPack, idx: np.ndarray, liftoff_weight_n: np.ndarray
                      ) -> tuple[np.ndarray, np.ndarray]:
    """Liftoff T/W (peak thrust in the first 0.1 s of the curve over liftoff weight) and average T/W.

    Average T/W uses the total impulse over the time from the first to the last sample with thrust.
    """
    t = pack.time_s[idx]
    f = pack.thrust_n[idx]
    start = t[:, :1]
    window = (t <= start + 0.1) & (np.arange(t.shape[1])[None, :] < pack.n_samples[idx][:, None])
    peak_early = np.max(np.where(window, f, 0.0), axis=1)
    # the curve value at start + 0.1 s can exceed every sample inside the window (a rising segment)
    rows = np.arange(idx.size)
    k = np.clip(np.sum(window, axis=1), 1, t.shape[1] - 1)
    t_a, t_b, f_a, f_b = t[rows, k - 1], t[rows, k], f[rows, k - 1], f[rows, k]
    at_edge = np.where((t_b > t_a) & (t_b > start[:, 0] + 0.1),
                       f_a + (f_b - f_a) * (start[:, 0] + 0.1 - t_a) / np.maximum(t_b - t_a, _TINY), 0.0)
    peak_early = np.maximum(peak_early, at_edge)
    burn = pack.burnout_s[idx] - t[:, 0]
    average = pack.total_impulse_ns[idx] / np.maximum(burn, _TINY)
    return peak_early / liftoff_weight_n, average / liftoff_weight_n


def _hermite(y0: np.ndarray, d0: np.ndarray, y1: np.ndarray, d1: np.ndarray, h: np.ndarray, tau: np.ndarray
             ) -> np.ndarray:
    """Cubic Hermite interpolant at fraction tau of a step of length h."""
    t2 = tau * tau
    t3 = t2 * tau
    return ((2 * t3 - 3 * t2 + 1) * y0 + (t3 - 2 * t2 + tau) * h * d0
            + (-2 * t3 + 3 * t2) * y1 + (t3 - t2) * h * d1)


def _hermite_root(y0: np.ndarray, d0: np.ndarray, y1: np.ndarray, d1: np.ndarray, h: np.ndarray,
                  level: np.ndarray | float = 0.0) -> np.ndarray:
    """Fraction tau in [0, 1] where the Hermite cubic crosses ``level`` (y0 - level and y1 - level differ in sign)."""
    a, b = y0 - level, y1 - level
    tau = np.clip(a / np.where(a - b == 0.0, 1.0, a - b), 0.0, 1.0)  # secant start
    lo, hi = np.zeros_like(tau), np.ones_like(tau)
    for _ in range(12):  # Newton, safeguarded by bisection bounds; converges in 3-4 steps here
        value = _hermite(y0, d0, y1, d1, h, tau) - level
        t2 = tau * tau
        slope = ((6 * t2 - 6 * tau) * y0 + (3 * t2 - 4 * tau + 1) * h * d0
                 + (-6 * t2 + 6 * tau) * y1 + (3 * t2 - 2 * tau) * h * d1)
        exact = value == 0.0
        same_side = (np.sign(value) == np.sign(a)) & ~exact
        lo = np.where(same_side, tau, lo)
        hi = np.where(same_side | exact, hi, tau)
        step = np.where(slope != 0.0, value / np.where(slope == 0.0, 1.0, slope), 0.0)
        candidate = tau - step
        bad = (candidate < lo) | (candidate > hi) | ~np.isfinite(candidate)  # on a bound: converged
        new = np.where(exact, tau, np.where(bad, 0.5 * (lo + hi), candidate))
        done = np.max(np.abs(new - tau)) < 1e-13
        tau = new
        if done:
            break
    return tau


# ----------------------------------------------------------------------------- the batched loop
@dataclass
class _Group:
    """What flights integrated together share: air, gravity, wind shape and drag table, on one height grid.

    Tables are sampled every ``step_m`` from ``base_m`` above the pad, so a lookup is
    one index computation and a linear interpolation per table (no search).
    """

    base_m: float
    step_m: float
    rho: np.ndarray  # density [kg/m³]; linear interpolation error ~4e-8 relative at 5 m spacing
    sound: np.ndarray  # speed of sound [m/s]
    gravity: np.ndarray  # [m/s²]
    wind_floor_m: float
    wind_exponent: float
    machs: np.ndarray
    cds: np.ndarray
    table_cd: bool

    def lookup(self, z: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        """Density, speed of sound, gravity and wind shape w(z)/w(10 m) at heights z above the pad.

        The wind power law is computed exactly: it is too curved near the ground for a 5 m table.
        """
        u = (z - self.base_m) * (1.0 / self.step_m)
        i = np.clip(u.astype(np.int64), 0, self.rho.size - 2)
        w = u - i
        out = []
        for table in (self.rho, self.sound, self.gravity):
            lo = table[i]
            out.append(lo + w * (table[i + 1] - lo))
        shape = (np.maximum(z, self.wind_floor_m) * 0.1) ** self.wind_exponent  # 0.1 = 1 / (10 m reference)
        return out[0], out[1], out[2], shape


def _make_group(frame: Airframe, s: FlightSettings) -> _Group:
    site = frame.launch.site
    top = 100_000.0 - site.elevation_m
    heights = np.arange(-100.0, top + 2 * _TABLE_STEP_M, _TABLE_STEP_M)
    _, _, rho, sound = site.air(heights)
    if s.uniform_air:
        _, _, rho0, sound0 = site.air(0.0)
        rho, sound = np.full(heights.size, float(rho0)), np.full(heights.size, float(sound0))
    if s.vary_gravity:
        gravity = STANDARD_GRAVITY_M_S2 * (EARTH_RADIUS_M / (EARTH_RADIUS_M + site.elevation_m + heights)) ** 2
    else:
        gravity = np.full(heights.size, STANDARD_GRAVITY_M_S2)
    return _Group(base_m=float(heights[0]), step_m=_TABLE_STEP_M, rho=rho, sound=sound, gravity=gravity,
                  wind_floor_m=s.wind_floor_m, wind_exponent=s.wind_exponent,
                  machs=np.array(frame.drag_machs), cds=np.array(frame.drag_cds),
                  table_cd=bool(frame.drag_table))


def _accel(g: _Group, a: dict[str, np.ndarray], t, x, z, vx, vz):
    """Accelerations (ax, az), Mach and dynamic pressure of every active flight; arrays of shape (n_active,).

    ``a`` holds the active flights' parameters and phase flags (compacted with the state).
    """
    burning = a["burning"]
    dt = t - a["seg_t"]
    thrust = np.where(burning, a["seg_f"] + a["seg_s"] * dt, 0.0)
    impulse = np.where(burning, a["seg_c"] + (a["seg_f"] + 0.5 * a["seg_s"] * dt) * dt, a["itot"])
    inv_mass = 1.0 / (a["m_full"] - a["m_prop"] * (impulse / a["itot"]))
    rho, sound, grav, shape = g.lookup(z)
    vrx = vx - a["wind"] * shape
    speed = np.sqrt(vrx * vrx + vz * vz)
    mach = speed / sound
    cd = np.interp(mach, g.machs, g.cds) if g.table_cd else a["cd"]
    half_rho_v = 0.5 * rho * speed
    drag_per_v = half_rho_v * (cd * a["area"] + a["extra"])  # drag force / |v_rel|
    # free flight: thrust along v_rel (weathercocking), drag against it
    along = thrust / np.maximum(speed, 1e-9) - drag_per_v
    ax = along * vrx * inv_mass
    az = along * vz * inv_mass - grav
    on_rail = a["on_rail"]
    if a["any_rail"]:
        ux, uz = a["ux"], a["uz"]
        a_rail = (thrust - drag_per_v * (vrx * ux + vz * uz)) * inv_mass - grav * uz  # uz = cos(rail angle)
        ax = np.where(on_rail, a_rail * ux, ax)
        az = np.where(on_rail, a_rail * uz, az)
    return ax, az, mach, half_rho_v * speed


def simulate(
    airframe: Airframe | Sequence[Airframe],
    motors: Sequence[MotorRecord] | MotorRecord | MotorPack,
    settings: FlightSettings | None = None,
    *,
    added_mass_kg: np.ndarray | float | None = None,
    deploy_delay_s: np.ndarray | None = None,
    descent: bool = True,
    trajectories: bool = False,
) -> FlightResults:
    """Fly every (airframe, motor) pair in one batch.

    Parameters
    ----------
    airframe : Airframe or sequence of Airframe
        One airframe for all motors, or one per motor. Flights that share a
        launch site, drag table and recovery device are integrated together;
        mass, diameter, constant Cd, rail and wind may differ per flight.
    motors : sequence of MotorRecord, one MotorRecord, or MotorPack
    settings : FlightSettings, optional
    added_mass_kg : float or array, shape (n,), optional
        Ballast added to the airframe [kg].
    deploy_delay_s : array, shape (n,), optional
        Delay that fires the recovery device when it deploys at ``ejection``;
        default: the reported delay closest to the optimal delay.
    descent : bool
        Fly the descent under the recovery device (landing speed, drift); False
        stops after the last ejection event, which is all a ranking needs.
    trajectories : bool
        Also return each flight's sampled trajectory (for plots and CSV export).

    Returns
    -------
    FlightResults

    Raises
    ------
    SimulationInputError
        When the inputs cannot be flown at all (mismatched lengths, negative ballast).
    """
    s = settings or FlightSettings()
    if isinstance(motors, MotorRecord):
        motors = [motors]
    pack = motors if isinstance(motors, MotorPack) else MotorPack.from_records(list(motors), s.drill_step_s)
    n = pack.n_motors
    frames = [airframe] * n if isinstance(airframe, Airframe) else list(airframe)
    if len(frames) != n:
        raise SimulationInputError("simulate", "airframe", f"got {len(frames)} airframes for {n} motors")
    added = np.broadcast_to(np.asarray(0.0 if added_mass_kg is None else added_mass_kg, dtype=float), (n,)).copy()
    if np.any(added < 0.0) or not np.all(np.isfinite(added)):
        raise SimulationInputError("simulate", "added_mass_kg", "ballast must be finite and not negative")
    wanted = None if deploy_delay_s is None else np.broadcast_to(np.asarray(deploy_delay_s, dtype=float), (n,))
    out = _empty_results(n, pack.delays_s.shape[1], pack.delays_s)
    traj: list[dict[str, np.ndarray] | None] = [None] * n
    groups: dict[tuple, list[int]] = {}
    for i, frame in enumerate(frames):
        groups.setdefault((frame.launch.site, frame.drag_table, frame.recovery), []).append(i)
    for members in groups.values():
        members_idx = np.array(members)
        _fly_group([frames[i] for i in members], pack, members_idx, added, s, out,
                   traj if trajectories else None, wanted, descent)
    return FlightResults(**out, trajectories=tuple(traj) if trajectories else None)  # type: ignore[arg-type]


_RESULT_FIELDS = ("liftoff_time_s", "rail_exit_time_s", "rail_exit_speed_m_s", "burnout_time_s", "apogee_m",
                  "apogee_time_s", "apogee_downrange_m", "max_speed_m_s", "max_mach", "max_acceleration_m_s2",
                  "max_dynamic_pressure_pa", "liftoff_mass_kg", "liftoff_thrust_to_weight",
                  "average_thrust_to_weight", "deploy_time_s", "deploy_altitude_m", "deploy_delay_s",
                  "landing_time_s", "landing_speed_m_s", "landing_descent_rate_m_s", "descent_time_s",
                  "drift_m")


def _empty_results(n: int, k: int, delays: np.ndarray) -> dict[str, np.ndarray]:
    out = {name: np.full(n, np.nan) for name in _RESULT_FIELDS}
    out["status"] = np.zeros(n, dtype=np.int64)
    out["ejection_delay_s"] = delays.copy()
    for name in ("ejection_altitude_m", "ejection_speed_m_s", "ejection_vertical_speed_m_s"):
        out[name] = np.full((n, k), np.nan)
    return out


def _fly_group(frames: list[Airframe], pack: MotorPack, idx: np.ndarray, added: np.ndarray, s: FlightSettings,
               out: dict[str, np.ndarray], traj: list | None, wanted_delay: np.ndarray | None,
               descent: bool) -> None:
    first = frames[0]
    g = _make_group(first, s)
    dry = np.array([f.mass_kg for f in frames]) + added[idx]
    angle = np.array([f.launch.rail_angle_rad for f in frames])
    params = {
        "itot": pack.total_impulse_ns[idx], "m_full": dry + pack.total_mass_kg[idx],
        "m_prop": pack.propellant_mass_kg[idx], "area": np.array([f.reference_area_m2 for f in frames]),
        "cd": np.array([f.drag_coefficient for f in frames]), "ux": np.sin(angle), "uz": np.cos(angle),
        "rail_m": np.array([f.launch.rail_length_m for f in frames]),
        "wind": np.array([f.launch.wind_speed_m_s for f in frames]), "extra": np.zeros(idx.size),
    }
    out["liftoff_mass_kg"][idx] = params["m_full"]
    ttw_lift, ttw_avg = _thrust_to_weight(pack, idx, params["m_full"] * STANDARD_GRAVITY_M_S2)
    out["liftoff_thrust_to_weight"][idx] = ttw_lift
    out["average_thrust_to_weight"][idx] = ttw_avg
    out["burnout_time_s"][idx] = pack.burnout_s[idx]
    flyable = pack.has_mass[idx].copy()
    out["status"][idx[~flyable]] = NO_MASS
    t0, seg0 = _liftoff(pack, idx, dry, params["uz"], STANDARD_GRAVITY_M_S2)
    grounded = flyable & np.isnan(t0)
    out["status"][idx[grounded]] = NO_LIFTOFF
    flyable &= ~grounded
    if not flyable.any():
        return
    keep = np.flatnonzero(flyable)
    idx, t0, seg0 = idx[keep], t0[keep], seg0[keep]
    params = {k: v[keep] for k, v in params.items()}
    out["liftoff_time_s"][idx] = t0
    recovery = first.recovery if first.recovery is not None and first.recovery.device != "none" else None
    deploy_altitude = recovery.deploy_altitude_m if recovery is not None and recovery.deploy == "altitude" else None
    zeros = np.zeros(idx.size)
    state0 = {"t": t0, "x": zeros, "z": zeros, "vx": zeros, "vz": zeros}
    ascent = _integrate(g, pack, idx, state0, seg0, params, s, out, traj, deploy_altitude, descent=False)
    if recovery is None or not descent:
        return
    _descend(g, pack, recovery, ascent, idx, params, s, out, traj, wanted_delay)


def _integrate(g: _Group, pack: MotorPack, idx: np.ndarray, state0: dict[str, np.ndarray], seg0: np.ndarray,
               params: dict[str, np.ndarray], s: FlightSettings, out: dict[str, np.ndarray], traj: list | None,
               deploy_altitude_m: float | None, *, descent: bool) -> dict[str, dict[str, np.ndarray]]:
    """The RK4 loop over time steps for the flights ``idx`` (never a loop over flights).

    Ascent pass (``descent`` False): from liftoff on the rail, through the burn,
    to apogee and the last ejection delay. Descent pass: burnt-out flights from
    the given states, with the device's drag area (``params["extra"]``), until landing.
    Every per-flight array lives in the dict ``a`` and is compacted together when
    flights finish; results are written back by each flight's position ``a["ref"]``.
    Returns the located states at apogee, deployment altitude, landing and every ejection delay.
    """
    n_all = idx.size
    n_delays = pack.delays_s.shape[1]
    times_all = pack.time_s[idx]
    thrust_all = pack.thrust_n[idx]
    cum_all = pack.cumulative_ns[idx]
    last_seg = pack.n_samples[idx] - 1
    burnout = pack.burnout_s[idx]
    queries = pack.delays_s[idx] + burnout[:, None]
    q_filled = np.where(np.isnan(queries), np.inf, queries)
    stop_after = np.max(np.where(np.isnan(queries), -np.inf, queries), axis=1)
    a: dict = {k: v.copy() for k, v in params.items()}
    a.update({k: state0[k].astype(float).copy() for k in ("t", "x", "z", "vx", "vz")})
    a["ref"] = np.arange(n_all)
    if descent:
        a["seg"] = last_seg.copy()
        a["burning"] = np.zeros(n_all, dtype=bool)
        a["on_rail"] = np.zeros(n_all, dtype=bool)
        a["apogee_found"] = np.ones(n_all, dtype=bool)
        a["pending"] = np.zeros(n_all, dtype=bool)
        a["next_q"] = np.full(n_all, np.inf)
    else:
        a["seg"] = seg0.copy()
        a["burning"] = a["t"] < burnout
        a["on_rail"] = np.ones(n_all, dtype=bool)
        a["apogee_found"] = np.zeros(n_all, dtype=bool)
        a["pending"] = np.full(n_all, deploy_altitude_m is not None)
        a["next_q"] = q_filled.min(axis=1)
    a["any_rail"] = bool(a["on_rail"].any())
    a["burn_h"] = np.maximum(burnout - a["t"], 1e-3) / s.burn_steps
    a["coast_h"] = np.full(n_all, 1.0 / s.coast_steps)
    a["stop_after"] = stop_after
    for name in ("max_speed", "max_mach", "max_acc", "max_q"):
        a[name] = np.zeros(n_all)
    apogee = {k: np.full(n_all, np.nan) for k in ("t", "x", "z", "vx")}
    at_deploy = {k: np.full(n_all, np.nan) for k in ("t", "x", "z", "vx", "vz")}
    landing = {k: np.full(n_all, np.nan) for k in ("t", "x", "speed", "rate")}
    ej = {k: np.full((n_all, n_delays), np.nan) for k in ("z", "speed", "vz", "x", "vx")}
    maxima = {name: np.zeros(n_all) for name in ("max_speed", "max_mach", "max_acc", "max_q")}
    status = np.zeros(n_all, dtype=np.int64)
    rail_exit_t = np.full(n_all, np.nan)
    rail_exit_v = np.full(n_all, np.nan)
    history: list[tuple[np.ndarray, ...]] = []
    apogee_steps: list[tuple[np.ndarray, ...]] = []  # end states of the steps that hold an apogee
    landing_steps: list[tuple[np.ndarray, ...]] = []

    def load_segment(mask: np.ndarray | None) -> None:
        """Coefficients of the current curve segment of the flights in ``mask`` (all when None)."""
        rows = a["ref"] if mask is None else a["ref"][mask]
        j = np.minimum(a["seg"] if mask is None else a["seg"][mask], last_seg[rows] - 1)
        t_a, t_b, f_a = times_all[rows, j], times_all[rows, j + 1], thrust_all[rows, j]
        values = (t_a, t_b, f_a, (thrust_all[rows, j + 1] - f_a) / np.maximum(t_b - t_a, _TINY), cum_all[rows, j])
        for name, value in zip(("seg_t", "seg_end", "seg_f", "seg_s", "seg_c"), values):
            if mask is None:
                a[name] = value
            else:
                a[name][mask] = value

    load_segment(None)

    def f(tt, xx, zz, vxx, vzz):
        return _accel(g, a, tt, xx, zz, vxx, vzz)

    ax, az, _, _ = f(a["t"], a["x"], a["z"], a["vx"], a["vz"])
    a["ax"], a["az"] = ax, az
    if traj is not None:
        history.append(tuple(a[k].copy() for k in ("ref", "t", "x", "z", "vx", "vz", "ax", "az")))
    steps = 0
    while a["ref"].size:
        steps += 1
        t, x, z, vx, vz, ax, az = a["t"], a["x"], a["z"], a["vx"], a["vz"], a["ax"], a["az"]
        burning = a["burning"]
        # ---- step size of every flight ----
        if descent:
            h = _descent_step(g, a, z, vx, vz, s)
        else:
            h = np.where(burning, np.minimum(a["burn_h"], a["seg_end"] - t), a["coast_h"])
        if a["any_rail"]:
            # end the step on rail exit: solve s + v h + a h²/2 = L, overshooting by 1e-7 relative,
            # and cover at most 1/rail_steps of the rail per step (the short rail phase sets the exit speed)
            on_rail = a["on_rail"]
            ux, uz = a["ux"], a["uz"]
            v_along = vx * ux + vz * uz
            a_along = ax * ux + az * uz
            remaining = a["rail_m"] - (x * ux + z * uz)
            disc = v_along * v_along + 2.0 * a_along * remaining
            denom = v_along + np.sqrt(np.maximum(disc, 0.0))
            piece = a["rail_m"] / s.rail_steps
            with np.errstate(divide="ignore", invalid="ignore"):
                h_rail = np.where((disc >= 0.0) & (denom > 0.0), 2.0 * remaining / denom, np.inf) * (1.0 + 1e-7)
                h_piece = 2.0 * piece / (v_along + np.sqrt(v_along * v_along + 2.0 * np.maximum(a_along, 0.0) * piece))
            h = np.where(on_rail, np.minimum(np.minimum(h, h_piece), h_rail), h)
        if deploy_altitude_m is not None and a["pending"].any():
            falling = a["pending"] & a["apogee_found"] & (vz < 0.0)
            with np.errstate(divide="ignore", invalid="ignore"):
                h_dep = np.where(falling, (z - deploy_altitude_m) / -vz, np.inf) * (1.0 + 1e-7)
            h = np.where(falling & (h_dep < h) & (h_dep > 0.0), h_dep, h)
        hit_seg = burning & (h >= a["seg_end"] - t)
        # ---- classic RK4 ----
        half = 0.5 * h
        vx2, vz2 = vx + half * ax, vz + half * az
        k2x, k2z, _, _ = f(t + half, x + half * vx, z + half * vz, vx2, vz2)
        vx3, vz3 = vx + half * k2x, vz + half * k2z
        k3x, k3z, _, _ = f(t + half, x + half * vx2, z + half * vz2, vx3, vz3)
        vx4, vz4 = vx + h * k3x, vz + h * k3z
        k4x, k4z, _, _ = f(t + h, x + h * vx3, z + h * vz3, vx4, vz4)
        sixth = h / 6.0
        x1 = x + sixth * (vx + 2.0 * (vx2 + vx3) + vx4)
        z1 = z + sixth * (vz + 2.0 * (vz2 + vz3) + vz4)
        vx1 = vx + sixth * (ax + 2.0 * (k2x + k3x) + k4x)
        vz1 = vz + sixth * (az + 2.0 * (k2z + k3z) + k4z)
        t1 = np.where(hit_seg, a["seg_end"], t + h)
        # ---- phase changes at the step end ----
        if hit_seg.any():
            a["seg"] = np.where(hit_seg, a["seg"] + 1, a["seg"])
            ended = hit_seg & ((a["seg"] >= last_seg[a["ref"]]) | (t1 >= burnout[a["ref"]]))
            load_segment(hit_seg & ~ended)
            if ended.any():  # coast steps: a fraction of the drag-free coast time v/g
                a["burning"] = burning & ~ended
                a["coast_h"] = np.where(ended, np.maximum(np.abs(vz1), 10.0) / STANDARD_GRAVITY_M_S2 / s.coast_steps,
                                        a["coast_h"])
        if a["any_rail"]:
            on_rail = a["on_rail"]
            left = on_rail & (x1 * a["ux"] + z1 * a["uz"] >= a["rail_m"] * (1.0 - 1e-12))
            if left.any():
                rows = a["ref"][left]
                rail_exit_t[rows] = t1[left]
                rail_exit_v[rows] = np.hypot(vx1[left], vz1[left])
            slid_back = on_rail & ~left & ((vx1 * a["ux"] + vz1 * a["uz"]) <= 0.0)
            status[a["ref"][slid_back]] = STUCK_ON_RAIL
            a["on_rail"] = on_rail & ~left
            a["any_rail"] = bool(a["on_rail"].any())
        # ---- derivative at the new state: the next step's first stage ----
        ax1, az1, mach1, q1 = f(t1, x1, z1, vx1, vz1)
        # ---- events inside the step, by cubic Hermite interpolation ----
        dt_step = t1 - t
        # Apogee and landing are located after the loop, all at once (one vectorised root solve instead of
        # one per step); here the step's end states are only recorded.
        crossing = (vz1 <= 0.0) & (vz > 0.0) & ~a["apogee_found"] & ~a["on_rail"]
        if crossing.any():
            c = crossing
            apogee_steps.append(tuple(v[c] for v in (a["ref"], t, dt_step, x, z, vx, vz, ax, az,
                                                       x1, z1, vx1, vz1, ax1, az1)))
            a["apogee_found"] = a["apogee_found"] | crossing
            if not descent:  # after apogee only the ejection states are wanted: 1/post_apogee_steps of the wait
                wait = a["stop_after"][c] - t1[c]
                a["coast_h"][c] = np.maximum(a["coast_h"][c], np.where(np.isfinite(wait), wait, 0.0) / s.post_apogee_steps)
        due = a["next_q"] <= t1
        if due.any():
            rows_d = np.flatnonzero(due)
            r_all = a["ref"][rows_d]
            q_rows = q_filled[r_all]
            inside = (q_rows > t[rows_d, None]) & (q_rows <= t1[rows_d, None])
            a_i, b_i = np.nonzero(inside)
            li = rows_d[a_i]  # local (active) positions
            hq = dt_step[li]
            tau = (q_rows[a_i, b_i] - t[li]) / hq
            r = a["ref"][li]
            ej["z"][r, b_i] = _hermite(z[li], vz[li], z1[li], vz1[li], hq, tau)
            ej["x"][r, b_i] = _hermite(x[li], vx[li], x1[li], vx1[li], hq, tau)
            vxq = _hermite(vx[li], ax[li], vx1[li], ax1[li], hq, tau)
            vzq = _hermite(vz[li], az[li], vz1[li], az1[li], hq, tau)
            ej["vx"][r, b_i] = vxq
            ej["vz"][r, b_i] = vzq
            ej["speed"][r, b_i] = np.hypot(vxq, vzq)
            later = np.where(q_rows > t1[rows_d, None], q_rows, np.inf)
            a["next_q"][rows_d] = later.min(axis=1)
        if deploy_altitude_m is not None and a["pending"].any():
            down = a["pending"] & a["apogee_found"] & (z1 <= deploy_altitude_m * (1.0 + 1e-9)) & (vz1 < 0.0)
            if down.any():
                r = a["ref"][down]
                at_deploy["t"][r], at_deploy["x"][r], at_deploy["z"][r] = t1[down], x1[down], z1[down]
                at_deploy["vx"][r], at_deploy["vz"][r] = vx1[down], vz1[down]
                a["pending"] = a["pending"] & ~down
        landed = (z1 <= 0.0) & (z > 0.0) & ~a["on_rail"]
        if landed.any():
            c = landed
            landing_steps.append(tuple(v[c] for v in (a["ref"], t, dt_step, x, z, vx, vz, ax, az,
                                                        x1, z1, vx1, vz1, ax1, az1)))
        # ---- running maxima, sampled at step ends (every curve sample is a step end) ----
        np.maximum(a["max_speed"], np.sqrt(vx1 * vx1 + vz1 * vz1), out=a["max_speed"])
        np.maximum(a["max_mach"], mach1, out=a["max_mach"])
        np.maximum(a["max_q"], q1, out=a["max_q"])
        np.maximum(a["max_acc"], np.sqrt(ax1 * ax1 + az1 * az1), out=a["max_acc"])  # kinematic, gravity included
        a["t"], a["x"], a["z"], a["vx"], a["vz"], a["ax"], a["az"] = t1, x1, z1, vx1, vz1, ax1, az1
        if traj is not None:
            history.append(tuple(a[k].copy() for k in ("ref", "t", "x", "z", "vx", "vz", "ax", "az")))
        # ---- finished flights leave the arrays ----
        if descent:
            done = landed
        else:
            done = landed | (a["apogee_found"] & (t1 >= a["stop_after"]) & ~a["pending"])
        over = (t1 > s.max_time_s) | (steps >= s.max_steps)
        if over.any():
            status[a["ref"][over & ~done]] = STEP_LIMIT
        done = done | over | (status[a["ref"]] != OK)
        if done.any():
            rows = a["ref"][done]
            for name in maxima:
                maxima[name][rows] = a[name][done]
            keep = ~done
            for name, value in a.items():
                if isinstance(value, np.ndarray):
                    a[name] = value[keep]
            a["any_rail"] = bool(a["on_rail"].any())
    if apogee_steps:
        r, t0_, h_, x0, z0, vx0, vz0, ax0, az0, x1_, z1_, vx1_, vz1_, ax1_, az1_ = map(np.concatenate, zip(*apogee_steps))
        tau = _hermite_root(vz0, az0, vz1_, az1_, h_)
        apogee["t"][r] = t0_ + tau * h_
        apogee["z"][r] = _hermite(z0, vz0, z1_, vz1_, h_, tau)
        apogee["x"][r] = _hermite(x0, vx0, x1_, vx1_, h_, tau)
        apogee["vx"][r] = _hermite(vx0, ax0, vx1_, ax1_, h_, tau)
    if landing_steps:
        r, t0_, h_, x0, z0, vx0, vz0, ax0, az0, x1_, z1_, vx1_, vz1_, ax1_, az1_ = map(np.concatenate, zip(*landing_steps))
        tau = _hermite_root(z0, vz0, z1_, vz1_, h_)
        landing["t"][r] = t0_ + tau * h_
        landing["x"][r] = _hermite(x0, vx0, x1_, vx1_, h_, tau)
        vz_land = _hermite(vz0, az0, vz1_, az1_, h_, tau)
        landing["speed"][r] = np.hypot(_hermite(vx0, ax0, vx1_, ax1_, h_, tau), vz_land)
        landing["rate"][r] = -vz_land
    if descent:
        out["landing_time_s"][idx] = landing["t"]
        out["landing_speed_m_s"][idx] = landing["speed"]
        out["landing_descent_rate_m_s"][idx] = landing["rate"]
        out["drift_m"][idx] = landing["x"]
    else:
        out["rail_exit_time_s"][idx] = rail_exit_t
        out["rail_exit_speed_m_s"][idx] = rail_exit_v
        out["apogee_m"][idx] = apogee["z"]
        out["apogee_time_s"][idx] = apogee["t"]
        out["apogee_downrange_m"][idx] = apogee["x"]
        out["max_speed_m_s"][idx] = maxima["max_speed"]
        out["max_mach"][idx] = maxima["max_mach"]
        out["max_acceleration_m_s2"][idx] = maxima["max_acc"]
        out["max_dynamic_pressure_pa"][idx] = maxima["max_q"]
        out["ejection_altitude_m"][idx] = ej["z"]
        out["ejection_speed_m_s"][idx] = ej["speed"]
        out["ejection_vertical_speed_m_s"][idx] = ej["vz"]
    failed = status != OK
    out["status"][idx[failed]] = status[failed]
    if traj is not None:
        _store_history(history, idx, traj, descent)
    return {"apogee": apogee, "deploy": at_deploy, "landing": landing, "ejection": ej}


def _descent_step(g: _Group, a: dict[str, np.ndarray], z, vx, vz, s: FlightSettings) -> np.ndarray:
    """Step under a deployed device, bounded by the drag time scale m/(k·v).

    With k = ½ρ(Cd·A) and v = max(|v|, v_t), the time scale is v_t/g at terminal
    speed and much shorter just after a fast deployment; RK4 is stable below
    2.78 time scales, and ``descent_step_fraction`` keeps it accurate. A step is
    also at most 1/30 of the time left to fall.
    """
    rho, _, grav, shape = g.lookup(z)
    mass = a["m_full"] - a["m_prop"]
    cd = g.cds[0] if g.table_cd else a["cd"]
    k = 0.5 * rho * (cd * a["area"] + a["extra"])
    v_t = np.sqrt(mass * grav / k)
    speed = np.maximum(np.hypot(vx - a["wind"] * shape, vz), v_t)
    time_scale = mass / (k * speed)
    time_left = np.maximum(z, 1.0) / np.maximum(np.maximum(-vz, v_t), 0.1)
    return np.clip(np.minimum(s.descent_step_fraction * time_scale, time_left / 30.0), 1e-5, 10.0)


def _store_history(history: list, idx: np.ndarray, traj: list, descent: bool) -> None:
    names = ("time_s", "x_m", "altitude_m", "vx_m_s", "vz_m_s", "ax_m_s2", "az_m_s2")
    per_flight: dict[int, list[np.ndarray]] = {}
    for entry in history:
        ref = entry[0]
        stacked = np.stack(entry[1:], axis=1)
        for col, flight in enumerate(ref):
            per_flight.setdefault(int(flight), []).append(stacked[col])
    for local, rows in per_flight.items():
        data = np.array(rows)
        block = {name: data[:, j] for j, name in enumerate(names)}
        block["descent"] = np.full(data.shape[0], descent)
        k = int(idx[local])
        if traj[k] is None:
            traj[k] = block
        else:
            traj[k] = {name: np.concatenate((traj[k][name], block[name])) for name in block}


def _descend(g: _Group, pack: MotorPack, recovery: Recovery, ascent: dict, idx: np.ndarray,
             params: dict[str, np.ndarray], s: FlightSettings, out: dict[str, np.ndarray], traj: list | None,
             wanted_delay: np.ndarray | None) -> None:
    """Choose the deployment instant of every flight, then fly the descent under the device."""
    n = idx.size
    start = {k: np.full(n, np.nan) for k in ("t", "x", "z", "vx", "vz")}
    delay_used = np.full(n, np.nan)
    if recovery.deploy == "apogee":
        for k in ("t", "x", "z", "vx"):
            start[k] = ascent["apogee"][k].copy()
        start["vz"] = np.zeros(n)
    elif recovery.deploy == "altitude":
        for k in start:
            start[k] = ascent["deploy"][k].copy()
    else:
        delays = pack.delays_s[idx]
        optimal = ascent["apogee"]["t"] - pack.burnout_s[idx]
        target = optimal if wanted_delay is None else wanted_delay[idx]
        col = np.argmin(np.where(np.isnan(delays), np.inf, np.abs(delays - target[:, None])), axis=1)
        rows = np.arange(n)
        has = ~np.all(np.isnan(delays), axis=1)  # plugged or booster: no charge, nothing deploys
        delay_used = np.where(has, delays[rows, col], np.nan)
        start["t"] = np.where(has, pack.burnout_s[idx] + delay_used, np.nan)
        for k in ("x", "z", "vx", "vz"):
            start[k] = np.where(has, ascent["ejection"][k][rows, col], np.nan)
    ok = np.isfinite(start["t"]) & np.isfinite(start["z"]) & (out["status"][idx] == OK)
    out["deploy_time_s"][idx] = np.where(ok, start["t"], np.nan)
    out["deploy_altitude_m"][idx] = np.where(ok, start["z"], np.nan)
    out["deploy_delay_s"][idx] = np.where(ok, delay_used, np.nan)
    if not ok.any():
        return
    keep = np.flatnonzero(ok)
    sub = idx[keep]
    sub_params = {k: v[keep].copy() for k, v in params.items()}
    sub_params["extra"] = np.full(sub.size, recovery.drag_area_m2)
    initial = {k: v[keep] for k, v in start.items()}
    _integrate(g, pack, sub, initial, np.zeros(sub.size, dtype=np.int64), sub_params, s, out, traj, None,
               descent=True)
    out["descent_time_s"][sub] = out["landing_time_s"][sub] - initial["t"]
