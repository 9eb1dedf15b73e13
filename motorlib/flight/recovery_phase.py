"""The flight after the first recovery event: where each device opens, the passes between openings, landing.

A recovery sequence is a list of devices, each with a trigger: the motor's
ejection charge (burnout plus the chosen delay), apogee (plus a delay), an
altitude on the way down, or a timer after the previous device (after liftoff
for the first). The ascent pass (no device) locates the first device's
opening; from there the flight is flown pass by pass, one pass per device,
each with the drag area of the devices open so far (a device adds to it, or
replaces it), ending where the next device opens or at landing. A device that
opens while the rocket climbs ends the climb; a device that opens while the
motor burns leaves it burning. When nothing opens (no charge, or the rocket
lands first) the rocket falls ballistically from apogee and its impact is the
landing.

Only flown states count: the trajectory is cut at every opening, apogee is the
one reached under the devices open then, and the maxima come from the states
flown above ground (acceleration until the first opening: the opening itself is
an instant change of drag here, reported as the opening-load estimate
½·ρ·v²·(Cd·A of the device), an upper bound without an inflation model).

The closed-form fall formulas (still air, constant density) are in :mod:`motorlib.flight.descent`.

numpy only.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Callable

import numpy as np

from .airframe import Recovery
from .delays import nearest_delay_column
from .dynamics import _Group
from .pack import MotorPack
from .results import OK

if TYPE_CHECKING:  # annotation only: integrate imports this module
    from .integrate import FlightSettings

_STATE = ("t", "x", "y", "z", "vx", "vy", "vz")
_MAXIMA = ("max_speed", "max_mach", "max_acc", "max_q")


def _charge_column(pack: MotorPack, idx: np.ndarray, apogee_t: np.ndarray, wanted_delay: np.ndarray | None
                   ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The delay column that fires the charge: the wanted delay, else the one closest to the optimal delay.

    Returns the column, whether the motor has a charge at all, and the delay used [s] (NaN without one).
    """
    delays = pack.delays_s[idx]
    optimal = apogee_t - pack.burnout_s[idx]
    target = optimal if wanted_delay is None else wanted_delay[idx]
    col, _ = nearest_delay_column(delays, target)
    has = ~np.all(np.isnan(delays), axis=1)  # plugged or booster: no charge
    return col, has, np.where(has, delays[np.arange(idx.size), col], np.nan)


def _first_opening(device: Recovery, ascent: dict, col: np.ndarray, has: np.ndarray, charge_t: np.ndarray,
                   status: np.ndarray) -> tuple[dict[str, np.ndarray], dict[str, np.ndarray], np.ndarray]:
    """The state where the first device opens, the ascent's maxima up to it, and which flights open it there.

    ``ascent`` holds the ascent pass's located states by position: apogee (and the
    maxima before it), the deployment-altitude state, and the ejection states of
    every delay column plus, last, the timer column of an ``after`` trigger. An
    ``apogee`` trigger with a delay opens later: its state here is apogee.
    """
    n = col.size
    rows = np.arange(n)
    if device.deploy in ("ejection", "after"):
        src = ascent["ejection"]
        c = col if device.deploy == "ejection" else np.full(n, src["z"].shape[1] - 1)
        ok = has if device.deploy == "ejection" else np.ones(n, dtype=bool)
        state = {k: np.where(ok, src[k][rows, c], np.nan) for k in _STATE[1:]}
        state["t"] = np.where(ok, charge_t if device.deploy == "ejection" else src["t"][rows, c], np.nan)
        snap = {k: src[k][rows, c] for k in _MAXIMA}
    elif device.deploy == "altitude":
        state = {k: ascent["deploy"][k].copy() for k in _STATE}
        snap = {k: ascent["deploy"][k].copy() for k in _MAXIMA}
    else:
        state = {k: ascent["apogee"][k].copy() for k in ("t", "x", "y", "z", "vx", "vy")}
        state["vz"] = np.zeros(n)
        snap = {k: ascent["apogee"][k].copy() for k in _MAXIMA}
    # a state inside the step that reaches the ground lies below the pad: nothing opens
    opens = np.isfinite(state["t"]) & (state["z"] > 0.0) & (status == OK)
    if device.deploy == "apogee" and device.delay_s > 0.0:
        opens[:] = False  # it falls from apogee until the delay runs out (see _fly_sequence)
    return state, snap, opens


