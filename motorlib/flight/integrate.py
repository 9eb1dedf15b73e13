"""Batched 2-D point-mass flight of many (airframe, motor) pairs at once: settings, :func:`simulate`, the loop.

The model (state, forces, phases) is described in :mod:`motorlib.flight`.

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

from dataclasses import dataclass, field
from typing import Sequence

import numpy as np

from .airframe import Airframe, Recovery
from .dynamics import _accel, _Group, _make_group
from .events import (_deploy_altitude_reached, _ejection_states, _liftoff, _locate_apogee, _locate_landing,
                     _rail_exit, _StepEnds, _thrust_to_weight)
from .pack import _TINY, MotorPack
from .recovery_phase import _deployment_start, _descent_step
from .results import NO_LIFTOFF, NO_MASS, OK, STEP_LIMIT, FlightResults, _empty_results, _store_history
from ..motor.record import MotorRecord
from ..errors import SimulationInputError
from ..units import STANDARD_GRAVITY_M_S2

__all__ = ["FlightSettings", "simulate"]


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



def _descend(g: _Group, pack: MotorPack, recovery: Recovery, ascent: dict, idx: np.ndarray,
             params: dict[str, np.ndarray], s: FlightSettings, out: dict[str, np.ndarray], traj: list | None,
             wanted_delay: np.ndarray | None) -> None:
    """Choose the deployment instant of every flight, then fly the descent under the device."""
    keep, initial = _deployment_start(pack, recovery, ascent, idx, out, wanted_delay)
    if keep.size == 0:
        return
    sub = idx[keep]
    sub_params = {k: v[keep].copy() for k, v in params.items()}
    sub_params["extra"] = np.full(sub.size, recovery.drag_area_m2)
    _integrate(g, pack, sub, initial, np.zeros(sub.size, dtype=np.int64), sub_params, s, out, traj, None,
               descent=True)
    out["descent_time_s"][sub] = out["landing_time_s"][sub] - initial["t"]


# ----------------------------------------------------------------------------- the batched loop
_MAXIMA = ("max_speed", "max_mach", "max_acc", "max_q")
_HISTORY = ("ref", "t", "x", "z", "vx", "vz", "ax", "az")


@dataclass
class _Pass:
    """What one pass of the loop keeps besides the active arrays, indexed by a flight's position ``ref``.

    Curve arrays have shape (n_flights, n_samples_max); ``queries_s`` has shape
    (n_flights, n_delays) and holds burnout plus each delay [s], inf where a motor
    has fewer delays. The stores fill as flights meet their events; maxima are
    copied in as flights leave the active arrays.
    """

    times_s: np.ndarray
    thrust_n: np.ndarray
    cumulative_ns: np.ndarray
    last_seg: np.ndarray
    burnout_s: np.ndarray
    queries_s: np.ndarray
    stop_after_s: np.ndarray  # the last ejection instant [s] (-inf when none): the ascent pass ends there
    status: np.ndarray
    rail_exit_t: np.ndarray
    rail_exit_v: np.ndarray
    apogee: dict[str, np.ndarray]
    at_deploy: dict[str, np.ndarray]
    landing: dict[str, np.ndarray]
    ejection: dict[str, np.ndarray]  # shape (n_flights, n_delays) each
    maxima: dict[str, np.ndarray]
    history: list[tuple[np.ndarray, ...]] | None
    apogee_steps: list[tuple[np.ndarray, _StepEnds]] = field(default_factory=list)  # steps that hold an apogee
    landing_steps: list[tuple[np.ndarray, _StepEnds]] = field(default_factory=list)

    @classmethod
    def start(cls, pack: MotorPack, idx: np.ndarray, keep_history: bool) -> _Pass:
        n_all = idx.size
        n_delays = pack.delays_s.shape[1]
        burnout = pack.burnout_s[idx]
        queries = pack.delays_s[idx] + burnout[:, None]
        return cls(
            times_s=pack.time_s[idx], thrust_n=pack.thrust_n[idx], cumulative_ns=pack.cumulative_ns[idx],
            last_seg=pack.n_samples[idx] - 1, burnout_s=burnout,
            queries_s=np.where(np.isnan(queries), np.inf, queries),
            stop_after_s=np.max(np.where(np.isnan(queries), -np.inf, queries), axis=1),
            status=np.zeros(n_all, dtype=np.int64),
            rail_exit_t=np.full(n_all, np.nan), rail_exit_v=np.full(n_all, np.nan),
            apogee={k: np.full(n_all, np.nan) for k in ("t", "x", "z", "vx")},
            at_deploy={k: np.full(n_all, np.nan) for k in ("t", "x", "z", "vx", "vz")},
            landing={k: np.full(n_all, np.nan) for k in ("t", "x", "speed", "rate")},
            ejection={k: np.full((n_all, n_delays), np.nan) for k in ("z", "speed", "vz", "x", "vx")},
            maxima={name: np.zeros(n_all) for name in _MAXIMA},
            history=[] if keep_history else None,
        )


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

    One step is :func:`_step` and its helpers. Splitting the former 254-line loop
    into them costs no measurable speed: 1,000 synthetic ascents (tests/synthetic.py,
    seed 7) took a median 158-162 ms of CPU before and 160-164 ms after, and 100
    flights with descent 640-687 ms before and 644-683 ms after (runs interleaved in
    one process; about 4 more Python calls per step, within the run-to-run spread).
    """
    run = _Pass.start(pack, idx, traj is not None)
    a = _active_arrays(run, state0, seg0, params, s, deploy_altitude_m, descent)
    _load_segment(a, run, None)
    a["ax"], a["az"], _, _ = _accel(g, a, a["t"], a["x"], a["z"], a["vx"], a["vz"])
    if run.history is not None:
        run.history.append(tuple(a[k].copy() for k in _HISTORY))
    steps = 0
    while a["ref"].size:
        steps += 1
        _step(g, a, run, s, deploy_altitude_m, descent, steps)
    if run.apogee_steps:
        _locate_apogee(run.apogee_steps, run.apogee)
    if run.landing_steps:
        _locate_landing(run.landing_steps, run.landing)
    _write_results(run, idx, out, descent)
    if traj is not None:
        _store_history(run.history, idx, traj, descent)
    return {"apogee": run.apogee, "deploy": run.at_deploy, "landing": run.landing, "ejection": run.ejection}


