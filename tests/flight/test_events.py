"""Flight events read off a curve: liftoff thrust-to-weight and the chosen ejection delay, against closed forms."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st

from motorlib import MotorRecord
from motorlib.flight import FlightSettings, simulate
from motorlib.flight.airframe import Airframe, Launch

G0 = 9.80665  # m/s², standard gravity, exact by definition (3rd CGPM, 1901)
FLAT = FlightSettings(vary_gravity=False)


def _vacuum(dry_kg: float) -> Airframe:
    # a 1 µm diameter: drag about 1e-13 of the weight, i.e. vacuum
    return Airframe("vacuum", dry_kg, 1e-6, 0.5, launch=Launch(rail_length_m=1.0))


@pytest.mark.parametrize(("time_s", "thrust_n", "peak_in_window_n"), [
    # samples inside the first 0.1 s peak at 20 N; the curve climbs to 60 N at 0.3 s (40 N at 0.2 s)
    ([0.0, 0.05, 0.1, 0.3, 1.0], [0.0, 20.0, 20.0, 60.0, 0.0], 20.0),
    # no sample inside the window but the start: the curve's value at 0.1 s on its rising segment, 20 N
    ([0.0, 0.2, 1.0], [0.0, 40.0, 0.0], 20.0),
    # a curve that starts late: the window is the first 0.1 s of the curve, not of the clock
    ([0.5, 0.55, 0.6, 0.9, 1.5], [0.0, 30.0, 30.0, 90.0, 0.0], 30.0),
])
def test_liftoff_thrust_to_weight_is_the_peak_of_the_first_tenth_of_a_second(time_s, thrust_n,
                                                                               peak_in_window_n) -> None:
    # Definition in LaunchRules (common practice, no published source): the highest thrust in the first 0.1 s of
    # the curve over the liftoff weight m·g0, m = airframe + loaded motor. The peak is worked out by hand above.
    motor = MotorRecord("T", time_s, thrust_n, total_mass_kg=0.1, propellant_mass_kg=0.04)
    results = simulate(_vacuum(0.2), [motor], FLAT, descent=False)
    assert results.liftoff_thrust_to_weight[0] == pytest.approx(peak_in_window_n / (0.3 * G0), rel=1e-12)


def test_average_thrust_to_weight_is_impulse_over_burn_time_over_weight() -> None:
    # A trapezoid 0-0.1-0.9-1.0 s at 50 N: impulse 45 N·s (area by hand), burn 1.0 s.
    motor = MotorRecord("T", [0.0, 0.1, 0.9, 1.0], [0.0, 50.0, 50.0, 0.0], total_mass_kg=0.1, propellant_mass_kg=0.04)
    results = simulate(_vacuum(0.4), [motor], FLAT, descent=False)
    assert results.average_thrust_to_weight[0] == pytest.approx(45.0 / 1.0 / (0.5 * G0), rel=1e-12)


@pytest.mark.parametrize(("delays", "expected"), [((3.0, 5.0, 7.0, 12.0), 7.0), ((2.0, 6.0, 14.0), 6.0),
                                                  ((9.0,), 9.0)])
def test_the_chosen_delay_is_the_listed_one_closest_to_the_optimal_delay(delays, expected) -> None:
    # Textbook vacuum closed form with constant thrust and mass: v_b = (T/m - g) t_b, optimal delay v_b / g
    # = (30/0.5 - 9.80665) * 1.2 / 9.80665 = 6.14 s; the closest listed delay is picked by hand above.
    motor = MotorRecord("T", [0.0, 1.2], [30.0, 30.0], total_mass_kg=0.1, propellant_mass_kg=1e-9, delays_s=delays)
    results = simulate(_vacuum(0.4), [motor], FLAT, descent=False)
    optimal = (30.0 / 0.5 - G0) * 1.2 / G0
    assert results.optimal_delay_s[0] == pytest.approx(optimal, rel=1e-7)
    assert results.chosen_delay_s(0) == expected
    summary = results.summary(0)
    assert summary["chosen_delay_s"] == expected
    # the ejection state of the chosen delay: speed |v_b - g·d| after burnout (vacuum)
    v_b = optimal * G0
    assert summary["chosen_ejection_speed_m_s"] == pytest.approx(abs(v_b - G0 * expected), rel=1e-6, abs=1e-6)


def test_no_delay_no_choice() -> None:
    motor = MotorRecord("T", [0.0, 1.2], [30.0, 30.0], total_mass_kg=0.1, propellant_mass_kg=1e-9)
    results = simulate(_vacuum(0.4), [motor], FLAT, descent=False)
    assert math.isnan(results.chosen_delay_s(0)) and results.summary(0)["chosen_delay_s"] is None


def test_a_motor_pack_is_a_record_with_read_only_arrays() -> None:
    from motorlib.flight import MotorPack

    thrust = [30.0, 30.0]
    pack = MotorPack.from_records([MotorRecord("T", [0.0, 1.2], thrust, total_mass_kg=0.1, propellant_mass_kg=0.04)])
    for name in ("time_s", "thrust_n", "cumulative_ns", "total_impulse_ns", "delays_s"):
        with pytest.raises(ValueError, match="read-only"):
            getattr(pack, name).flat[0] = 1.0


@settings(max_examples=200, deadline=None)
@given(y0=st.floats(0.1, 100.0), y1=st.floats(-100.0, -0.1), d0=st.floats(-50.0, 50.0), d1=st.floats(-50.0, 50.0),
       h=st.floats(0.01, 2.0), flip=st.booleans())
def test_the_step_root_is_a_root_of_the_hermite_cubic(y0, y1, d0, d1, h, flip) -> None:
    # The cubic through (0, y0) and (1, y1) with slopes h·d0 and h·d1, in power form by hand (textbook
    # Hermite basis), evaluated by numpy.polyval: the returned fraction must be one of its roots in [0, 1].
    from motorlib.flight.events import _hermite_root

    if flip:
        y0, y1 = -y0, -y1
    coefficients = [2 * y0 + h * d0 - 2 * y1 + h * d1, -3 * y0 - 2 * h * d0 + 3 * y1 - h * d1, h * d0, y0]
    tau = float(_hermite_root(np.array([y0]), np.array([d0]), np.array([y1]), np.array([d1]), np.array([h]))[0])
    assert 0.0 <= tau <= 1.0
    scale = max(abs(y0), abs(y1), abs(h * d0), abs(h * d1))
    assert abs(np.polyval(coefficients, tau)) <= 1e-10 * scale


def test_results_are_frozen_and_the_summary_lists_the_listed_delays_and_the_chosen_one() -> None:
    import dataclasses

    # an adjustable 8 s motor drills to 1..8 s; optimal 6.14 s (vacuum closed form above): chosen 6 s, not listed
    motor = MotorRecord("T", [0.0, 1.2], [30.0, 30.0], total_mass_kg=0.1, propellant_mass_kg=1e-9, delays_s=(8.0,),
                        delay_adjustable=True)
    results = simulate(_vacuum(0.4), [motor], FLAT, descent=False)
    with pytest.raises(dataclasses.FrozenInstanceError):
        results.apogee_m = results.apogee_m  # type: ignore[misc]
    assert results.chosen_delay_s(0) == 6.0
    assert [e["delay_s"] for e in results.summary(0)["ejections"]] == [1.0, 2.0, 3.0, 4.0, 5.0, 6.0, 7.0, 8.0]
    assert [e["delay_s"] for e in results.summary(0, listed_delays_s=(8.0,))["ejections"]] == [6.0, 8.0]


def test_trajectories_mark_the_descent_and_keep_time_in_order() -> None:
    from motorlib.flight.airframe import Recovery

    chute = Recovery(device="parachute", deploy="apogee", drag_area_m2=0.5)
    frame = Airframe("chute", 0.4, 0.04, 0.5, launch=Launch(rail_length_m=1.0), recovery=chute)
    motor = MotorRecord("T", [0.0, 1.2], [30.0, 30.0], total_mass_kg=0.1, propellant_mass_kg=0.04, delays_s=(5.0,))
    trajectory = simulate(frame, [motor], trajectories=True).trajectories[0]
    n = trajectory["time_s"].size
    assert all(np.asarray(values).shape == (n,) for values in trajectory.values())
    # found by this test: the ascent rows past apogee (kept for the ejection delays) overlapped the descent,
    # so time ran backwards where the two passes were joined
    assert np.all(np.diff(trajectory["time_s"]) > 0)
    descent = np.asarray(trajectory["descent"])
    assert not descent[0] and descent[-1] and np.all(np.diff(descent.astype(int)) >= 0)  # ascent, then descent


def test_the_summary_says_whether_the_flight_succeeded() -> None:
    good = MotorRecord("T", [0.0, 1.2], [30.0, 30.0], total_mass_kg=0.1, propellant_mass_kg=1e-9)
    weak = MotorRecord("W", [0.0, 1.2], [1.0, 1.0], total_mass_kg=0.1, propellant_mass_kg=1e-9)  # 1 N < 4.9 N weight
    results = simulate(_vacuum(0.4), [good, weak], FLAT, descent=False)
    assert results.summary(0)["status"] == "ok" and results.summary(0)["apogee_m"] > 0
    assert results.summary(1)["status"] == "failed" and results.summary(1)["apogee_m"] is None
    assert "lift off" in results.summary(1)["message"]


@pytest.mark.parametrize("descent", [False, True])
def test_a_delay_that_fires_after_landing_has_no_ejection_state(descent: bool) -> None:
    # the 7 s delay fires at 7.5 s, 0.02 s after the rocket lands (7.48 s), inside the step that reaches the ground:
    # that state lies below ground (it was reported 0.56 m under the pad; independent check) and is no ejection at all
    motor = MotorRecord("LATE", [0.0, 0.05, 0.4, 0.5], [0.0, 12.0, 10.0, 0.0], total_mass_kg=0.02,
                        propellant_mass_kg=0.01, delays_s=(3.0, 7.0))
    got = simulate(Airframe("stub", 0.1, 0.03, 0.6, launch=Launch(rail_length_m=1.0)), motor, descent=descent)
    assert got.ejection_altitude_m[0, 0] > 60.0
    assert math.isnan(got.ejection_altitude_m[0, 1])
    assert math.isnan(got.ejection_speed_m_s[0, 1]) and math.isnan(got.ejection_vertical_speed_m_s[0, 1])
