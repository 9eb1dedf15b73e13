"""What a batch of flights returns: status codes, their messages and the :class:`FlightResults` record.

Expected outcomes are data, not exceptions: a rocket that never lifts off gets the
status ``NO_LIFTOFF`` and a ``MESSAGES`` text, as SciPy's solvers report ``status``.
The private helpers lay out the result arrays the integrator fills.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from types import MappingProxyType
from typing import TYPE_CHECKING, Final, Mapping, Sequence

import numpy as np

if TYPE_CHECKING:  # annotation only: pandas loads when to_frame is called
    import pandas

from .delays import nearest_delay_column
from ..motor.record import freeze_arrays, read_only_copy

__all__ = ["MESSAGES", "NO_LIFTOFF", "NO_MASS", "OK", "STEP_LIMIT", "STUCK_ON_RAIL", "FlightResults"]

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


@dataclass(frozen=True, eq=False)
class FlightResults:
    """Results of a batch; every array has shape (n_flights,) unless stated. Times from ignition [s].

    Every figure describes the flight that was flown: one trajectory, cut where
    each recovery device opens, so a device that opens while the rocket climbs
    ends the climb (apogee and maxima come from the flown states above ground).

    ``ejection_*`` arrays have shape (n_flights, n_delays) aligned with
    ``ejection_delay_s`` (NaN where a motor has fewer delays, or where the
    rocket lands before that delay); they describe the rocket without a device
    (what each delay would meet). ``ejection_speed_m_s`` is the speed over the
    ground, |v|, when that delay fires (the wind not removed).
    ``deployment_*`` and ``opening_load_n`` have
    shape (n_flights, n_devices), one column per recovery device in the order
    they open, NaN where a device never opens (the rocket lands first):
    time, height above the pad, speed and the opening-load estimate
    ½·ρ·v²·(Cd·A of the device), an upper bound without an inflation model.
    ``deployment_speed_m_s`` is the speed through the air, |v − w(z)| with the
    wind w at that height: what loads the device, and what the
    ``deployment-fast`` rule judges. A device the charge opens opens at the
    charge's instant (fully open at once: no inflation model), so the two
    speeds differ only by the wind; near apogee the rocket drifts with the
    wind, so the air speed there is usually far below the ground speed
    (``fly --json``: ``chosen_ejection_speed_m_s`` against
    ``deployments[k].speed_m_s``). ``deployment_descent_rate_m_s`` is the descent rate under that device
    when the next one opens or at landing. ``landing_*`` is the impact when
    nothing opens; NaN when the descent was not flown (``descent=False``).
    ``optimal_delay_s`` is the delay that fires at the apogee of the rocket
    without a device.

    Definitions: ``liftoff_thrust_to_weight`` is the highest thrust in the first
    0.1 s of the curve over the liftoff weight (m·g0); ``average_thrust_to_weight``
    the total impulse over the time from the first sample to burnout, over the same
    weight; ``max_acceleration_m_s2`` the largest magnitude of the trajectory's
    (kinematic) acceleration. Maxima are taken at step ends (every curve sample is
    one), and speed, Mach and dynamic pressure also inside a step that holds their
    peak (thrust falling below drag in a long curve segment, say: found on the
    integrator's continuous extension, :mod:`motorlib.flight.peaks`); the
    acceleration's only at step ends. ``max_acceleration_m_s2`` covers the flight until the
    first device opens (the opening is an instant change of drag in this model:
    its jolt is ``opening_load_n``). ``burnout_time_s`` is where the thrust curve
    reaches zero for good, and ejection delays count from it.

    A record, not a workspace: the arrays are read-only copies, and each trajectory is a read-only
    mapping of read-only arrays (writing into them raises ``ValueError`` / ``TypeError``).
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
    optimal_delay_s: np.ndarray
    apogee_east_m: np.ndarray
    apogee_north_m: np.ndarray
    landing_east_m: np.ndarray
    landing_north_m: np.ndarray
    deployment_time_s: np.ndarray
    deployment_altitude_m: np.ndarray
    deployment_speed_m_s: np.ndarray
    opening_load_n: np.ndarray
    deployment_descent_rate_m_s: np.ndarray
    recovery_devices: tuple[tuple[object, ...], ...] = ()
    trajectories: tuple[Mapping[str, np.ndarray] | None, ...] | None = None

    def __post_init__(self) -> None:
        freeze_arrays(self)
        if self.trajectories is not None:
            object.__setattr__(self, "trajectories", tuple(None if t is None else _frozen_mapping(t)
                                                           for t in self.trajectories))

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

    def to_frame(self, index: Sequence[object] | None = None) -> "pandas.DataFrame":
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
        col, found = nearest_delay_column(self.ejection_delay_s[i:i + 1], self.optimal_delay_s[i:i + 1])
        return float(self.ejection_delay_s[i, col[0]]) if found[0] else math.nan

    def summary(self, i: int, listed_delays_s: Sequence[float] | None = None,
                delay_s: float | None = None) -> dict[str, object]:
        """Flight ``i`` as a plain dict of SI figures (the ``fly --json`` layout). Times from ignition.

        ``chosen_ejection_speed_m_s`` and ``ejections[k].speed_m_s`` are speeds over the ground when a delay
        fires; ``deployments[k].speed_m_s`` is the speed through the air when a device opens (see the class).

        ``listed_delays_s`` limits ``ejections`` to the motor's listed delays (and the chosen one),
        leaving out the drillable values of adjustable motors. ``delay_s``: the delay asked for (the
        ``deploy_delay_s`` the flight was flown with), the chosen one even where it opened nothing (it fires
        after landing: its ejection figures are then None), not the listed one closest to the optimal delay.
        """
        def num(value: float) -> float | None:
            return float(value) if np.isfinite(value) else None

        chosen = self.chosen_delay_s(i) if delay_s is None else float(delay_s)
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
            # the descent rate under the device, as match reports it (the speed over the ground is landing.speed_m_s)
            "landing_speed_m_s": num(self.landing_descent_rate_m_s[i]),
            "landing_descent_rate_m_s": num(self.landing_descent_rate_m_s[i]),
            "descent_time_s": num(self.descent_time_s[i]),
            "drift_m": num(self.drift_m[i]),
            "apogee_east_m": num(self.apogee_east_m[i]),
            "apogee_north_m": num(self.apogee_north_m[i]),
            "deployments": self.deployments(i),
            "landing": self.landing(i),
        }

    def deployments(self, i: int) -> list[dict[str, object]]:
        """Flight ``i``'s devices that opened, in order: ``{device, trigger, time_s, altitude_m, speed_m_s,
        opening_load_n, descent_rate_m_s}`` (SI; the speed through the air, relative to the wind, not over the
        ground; the load an upper-bound estimate)."""
        devices = self.recovery_devices[i] if i < len(self.recovery_devices) else ()
        out = []
        for k, device in enumerate(devices):
            if k >= self.deployment_time_s.shape[1] or not np.isfinite(self.deployment_time_s[i, k]):
                continue
            out.append({"device": getattr(device, "device", "device"), "trigger": getattr(device, "deploy", None),
                        "time_s": float(self.deployment_time_s[i, k]),
                        "altitude_m": float(self.deployment_altitude_m[i, k]),
                        "speed_m_s": float(self.deployment_speed_m_s[i, k]),
                        "opening_load_n": float(self.opening_load_n[i, k]),
                        "descent_rate_m_s": _finite(self.deployment_descent_rate_m_s[i, k])})
        return out

    def landing(self, i: int) -> dict[str, object] | None:
        """Flight ``i``'s landing: ``{time_s, speed_m_s, east_m, north_m, distance_m, bearing_deg}`` (None if
        not flown); the bearing from the pad is clockwise from north, in [0, 360)."""
        if not np.isfinite(self.landing_time_s[i]):
            return None
        east, north = float(self.landing_east_m[i]), float(self.landing_north_m[i])
        return {"time_s": float(self.landing_time_s[i]), "speed_m_s": float(self.landing_speed_m_s[i]),
                "east_m": east, "north_m": north, "distance_m": math.hypot(east, north),
                "bearing_deg": math.degrees(math.atan2(east, north)) % 360.0}