def _active_arrays(run: _Pass, state0: dict[str, np.ndarray], seg0: np.ndarray, params: dict[str, np.ndarray],
                   s: FlightSettings, deploy_altitude_m: float | None, descent: bool) -> dict:
    """The per-flight arrays of the loop, shape (n_active,): parameters, state, phase flags, step sizes, maxima."""
    n_all = run.status.size
    a: dict = {k: v.copy() for k, v in params.items()}
    a.update({k: state0[k].astype(float).copy() for k in ("t", "x", "z", "vx", "vz")})
    a["ref"] = np.arange(n_all)
    if descent:
        a["seg"] = run.last_seg.copy()
        a["burning"] = np.zeros(n_all, dtype=bool)
        a["on_rail"] = np.zeros(n_all, dtype=bool)
        a["apogee_found"] = np.ones(n_all, dtype=bool)
        a["pending"] = np.zeros(n_all, dtype=bool)
        a["next_q"] = np.full(n_all, np.inf)
    else:
        a["seg"] = seg0.copy()
        a["burning"] = a["t"] < run.burnout_s
        a["on_rail"] = np.ones(n_all, dtype=bool)
        a["apogee_found"] = np.zeros(n_all, dtype=bool)
        a["pending"] = np.full(n_all, deploy_altitude_m is not None)
        a["next_q"] = run.queries_s.min(axis=1)
    a["any_rail"] = bool(a["on_rail"].any())
    a["burn_h"] = np.maximum(run.burnout_s - a["t"], 1e-3) / s.burn_steps
    a["coast_h"] = np.full(n_all, 1.0 / s.coast_steps)
    a["stop_after"] = run.stop_after_s
    for name in _MAXIMA:
        a[name] = np.zeros(n_all)
    return a


def _load_segment(a: dict, run: _Pass, mask: np.ndarray | None) -> None:
    """Coefficients of the current curve segment of the flights in ``mask`` (all when None)."""
    rows = a["ref"] if mask is None else a["ref"][mask]
    j = np.minimum(a["seg"] if mask is None else a["seg"][mask], run.last_seg[rows] - 1)
    times, thrust = run.times_s, run.thrust_n
    t_a, t_b, f_a = times[rows, j], times[rows, j + 1], thrust[rows, j]
    values = (t_a, t_b, f_a, (thrust[rows, j + 1] - f_a) / np.maximum(t_b - t_a, _TINY), run.cumulative_ns[rows, j])
    for name, value in zip(("seg_t", "seg_end", "seg_f", "seg_s", "seg_c"), values):
        if mask is None:
            a[name] = value
        else:
            a[name][mask] = value


