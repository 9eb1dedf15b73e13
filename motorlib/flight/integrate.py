"""Batched 3-D point-mass flight of many (airframe, motor) pairs at once: settings, :func:`simulate`, the loop.

The model (state, forces, phases) is described in :mod:`motorlib.flight`.

Integrator (the performance core): the Dormand–Prince 5(4) Runge-Kutta pair
on arrays of shape (n_active,), one numpy loop over time steps and never over
motors, with a per-flight step controller. Each step advances the fifth-order
solution (six evaluations of the right-hand side: the seventh stage is the
derivative at the step's end, which is also the next step's first, FSAL) and
estimates its local error as h·Σ eᵢ·kᵢ, the difference from the embedded
fourth-order solution. The error of each speed component is measured against
``tolerance`` times the flight's speed scale (its fastest speed so far, and in
the ascent at least half the motor's ideal velocity change Itot/m, since an
early speed error carries to burnout; at least 1 m/s), and of each position
component against ``tolerance`` times the matching length scale (speed
scale²/g0, the height that speed buys): the same relative accuracy in apogee
for a 60 m and a 6,000 m flight. A step whose error exceeds that is rejected
(the flight stays where it was, in the arrays, and retries with a shorter
step); the next step is h·clip(0.9·err^(-1/5), 0.2, 5). The pair replaced
classic RK4 with its embedded third-order estimate (issue 16): on 1,000
synthetic flights it took 46 steps a flight instead of 72 (91 at most instead
of 161) for a smaller apogee error (median 2e-7 instead of 8e-7); 43.7 (92 at
most) since the rail and wind-floor rules of steps.py and a longer first step. Steps that would cross a
change of dynamics end on it: every thrust-curve sample during the burn (thrust
is smooth inside every step), rail exit, each point of a Cd(Mach) table, the
deployment altitude and a pass's stop time (predicted from the local motion,
with a tiny overshoot); a step that switches the dynamics (rail exit, burnout)
is not error-tested, since no smooth solution joins its two ends, so the rail
is left in two steps (2 % short of the predicted exit, then a short aimed
step) and a rail step that ends past the rail's end by more than 1e-5 of its
length is taken again, shorter. After apogee the ascent pass only carries the
ejection instants, at 10 x the tolerance; steps during the burn get 3 x.
Under a recovery device, once past apogee and falling, only the landing point
and time matter (to centimetres and milliseconds, not the ascent's 1e-5 of
apogee): the tolerance is 100 x looser there and positions are measured
against the height left to fall where it exceeds v²/g0; a climb under a device
(one that opened before apogee) keeps the ascent's tolerance. Descent steps are
also bounded by the drag time scale (recovery_phase.py). On 290 varied descents
this puts the landing within 8 mm and 0.7 ms at worst (median 0.36 mm) of a
DOP853 reference flown from the same opening state, in a median 98 steps a
descent (issue 16, tests/benchmarks/bench_descent.py); flown from liftoff, the
ascent's own error carried down makes it 129 mm at worst (median 0.6 mm).
Apogee, landing and ejection-delay instants are located inside a step by
cubic Hermite interpolation of position and speed, using the derivatives at
both ends. Finished flights are compacted out of the arrays.

Vectorisation contract: k flights simulated together give the same numbers
as k single runs (each flight's steps depend only on its own state).

The loop's arrays hold a few hundred flights, where a numpy call's fixed cost outweighs its work: masks are
tested with np.count_nonzero (0.4 us for 10 flights against 1.3-1.5 us for ndarray.any, measured), and the stages
of a Runge-Kutta step compute no Mach or dynamic pressure.

numpy only (scipy is used by the tests as the reference, never here).

The module runs past 500 lines on purpose: the settings, the passes of one flight (ascent, each device,
landing) and the loop that carries them belong together; the right-hand side (dynamics), events, step sizes
(steps), results and the recovery phase live in their own modules.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Final, Sequence

import numpy as np

from .airframe import Airframe, Recovery
from .delays import DEFAULT_DRILL_STEP_S
from .dynamics import _accel, _basis, _Group, _make_group
from .peaks import interior_peaks
from .events import (_deploy_altitude_reached, _ejection_steps, _liftoff, _locate_apogee, _locate_ejections,
                     _locate_landing,
                     _rail_exit, _StepEnds, _thrust_to_weight)
from .pack import _TINY, MotorPack
from .wind import DEFAULT_CAP_M
from .recovery_phase import (_MAXIMA, _STATE, _air_speed, _charge_column, _first_opening,
                             _fly_sequence, _sub)
from .steps import _step_size
from .results import (NO_LIFTOFF, NO_MASS, OK, STEP_LIMIT, FlightResults, _empty_results, _finish_trajectory,
                      _store_history)
from ..motor.record import MotorRecord
from ..errors import SimulationInputError
from ..units import STANDARD_GRAVITY_M_S2

__all__ = ["FlightSettings", "simulate"]


# Largest descent step fraction accepted: the Dormand–Prince pair's real stability limit h·|λ| = 3.307 with
# |λ| = 2/τ gives 1.65; 1.6 keeps 3 % from the edge, where a perturbation still decays by 0.82 per step (its
# stability polynomial 1 + z + z²/2 + z³/6 + z⁴/24 + z⁵/120 + z⁶/600 at z = -3.2; tests/flight/
# test_dormand_prince.py). Our choice within the limit (see FlightSettings.descent_step_fraction).
_MAX_DESCENT_STEP_FRACTION: Final = 1.6


@dataclass(frozen=True)
class FlightSettings:
    """Integrator and model settings.

    Attributes
    ----------
    tolerance : float
        Local error allowed per step, relative to the flight's speed scale (speeds) and
        length scale (positions); 100 x looser, and positions against the height left to
        fall, under a device once the rocket falls; see the module docstring. On 1,000 synthetic
        flights (tests/synthetic.py, seed 7; tests/benchmarks/bench_flight.py) against solve_ivp
        DOP853 at rtol 1e-10, 3e-7 gives an apogee error of median 2.3e-7 and at worst 3.6e-6 in
        43.7 steps a flight; 6e-7 gives 4.9e-7 and 1.3e-5 in 41.5 steps, 1e-6 gives 8.5e-7 and
        2.1e-5 in 40.1 steps: a looser tolerance saves few steps, since most are cut by curve
        samples, the rail and apogee. Our choice, no published source: the speed goal's median
        error of 1e-6 with a margin of 4.
    burn_steps : int
        The first step is the burn time over this; the controller then adapts it, growing it at
        most 5 x a step. 100: on 1,000 synthetic flights (tests/synthetic.py, seed 7) 43.7 steps a
        flight instead of 44.7 with 400 (a first step short enough to pass the error test at liftoff
        on nearly every flight, which then took steps to grow), the apogee's worst error against
        DOP853 3.6e-6 instead of 3.9e-6, its median 2.3e-7 instead of 2.2e-7. Our choice, no
        published source.
    descent_step_fraction : float
        Under a deployed device, a step is at most this fraction f of the drag
        time scale τ = m/(½ρ·Cd·A·v) (v_t/g at terminal speed). Drag's stiffest
        eigenvalue is λ = -2/τ (-2g/v_t at terminal speed), so h·λ = -2f, and the
        Dormand–Prince pair is stable on the real axis for h·|λ| ≤ 3.307 (its stability
        polynomial 1 + z + z²/2 + z³/6 + z⁴/24 + z⁵/120 + z⁶/600; Hairer & Wanner, Solving
        Ordinary Differential Equations II, 2nd ed., 1996, section IV.2): f < 1.65. 1.5
        (h·|λ| = 3.0, where a perturbation shrinks by 0.57 per step) leaves a 10 % margin; it
        cut the parachute descent of tests/benchmarks/bench_descent.py from 178 steps at 1.2
        to 148 with no change in the landings (worst 2.7 mm from the reference over 58 varied
        descents flown from the same opening state); the former RK4 (limit 1.39) took 201 at
        1.2 (issue 16). Values above 1.6 are refused.
    opening_step_fraction : float
        The same fraction while the rocket moves faster than 1.2 times the
        terminal speed (just after a device opens fast) or still climbs under a
        device: the hard deceleration lasts a few time scales, and the error
        controller's step has yet to settle. 0.3 (was 0.1): on the 5,000-motor
        synthetic catalog of tests/benchmarks/bench_match.py, whose 2,111 charges
        fire before apogee, a ranking took 95 loop iterations instead of 110 (the
        climb to apogee under the device, 32 instead of 47), with the same apogee,
        deployment-speed and landing errors against the same flights at tolerance
        1e-10 and fraction 0.02 (worst 2.8e-5, 8.4e-5 and 9 cm); the 290 descents of
        tests/benchmarks/bench_descent.py took a median 98 steps instead of 110 and
        land within 8.0 mm of the DOP853 reference flown from the same opening state
        (6.0 mm at 0.1; median 0.36 mm against 0.16 mm). Our choice, no published
        source.
    wind_exponent : float
        Power-law exponent of the wind profile, 1/7 (common practice, no published source).
    wind_floor_m : float
        Below this height the wind is that at this height [m].
    wind_cap_m : float
        Above this height the power-law wind is held [m]; 1,000 m, about the top of a
        daytime boundary layer (common practice, no published source; see
        :mod:`motorlib.flight.wind`); ``math.inf`` for the uncapped law.
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

    tolerance: float = 3e-7
    burn_steps: int = 100
    descent_step_fraction: float = 1.5
    opening_step_fraction: float = 0.3
    wind_exponent: float = 1.0 / 7.0
    wind_floor_m: float = 1.0
    wind_cap_m: float = DEFAULT_CAP_M
    vary_gravity: bool = True
    uniform_air: bool = False
    drill_step_s: float = DEFAULT_DRILL_STEP_S
    max_time_s: float = 4000.0
    max_steps: int = 200_000

    def __post_init__(self) -> None:
        if self.burn_steps < 4:
            raise ValueError("`burn_steps` must be at least 4")
        if not 0.0 < self.tolerance < 0.1:
            raise ValueError("`tolerance` must lie in (0, 0.1)")
        if not 0.0 < self.descent_step_fraction <= _MAX_DESCENT_STEP_FRACTION:
            raise ValueError(f"`descent_step_fraction` must lie in (0, {_MAX_DESCENT_STEP_FRACTION}]: near 1.65 the "
                             "integrator is unstable under a device")
        if not 0.0 < self.opening_step_fraction <= 1.0:
            raise ValueError("`opening_step_fraction` must lie in (0, 1]")



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
        launch site, drag tables and recovery device are integrated together;
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
    distinct, slot = _distinct(frames)
    devices = [f.recovery_devices for f in distinct]
    n_devices = max((len(d) for d in devices), default=1)
    out = _empty_results(n, pack.delays_s.shape[1], pack.delays_s, n_devices)
    traj: list[dict[str, np.ndarray] | None] = [None] * n
    groups: dict[tuple, list[int]] = {}  # distinct airframes by what a group shares
    for k, frame in enumerate(distinct):
        key = (frame.launch.site, frame.drag_table, frame.drag_table_powered, devices[k], frame.launch.wind_profile)
        groups.setdefault(key, []).append(k)
    for kinds in groups.values():
        members_idx = np.flatnonzero(np.isin(slot, kinds)) if len(groups) > 1 else np.arange(n)
        _fly_group([frames[i] for i in members_idx], pack, members_idx, added, s, out,
                   traj if trajectories else None, wanted, descent)
    return FlightResults(**out, recovery_devices=tuple(devices[k] for k in slot.tolist()),  # type: ignore[arg-type]
                         trajectories=tuple(traj) if trajectories else None)


