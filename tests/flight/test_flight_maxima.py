"""The flown maxima (speed, dynamic pressure, Mach) against the independent solve_ivp oracle.

A maximum inside a step (thrust falling below drag and weight in the middle of a long curve segment, say) must be
found, not read off the step ends: the oracle (tests/reference_flight.py, DOP853 at rtol 1e-10) searches its dense
output for each maximum.
"""

from __future__ import annotations

import math

import pytest

from motorlib import MotorRecord
from motorlib.flight import OK, simulate
from motorlib.flight.airframe import Airframe, Launch

from ..reference_flight import reference_flight
from ..synthetic import synthetic_flights

_KEYS = ("max_speed_m_s", "max_dynamic_pressure_pa", "max_mach")


def _long_tail(wind_m_s: float) -> tuple[Airframe, MotorRecord]:
    # an invented motor whose thrust falls linearly from 80 N to 0 over 2.5 s: the speed peaks where thrust falls
    # below drag and weight, a second or so inside that one segment
    motor = MotorRecord("G32", [0.0, 0.05, 0.5, 3.0], [0.0, 80.0, 80.0, 0.0], total_mass_kg=0.12,
                        propellant_mass_kg=0.06)
    frame = Airframe("tail", 0.45, 0.041, 0.5, launch=Launch(rail_length_m=1.5, wind_speed_m_s=wind_m_s))
    return frame, motor


@pytest.mark.parametrize("wind_m_s", [0.0, 6.0])
def test_a_peak_inside_a_long_curve_segment_is_found(wind_m_s: float) -> None:
    frame, motor = _long_tail(wind_m_s)
    got = simulate(frame, motor, descent=False)
    ref = reference_flight(frame, motor, maxima=True)
    assert got.status[0] == OK
    burn_end = 3.0
    assert got.max_speed_m_s[0] < 300.0 and ref["apogee_time_s"] > burn_end  # subsonic, the peak in the burn
    for key in _KEYS:
        # the oracle's own search of its dense output. 1e-5: at its default tolerance the batched flight errs about
        # 1e-6 in apogee and 2e-6 to 5e-6 in these peaks, both shrinking with the tolerance (to 5e-8 at 1e-8); read
        # off the step ends, the peaks were 5e-5 low in calm air and 6e-3 in a 6 m/s wind
        assert getattr(got, key)[0] == pytest.approx(ref[key], rel=1e-5), key


def test_synthetic_flights_maxima_agree_with_the_oracle() -> None:
    frames, motors = synthetic_flights(24, seed=31)
    got = simulate(frames, motors, descent=False)
    checked = 0
    for i, (frame, motor) in enumerate(zip(frames, motors)):
        ref = reference_flight(frame, motor, maxima=True)
        if got.status[i] != OK or not math.isfinite(ref["apogee_m"]):
            continue
        checked += 1
        for key in _KEYS:
            assert getattr(got, key)[i] == pytest.approx(ref[key], rel=1e-5), (i, key)
    assert checked >= 12