def _frozen_mapping(arrays: Mapping[str, np.ndarray]) -> Mapping[str, np.ndarray]:
    """A read-only view of read-only copies of ``arrays``."""
    return MappingProxyType({name: read_only_copy(values) for name, values in arrays.items()})


def _finite(value: float) -> float | None:
    return float(value) if np.isfinite(value) else None


_RESULT_FIELDS = ("liftoff_time_s", "rail_exit_time_s", "rail_exit_speed_m_s", "burnout_time_s", "apogee_m",
                  "apogee_time_s", "apogee_downrange_m", "max_speed_m_s", "max_mach", "max_acceleration_m_s2",
                  "max_dynamic_pressure_pa", "liftoff_mass_kg", "liftoff_thrust_to_weight",
                  "average_thrust_to_weight", "deploy_time_s", "deploy_altitude_m", "deploy_delay_s",
                  "landing_time_s", "landing_speed_m_s", "landing_descent_rate_m_s", "descent_time_s",
                  "drift_m", "optimal_delay_s", "apogee_east_m", "apogee_north_m", "landing_east_m",
                  "landing_north_m")
_DEPLOYMENT_FIELDS = ("deployment_time_s", "deployment_altitude_m", "deployment_speed_m_s", "opening_load_n",
                      "deployment_descent_rate_m_s")