def _step(g: _Group, a: dict, run: _Pass, s: FlightSettings, deploy_altitude_m: float | None, descent: bool,
          steps: int) -> None:
    """Advance every active flight by one RK4 step, then record its events and retire finished flights."""
    t, x, z, vx, vz, ax, az = a["t"], a["x"], a["z"], a["vx"], a["vz"], a["ax"], a["az"]
    burning = a["burning"]
    h = _step_size(g, a, s, deploy_altitude_m, descent)
    hit_seg = burning & (h >= a["seg_end"] - t)
    x1, z1, vx1, vz1 = _rk4(g, a, h, t, x, z, vx, vz, ax, az)
    t1 = np.where(hit_seg, a["seg_end"], t + h)
    # ---- phase changes at the step end ----
    if hit_seg.any():
        _next_segment(a, run, s, hit_seg, burning, t1, vz1)
    if a["any_rail"]:
        _rail_exit(a, run.rail_exit_t, run.rail_exit_v, run.status, t1, x1, z1, vx1, vz1)
    # ---- derivative at the new state: the next step's first stage ----
    ax1, az1, mach1, q1 = _accel(g, a, t1, x1, z1, vx1, vz1)
    landed = _record_events(a, run, _StepEnds(t, t1, t1 - t, x, z, vx, vz, ax, az, x1, z1, vx1, vz1, ax1, az1),
                            s, deploy_altitude_m, descent)
    # ---- running maxima, sampled at step ends (every curve sample is a step end) ----
    np.maximum(a["max_speed"], np.sqrt(vx1 * vx1 + vz1 * vz1), out=a["max_speed"])
    np.maximum(a["max_mach"], mach1, out=a["max_mach"])
    np.maximum(a["max_q"], q1, out=a["max_q"])
    np.maximum(a["max_acc"], np.sqrt(ax1 * ax1 + az1 * az1), out=a["max_acc"])  # kinematic, gravity included
    a["t"], a["x"], a["z"], a["vx"], a["vz"], a["ax"], a["az"] = t1, x1, z1, vx1, vz1, ax1, az1
    if run.history is not None:
        run.history.append(tuple(a[k].copy() for k in _HISTORY))
    _retire(a, run, s, landed, t1, steps, descent)


def _step_size(g: _Group, a: dict, s: FlightSettings, deploy_altitude_m: float | None, descent: bool) -> np.ndarray:
    """Step of every active flight [s], shortened to end on rail exit and on the deployment altitude."""
    t, z, vx, vz = a["t"], a["z"], a["vx"], a["vz"]
    if descent:
        h = _descent_step(g, a, z, vx, vz, s)
    else:
        h = np.where(a["burning"], np.minimum(a["burn_h"], a["seg_end"] - t), a["coast_h"])
        if g.table_cd and g.machs.size > 2:
            h = _mach_point_step(g, a, h)
    if a["any_rail"]:
        h = _rail_step(a, s, h)
    if deploy_altitude_m is not None and a["pending"].any():
        falling = a["pending"] & a["apogee_found"] & (vz < 0.0)
        with np.errstate(divide="ignore", invalid="ignore"):
            h_dep = np.where(falling, (z - deploy_altitude_m) / -vz, np.inf) * (1.0 + 1e-7)
        h = np.where(falling & (h_dep < h) & (h_dep > 0.0), h_dep, h)
    return h


# Largest change of Mach number in one step with a Cd(Mach) table: 0.02 brings the transonic case of
# tests/flight/test_oracle.py to 1e-7 of the solve_ivp apogee (0.05 gave 2e-5); our choice, no published source.
_MAX_MACH_STEP = 0.02


