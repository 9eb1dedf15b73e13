"""Motors as flat arrays: thrust curves, impulse and masses of n motors padded to one width.

The batched integrator reads only these arrays, so the flight loop never iterates
motors (see :mod:`motorlib.flight.integrate`). numpy only.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Final, Sequence

import numpy as np

from ..motor.record import MotorRecord, cumulative_impulse_ns, freeze_arrays
from .delays import DEFAULT_DRILL_STEP_S, offered_delays_s

__all__ = ["MotorPack"]

_TINY: Final = 1e-12  # floor on curve time spans [s]: guards a division by a zero-length segment


@dataclass(frozen=True, eq=False)
class MotorPack:
    """Thrust curves and masses of n motors packed into padded arrays.

    Arrays of shape (n, n_samples_max) are padded with the last time and zero
    thrust; ``delays_s`` has shape (n, n_delays_max), padded with NaN, and holds
    every delay an ejection state is reported for: the delays each motor offers
    (:func:`~motorlib.flight.delays.offered_delays_s`).
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

    def __post_init__(self) -> None:
        freeze_arrays(self)  # a record, not a workspace: its arrays are our own read-only copies

    @property
    def n_motors(self) -> int:
        return int(self.n_samples.size)

    @classmethod
    def from_records(cls, records: Sequence[MotorRecord] | MotorRecord,
                     drill_step_s: float = DEFAULT_DRILL_STEP_S) -> MotorPack:
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
                     drill_step_s: float = DEFAULT_DRILL_STEP_S) -> MotorPack:
        """Pack (time [s], thrust [N]) arrays of valid curves with their masses [kg] and delays [s]."""
        if len(samples) == 0:
            raise ValueError("`samples` must not be empty")
        return cls.from_flat(np.concatenate([np.asarray(t, dtype=float) for t, _ in samples]),
                             np.concatenate([np.asarray(f, dtype=float) for _, f in samples]),
                             np.array([np.size(t) for t, _ in samples], dtype=np.int64),
                             total_mass_kg=total_mass_kg, propellant_mass_kg=propellant_mass_kg, delays_s=delays_s,
                             delay_adjustable=delay_adjustable, drill_step_s=drill_step_s)

    @classmethod
    def from_flat(cls, time_s: np.ndarray, thrust_n: np.ndarray, counts: np.ndarray, *,
                  total_mass_kg: Sequence[float | None], propellant_mass_kg: Sequence[float | None],
                  delays_s: Sequence[Sequence[float]], delay_adjustable: Sequence[bool],
                  drill_step_s: float = DEFAULT_DRILL_STEP_S) -> MotorPack:
        """:meth:`from_samples` for the curves laid end to end: ``time_s`` and ``thrust_n`` [s, N] hold
        ``counts[0]`` samples of the first motor, then ``counts[1]`` of the second, ... (how the catalog's
        index hands them out, without one array per motor)."""
        counts = np.asarray(counts, dtype=np.int64)
        n = counts.size
        if n == 0:
            raise ValueError("`counts` must not be empty")
        if np.any(counts < 1) or time_s.shape != thrust_n.shape or time_s.size != int(counts.sum()):
            raise ValueError("`counts` must be positive and add up to the samples given")
        width = int(counts.max())
        delay_lists = _offered_per_motor(delays_s, delay_adjustable, drill_step_s)
        n_delays = max(1, max(len(d) for d in delay_lists))
        # one scatter per array: row i holds its samples, then its last time repeated and zero thrust;
        # delays NaN past the motor's own
        inside = np.arange(width) < counts[:, None]
        time = np.empty((n, width))
        time[inside] = time_s
        time = np.where(inside, time, time[np.arange(n), counts - 1][:, None])
        thrust = np.zeros((n, width))
        thrust[inside] = thrust_n
        lengths = np.array([len(d) for d in delay_lists], dtype=np.int64)
        delays = np.full((n, n_delays), np.nan)
        delays[np.arange(n_delays) < lengths[:, None]] = [d for lst in delay_lists for d in lst]
        has_mass = np.array([m is not None and p is not None for m, p in zip(total_mass_kg, propellant_mass_kg)])
        total = np.array([m if ok else 1.0 for m, ok in zip(total_mass_kg, has_mass)], dtype=float)
        propellant = np.array([p if ok else 0.0 for p, ok in zip(propellant_mass_kg, has_mass)], dtype=float)
        cumulative = cumulative_impulse_ns(time, thrust)
        last_burning = width - 1 - np.argmax((thrust > 0.0)[:, ::-1], axis=1)
        burnout = time[np.arange(n), np.minimum(last_burning + 1, counts - 1)]
        return cls(time, thrust, cumulative, counts, cumulative[:, -1].copy(), total, propellant, burnout, delays,
                   has_mass)



def _offered_per_motor(delays_s: Sequence[Sequence[float]], delay_adjustable: Sequence[bool],
                       drill_step_s: float) -> list[list[float]]:
    """:func:`~.delays.offered_delays_s` of every motor, worked out once per distinct (delays, adjustable): a
    catalog of thousands of motors lists a few dozen delay sets, and the offer is a function of the delays'
    values. Delays are compared as numbers, so 5 and 5.0 share an offer (which reads both as 5.0); 0.0 and
    -0.0 compare equal but would be offered as given, so a list holding a zero is never shared."""
    seen: dict[tuple[tuple[float, ...], bool], list[float]] = {}
    out = []
    for listed, adjustable in zip(delays_s, delay_adjustable):
        key = (tuple(listed), bool(adjustable))
        offered = seen.get(key)
        if offered is None:
            offered = offered_delays_s(listed, adjustable, drill_step_s)
            if 0.0 not in key[0]:
                seen[key] = offered
        out.append(offered)
    return out
