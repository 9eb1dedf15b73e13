"""Figures and reasons of the matcher against closed forms: chosen delay, landing speed, rules at their limits."""

from __future__ import annotations

import math

import pytest

from motorlib import MotorRecord
from motorlib.flight import FlightSettings, simulate
from motorlib.flight.airframe import Airframe, Launch, Recovery
from motorlib.flight.rules import LaunchRules
from motorlib.matching import MatchSettings, rank

G0 = 9.80665  # m/s², standard gravity, exact by definition (3rd CGPM, 1901)
RHO_SEA_LEVEL = 1.225  # kg/m³, U.S. Standard Atmosphere 1976 sea-level density (1.2250 in its table)
FLAT = FlightSettings(vary_gravity=False)  # the closed forms below take g constant


def _motor(delays: tuple[float, ...] = (3.0, 5.0, 7.0, 12.0)) -> MotorRecord:
    # constant thrust, (nearly) constant mass: the propellant is 1 µg
    return MotorRecord("F30-7", [0.0, 1.2], [30.0, 30.0], total_mass_kg=0.1, propellant_mass_kg=1e-9, delays_s=delays,
                       diameter_m=0.024, length_m=0.1)


def _frame(recovery: Recovery | None = None, diameter_m: float = 1e-6) -> Airframe:
    return Airframe("test", 0.4, diameter_m, 0.5, launch=Launch(rail_length_m=1.0), recovery=recovery,
                    mount_diameter_m=0.024, mount_length_m=0.2)


def test_the_chosen_delay_is_the_listed_one_closest_to_the_closed_form_optimum() -> None:
    # Vacuum closed form (textbook): optimal delay v_b / g = (T/m - g) t_b / g = 6.14 s; of 3, 5, 7, 12 s the
    # closest is 7 s (by hand).
    candidate = rank(_frame(), _motor(), MatchSettings(), flight_settings=FLAT).candidates[0]
    assert candidate["optimal_delay_s"] == pytest.approx((30.0 / 0.5 - G0) * 1.2 / G0, rel=1e-7)
    assert candidate["chosen_delay_s"] == 7.0
    assert "delay" not in candidate["reason_codes"]
    far = rank(_frame(), _motor((2.0, 12.0)), MatchSettings(), flight_settings=FLAT).candidates[0]
    assert far["chosen_delay_s"] == 2.0 and "delay" in far["reason_codes"]  # 4.1 s early, 5.9 s late


def test_landing_speed_is_the_terminal_descent_rate_at_sea_level() -> None:
    # Terminal speed of a quadratic-drag fall (textbook): v = sqrt(2 m g / (rho CdA)), CdA = device + body
    # (body Cd 0.5 on its frontal area), m = the burnt-out rocket.
    chute = Recovery(device="parachute", deploy="ejection", drag_area_m2=0.25)
    frame = _frame(chute, diameter_m=0.04)
    candidate = rank(frame, _motor(), MatchSettings(), flight_settings=FLAT).candidates[0]
    mass = 0.4 + 0.1 - 1e-9
    drag_area = 0.25 + 0.5 * math.pi * 0.04**2 / 4
    expected = math.sqrt(2 * mass * G0 / (RHO_SEA_LEVEL * drag_area))
    assert candidate["landing_speed_m_s"] == pytest.approx(expected, rel=1e-5)
    slow = LaunchRules(max_landing_speed_m_s=expected * 0.99)
    assert "descent" in rank(frame, _motor(), MatchSettings(rules=slow), flight_settings=FLAT).candidates[0]["reason_codes"]


def test_a_motor_exactly_at_each_limit_passes() -> None:
    frame = _frame()
    flight = simulate(frame, [_motor()], FLAT, descent=False)
    exit_speed = float(flight.rail_exit_speed_m_s[0])
    ttw = float(flight.liftoff_thrust_to_weight[0])
    assert exit_speed == pytest.approx(math.sqrt(2 * 1.0 * (30.0 / 0.5 - G0)), rel=1e-8)  # v² = 2 L a, textbook
    at_limit = LaunchRules(min_rail_exit_speed_m_s=exit_speed, min_liftoff_thrust_to_weight=ttw)
    assert rank(frame, _motor(), MatchSettings(rules=at_limit), flight_settings=FLAT).candidates[0]["passes"]
    past = LaunchRules(min_rail_exit_speed_m_s=exit_speed * (1 + 1e-9))
    assert rank(frame, _motor(), MatchSettings(rules=past), flight_settings=FLAT).candidates[0]["reason_codes"] == ["rail"]
    past_ttw = LaunchRules(min_rail_exit_speed_m_s=exit_speed, min_liftoff_thrust_to_weight=ttw * (1 + 1e-9))
    assert rank(frame, _motor(), MatchSettings(rules=past_ttw), flight_settings=FLAT).candidates[0]["reason_codes"] == ["T/W"]