def _mach_point_step(g: _Group, a: dict, h: np.ndarray) -> np.ndarray:
    """Steps of flights with a Cd(Mach) table: at most ``_MAX_MACH_STEP`` of Mach each, ending on the table's points.

    Cd(Mach) is linear between the table's points and kinked at them; a step across a kink loses
    RK4's order, and coast steps sized by v/g are long where Cd changes fast (together a 0.13 %
    apogee error at the default step counts for a transonic drag rise, against the 0.01 % goal).
    The crossing is predicted from the local rate of change of Mach, dM/dt = (v_rel · a) / (|v_rel| c),
    overshooting by 1e-7 relative so that the next step starts past the point; a predicted crossing
    closer than 1e-3 of the step is ignored (the kink then sits at the step's very start).
    """
    _, sound, _, shape = g.lookup(a["z"])
    vrx = a["vx"] - a["wind"] * shape
    speed = np.sqrt(vrx * vrx + a["vz"] * a["vz"])
    mach = speed / sound
    rate = (vrx * a["ax"] + a["vz"] * a["az"]) / (np.maximum(speed, 1e-9) * sound)
    inner = g.machs[1:-1]
    k_up = np.searchsorted(inner, mach, side="right")  # first inner point above the Mach number
    above = np.where(k_up < inner.size, inner[np.minimum(k_up, inner.size - 1)], np.inf)
    k_down = np.searchsorted(inner, mach, side="left") - 1  # last inner point below it
    below = np.where(k_down >= 0, inner[np.maximum(k_down, 0)], -np.inf)
    with np.errstate(divide="ignore", invalid="ignore"):
        h_point = np.where(rate > 0.0, (above - mach) / rate, np.where(rate < 0.0, (below - mach) / rate, np.inf))
    h_point = h_point * (1.0 + 1e-7)
    with np.errstate(divide="ignore"):
        h = np.minimum(h, _MAX_MACH_STEP / np.abs(rate))
    shorter = np.isfinite(h_point) & (h_point < h) & (h_point > 1e-3 * h)
    return np.where(shorter, h_point, h)


def _rail_step(a: dict, s: FlightSettings, h: np.ndarray) -> np.ndarray:
    """Shorten the steps of flights on the rail to end on rail exit.

    Solves s + v h + a h²/2 = L, overshooting by 1e-7 relative, and covers at most
    1/rail_steps of the rail per step (the short rail phase sets the exit speed).
    """
    on_rail = a["on_rail"]
    ux, uz = a["ux"], a["uz"]
    vx, vz = a["vx"], a["vz"]
    v_along = vx * ux + vz * uz
    a_along = a["ax"] * ux + a["az"] * uz
    remaining = a["rail_m"] - (a["x"] * ux + a["z"] * uz)
    disc = v_along * v_along + 2.0 * a_along * remaining
    denom = v_along + np.sqrt(np.maximum(disc, 0.0))
    piece = a["rail_m"] / s.rail_steps
    with np.errstate(divide="ignore", invalid="ignore"):
        h_rail = np.where((disc >= 0.0) & (denom > 0.0), 2.0 * remaining / denom, np.inf) * (1.0 + 1e-7)
        h_piece = 2.0 * piece / (v_along + np.sqrt(v_along * v_along + 2.0 * np.maximum(a_along, 0.0) * piece))
    return np.where(on_rail, np.minimum(np.minimum(h, h_piece), h_rail), h)


def _rk4(g: _Group, a: dict, h: np.ndarray, t, x, z, vx, vz, ax, az
         ) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """Classic RK4 from (x, z, vx, vz) with first stage (ax, az) over steps h; the new x, z, vx, vz."""
    half = 0.5 * h
    vx2, vz2 = vx + half * ax, vz + half * az
    k2x, k2z, _, _ = _accel(g, a, t + half, x + half * vx, z + half * vz, vx2, vz2)
    vx3, vz3 = vx + half * k2x, vz + half * k2z
    k3x, k3z, _, _ = _accel(g, a, t + half, x + half * vx2, z + half * vz2, vx3, vz3)
    vx4, vz4 = vx + h * k3x, vz + h * k3z
    k4x, k4z, _, _ = _accel(g, a, t + h, x + h * vx3, z + h * vz3, vx4, vz4)
    sixth = h / 6.0
    x1 = x + sixth * (vx + 2.0 * (vx2 + vx3) + vx4)
    z1 = z + sixth * (vz + 2.0 * (vz2 + vz3) + vz4)
    vx1 = vx + sixth * (ax + 2.0 * (k2x + k3x) + k4x)
    vz1 = vz + sixth * (az + 2.0 * (k2z + k3z) + k4z)
    return x1, z1, vx1, vz1