def _distinct(frames: Sequence[Airframe]) -> tuple[list[Airframe], np.ndarray]:
    """The distinct airframe objects among ``frames`` (by identity) and each flight's position among them:
    a ranking passes one airframe for every motor, and its figures are then read once, not n times."""
    position: dict[int, int] = {}
    distinct: list[Airframe] = []
    slot = np.empty(len(frames), dtype=np.int64)
    for i, frame in enumerate(frames):
        k = position.get(id(frame))
        if k is None:
            k = position[id(frame)] = len(distinct)
            distinct.append(frame)
        slot[i] = k
    return distinct, slot


def _fly_group(frames: list[Airframe], pack: MotorPack, idx: np.ndarray, added: np.ndarray, s: FlightSettings,
               out: dict[str, np.ndarray], traj: list | None, wanted_delay: np.ndarray | None,
               descent: bool) -> None:
    first = frames[0]
    g = _make_group(first, s)
    distinct, slot = _distinct(frames)

    def column(values: list[float]) -> np.ndarray:  # one value per distinct airframe -> one per flight
        return np.array(values, dtype=float)[slot]

    dry = column([f.mass_kg for f in distinct]) + added[idx]
    e1e, e1n, ux, uy, uz = np.array([_basis(f.launch) for f in distinct], dtype=float)[slot].T
    g.planar = g.profile is None and not np.any(uy != 0.0)  # 3-D only for a rail across the wind, or a profile
    g.calm = g.profile is None and not any(f.launch.wind_speed_m_s for f in distinct)
    params = {
        "itot": pack.total_impulse_ns[idx], "m_full": dry + pack.total_mass_kg[idx],
        "m_prop": pack.propellant_mass_kg[idx], "area": column([f.reference_area_m2 for f in distinct]),
        "cd": column([f.drag_coefficient for f in distinct]), "ux": ux, "uy": uy, "uz": uz,
        "rail_m": column([f.launch.rail_length_m for f in distinct]),
        "wind": column([f.launch.wind_speed_m_s for f in distinct]), "extra": np.zeros(idx.size),
        "zeros": np.zeros(idx.size),
    }
    if g.profile is not None:  # the loop turns a measured wind into each flight's axes
        params.update(e1e=e1e, e1n=e1n, e2e=-e1n, e2n=e1e)
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
    axes = (e1e[keep], e1n[keep])
    out["liftoff_time_s"][idx] = t0
    devices = first.recovery_devices
    lead = devices[0] if devices else None
    deploy_altitude = lead.deploy_altitude_m if lead is not None and lead.deploy == "altitude" else None
    timer = t0 + lead.delay_s if lead is not None and lead.deploy == "after" else None
    zeros = np.zeros(idx.size)
    state0 = {k: zeros for k in _STATE}
    state0["t"] = t0
    ascent = _integrate(g, pack, idx, state0, seg0, params, s, out, traj, deploy_altitude, descent=False,
                        timer_s=timer)
    _fly_after_ascent(g, pack, devices, ascent, idx, params, s, out, traj, wanted_delay, descent, axes)