def _empty_results(n: int, k: int, delays: np.ndarray, n_devices: int = 1) -> dict[str, np.ndarray]:
    """The :class:`FlightResults` arrays of ``n`` flights with ``k`` delay columns, NaN until flown."""
    out = {name: np.full(n, np.nan) for name in _RESULT_FIELDS}
    out["status"] = np.zeros(n, dtype=np.int64)
    out["ejection_delay_s"] = delays.copy()
    for name in ("ejection_altitude_m", "ejection_speed_m_s", "ejection_vertical_speed_m_s"):
        out[name] = np.full((n, k), np.nan)
    for name in _DEPLOYMENT_FIELDS:
        out[name] = np.full((n, max(n_devices, 1)), np.nan)
    return out


def _store_history(history: list, idx: np.ndarray, traj: list, descent: bool) -> None:
    """Append one pass's sampled states, (ref, t, x, y, z, vx, vy, vz, ax, ay, az) per step, to each flight's
    trajectory (x downwind, y to its left).

    A pass starts where the flight branched from the pass before it (a device opened): the earlier
    rows from that instant on were never flown and are cut, so the trajectory stays one flight.
    """
    names = ("time_s", "x_m", "y_m", "altitude_m", "vx_m_s", "vy_m_s", "vz_m_s", "ax_m_s2", "ay_m_s2", "az_m_s2")
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
            # the ascent pass runs on past apogee to the last ejection delay, the descent pass starts at
            # apogee (or deployment): keep the earlier pass only up to where the later one starts
            before = traj[k]["time_s"] < block["time_s"][0]
            traj[k] = {name: np.concatenate((traj[k][name][before], block[name])) for name in block}


def _finish_trajectory(block: dict[str, np.ndarray] | None, t_end_s: float, landing: dict[str, float] | None,
                       axis: tuple[float, float]) -> dict[str, np.ndarray] | None:
    """Cut a trajectory at ``t_end_s`` (rows after it were not flown), end it on the ground at the landing
    state ``{t, x, y, vx, vy, vz}`` when there is one (the last step ends below the pad), and add the
    ``east_m`` and ``north_m`` columns from the flight's downwind axis ``axis`` = (east, north)."""
    if block is None:
        return None
    kept = (block["time_s"] <= t_end_s) & (block["altitude_m"] >= 0.0)
    out = {name: values[kept] for name, values in block.items()}
    if landing is not None and out["time_s"].size:
        row = {"time_s": landing["t"], "x_m": landing["x"], "y_m": landing["y"], "altitude_m": 0.0,
               "vx_m_s": landing["vx"], "vy_m_s": landing["vy"], "vz_m_s": landing["vz"]}
        out = {name: np.append(values, row.get(name, values[-1])) for name, values in out.items()}
    e1e, e1n = axis
    out["east_m"] = out["x_m"] * e1e - out["y_m"] * e1n
    out["north_m"] = out["x_m"] * e1n + out["y_m"] * e1e
    return out


