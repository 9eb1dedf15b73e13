"""One delay rule: what a motor offers (listed, or drilled in steps), and the delay nearest a target."""

from __future__ import annotations

import numpy as np
import pytest

from motorlib.flight.delays import delay_problem, nearest_delay_column, offered_delays_s, offers_delay
from motorlib.flight.pack import MotorPack
from motorlib.motor.record import MotorRecord


def _motor(delays_s: tuple[float, ...], adjustable: bool) -> MotorRecord:
    return MotorRecord("G", [0.0, 0.05, 1.5, 1.6], [0.0, 80.0, 60.0, 0.0], total_mass_kg=0.12,
                       propellant_mass_kg=0.06, delays_s=delays_s, delay_adjustable=adjustable)


@pytest.mark.parametrize(("listed", "adjustable", "step", "expected"), [
    ((8.0,), True, 1.0, [1, 2, 3, 4, 5, 6, 7, 8]),
    ((4.0, 6.0), True, 1.0, [1, 2, 3, 4, 5, 6]),
    ((5.0,), True, 2.0, [2, 4, 5]),             # whole steps below the longest, and the longest
    ((6.0, 4.0), False, 1.0, [4, 6]),           # not adjustable: the listed ones, sorted
    ((), True, 1.0, []),                        # nothing listed: nothing to drill from
])
def test_offered_delays(listed, adjustable, step, expected) -> None:
    assert offered_delays_s(listed, adjustable, step) == expected


@pytest.mark.parametrize("delay_s", [0.0, 0.5, 1.0, 3.0, 3.5, 7.0, 7.9, 8.0, 8.5, 9.0, 20.0])
@pytest.mark.parametrize(("listed", "adjustable"), [((8.0,), True), ((4.0, 8.0), False), ((3.0, 5.0, 8.0), True)])
def test_a_delay_is_accepted_exactly_when_the_pack_reports_it(delay_s, listed, adjustable) -> None:
    # fly's --delay check and the pack's reported ejection delays are one rule: a delay fly accepts is one the
    # flight reports an ejection state for, and one it refuses is not
    pack = MotorPack.from_records(_motor(listed, adjustable))
    in_pack = bool(np.any(np.abs(pack.delays_s[0] - delay_s) < 1e-9))
    assert (delay_problem(delay_s, listed, adjustable) is None) == in_pack == offers_delay(delay_s, listed, adjustable)


def test_delay_problems_say_what_is_on_offer() -> None:
    assert delay_problem(6.0, (4.0, 8.0), False) == "offers 4, 8 s"
    assert "shortened below 8 s" in delay_problem(9.0, (8.0,), True)
    assert "1 s steps" in delay_problem(3.5, (8.0,), True)
    assert delay_problem(3.0, (), False) is None  # delays unknown: nothing to check against


def test_nearest_delay_column() -> None:
    delays = np.array([[2.0, 6.0, 10.0], [4.0, 6.0, np.nan], [np.nan, np.nan, np.nan], [4.0, 8.0, np.nan]])
    col, found = nearest_delay_column(delays, np.array([7.9, 9.0, 5.0, 6.0]))
    assert col.tolist()[:2] == [1, 1] and found.tolist() == [True, True, False, True]
    assert col[3] == 0  # a tie goes to the shorter delay
    col, found = nearest_delay_column(delays[:1], np.array([np.nan]))
    assert not found[0]