def _fly_after_ascent(g: _Group, pack: MotorPack, devices: tuple[Recovery, ...], ascent: dict, idx: np.ndarray,
                      params: dict[str, np.ndarray], s: FlightSettings, out: dict[str, np.ndarray],
                      traj: list | None, wanted_delay: np.ndarray | None, descent: bool,
                      axes: tuple[np.ndarray, np.ndarray]) -> None:
    """From the ascent pass to the reported flight: openings, the passes between them, landing, flown figures.

    With ``descent`` False only the first opening is located (what a ranking needs), and apogee
    and maxima are the ascent's up to it.
    """
    n = idx.size
    status = out["status"][idx]
    apogee = ascent["apogee"]
    col, has, delay_used = _charge_column(pack, idx, apogee["t"], wanted_delay)
    charge_t = pack.burnout_s[idx] + delay_used
    out["optimal_delay_s"][idx] = apogee["t"] - pack.burnout_s[idx]
    lead = devices[0] if devices else None
    if lead is not None:
        start, snap, opens = _first_opening(lead, ascent, col, has, charge_t, status)
    else:
        start, snap, opens = {k: np.full(n, np.nan) for k in _STATE}, {}, np.zeros(n, dtype=bool)
    branch_t = np.where(opens, start["t"], apogee["t"])
    snap = {k: np.where(opens, snap[k], apogee[k]) if k in snap else apogee[k].copy() for k in _MAXIMA}
    # the ascent's apogee was flown unless a device opened before it: then a later pass finds the flown one
    early = opens & (start["t"] < apogee["t"])
    flown = {k: np.where(early, np.nan, apogee[k]) for k in ("t", "x", "y", "z")}
    acc = {**{f"apogee_{k}": v for k, v in flown.items()}, **snap,
           **{f"land_{k}": np.full(n, np.nan) for k in _LANDING}}
    n_dev = out["deployment_time_s"].shape[1]
    dep = {k: np.full((n, n_dev), np.nan) for k in ("t", "z", "speed", "load", "rate")}

    def record(pos: np.ndarray, k: int, state: dict[str, np.ndarray]) -> tuple[np.ndarray, np.ndarray]:
        """Note device k's opening state; returns the air density [kg/m³] and speed of sound [m/s] there."""
        speed, rho, sound = _air_speed(g, {k: v[pos] for k, v in params.items()}, state)
        dep["t"][pos, k], dep["z"][pos, k], dep["speed"][pos, k] = state["t"], state["z"], speed
        dep["load"][pos, k] = 0.5 * rho * speed * speed * devices[k].drag_area_m2
        return rho, sound

    def fly(pos: np.ndarray, state: dict[str, np.ndarray], extra: np.ndarray, *, device: int | None,
            stop_time_s: np.ndarray | None = None, stop_altitude_m: float | None = None,
            stop_at_apogee: bool = False) -> dict[str, np.ndarray]:
        sub_params = {k: v[pos].copy() for k, v in params.items()}
        sub_params["extra"] = np.broadcast_to(extra, (pos.size,)).astype(float)
        r = _integrate(g, pack, idx[pos], state, np.zeros(pos.size, dtype=np.int64), sub_params, s, out, traj,
                       stop_altitude_m, descent=True, stop_time_s=stop_time_s, stop_at_apogee=stop_at_apogee,
                       under_device=device is not None)
        found = np.isfinite(r["apogee"]["t"]) & np.isnan(acc["apogee_t"][pos])
        for k in ("t", "x", "y", "z"):
            acc[f"apogee_{k}"][pos[found]] = r["apogee"][k][found]
        for k in ("max_speed", "max_mach", "max_q") + (("max_acc",) if device is None else ()):
            acc[k][pos] = np.fmax(acc[k][pos], r["maxima"][k])
        landed = np.isfinite(r["landing"]["t"])
        for k in _LANDING:
            acc[f"land_{k}"][pos[landed]] = r["landing"][k][landed]
        stop = r["stop"]
        if device is not None:
            dep["rate"][pos, device] = np.where(landed, r["landing"]["rate"], -stop["vz"])
        return stop

    if descent:
        _fly_sequence(fly, record, devices, start, opens, apogee, charge_t, status, acc["apogee_t"])
    elif lead is not None and opens.any():
        pos = np.flatnonzero(opens)
        at = _sub(start, opens)
        rho, sound = record(pos, 0, at)
        # the opening state was flown: it counts in every maximum, as it does when the descent is flown
        # (Mach and dynamic pressure from the air speed, as in the flight's right-hand side)
        air_speed = dep["speed"][pos, 0]
        acc["max_speed"][pos] = np.fmax(acc["max_speed"][pos], np.sqrt(at["vx"]**2 + at["vy"]**2 + at["vz"]**2))
        acc["max_mach"][pos] = np.fmax(acc["max_mach"][pos], air_speed / sound)
        acc["max_q"][pos] = np.fmax(acc["max_q"][pos], 0.5 * rho * air_speed * air_speed)
        if early.any():  # the climb under the first device, to the flown apogee
            fly(np.flatnonzero(early), _sub(start, early), np.full(int(early.sum()), lead.drag_area_m2), device=0,
                stop_at_apogee=True)
    charge_delay = delay_used if lead is not None and lead.deploy == "ejection" else np.full(n, np.nan)
    _write_flown(out, idx, acc, dep, opens, charge_delay, descent, axes)
    if traj is not None:
        for k, i in enumerate(idx):
            landing = None
            if np.isfinite(acc["land_t"][k]):
                landing = {key: acc[f"land_{key}"][k] for key in ("t", "x", "y", "vx", "vy", "vz")}
            end = acc["land_t"][k] if descent else np.fmax(branch_t[k], acc["apogee_t"][k])
            traj[i] = _finish_trajectory(traj[i], end if np.isfinite(end) else np.inf, landing,
                                         (axes[0][k], axes[1][k]))


def _write_flown(out: dict[str, np.ndarray], idx: np.ndarray, acc: dict[str, np.ndarray], dep: dict[str, np.ndarray],
                 opens: np.ndarray, delay_used: np.ndarray, descent: bool, axes: tuple[np.ndarray, np.ndarray]
                 ) -> None:
    """Copy the flown flight's figures into the batch's result arrays, at the flights' rows ``idx``;
    positions turned from each flight's (downwind, left) axes to east and north."""
    e1e, e1n = axes
    out["apogee_m"][idx] = acc["apogee_z"]
    out["apogee_time_s"][idx] = acc["apogee_t"]
    out["apogee_downrange_m"][idx] = acc["apogee_x"]
    out["apogee_east_m"][idx] = acc["apogee_x"] * e1e - acc["apogee_y"] * e1n
    out["apogee_north_m"][idx] = acc["apogee_x"] * e1n + acc["apogee_y"] * e1e
    for name, key in (("max_speed_m_s", "max_speed"), ("max_mach", "max_mach"),
                      ("max_acceleration_m_s2", "max_acc"), ("max_dynamic_pressure_pa", "max_q")):
        out[name][idx] = acc[key]
    for name, key in (("deployment_time_s", "t"), ("deployment_altitude_m", "z"), ("deployment_speed_m_s", "speed"),
                      ("opening_load_n", "load"), ("deployment_descent_rate_m_s", "rate")):
        out[name][idx] = dep[key]
    out["deploy_time_s"][idx] = dep["t"][:, 0]
    out["deploy_altitude_m"][idx] = dep["z"][:, 0]
    out["deploy_delay_s"][idx] = np.where(opens, delay_used, np.nan)
    if descent:
        out["landing_time_s"][idx] = acc["land_t"]
        out["landing_speed_m_s"][idx] = acc["land_speed"]
        out["landing_descent_rate_m_s"][idx] = acc["land_rate"]
        out["drift_m"][idx] = acc["land_x"]
        out["landing_east_m"][idx] = acc["land_x"] * e1e - acc["land_y"] * e1n
        out["landing_north_m"][idx] = acc["land_x"] * e1n + acc["land_y"] * e1e
        out["descent_time_s"][idx] = acc["land_t"] - dep["t"][:, 0]


