"""Ejection delays: which ones a motor offers, and which one a flight uses (one rule for every command).

Offer: a motor offers its listed delays. An adjustable motor (``delay_adjustable``: its listed delays are
the longest) may also be drilled down in steps of ``drill_step_s``, so it offers every whole multiple of the
step below its longest listed delay as well (1 s steps by default, the usual drilling increment: common
practice, no published source). A motor whose delays are not listed offers none: plugged, or not known.

Choice: each flight uses the offered delay nearest a target (the optimal delay, apogee time minus burnout,
unless a delay is wanted); on a tie the shorter delay, which comes first in the sorted delays.

numpy only.
"""

from __future__ import annotations

from functools import lru_cache
from typing import Final, Sequence

import numpy as np

__all__ = ["DEFAULT_DRILL_STEP_S", "delay_problem", "nearest_delay_column", "no_optimal_delay", "offered_delays_s",
           "offers_delay"]

DEFAULT_DRILL_STEP_S: Final = 1.0  # drilling increment [s]; common practice, no published source
_SAME_S: Final = 1e-9  # two delays closer than this [s] are one (drilled values are rounded to 1e-9 s)


def no_optimal_delay(optimal_s: object) -> str | None:
    """What to say of an optimal delay [s] below 0, which no motor has: apogee comes before burnout, and the
    delay counts from burnout; None for a delay that exists (or none known). The flight card and the rule
    book's messages say it alike.

    >>> no_optimal_delay(-0.14), no_optimal_delay(3.0)
    ('none: apogee 0.1 s before burnout', None)
    """
    if optimal_s is not None and float(optimal_s) < 0.0:  # type: ignore[arg-type]
        return f"none: apogee {abs(float(optimal_s)):.1f} s before burnout"  # type: ignore[arg-type]
    return None


def offered_delays_s(listed_delays_s: Sequence[float], adjustable: bool,
                     drill_step_s: float = DEFAULT_DRILL_STEP_S) -> list[float]:
    """Every delay [s] a motor offers, sorted: the listed ones and, adjustable, the drillable ones below them.

    >>> offered_delays_s([5.0], True, 1.0)
    [1.0, 2.0, 3.0, 4.0, 5.0]
    >>> offered_delays_s([4.0, 6.0], False)
    [4.0, 6.0]
    """
    if not drill_step_s > 0.0:
        raise ValueError(f"`drill_step_s` must be > 0, got {drill_step_s!r}")
    return list(_offered(tuple(float(d) for d in listed_delays_s), bool(adjustable), float(drill_step_s)))


@lru_cache(maxsize=4096)
def _offered(listed_delays_s: tuple[float, ...], adjustable: bool, drill_step_s: float) -> tuple[float, ...]:
    """:func:`offered_delays_s` for hashable arguments, remembered: a catalog repeats a few delay lists
    thousands of times."""
    listed = sorted(listed_delays_s)
    if not adjustable or not listed:
        return tuple(listed)
    drilled = np.arange(drill_step_s, listed[-1], drill_step_s)
    return tuple(sorted(set(listed) | {round(float(d), 9) for d in drilled if listed[-1] - d > _SAME_S}))


def offers_delay(delay_s: float, listed_delays_s: Sequence[float], adjustable: bool,
                 drill_step_s: float = DEFAULT_DRILL_STEP_S) -> bool:
    """Whether a motor offers ``delay_s`` [s] (see the module docstring).

    >>> offers_delay(3.0, [8.0], True), offers_delay(3.5, [8.0], True), offers_delay(9.0, [8.0], True)
    (True, False, False)
    """
    return any(abs(d - delay_s) < _SAME_S for d in offered_delays_s(listed_delays_s, adjustable, drill_step_s))


def delay_problem(delay_s: float, listed_delays_s: Sequence[float], adjustable: bool,
                  drill_step_s: float = DEFAULT_DRILL_STEP_S, *, plugged: bool = False) -> str | None:
    """Why ``delay_s`` [s] cannot be fitted to a motor, in words that follow its name; None when it can.

    A plugged motor (``plugged``: no ejection charge) has no delay to choose. A motor whose delays are
    unknown has nothing to check against: None.

    >>> delay_problem(6.0, [], False, plugged=True)
    'has no ejection charge (plugged): there is no delay to choose'

    >>> delay_problem(5.0, [4.0, 8.0], False)
    'offers 4, 8 s'
    >>> delay_problem(20.0, [8.0], True)
    'has an adjustable delay: it can only be shortened below 8 s'
    """
    if plugged:
        return "has no ejection charge (plugged): there is no delay to choose"
    listed = sorted(float(d) for d in listed_delays_s)
    if not listed or offers_delay(delay_s, listed, adjustable, drill_step_s):
        return None
    if not adjustable:
        return f"offers {', '.join(f'{d:g}' for d in listed)} s"
    if delay_s > listed[-1]:
        return f"has an adjustable delay: it can only be shortened below {listed[-1]:g} s"
    return (f"has an adjustable delay: it is drilled in {drill_step_s:g} s steps, to "
            f"{', '.join(f'{d:g}' for d in offered_delays_s(listed, True, drill_step_s))} s")


def nearest_delay_column(delays_s: np.ndarray, target_s: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """For every motor, the column of the delay nearest its target (vectorised over motors).

    Parameters
    ----------
    delays_s : ndarray, shape (n_motors, n_delays)
        Offered delays [s], sorted in each row and padded with NaN (as :class:`~.pack.MotorPack` holds them).
    target_s : ndarray, shape (n_motors,)
        The delay [s] wanted for each motor (NaN: none).

    Returns
    -------
    column : ndarray of int, shape (n_motors,)
        The nearest delay's column; the first (the shorter delay) on a tie; 0 where nothing is found.
    found : ndarray of bool, shape (n_motors,)
        False where the motor has no delay or the target is NaN.

    >>> col, found = nearest_delay_column(np.array([[4.0, 6.0, 8.0], [5.0, np.nan, np.nan]]), np.array([7.0, 1.0]))
    >>> col.tolist(), found.tolist()
    ([1, 0], [True, True])
    """
    distance = np.abs(np.asarray(delays_s, dtype=float) - np.asarray(target_s, dtype=float)[:, None])
    distance = np.where(np.isnan(distance), np.inf, distance)
    column = np.argmin(distance, axis=1)
    return column, np.isfinite(distance[np.arange(distance.shape[0]), column])