_RATE_OF = {"x_m": "vx_m_s", "y_m": "vy_m_s", "altitude_m": "vz_m_s",
            "vx_m_s": "ax_m_s2", "vy_m_s": "ay_m_s2", "vz_m_s": "az_m_s2"}
_ACCELERATIONS = ("ax_m_s2", "ay_m_s2", "az_m_s2")


def dense_trajectory(trajectory: Mapping[str, np.ndarray], max_gap_s: float = 0.1) -> dict[str, np.ndarray]:
    """A flown trajectory (``FlightResults.trajectories[i]``) with rows added wherever two of its steps lie more
    than ``max_gap_s`` [s] apart, for drawing: the integrator's steps reach a second and more in a coast, and
    straight lines between them cut the arc (by g·h²/8, 1.2 m for h = 1 s; 0.1 s is about a pixel of a chart).

    Positions are interpolated by cubic Hermite from the speeds at both ends, and speeds from the accelerations
    (the interpolant that locates the flight's events; exact for a drag-free arc; in the step where a device
    opened, whose last row carries the device's drag, speeds take the step's first acceleration at both ends);
    east and north follow x and
    y through the flight's fixed axis; the ``descent`` flag and the accelerations are held from the step's start.
    The flown rows stay as they were. Assumes rows in time order (steps of no length are left alone).
    """
    t = np.asarray(trajectory["time_s"], dtype=float)
    gaps = np.diff(t)
    pieces = np.where(gaps > max_gap_s, np.ceil(gaps / max_gap_s).astype(np.int64), 1)
    if t.size < 2 or not np.any(pieces > 1):
        return {name: np.array(values) for name, values in trajectory.items()}
    # each new row: the step it lies in (its left row) and its fraction of that step; the flown rows keep fraction 0
    left = np.repeat(np.arange(t.size - 1), pieces)
    tau = np.concatenate([np.arange(k) / k for k in pieces])
    left = np.append(left, t.size - 1)
    tau = np.append(tau, 0.0)
    right = np.minimum(left + 1, t.size - 1)
    h = t[right] - t[left]
    h00, h10 = (1.0 + 2.0 * tau) * (1.0 - tau) ** 2, tau * (1.0 - tau) ** 2
    h01, h11 = tau * tau * (3.0 - 2.0 * tau), tau * tau * (tau - 1.0)
    out: dict[str, np.ndarray] = {"time_s": t[left] + tau * h}
    flag = np.asarray(trajectory["descent"]) if "descent" in trajectory else np.zeros(t.size, dtype=bool)
    branch = flag[left] != flag[right]  # the step in which a device opened: speeds bend there
    for name, values in trajectory.items():
        if name == "time_s" or name in ("east_m", "north_m"):
            continue
        v = np.asarray(values)
        rate = _RATE_OF.get(name)
        if rate is None or rate not in trajectory:
            out[name] = v[left]
            continue
        m = np.asarray(trajectory[rate], dtype=float)
        m_right = m[right]
        if rate in _ACCELERATIONS and branch.any():  # across an opening the end's acceleration is the device's
            m_right = np.where(branch, m[left], m_right)
        out[name] = h00 * v[left] + h01 * v[right] + h * (h10 * m[left] + h11 * m_right)
    if "east_m" in trajectory and "x_m" in trajectory and "y_m" in trajectory:
        # east and north are fixed combinations of x and y (the flight's downwind axis): recover it from the rows
        xy = np.column_stack((trajectory["x_m"], trajectory["y_m"]))
        axis = np.linalg.lstsq(xy, np.column_stack((trajectory["east_m"], trajectory["north_m"])), rcond=None)[0]
        out["east_m"], out["north_m"] = (np.column_stack((out["x_m"], out["y_m"])) @ axis).T
    return out