# ----------------------------------------------------------------------------- the batched loop
_HISTORY = ("ref", "t", "x", "y", "z", "vx", "vy", "vz", "ax", "ay", "az")
_LANDING = ("t", "x", "y", "speed", "rate", "vx", "vy", "vz")


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
    end_thrust_n: np.ndarray  # thrust at each curve's last sample [N]: above zero, the burn ends in a cut-off
    burnout_s: np.ndarray
    queries_s: np.ndarray
    stop_after_s: np.ndarray  # the last ejection instant [s] (-inf when none): the ascent pass ends there
    stop_at_apogee: bool
    status: np.ndarray
    rail_exit_t: np.ndarray
    rail_exit_v: np.ndarray
    apogee: dict[str, np.ndarray]
    at_deploy: dict[str, np.ndarray]
    landing: dict[str, np.ndarray]
    ejection: dict[str, np.ndarray]  # shape (n_flights, n_delays) each, with the maxima up to each instant
    maxima: dict[str, np.ndarray]
    stop: dict[str, np.ndarray]  # where a pass after the ascent stopped at its stop time
    history: list[tuple[np.ndarray, ...]] | None
    segments: np.ndarray = field(default_factory=lambda: np.empty((7, 0)))  # _segment_table, set by _integrate
    apogee_steps: list[tuple[np.ndarray, _StepEnds]] = field(default_factory=list)  # steps that hold an apogee
    landing_steps: list[tuple[np.ndarray, _StepEnds]] = field(default_factory=list)
    ejection_steps: list[tuple[np.ndarray, _StepEnds, np.ndarray]] = field(default_factory=list)
    # steps that hold a maximum of speed, q or Mach: positions, end times [s], lengths [s], start states
    # (components, m), stages (7, components, m), the wind's parameters
    peak_steps: list[tuple] = field(default_factory=list)

    @classmethod
    def start(cls, pack: MotorPack, idx: np.ndarray, keep_history: bool, timer_s: np.ndarray | None = None,
              stop_at_apogee: bool = False) -> _Pass:
        """Empty stores of a pass; ``timer_s`` adds a last query column (an ``after`` trigger's instant)."""
        n_all = idx.size
        burnout = pack.burnout_s[idx]
        queries = pack.delays_s[idx] + burnout[:, None]
        if timer_s is not None:
            queries = np.concatenate((queries, np.asarray(timer_s, dtype=float)[:, None]), axis=1)
        n_delays = queries.shape[1]
        return cls(
            times_s=pack.time_s[idx], thrust_n=pack.thrust_n[idx], cumulative_ns=pack.cumulative_ns[idx],
            last_seg=pack.n_samples[idx] - 1, burnout_s=burnout,
            end_thrust_n=pack.thrust_n[idx, pack.n_samples[idx] - 1],
            queries_s=np.where(np.isnan(queries), np.inf, queries),
            stop_after_s=np.max(np.where(np.isnan(queries), -np.inf, queries), axis=1),
            stop_at_apogee=stop_at_apogee,
            status=np.zeros(n_all, dtype=np.int64),
            rail_exit_t=np.full(n_all, np.nan), rail_exit_v=np.full(n_all, np.nan),
            apogee={k: np.full(n_all, np.nan) for k in ("t", "x", "y", "z", "vx", "vy") + _MAXIMA},
            at_deploy={k: np.full(n_all, np.nan) for k in _STATE + _MAXIMA},
            landing={k: np.full(n_all, np.nan) for k in _LANDING},
            ejection={k: np.full((n_all, n_delays), np.nan) for k in _STATE + ("speed",) + _MAXIMA},
            maxima={name: np.zeros(n_all) for name in _MAXIMA},
            stop={k: np.full(n_all, np.nan) for k in _STATE},
            history=[] if keep_history else None,
        )


def _integrate(g: _Group, pack: MotorPack, idx: np.ndarray, state0: dict[str, np.ndarray], seg0: np.ndarray,
               params: dict[str, np.ndarray], s: FlightSettings, out: dict[str, np.ndarray], traj: list | None,
               deploy_altitude_m: float | None, *, descent: bool, timer_s: np.ndarray | None = None,
               stop_time_s: np.ndarray | None = None, stop_at_apogee: bool = False,
               under_device: bool = False) -> dict[str, dict[str, np.ndarray]]:
    """The Runge-Kutta loop over time steps for the flights ``idx`` (never a loop over flights).

    Ascent pass (``descent`` False): from liftoff on the rail, through the burn,
    to apogee and the last ejection delay (and ``timer_s``, an ``after`` trigger's
    instant), without a device. A pass after the ascent (``descent`` True) flies
    from the given states (burning or not, climbing or falling) with the drag area
    ``params["extra"]`` of the devices open, until landing or its stop: the time
    ``stop_time_s``, the height ``deploy_altitude_m`` on the way down, or apogee.
    Every per-flight array lives in the dict ``a`` and is compacted together when
    flights finish; results are written back by each flight's position ``a["ref"]``.
    Returns the located states at apogee (with the maxima before it), deployment
    altitude, landing, every ejection delay (with the maxima up to it), the stop
    state (NaN where the flight landed first) and the pass's maxima above ground.

    One step is :func:`_step` and its helpers. Splitting the former 254-line loop
    into them costs no measurable speed: 1,000 synthetic ascents (tests/synthetic.py,
    seed 7) took a median 158-162 ms of CPU before and 160-164 ms after, and 100
    flights with descent 640-687 ms before and 644-683 ms after (runs interleaved in
    one process; about 4 more Python calls per step, within the run-to-run spread).
    """
    run = _Pass.start(pack, idx, traj is not None, timer_s, stop_at_apogee)
    a = _active_arrays(run, state0, seg0, params, s, deploy_altitude_m, descent, stop_time_s, under_device)
    with np.errstate(invalid="ignore"):  # the padding past a curve's last sample is NaN
        run.segments = _segment_table(run, params)
    _load_segment(a, run, None)
    a["ax"], ay, a["az"], mach0, q0, rates0 = _accel(g, a, a["t"], a["x"], a["y"], a["z"], a["vx"], a["vy"],
                                                      a["vz"], rates=True)
    a["ay"] = a["zeros"] if ay is None else ay
    a["rates"] = rates0
    a["mach"] = mach0
    if descent:  # the start state was flown: it counts in the maxima
        a["max_speed"], a["max_mach"], a["max_q"] = np.sqrt(a["vx"]**2 + a["vy"]**2 + a["vz"]**2), mach0, q0
        a["max_acc"] = np.sqrt(a["ax"]**2 + a["ay"]**2 + a["az"]**2)
    if run.history is not None:
        run.history.append(tuple(a[k].copy() for k in _HISTORY))
    steps = 0
    while a["ref"].size:
        steps += 1
        _step(g, a, run, s, deploy_altitude_m, descent, steps)
    if run.apogee_steps:
        _locate_apogee(run.apogee_steps, run.apogee)
        _state_maxima(g, run.apogee, params, (run.apogee, run.maxima))
    if run.landing_steps:
        _locate_landing(run.landing_steps, run.landing)
        _state_maxima(g, run.landing, params, (run.maxima,))
    _locate_ejections(run.ejection_steps, run.queries_s, run.ejection, run.landing["t"])
    if run.peak_steps:
        _interior_maxima(g, run)
    _write_results(run, idx, out, descent)
    if traj is not None:
        _store_history(run.history, idx, traj, under_device)
    stop = run.stop
    if descent and stop_at_apogee:
        stop = {**{k: run.apogee[k] for k in ("t", "x", "y", "z", "vx", "vy")}, "vz": np.zeros(idx.size)}
    elif descent and deploy_altitude_m is not None:
        stop = {k: run.at_deploy[k] for k in _STATE}
    return {"apogee": run.apogee, "deploy": run.at_deploy, "landing": run.landing, "ejection": run.ejection,
            "stop": stop, "maxima": run.maxima}