def _next_segment(a: dict, run: _Pass, s: FlightSettings, hit_seg: np.ndarray, burning: np.ndarray,
                  t1: np.ndarray, vz1: np.ndarray) -> None:
    """Flights whose step ended on a curve sample move to the next segment; past the last, the burn ends."""
    a["seg"] = np.where(hit_seg, a["seg"] + 1, a["seg"])
    ended = hit_seg & ((a["seg"] >= run.last_seg[a["ref"]]) | (t1 >= run.burnout_s[a["ref"]]))
    _load_segment(a, run, hit_seg & ~ended)
    if ended.any():  # coast steps: a fraction of the drag-free coast time v/g
        a["burning"] = burning & ~ended
        a["coast_h"] = np.where(ended, np.maximum(np.abs(vz1), 10.0) / STANDARD_GRAVITY_M_S2 / s.coast_steps,
                                a["coast_h"])


def _record_events(a: dict, run: _Pass, e: _StepEnds, s: FlightSettings, deploy_altitude_m: float | None,
                   descent: bool) -> np.ndarray:
    """Note the events inside this step; returns which active flights landed in it.

    Apogee and landing are located after the loop, all at once (one vectorised
    root solve instead of one per step); here the steps that hold them are only
    recorded. Ejection states are interpolated now (cubic Hermite).
    """
    crossing = (e.vz1 <= 0.0) & (e.vz0 > 0.0) & ~a["apogee_found"] & ~a["on_rail"]
    if crossing.any():
        c = crossing
        run.apogee_steps.append((a["ref"][c], e.select(c)))
        a["apogee_found"] = a["apogee_found"] | crossing
        if not descent:  # after apogee only the ejection states are wanted: 1/post_apogee_steps of the wait
            wait = a["stop_after"][c] - e.t1[c]
            a["coast_h"][c] = np.maximum(a["coast_h"][c], np.where(np.isfinite(wait), wait, 0.0) / s.post_apogee_steps)
    _ejection_states(a, run.queries_s, run.ejection, e)
    if deploy_altitude_m is not None and a["pending"].any():
        _deploy_altitude_reached(a, run.at_deploy, deploy_altitude_m, e)
    landed = (e.z1 <= 0.0) & (e.z0 > 0.0) & ~a["on_rail"]
    if landed.any():
        run.landing_steps.append((a["ref"][landed], e.select(landed)))
    return landed


def _retire(a: dict, run: _Pass, s: FlightSettings, landed: np.ndarray, t1: np.ndarray, steps: int,
            descent: bool) -> None:
    """Finished flights (landed, past their last ejection, failed or over a limit) leave the active arrays."""
    if descent:
        done = landed
    else:
        done = landed | (a["apogee_found"] & (t1 >= a["stop_after"]) & ~a["pending"])
    over = (t1 > s.max_time_s) | (steps >= s.max_steps)
    if over.any():
        run.status[a["ref"][over & ~done]] = STEP_LIMIT
    done = done | over | (run.status[a["ref"]] != OK)
    if done.any():
        rows = a["ref"][done]
        for name in run.maxima:
            run.maxima[name][rows] = a[name][done]
        keep = ~done
        for name, value in a.items():
            if isinstance(value, np.ndarray):
                a[name] = value[keep]
        a["any_rail"] = bool(a["on_rail"].any())


def _write_results(run: _Pass, idx: np.ndarray, out: dict[str, np.ndarray], descent: bool) -> None:
    """Copy what the pass found into the batch's result arrays, at the flights' rows ``idx``."""
    if descent:
        out["landing_time_s"][idx] = run.landing["t"]
        out["landing_speed_m_s"][idx] = run.landing["speed"]
        out["landing_descent_rate_m_s"][idx] = run.landing["rate"]
        out["drift_m"][idx] = run.landing["x"]
    else:
        out["rail_exit_time_s"][idx] = run.rail_exit_t
        out["rail_exit_speed_m_s"][idx] = run.rail_exit_v
        out["apogee_m"][idx] = run.apogee["z"]
        out["apogee_time_s"][idx] = run.apogee["t"]
        out["apogee_downrange_m"][idx] = run.apogee["x"]
        out["max_speed_m_s"][idx] = run.maxima["max_speed"]
        out["max_mach"][idx] = run.maxima["max_mach"]
        out["max_acceleration_m_s2"][idx] = run.maxima["max_acc"]
        out["max_dynamic_pressure_pa"][idx] = run.maxima["max_q"]
        out["ejection_altitude_m"][idx] = run.ejection["z"]
        out["ejection_speed_m_s"][idx] = run.ejection["speed"]
        out["ejection_vertical_speed_m_s"][idx] = run.ejection["vz"]
    failed = run.status != OK
    out["status"][idx[failed]] = run.status[failed]
