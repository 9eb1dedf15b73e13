"""What a batch of flights returns: status codes, their messages and the :class:`FlightResults` record.

Expected outcomes are data, not exceptions: a rocket that never lifts off gets the
status ``NO_LIFTOFF`` and a ``MESSAGES`` text, as SciPy's solvers report ``status``.
The private helpers lay out the result arrays the integrator fills.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Final, Sequence

import numpy as np

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


_RESULT_FIELDS = ("liftoff_time_s", "rail_exit_time_s", "rail_exit_speed_m_s", "burnout_time_s", "apogee_m",
                  "apogee_time_s", "apogee_downrange_m", "max_speed_m_s", "max_mach", "max_acceleration_m_s2",
                  "max_dynamic_pressure_pa", "liftoff_mass_kg", "liftoff_thrust_to_weight",
                  "average_thrust_to_weight", "deploy_time_s", "deploy_altitude_m", "deploy_delay_s",
                  "landing_time_s", "landing_speed_m_s", "landing_descent_rate_m_s", "descent_time_s",
                  "drift_m")


def _empty_results(n: int, k: int, delays: np.ndarray) -> dict[str, np.ndarray]:
    """The :class:`FlightResults` arrays of ``n`` flights with ``k`` delay columns, NaN until flown."""
    out = {name: np.full(n, np.nan) for name in _RESULT_FIELDS}
    out["status"] = np.zeros(n, dtype=np.int64)
    out["ejection_delay_s"] = delays.copy()
    for name in ("ejection_altitude_m", "ejection_speed_m_s", "ejection_vertical_speed_m_s"):
        out[name] = np.full((n, k), np.nan)
    return out


def _store_history(history: list, idx: np.ndarray, traj: list, descent: bool) -> None:
    """Append one pass's sampled states, (ref, t, x, z, vx, vz, ax, az) per step, to each flight's trajectory."""
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
            # the ascent pass runs on past apogee to the last ejection delay, the descent pass starts at
            # apogee (or deployment): keep the earlier pass only up to where the later one starts
            before = traj[k]["time_s"] < block["time_s"][0]
            traj[k] = {name: np.concatenate((traj[k][name][before], block[name])) for name in block}