def _active_arrays(run: _Pass, state0: dict[str, np.ndarray], seg0: np.ndarray, params: dict[str, np.ndarray],
                   s: FlightSettings, deploy_altitude_m: float | None, descent: bool,
                   stop_time_s: np.ndarray | None, under_device: bool = False) -> dict:
    """The per-flight arrays of the loop, shape (n_active,): parameters, state, phase flags, step sizes, maxima."""
    n_all = run.status.size
    a: dict = {k: v.copy() for k, v in params.items()}
    a.update({k: state0[k].astype(float).copy() for k in _STATE})
    a["ref"] = np.arange(n_all)
    if descent:  # a pass after the ascent: the motor may still burn, the rocket may still climb
        seg = np.sum(run.times_s <= a["t"][:, None], axis=1) - 1
        a["seg"] = np.clip(seg, 0, np.maximum(run.last_seg - 1, 0))
        a["burning"] = a["t"] < run.burnout_s
        a["on_rail"] = np.zeros(n_all, dtype=bool)
        a["apogee_found"] = a["vz"] <= 0.0
        a["pending"] = np.full(n_all, deploy_altitude_m is not None)
        a["next_q"] = np.full(n_all, np.inf)
    else:
        a["seg"] = seg0.copy()
        a["burning"] = a["t"] < run.burnout_s
        a["on_rail"] = np.ones(n_all, dtype=bool)
        a["apogee_found"] = np.zeros(n_all, dtype=bool)
        a["pending"] = np.full(n_all, deploy_altitude_m is not None)
        a["next_q"] = run.queries_s.min(axis=1)
    a["half_cda"] = 0.5 * (a["cd"] * a["area"] + a["extra"])  # [m²], read by _accel with a constant Cd
    a["stop_t"] = np.full(n_all, np.inf) if stop_time_s is None else np.asarray(stop_time_s, dtype=float).copy()
    a["any_rail"] = bool(a["on_rail"].any())
    # the controller's next step [s]: a fraction of the burn at first; a pass after the ascent starts from its
    # own step rules (the descent time scale) and the controller takes over after one step
    a["h"] = np.maximum(run.burnout_s - a["t"], 1e-3) / s.burn_steps if not descent else np.full(n_all, np.inf)
    a["after_apogee_factor"] = 1.0 if descent else _AFTER_APOGEE_TOLERANCE_FACTOR
    a["descent_factor"] = _DESCENT_TOLERANCE_FACTOR if under_device else 1.0
    # the speed scale of the error control: at least half the motor's ideal velocity change Itot/m in the ascent
    # (an early speed error carries to burnout, where it is compared with about that speed), 1 m/s after it
    a["v_floor"] = np.ones(n_all) if descent else np.maximum(0.5 * a["itot"] / a["m_full"], 1.0)
    a["stop_after"] = run.stop_after_s
    for name in _MAXIMA:
        a[name] = np.zeros(n_all)
    return a


def _load_segment(a: dict, run: _Pass, mask: np.ndarray | None) -> None:
    """Coefficients of the current curve segment of the flights in ``mask`` (all when None), read from
    ``run.segments`` (:func:`_segment_table`): start and end [s],
    thrust F + S·dt [N] and mass m0 + m1·dt + m2·dt² [kg] in dt = t − start, mass falling with the impulse
    delivered (as :mod:`motorlib.flight` states). Flights that no longer burn get the coast's: no thrust,
    the burnt-out mass."""
    rows = a["ref"] if mask is None else a["ref"][mask]
    j = np.minimum(a["seg"] if mask is None else a["seg"][mask], run.last_seg[rows] - 1)
    values = run.segments.take(rows * (run.times_s.shape[1] - 1) + j, axis=1)  # one gather of the 7 rows
    for name, value in zip(_SEGMENT, values):
        if mask is None:
            a[name] = value
        else:
            a[name][mask] = value
    burning = a["burning"] if mask is None else a["burning"][mask]
    if not burning.all():
        _coast_segment(a, ~burning if mask is None else mask & ~a["burning"])


_SEGMENT = ("seg_t", "seg_end", "seg_f", "seg_s", "seg_m0", "seg_m1", "seg_m2")


def _segment_table(run: _Pass, params: dict[str, np.ndarray]) -> np.ndarray:
    """Every curve segment's coefficients for :func:`_load_segment`, rows in ``_SEGMENT``'s order, shape
    (7, n_flights·(n_samples_max − 1)), flight by flight (a flight's position ``ref`` in ``params``): computed
    once a pass, not at every segment change. Padding past a curve's last sample is never read."""
    times, thrust = run.times_s, run.thrust_n
    out = np.empty((len(_SEGMENT),) + (times.shape[0], times.shape[1] - 1))  # written row by row: no stacked copy
    t_a, t_b, f_a, slope, m0, m1, m2 = out
    t_a[...], t_b[...], f_a[...] = times[:, :-1], times[:, 1:], thrust[:, :-1]
    np.divide(thrust[:, 1:] - f_a, np.maximum(t_b - t_a, _TINY), out=slope)
    per_ns = (params["m_prop"] / params["itot"])[:, None]  # propellant burnt per N·s [kg/(N·s)]
    np.subtract(params["m_full"][:, None], per_ns * run.cumulative_ns[:, :-1], out=m0)
    np.multiply(-per_ns, f_a, out=m1)
    np.multiply(-0.5 * per_ns, slope, out=m2)
    return out.reshape(len(_SEGMENT), -1)


def _coast_segment(a: dict, mask: np.ndarray) -> None:
    """The coast's 'segment' for the flights in ``mask``: no thrust, the burnt-out mass."""
    a["seg_f"][mask] = 0.0
    a["seg_s"][mask] = 0.0
    a["seg_m0"][mask] = (a["m_full"] - a["m_prop"])[mask]
    a["seg_m1"][mask] = 0.0
    a["seg_m2"][mask] = 0.0