def _air_speed(g: _Group, params: dict[str, np.ndarray], state: dict[str, np.ndarray]
               ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Air-relative speed [m/s], air density [kg/m³] and speed of sound [m/s] at the given states (``params`` of
    those flights)."""
    rho, sound, _, shape = g.lookup(state["z"])
    wind_x, wind_y = g.wind(params, state["z"], shape)
    vry = state["vy"] if wind_y is None else state["vy"] - wind_y
    return np.sqrt((state["vx"] - wind_x) ** 2 + vry**2 + state["vz"] ** 2), rho, sound


def _sub(state: dict[str, np.ndarray], mask: np.ndarray) -> dict[str, np.ndarray]:
    return {k: v[mask] for k, v in state.items()}


def _fly_sequence(fly: Callable[..., dict[str, np.ndarray]], record: Callable[..., None],
                  devices: tuple[Recovery, ...], start: dict[str, np.ndarray], opens: np.ndarray,
                  apogee: dict[str, np.ndarray], charge_t: np.ndarray, status: np.ndarray,
                  flown_apogee_t: np.ndarray) -> None:
    """Fly every flight from its first recovery event to landing, device after device.

    ``fly(positions, state, extra_m2, *, device, stop_time_s, stop_altitude_m, stop_at_apogee)`` flies one
    pass and returns the state where it stopped (NaN where the flight landed first);
    ``record(positions, k, state)`` notes that device ``k`` opened at ``state``. ``start`` is the
    first device's opening state (where ``opens``), ``apogee`` the ascent's apogee states, ``charge_t``
    the instant the motor's charge fires (NaN without one), ``flown_apogee_t`` the flown apogee times
    (filled in by ``fly`` as passes find them); all by position in the group.
    """
    n = opens.size
    ok = (status == OK) & np.isfinite(apogee["t"])
    apogee_state = {**{k: apogee[k] for k in ("t", "x", "y", "z", "vx", "vy")}, "vz": np.zeros(n)}
    first = devices[0] if devices else None
    # nothing opens at the first event: fall from apogee (ballistically, or until an apogee delay runs out)
    waiting = np.flatnonzero(ok & ~opens)
    pending: list[tuple[np.ndarray, dict[str, np.ndarray]]] = []  # (positions, state) where device k opens
    if waiting.size:
        state = _sub(apogee_state, waiting)
        if first is not None and first.deploy == "apogee" and first.delay_s > 0.0:
            stop = fly(waiting, state, np.zeros(waiting.size), device=None,
                       stop_time_s=state["t"] + first.delay_s)
            later = np.isfinite(stop["t"])
            pending.append((waiting[later], _sub(stop, later)))
        else:
            fly(waiting, state, np.zeros(waiting.size), device=None)
    opened = np.flatnonzero(opens)
    if opened.size:
        pending.append((opened, _sub(start, opens)))
    if not pending:
        return
    pos = np.concatenate([p for p, _ in pending])
    state = {k: np.concatenate([s[k] for _, s in pending]) for k in _STATE}
    extra = np.zeros(pos.size)
    for k, device in enumerate(devices):
        if pos.size == 0:
            return
        record(pos, k, state)
        extra = device.drag_area_m2 + (0.0 if device.replaces else extra)
        if k + 1 == len(devices):
            fly(pos, state, extra, device=k)
            return
        pos, state, extra = _to_next_opening(fly, devices[k + 1], k, pos, state, extra, charge_t, flown_apogee_t)


def _to_next_opening(fly: Callable[..., dict[str, np.ndarray]], device: Recovery, k: int, pos: np.ndarray,
                     state: dict[str, np.ndarray], extra: np.ndarray, charge_t: np.ndarray, apogee_t: np.ndarray
                     ) -> tuple[np.ndarray, dict[str, np.ndarray], np.ndarray]:
    """Fly under device ``k`` until ``device`` (the next one) opens; the flights it opens on, their states, drag.

    A trigger already met opens the device at once (an altitude trigger below that altitude on
    the way down, a timer or an apogee delay already run out). ``apogee_t`` holds the flown apogee
    times by group position, as far as they are known.
    """
    trigger, t = device.deploy, state["t"]
    falling = state["vz"] <= 0.0
    stops: list[tuple[np.ndarray, dict]] = []
    if trigger == "altitude":
        now = falling & (state["z"] <= device.deploy_altitude_m)
        stops.append((~now, {"stop_altitude_m": device.deploy_altitude_m}))
    else:
        if trigger == "apogee":
            when = np.where(falling, apogee_t[pos] + device.delay_s, np.inf)
            stops.append((~falling, {"stop_at_apogee": True}))
        else:
            when = t + device.delay_s if trigger == "after" else charge_t[pos]
        when = np.where(np.isnan(when), np.inf, when)  # no charge: the device never opens
        now = when <= t
        timed = ~now & (falling if trigger == "apogee" else True)
        stops.append((timed, {"stop_time_s": when[timed]}))
    parts = [(np.flatnonzero(now), _sub(state, now))]
    for mask, stop in stops:
        if not mask.any():
            continue
        where = np.flatnonzero(mask)
        reached = fly(pos[where], _sub(state, mask), extra[where], device=k, **stop)
        if stop.get("stop_at_apogee") and device.delay_s > 0.0:
            at = np.isfinite(reached["t"])
            where, reached = where[at], _sub(reached, at)
            if where.size:
                reached = fly(pos[where], reached, extra[where], device=k, stop_time_s=reached["t"] + device.delay_s)
        got = np.isfinite(reached["t"])
        parts.append((where[got], _sub(reached, got)))
    local = np.concatenate([p for p, _ in parts]).astype(np.int64)
    new_state = {key: np.concatenate([s[key] for _, s in parts]) for key in _STATE}
    return pos[local], new_state, extra[local]


def _descent_step(g: _Group, a: dict[str, np.ndarray], s: FlightSettings) -> np.ndarray:
    """Step after the first recovery event, bounded by the drag time scale τ = m/(k·v) [s].

    With k = ½ρ(Cd·A) and v = max(|v|, v_t), τ is v_t/g at terminal speed and much shorter
    just after a fast deployment. Drag's Jacobian -(k/m)(|v|·I + v·vᵀ/|v|) has its largest
    eigenvalue -2k|v|/m = -2/τ, so a step of ``descent_step_fraction``·τ puts h·λ at twice
    that fraction, inside the Dormand–Prince pair's real stability interval (-3.307, 0) for fractions below 1.65 (1.5 by default)
    (``opening_step_fraction`` while the rocket is still much faster than terminal speed, just
    after an opening, or climbs under a device). The first step of a pass is also at most 1/30 of
    the time left to fall (at terminal speed, or the drag-free speed at the ground when that is
    lower: a ballistic fall), so that a short fall starts with a short step; from then on the error
    controller's step bounds it (issue 16: applied to every step, this rule made the last tens of
    metres of every descent crawl, about 150 of the 460 steps of a parachute descent). While the motor
    still burns, a step also ends on every thrust-curve sample; a step never passes the pass's stop time.
    """
    z, vz = a["z"], a["vz"]
    rho, _, grav, shape = g.lookup(z)
    mass = a["m_full"] - a["m_prop"]
    cd = g.cds[0] if g.table_cd else a["cd"]
    k = 0.5 * rho * (cd * a["area"] + a["extra"])
    v_t = np.sqrt(mass * grav / k)
    wind_x, wind_y = g.wind(a, z, shape)
    vry = a["vy"] if wind_y is None else a["vy"] - wind_y
    air_speed = np.sqrt((a["vx"] - wind_x) ** 2 + vry * vry + vz * vz)
    speed = np.maximum(air_speed, v_t)
    time_scale = mass / (k * speed)
    # Fine steps while far from the terminal state: just after an opening, or still climbing under a device.
    # The numbers below are our choice, no published source and no recorded tuning: 1.2 v_t marks "far from
    # terminal"; the first step covers at most 1/30 of the time left to fall; the 1 m and 0.1 m/s floors keep the
    # time left finite at the ground; 1e-5 s to 10 s bound a step. The descent matches the closed-form fall
    # (tests/reference/check_values.md#fall-from-rest) to 1e-4 with them (tests/flight/test_integrate.py).
    fraction = np.where((air_speed > 1.2 * v_t) | (vz > 0.0), s.opening_step_fraction, s.descent_step_fraction)
    h = fraction * time_scale
    first = np.isinf(a["h"])  # the controller has no step yet: the pass's first
    if np.count_nonzero(first):
        # the fall speed to expect: terminal under a device, at most the drag-free speed at the ground
        v_fall = np.minimum(v_t, np.sqrt(vz * vz + 2.0 * grav * np.maximum(z, 0.0)))
        time_left = np.maximum(z, 1.0) / np.maximum(np.maximum(-vz, v_fall), 0.1)
        h = np.where(first, np.minimum(h, time_left / 30.0), h)
    h = np.clip(h, 1e-5, 10.0)
    t = a["t"]
    if np.count_nonzero(a["burning"]):
        h = np.where(a["burning"], np.minimum(h, a["seg_end"] - t), h)
    stop = a["stop_t"]
    return np.where(stop > t, np.minimum(h, stop - t), h)
