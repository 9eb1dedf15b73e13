"""Events of a flight located exactly or inside a step: liftoff, rail exit, apogee, landing, ejection, deployment.

Liftoff: on each thrust-curve segment thrust is linear and mass quadratic in time,
so the first instant with thrust above the weight along the rail is the root of a
quadratic, solved in closed form (the pad wait is never integrated).

Inside a step of the integrator, position and speed are interpolated by the cubic
Hermite polynomial through both ends' values and derivatives (speed for position,
acceleration for speed). Apogee (vertical speed 0) and landing (height 0) are
roots of that cubic, found by Newton iterations safeguarded by bisection, for all
recorded steps at once after the loop. The state at an ejection delay is the
cubic at the delay's instant.

numpy only.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from .pack import _TINY, MotorPack
from .results import STUCK_ON_RAIL


class _StepEnds(NamedTuple):
    """Both ends of one step of the active flights; every field has shape (n_active,).

    Times from ignition [s], step length ``h`` = t1 − t0 [s], positions [m],
    speeds [m/s] and accelerations [m/s²] at the start (0) and the end (1).
    """

    t0: np.ndarray
    t1: np.ndarray
    h: np.ndarray
    x0: np.ndarray
    y0: np.ndarray
    z0: np.ndarray
    vx0: np.ndarray
    vy0: np.ndarray
    vz0: np.ndarray
    ax0: np.ndarray
    ay0: np.ndarray
    az0: np.ndarray
    x1: np.ndarray
    y1: np.ndarray
    z1: np.ndarray
    vx1: np.ndarray
    vy1: np.ndarray
    vz1: np.ndarray
    ax1: np.ndarray
    ay1: np.ndarray
    az1: np.ndarray

    def select(self, mask: np.ndarray) -> _StepEnds:
        """The steps of the flights in ``mask``."""
        return _StepEnds(*(value[mask] for value in self))


# ----------------------------------------------------------------------------- liftoff
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



# ----------------------------------------------------------------------------- Hermite interpolation
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
    for _ in range(12):  # Newton, safeguarded by bisection bounds; converges in 3-4 steps here, then stays put
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
        tau = new  # a fixed count for every flight: a batch-wide early stop would make a flight's root depend on
    return tau  # the others in its batch (in the last bit), against the vectorisation contract


# ----------------------------------------------------------------------------- events inside a step
def _rail_exit(a: dict, rail_exit_t: np.ndarray, rail_exit_v: np.ndarray, status: np.ndarray, t1: np.ndarray,
               x1: np.ndarray, y1: np.ndarray, z1: np.ndarray, vx1: np.ndarray, vy1: np.ndarray, vz1: np.ndarray
               ) -> None:
    """Record rail exit time [s] and speed [m/s] of the flights that left the rail; flag those that slid back.

    The step size aims a rail step's end at the rail's end (predicted from the
    local motion, overshooting by 1e-7 relative), so the step end stands for the
    exit; the test allows 1e-7 of the rail's length short of its end. With 1e-12,
    the prediction fell short in 263 of 1,000 synthetic flights (tests/synthetic.py,
    seed 7; by a median 8e-9 of the rail), each of which then took a step of about
    1e-7 s to leave it; with 1e-7, in 23, and no apogee moved by more than 2.3e-8
    relative (rail exit speed 4.6e-8). Our choice, no published source.
    """
    on_rail = a["on_rail"]
    left = on_rail & (x1 * a["ux"] + y1 * a["uy"] + z1 * a["uz"] >= a["rail_m"] * (1.0 - 1e-7))
    if np.count_nonzero(left):
        rows = a["ref"][left]
        rail_exit_t[rows] = t1[left]
        rail_exit_v[rows] = np.sqrt(vx1[left] ** 2 + vy1[left] ** 2 + vz1[left] ** 2)
    slid_back = on_rail & ~left & ((vx1 * a["ux"] + vy1 * a["uy"] + vz1 * a["uz"]) <= 0.0)
    status[a["ref"][slid_back]] = STUCK_ON_RAIL
    a["on_rail"] = on_rail & ~left
    a["any_rail"] = np.count_nonzero(a["on_rail"]) > 0


_EJECTION_MAXIMA = ("max_speed", "max_mach", "max_acc", "max_q")


def _ejection_steps(a: dict, queries_s: np.ndarray, e: _StepEnds, steps: list) -> None:
    """Record the steps that hold an ejection instant (located after the loop by :func:`_locate_ejections`).

    ``queries_s`` has shape (n_flights, n_delays): burnout plus each delay [s],
    inf where a motor has fewer delays; ``a["next_q"]`` is each active flight's
    next instant, so only flights with one due are looked at. The maxima of the
    step ends so far are kept with each step.
    """
    due = a["next_q"] <= e.t1
    if not np.count_nonzero(due):
        return
    rows_d = np.flatnonzero(due)
    r_all = a["ref"][rows_d]
    steps.append((r_all, e.select(rows_d), np.stack([a[name][rows_d] for name in _EJECTION_MAXIMA])))
    q_rows = queries_s[r_all]
    a["next_q"][rows_d] = np.where(q_rows > e.t1[rows_d, None], q_rows, np.inf).min(axis=1)


def _locate_ejections(steps: list, queries_s: np.ndarray, ejection: dict[str, np.ndarray],
                      landing_t: np.ndarray) -> None:
    """Interpolate (cubic Hermite) the state at every ejection instant inside the recorded steps, all at once.
    An instant after the flight's landing (``landing_t``, NaN where it did not land) is no ejection: it stays NaN
    (the step that reaches the ground ends below it, and an instant inside it past the landing lay under the pad)."""
    if not steps:
        return
    refs, e = _stacked([(r, ends) for r, ends, _ in steps])
    maxima = np.concatenate([m for _, _, m in steps], axis=1)
    q_rows = queries_s[refs]
    inside = (q_rows > e.t0[:, None]) & (q_rows <= e.t1[:, None]) & ~(q_rows > landing_t[refs][:, None])
    li, b_i = np.nonzero(inside)
    hq = e.h[li]
    tau = (q_rows[li, b_i] - e.t0[li]) / hq
    r = refs[li]
    for axis in "xyz":
        ejection[axis][r, b_i] = _hermite(getattr(e, f"{axis}0")[li], getattr(e, f"v{axis}0")[li],
                                          getattr(e, f"{axis}1")[li], getattr(e, f"v{axis}1")[li], hq, tau)
        ejection[f"v{axis}"][r, b_i] = _hermite(getattr(e, f"v{axis}0")[li], getattr(e, f"a{axis}0")[li],
                                                getattr(e, f"v{axis}1")[li], getattr(e, f"a{axis}1")[li], hq, tau)
    ejection["speed"][r, b_i] = np.sqrt(ejection["vx"][r, b_i] ** 2 + ejection["vy"][r, b_i] ** 2
                                        + ejection["vz"][r, b_i] ** 2)
    ejection["t"][r, b_i] = q_rows[li, b_i]
    for k, name in enumerate(_EJECTION_MAXIMA):  # maxima of the step ends before the instant
        ejection[name][r, b_i] = maxima[k, li]


def _deploy_altitude_reached(a: dict, at_deploy: dict[str, np.ndarray], deploy_altitude_m: float,
                             e: _StepEnds) -> None:
    """Record the end state of falling flights that reached the deployment altitude, and stop waiting for it.

    The step size aims each falling flight's step end at that altitude (predicted
    from the local motion, overshooting by 1e-7 relative), so the end state stands
    for the deployment state; the test allows 1e-9 relative above the altitude.
    """
    down = a["pending"] & a["apogee_found"] & (e.z1 <= deploy_altitude_m * (1.0 + 1e-9)) & (e.vz1 < 0.0)
    if np.count_nonzero(down):
        r = a["ref"][down]
        for key, value in (("t", e.t1), ("x", e.x1), ("y", e.y1), ("z", e.z1), ("vx", e.vx1), ("vy", e.vy1),
                           ("vz", e.vz1)):
            at_deploy[key][r] = value[down]
        for name in ("max_speed", "max_mach", "max_acc", "max_q"):  # the step end itself counts in the next pass
            at_deploy[name][r] = a[name][down]
        a["pending"] = a["pending"] & ~down


def _stacked(steps: list[tuple[np.ndarray, _StepEnds]]) -> tuple[np.ndarray, _StepEnds]:
    """The recorded (flight positions, step ends) pairs of a pass, concatenated into one batch."""
    refs = np.concatenate([ref for ref, _ in steps])
    return refs, _StepEnds(*map(np.concatenate, zip(*(ends for _, ends in steps))))


def _locate_apogee(steps: list[tuple[np.ndarray, _StepEnds]], apogee: dict[str, np.ndarray]) -> None:
    """Time, height, downrange and horizontal speed at apogee (vertical speed 0) in the recorded steps."""
    r, e = _stacked(steps)
    tau = _hermite_root(e.vz0, e.az0, e.vz1, e.az1, e.h)
    apogee["t"][r] = e.t0 + tau * e.h
    apogee["z"][r] = _hermite(e.z0, e.vz0, e.z1, e.vz1, e.h, tau)
    apogee["x"][r] = _hermite(e.x0, e.vx0, e.x1, e.vx1, e.h, tau)
    apogee["y"][r] = _hermite(e.y0, e.vy0, e.y1, e.vy1, e.h, tau)
    apogee["vx"][r] = _hermite(e.vx0, e.ax0, e.vx1, e.ax1, e.h, tau)
    apogee["vy"][r] = _hermite(e.vy0, e.ay0, e.vy1, e.ay1, e.h, tau)


def _locate_landing(steps: list[tuple[np.ndarray, _StepEnds]], landing: dict[str, np.ndarray]) -> None:
    """Time, drift, speed and descent rate at landing (height 0 above the pad) in the recorded steps."""
    r, e = _stacked(steps)
    tau = _hermite_root(e.z0, e.vz0, e.z1, e.vz1, e.h)
    landing["t"][r] = e.t0 + tau * e.h
    landing["x"][r] = _hermite(e.x0, e.vx0, e.x1, e.vx1, e.h, tau)
    landing["y"][r] = _hermite(e.y0, e.vy0, e.y1, e.vy1, e.h, tau)
    vz_land = _hermite(e.vz0, e.az0, e.vz1, e.az1, e.h, tau)
    vx_land = _hermite(e.vx0, e.ax0, e.vx1, e.ax1, e.h, tau)
    vy_land = _hermite(e.vy0, e.ay0, e.vy1, e.ay1, e.h, tau)
    landing["speed"][r] = np.sqrt(vx_land**2 + vy_land**2 + vz_land**2)
    landing["rate"][r] = -vz_land
    landing["vx"][r], landing["vy"][r], landing["vz"][r] = vx_land, vy_land, vz_land