def _step(g: _Group, a: dict, run: _Pass, s: FlightSettings, deploy_altitude_m: float | None, descent: bool,
          steps: int) -> None:
    """Advance every active flight by one Dormand–Prince step (or reject it), record its events, retire finished flights."""
    t = a["t"]
    burning = a["burning"]
    h = _step_size(g, a, s, deploy_altitude_m, descent)
    hit_seg = burning & (h >= a["seg_end"] - t)
    x1, y1, z1, vx1, vy1, vz1, stages, state0 = _dopri(g, a, h)
    t1 = np.where(hit_seg, a["seg_end"], t + h)
    if descent:
        t1 = np.where(h >= a["stop_t"] - t, a["stop_t"], t1)  # a step aimed at the stop time ends on it
    # ---- a step that passed the rail's end by more than a hair is taken again, shorter (it is not error-tested:
    # the dynamics switch at the end) ----
    overshot = None
    if a["any_rail"]:
        along = x1 * a["ux"] + y1 * a["uy"] + z1 * a["uz"]
        overshot = a["on_rail"] & (along > a["rail_m"] * (1.0 + _RAIL_EXIT_SLACK))
        if np.count_nonzero(overshot):
            x1, y1, z1, vx1, vy1, vz1, t1 = (np.where(overshot, old, new) for old, new in (
                (a["x"], x1), (a["y"], y1), (a["z"], z1), (a["vx"], vx1), (a["vy"], vy1), (a["vz"], vz1), (t, t1)))
            hit_seg = hit_seg & ~overshot
        else:
            overshot = None
    # ---- phase changes at the step end ----
    was_on_rail = a["on_rail"]
    ended = np.zeros(t.size, dtype=bool)
    if np.count_nonzero(hit_seg):
        ended = _next_segment(a, run, hit_seg, burning, t1)
    if a["any_rail"]:
        _rail_exit(a, run.rail_exit_t, run.rail_exit_v, run.status, t1, x1, y1, z1, vx1, vy1, vz1)
    # ---- derivative at the new state: the error estimate's last stage and the next step's first ----
    ax1, ay1, az1, mach1, q1, rates1 = _accel(g, a, t1, x1, y1, z1, vx1, vy1, vz1, rates=True)
    if ay1 is None:
        ay1 = a["zeros"]
    # ---- error control: a step that switched the dynamics (rail exit, burnout, failure) is taken as it is ----
    # (a burnout is a switch only where the curve ends above zero thrust: a cut-off; a curve that ends at zero
    # is continuous there and its last step is tested like any other)
    cut_off = ended & (run.end_thrust_n[a["ref"]] > 0.0) if np.count_nonzero(ended) else ended
    switched = cut_off | (was_on_rail & ~a["on_rail"]) | (run.status[a["ref"]] != OK)
    # the derivative at a cut-off's end with the thrust just before it: the burn's last step, for its maxima
    pre_cut = _before_cut_off(g, a, run, cut_off, t1, x1, y1, z1, vx1, vy1, vz1) if np.count_nonzero(cut_off) else None
    stages[6] = (vx1, vz1, ax1, az1) if g.planar else (vx1, vy1, vz1, ax1, ay1, az1)
    err = _error_ratio(g, a, s, h, stages)
    rejected = (err > 1.0) & ~switched
    if overshot is not None:
        rejected |= overshot
        err = np.where(overshot, 32.0, err)  # halves the step
    fmax, saf = 5.0, 0.9
    # the step the error allows: err grows as h^5, so saf·h·err^(-1/5) whatever the step's own length
    allowed = saf * h * np.maximum(err, 1e-30) ** -0.2
    capped = h < a["h"]  # cut short by a step rule: it may shrink the controller's proposal, never grow it
    # in the ascent, a step under a tenth of the proposal (aimed at an event a hair away) tells nothing of the
    # proposal: its error estimate is rounding, and taken at its word it shrank the proposal a million-fold, which
    # then took eight steps to grow back (_SHORT_STEP_RATIO); under a device every step is bounded by the drag
    # time scale and the proposal follows the error of the capped steps
    keep_h = switched if descent else switched | ((h < _SHORT_STEP_RATIO * a["h"]) & ~rejected)
    a["h"] = np.where(keep_h, a["h"],
                      np.where(capped, np.minimum(a["h"], np.maximum(allowed, 0.2 * h)),
                               np.minimum(np.maximum(allowed, 0.2 * h), fmax * h)))
    if np.count_nonzero(rejected):  # the flight stays where it was: a step of length zero
        x1, y1, z1, vx1, vy1, vz1, ax1, ay1, az1, t1 = (
            np.where(rejected, old, new) for old, new in
            ((a["x"], x1), (a["y"], y1), (a["z"], z1), (a["vx"], vx1), (a["vy"], vy1), (a["vz"], vz1),
             (a["ax"], ax1), (a["ay"], ay1), (a["az"], az1), (t, t1)))
        mach1, q1 = np.where(rejected, a["mach"], mach1), np.where(rejected, 0.0, q1)
        rates1 = np.where(rejected, a["rates"], rates1)
        back = rejected & hit_seg
        if np.count_nonzero(back):  # back to the segment the flight is still in, burning
            a["seg"] = np.where(back, a["seg"] - 1, a["seg"])
            a["burning"] = a["burning"] | (back & ended)
            _load_segment(a, run, back)
    ends = _StepEnds(t, t1, t1 - t, a["x"], a["y"], a["z"], a["vx"], a["vy"], a["vz"], a["ax"], a["ay"], a["az"],
                     x1, y1, z1, vx1, vy1, vz1, ax1, ay1, az1)
    landed = _record_events(a, run, ends, s, deploy_altitude_m, descent)
    # ---- running maxima, sampled at step ends above ground (every curve sample is a step end); peaks inside a
    # step are added after the loop (_interior_maxima) ----
    flown = ~landed  # the end of the step that reaches the ground lies below it: never flown
    if g.planar:
        speed2, acc2 = vx1 * vx1 + vz1 * vz1, ax1 * ax1 + az1 * az1
    else:
        speed2, acc2 = vx1 * vx1 + vy1 * vy1 + vz1 * vz1, ax1 * ax1 + ay1 * ay1 + az1 * az1
    np.maximum(a["max_speed"], np.sqrt(speed2), out=a["max_speed"], where=flown)
    np.maximum(a["max_mach"], mach1, out=a["max_mach"], where=flown)
    np.maximum(a["max_q"], q1, out=a["max_q"], where=flown)
    np.maximum(a["max_acc"], np.sqrt(acc2), out=a["max_acc"], where=flown)  # kinematic, gravity included
    # ---- a maximum of speed, q or Mach inside the step (rising at its start, falling at its end): searched after
    # the loop, all at once (_interior_maxima) ----
    end_rates, end_acc = rates1, (ax1, ay1, az1)
    if pre_cut is not None:  # a cut-off step: the rates and derivative at its end as the burn left them
        at, acc_before, rates_before = pre_cut
        end_rates, end_acc = rates1.copy(), tuple(v.copy() for v in end_acc)
        end_rates[:, at] = rates_before
        for full, part in zip(end_acc, acc_before):
            full[at] = part
    peaked = ((a["rates"] > 0.0) & (end_rates < 0.0)).any(axis=0)  # rows: speed, q, Mach
    if np.count_nonzero(peaked):
        peaked &= flown & ~(switched & ~cut_off) & ~rejected
        if np.count_nonzero(peaked):
            k = stages[:, :, peaked]
            half = k.shape[1] // 2
            k[6, half:] = [acc[peaked] for acc in (end_acc[::2] if g.planar else end_acc)]
            run.peak_steps.append((a["ref"][peaked], t1[peaked], h[peaked], state0[:, peaked], k,
                                   {name: a[name][peaked] for name in _wind_params(g)}))
    a["rates"] = rates1
    a.update(t=t1, x=x1, y=y1, z=z1, vx=vx1, vy=vy1, vz=vz1, ax=ax1, ay=ay1, az=az1, mach=mach1)
    if run.history is not None:
        run.history.append(tuple(a[k][~rejected] if np.count_nonzero(rejected) else a[k].copy() for k in _HISTORY))
    _retire(a, run, s, landed, t1, steps, descent, deploy_altitude_m)


# The ascent pass flies on past apogee only to the ejection instants, whose states start the descent and give the
# ejection speed (unless a deployment altitude is still ahead: the full tolerance then), at 10 x the tolerance. With
# the Dormand–Prince pair, 100 x (as under RK4) made the steps after apogee so long that a charge 2 s after apogee
# was placed 1.5 cm low on a 157 m flight and a whole-flight landing drifted 30 cm (60 varied descents,
# tests/benchmarks/bench_descent.py); 10 x: 0.07 mm and 28 mm at worst, for 0.6 more steps a flight in a ranking.
# Our choice, no published source.
_AFTER_APOGEE_TOLERANCE_FACTOR: Final = 10.0
# Under a recovery device, after apogee and falling, what matters is where and when the rocket lands, to centimetres
# and milliseconds, not the ascent's 1e-5 of apogee: the tolerance is 100 x looser there, and positions are measured
# against the height left to fall when it exceeds v²/g0 (a position error made high up is no larger a share of the
# fall than one made low down). Measured with the descent step rules of recovery_phase.py on 290 varied descents
# (tests/synthetic.py descent_flights, 3-D, winds to 8 m/s, single and dual deployments; tests/benchmarks/
# bench_descent.py), with the Dormand–Prince pair: landing within 8 mm and 0.7 ms at worst (median 0.36 mm) of the
# DOP853 reference flown from the same opening state (under RK4, 3.1 mm against 0.1 mm at the full tolerance, with
# 2.3 x the steps). Measuring speed errors against the height left as well saved another 7 % of the steps for 10 x
# the error (worst 3 cm): not taken. Our choice, no published source.
_DESCENT_TOLERANCE_FACTOR: Final = 100.0
# In the ascent, a step cut by a step rule to under this fraction of the controller's proposal leaves the proposal
# as it was (unless rejected): on 1,000 synthetic flights such steps (at the wind's 1 m floor on the rail, mostly) each
# cost about eight extra steps before. Our choice, no published source.
_SHORT_STEP_RATIO: Final = 0.1
# During the burn most steps end on curve samples anyway; 3 x the tolerance there cost 1e-7 in median apogee and
# saved 10 % of the steps on 300 synthetic flights (tests/benchmarks/bench_flight.py). Our choice, no published source.
_BURN_TOLERANCE_FACTOR: Final = 3.0


# A step on the rail may end past the rail's end by this fraction of its length (its aim overshoots by 1e-7 in
# time); farther, the step is taken again, shorter. 1e-5 of the rail moves the exit by under 1e-4 m/s in speed
# for a 1.5 m rail at 15 m/s. Our choice, no published source.
_RAIL_EXIT_SLACK: Final = 1e-5


# Dormand–Prince 5(4) (J. R. Dormand and P. J. Prince, "A family of embedded Runge-Kutta formulae", J. Comput.
# Appl. Math. 6, 1980, pp. 19-26; Hairer, Nørsett & Wanner, Solving Ordinary Differential Equations I, 2nd ed.,
# 1993, Table II.5.2): nodes, stage coefficients, fifth-order weights (the seventh stage, at the step's end, is the
# next step's first: FSAL) and the error weights b − b̂ against the embedded fourth-order solution.
_DP_C: Final = (0.0, 1 / 5, 3 / 10, 4 / 5, 8 / 9, 1.0)
_DP_A: Final = (
    (),
    (1 / 5,),
    (3 / 40, 9 / 40),
    (44 / 45, -56 / 15, 32 / 9),
    (19372 / 6561, -25360 / 2187, 64448 / 6561, -212 / 729),
    (9017 / 3168, -355 / 33, 46732 / 5247, 49 / 176, -5103 / 18656),
)
_DP_B: Final = (35 / 384, 0.0, 500 / 1113, 125 / 192, -2187 / 6784, 11 / 84)
_DP_E: Final = (71 / 57600, 0.0, -71 / 16695, 71 / 1920, -17253 / 339200, 22 / 525, -1 / 40)


def _combine(weights: tuple[float, ...], stages: np.ndarray) -> np.ndarray:
    """Σ wⱼ·stages[j] over the non-zero weights, added in order, element by element: every flight gets the same
    bits whatever the batch (a matrix product would not: BLAS rounds an element differently by where it falls in
    the array)."""
    total = None
    for j, w in enumerate(weights):
        if w != 0.0:
            if total is None:
                total = w * stages[j]
            else:
                total += w * stages[j]  # in place: the same sums, one array fewer each
    return total


def _error_ratio(g: _Group, a: dict, s: FlightSettings, h: np.ndarray, stages: np.ndarray) -> np.ndarray:
    """Each flight's estimated local error over its allowed error (≤ 1 passes): the embedded fourth-order
    estimate h·Σ eᵢ·kᵢ over the seven stages ``stages`` (shape (7, components, n): positions' rates first, then
    speeds' rates; the seventh is the derivative at the step's end), speeds against ``tolerance`` × the speed
    scale, positions against ``tolerance`` × the length scale speed²/g0; under a device, falling, 100 x the
    tolerance and the length scale at least the height left to fall (see ``_DESCENT_TOLERANCE_FACTOR``)."""
    n_comp = stages.shape[1]
    delta = np.abs(h * _combine(_DP_E, stages))
    half = n_comp // 2
    dx = delta[:half].max(axis=0)
    dv = delta[half:].max(axis=0)
    v_scale = np.maximum(a["max_speed"], a["v_floor"])
    # |h·Δk| / (tol·v) for speeds and |h·Δv| / (tol·L) for positions, L = v²/g0: Δv·v/L = Δv·g0/v
    tol = s.tolerance * np.where(a["burning"], _BURN_TOLERANCE_FACTOR, 1.0)
    if a["after_apogee_factor"] != 1.0:
        tol = np.where(a["apogee_found"] & ~a["pending"], tol * a["after_apogee_factor"], tol)
    dx_scaled = dx * STANDARD_GRAVITY_M_S2 / v_scale
    if a["descent_factor"] != 1.0:  # under a device, falling: L = max(v²/g0, height left to fall)
        falling = a["apogee_found"] & (a["vz"] < 0.0) & ~a["burning"]
        tol = np.where(falling, tol * a["descent_factor"], tol)
        dx_scaled = np.where(falling, np.minimum(dx_scaled, dx * v_scale / np.maximum(a["z"], 1e-300)), dx_scaled)
    return (1.0 / tol / v_scale) * np.maximum(dv, dx_scaled)


def _dopri(g: _Group, a: dict, h: np.ndarray) -> tuple:
    """One Dormand–Prince 5(4) step from the active state, whose derivative (first stage) is (vx, vy, vz, ax, ay,
    az), over steps h: the new x, y, z, vx, vy, vz (fifth order), the stage array (7, components, n) with its
    last stage left to fill with the derivative at the new state, which the error estimate needs, and the start
    state (components, n).

    In a planar group y and its speed stay as they are (0) and are not integrated: components (x, z, vx, vz).
    """
    t = a["t"]
    planar = g.planar
    if planar:
        state = np.stack((a["x"], a["z"], a["vx"], a["vz"]))
        first = (a["vx"], a["vz"], a["ax"], a["az"])
    else:
        state = np.stack((a["x"], a["y"], a["z"], a["vx"], a["vy"], a["vz"]))
        first = (a["vx"], a["vy"], a["vz"], a["ax"], a["ay"], a["az"])
    n_comp, n = state.shape
    half = n_comp // 2
    k = np.empty((7, n_comp, n))
    k[0] = first
    y, vy = a["y"], a["vy"]
    for i in range(1, 6):
        stage = state + h * _combine(_DP_A[i], k)
        k[i, :half] = stage[half:]
        if planar:
            ax, _, az = _accel(g, a, t + _DP_C[i] * h, stage[0], y, stage[1], stage[2], vy, stage[3], figures=False)
            k[i, 2], k[i, 3] = ax, az
        else:
            ax, ay, az = _accel(g, a, t + _DP_C[i] * h, *stage, figures=False)
            k[i, 3], k[i, 4], k[i, 5] = ax, ay, az
    new = state + h * _combine(_DP_B, k)
    if planar:
        return new[0], y, new[1], new[2], vy, new[3], k, state
    return (*new, k, state)


def _next_segment(a: dict, run: _Pass, hit_seg: np.ndarray, burning: np.ndarray, t1: np.ndarray) -> np.ndarray:
    """Flights whose step ended on a curve sample move to the next segment; past the last, the burn ends.
    Returns which flights burned out in this step."""
    a["seg"] = np.where(hit_seg, a["seg"] + 1, a["seg"])
    ended = hit_seg & ((a["seg"] >= run.last_seg[a["ref"]]) | (t1 >= run.burnout_s[a["ref"]]))
    _load_segment(a, run, hit_seg & ~ended)
    if np.count_nonzero(ended):
        a["burning"] = burning & ~ended
        _coast_segment(a, ended)
    return ended


def _record_events(a: dict, run: _Pass, e: _StepEnds, s: FlightSettings, deploy_altitude_m: float | None,
                   descent: bool) -> np.ndarray:
    """Note the events inside this step; returns which active flights landed in it.

    Apogee and landing are located after the loop, all at once (one vectorised
    root solve instead of one per step); here the steps that hold them are only
    recorded, as are the steps that hold an ejection instant.
    """
    crossing = (e.vz1 <= 0.0) & (e.vz0 > 0.0) & ~a["apogee_found"] & ~a["on_rail"]
    if np.count_nonzero(crossing):
        c = crossing
        run.apogee_steps.append((a["ref"][c], e.select(c)))
        for name in _MAXIMA:  # the maxima before apogee (step ends up to this step's start)
            run.apogee[name][a["ref"][c]] = a[name][c]
        a["apogee_found"] = a["apogee_found"] | crossing
    _ejection_steps(a, run.queries_s, e, run.ejection_steps)
    if deploy_altitude_m is not None and np.count_nonzero(a["pending"]):
        _deploy_altitude_reached(a, run.at_deploy, deploy_altitude_m, e)
    landed = (e.z1 <= 0.0) & (e.z0 > 0.0) & ~a["on_rail"]
    if np.count_nonzero(landed):
        run.landing_steps.append((a["ref"][landed], e.select(landed)))
    if descent:
        stopped = (e.t1 >= a["stop_t"]) & ~landed
        if np.count_nonzero(stopped):
            r = a["ref"][stopped]
            for key, value in zip(_STATE, (e.t1, e.x1, e.y1, e.z1, e.vx1, e.vy1, e.vz1)):
                run.stop[key][r] = value[stopped]
    return landed


_PEAK_CHUNK: Final = 512  # steps searched together for interior maxima (27 x 512 values, 0.1 MB, per array)


def _wind_params(g: _Group) -> tuple[str, ...]:
    """The per-flight parameters the group's wind reads."""
    return () if g.calm else ("wind",) if g.profile is None else ("e1e", "e1n", "e2e", "e2n")


def _before_cut_off(g: _Group, a: dict, run: _Pass, cut_off: np.ndarray, t1, x1, y1, z1, vx1, vy1, vz1
                    ) -> tuple[np.ndarray, tuple, tuple]:
    """Positions of the flights whose curve was cut off (ended above zero thrust) in this step, and their
    acceleration (ax, ay, az) and figure rates at its end with the thrust of the burn's last segment: the step's
    own derivative there (after it, the coast's takes over)."""
    at = np.flatnonzero(cut_off)
    n = cut_off.size
    sub = {k: v[at] if isinstance(v, np.ndarray) and v.shape == (n,) else v for k, v in a.items()}
    sub["burning"] = np.ones(at.size, dtype=bool)
    _load_segment(sub, run, None)  # a["seg"] is past the last segment: the last one is loaded
    ax, ay, az, _, _, rates = _accel(g, sub, t1[at], x1[at], y1[at], z1[at], vx1[at], vy1[at], vz1[at], rates=True)
    return at, (ax, sub["zeros"] if ay is None else ay, az), rates


def _interior_maxima(g: _Group, run: _Pass) -> None:
    """Raise the maxima of speed, q and Mach to the peaks inside the steps recorded in ``run.peak_steps``
    (:func:`.peaks.interior_peaks`, all steps at once): the pass's maxima, and those up to apogee, to the
    deployment altitude and to each ejection instant where the step ends by then (these were taken at the start
    of the step that holds the event, so a peak in that step itself stays out, as its end does)."""
    refs, t1, h, state, stages = (np.concatenate(part, axis=-1) for part in zip(*[r[:5] for r in run.peak_steps]))
    params = {k: np.concatenate([r[5][k] for r in run.peak_steps]) for k in _wind_params(g)}
    peaks = np.empty((3, refs.size))
    for lo in range(0, refs.size, _PEAK_CHUNK):  # in chunks: the search holds (27, chunk) arrays
        part = slice(lo, lo + _PEAK_CHUNK)
        peaks[:, part] = interior_peaks(g, {k: v[part] for k, v in params.items()}, h[part], state[:, part],
                                        stages[:, :, part], g.planar)
    for name, value in zip(("max_speed", "max_q", "max_mach"), peaks):
        np.maximum.at(run.maxima[name], refs, value)
        for store in (run.apogee, run.at_deploy):
            by_then = t1 <= store["t"][refs]  # NaN (no such event): False
            np.maximum.at(store[name], refs[by_then], value[by_then])
        ejection = run.ejection
        for j in range(ejection["t"].shape[1]):
            by_then = t1 <= ejection["t"][refs, j]
            np.maximum.at(ejection[name][:, j], refs[by_then], value[by_then])  # a view: in place


def _state_maxima(g: _Group, located: dict[str, np.ndarray], params: dict[str, np.ndarray],
                  targets: tuple[dict[str, np.ndarray], ...]) -> None:
    """A state located inside a step (apogee, where the vertical speed is 0, or ground contact, at height 0) was
    flown: its speed, q and Mach count in the maxima ``targets`` (the pass's, and those up to apogee). A flight
    whose apogee comes during the burn, its speed still rising, has every maximum up to apogee there."""
    r = np.flatnonzero(np.isfinite(located["t"]))
    state = {k: located[k][r] for k in ("vx", "vy")}
    state["vz"] = located["vz"][r] if "vz" in located else np.zeros(r.size)  # apogee: 0
    state["z"] = located["z"][r] if "z" in located else np.zeros(r.size)  # ground contact: 0
    air, rho, sound = _air_speed(g, {k: params[k][r] for k in _wind_params(g)}, state)
    ground = np.sqrt(state["vx"] ** 2 + state["vy"] ** 2 + state["vz"] ** 2)
    for target in targets:
        for name, value in (("max_speed", ground), ("max_q", 0.5 * rho * air * air), ("max_mach", air / sound)):
            target[name][r] = np.fmax(target[name][r], value)


def _retire(a: dict, run: _Pass, s: FlightSettings, landed: np.ndarray, t1: np.ndarray, steps: int,
            descent: bool, deploy_altitude_m: float | None) -> None:
    """Finished flights (landed, past their last ejection, failed or over a limit) leave the active arrays."""
    if descent:
        done = landed | (t1 >= a["stop_t"])
        if deploy_altitude_m is not None:
            done |= ~a["pending"]
        if run.stop_at_apogee:
            done |= a["apogee_found"]
    else:
        done = landed | (a["apogee_found"] & (t1 >= a["stop_after"]) & ~a["pending"])
    over = (t1 > s.max_time_s) | (steps >= s.max_steps)
    if np.count_nonzero(over):
        run.status[a["ref"][over & ~done]] = STEP_LIMIT
    done = done | over | (run.status[a["ref"]] != OK)
    if np.count_nonzero(done):
        rows = a["ref"][done]
        for name in run.maxima:
            run.maxima[name][rows] = a[name][done]
        keep = np.flatnonzero(~done)  # positions: one take per array costs less than a boolean mask each
        for name, value in a.items():
            if isinstance(value, np.ndarray):
                a[name] = value.take(keep, axis=-1)  # (the rates: 3 rows)
        a["any_rail"] = np.count_nonzero(a["on_rail"]) > 0


def _write_results(run: _Pass, idx: np.ndarray, out: dict[str, np.ndarray], descent: bool) -> None:
    """Copy what only the ascent pass finds (rail exit, ejection states) and every pass's failures into the
    batch's result arrays, at the flights' rows ``idx``; the flown figures are written by the caller."""
    if not descent:
        n_delays = out["ejection_altitude_m"].shape[1]
        out["rail_exit_time_s"][idx] = run.rail_exit_t
        out["rail_exit_speed_m_s"][idx] = run.rail_exit_v
        out["ejection_altitude_m"][idx] = run.ejection["z"][:, :n_delays]
        out["ejection_speed_m_s"][idx] = run.ejection["speed"][:, :n_delays]
        out["ejection_vertical_speed_m_s"][idx] = run.ejection["vz"][:, :n_delays]
    failed = run.status != OK
    out["status"][idx[failed]] = run.status[failed]
