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
    return MotorRecord("E30-7", [0.0, 1.2], [30.0, 30.0], total_mass_kg=0.1, propellant_mass_kg=1e-9, delays_s=delays,
                       diameter_m=0.024, length_m=0.1)


def _frame(recovery: Recovery | None = None, diameter_m: float = 1e-6) -> Airframe:
    return Airframe("test", 0.4, diameter_m, 0.5, launch=Launch(rail_length_m=1.0), recovery=recovery,
                    mount_diameter_m=0.024, mount_length_m=0.2)


def test_the_chosen_delay_is_the_listed_one_closest_to_the_closed_form_optimum() -> None:
    # Vacuum closed form (textbook): optimal delay v_b / g = (T/m - g) t_b / g = 6.14 s; of 3, 5, 7, 12 s the
    # closest is 7 s (by hand).
    candidate = rank(_frame(), _motor(), MatchSettings(), flight_settings=FLAT).candidates[0]
    assert candidate.optimal_delay_s == pytest.approx((30.0 / 0.5 - G0) * 1.2 / G0, rel=1e-7)
    assert candidate.chosen_delay_s == 7.0
    assert "ejection-far-from-apogee" not in candidate.reason_codes
    far = rank(_frame(), _motor((2.0, 12.0)), MatchSettings(), flight_settings=FLAT).candidates[0]
    assert far.chosen_delay_s == 2.0 and "ejection-far-from-apogee" in far.reason_codes  # 4.1 s early, 5.9 s late


def test_landing_speed_is_the_terminal_descent_rate_at_sea_level() -> None:
    # Terminal speed of a quadratic-drag fall (textbook): v = sqrt(2 m g / (rho CdA)), CdA = device + body
    # (body Cd 0.5 on its frontal area), m = the burnt-out rocket.
    chute = Recovery(device="parachute", deploy="ejection", drag_area_m2=0.25)
    frame = _frame(chute, diameter_m=0.04)
    candidate = rank(frame, _motor(), MatchSettings(), flight_settings=FLAT).candidates[0]
    mass = 0.4 + 0.1 - 1e-9
    drag_area = 0.25 + 0.5 * math.pi * 0.04**2 / 4
    expected = math.sqrt(2 * mass * G0 / (RHO_SEA_LEVEL * drag_area))
    assert candidate.landing_speed_m_s == pytest.approx(expected, rel=1e-5)
    slow = LaunchRules(max_landing_speed_m_s=expected * 0.99)
    assert "descent-fast" in rank(frame, _motor(), MatchSettings(rules=slow), flight_settings=FLAT).candidates[0].reason_codes


def test_a_motor_exactly_at_each_limit_passes() -> None:
    # a parachute (every rocket needs a recovery device: no-recovery); it opens after apogee, the ascent is the same
    frame = _frame(Recovery(device="parachute", deploy="ejection", drag_area_m2=1.0))
    flight = simulate(frame, [_motor()], FLAT, descent=False)
    exit_speed = float(flight.rail_exit_speed_m_s[0])
    ttw = float(flight.liftoff_thrust_to_weight[0])
    assert exit_speed == pytest.approx(math.sqrt(2 * 1.0 * (30.0 / 0.5 - G0)), rel=1e-8)  # v² = 2 L a, textbook
    at_limit = LaunchRules(min_rail_exit_speed_m_s=exit_speed, min_liftoff_thrust_to_weight=ttw)
    assert rank(frame, _motor(), MatchSettings(rules=at_limit), flight_settings=FLAT).candidates[0].passes
    past = LaunchRules(min_rail_exit_speed_m_s=exit_speed * (1 + 1e-9))
    assert rank(frame, _motor(), MatchSettings(rules=past), flight_settings=FLAT).candidates[0].reason_codes == ("rail-exit-slow",)
    past_ttw = LaunchRules(min_rail_exit_speed_m_s=exit_speed, min_liftoff_thrust_to_weight=ttw * (1 + 1e-9))
    assert rank(frame, _motor(), MatchSettings(rules=past_ttw), flight_settings=FLAT).candidates[0].reason_codes == ("thrust-to-weight-low",)


def test_ballast_for_a_target_in_vacuum_matches_the_closed_form() -> None:
    # Vacuum, constant thrust T for t_b, constant mass m (textbook): apogee H = a t_b²/2 (1 + a/g), a = T/m - g.
    # Solved for the target: a = g (sqrt(1 + 8 H / (g t_b²)) - 1) / 2, m = T / (a + g). For 60 m that is a
    # ballast of about 77 % of the 0.5 kg liftoff mass, past the solver's first bracket.
    frame = Airframe("test", 0.4, 1e-6, 0.5, launch=Launch(rail_length_m=3.0), mount_diameter_m=0.024,
                     mount_length_m=0.2)
    target = 60.0
    candidate = rank(frame, _motor(), MatchSettings(target_m=target, ballast=True), flight_settings=FLAT).candidates[0]
    a = G0 * (math.sqrt(1.0 + 8.0 * target / (G0 * 1.2**2)) - 1.0) / 2.0
    mass = 30.0 / (a + G0)
    assert candidate.ballast_kg == pytest.approx(mass - (0.4 + 0.1 - 1e-9), rel=1e-3)
    assert candidate.ballast_apogee_m == pytest.approx(target, rel=2e-4)
    assert candidate.ballast_optimal_delay_s == pytest.approx(a * 1.2 / G0, rel=1e-3)  # coast v_b / g
    assert candidate.ballast_liftoff_thrust_to_weight == pytest.approx(30.0 / (mass * G0), rel=1e-3)


@pytest.mark.parametrize(("motor_diameter_m", "smaller_allowed", "fits"), [
    (0.0244, False, True), (0.0246, False, False), (0.0236, False, True), (0.0234, False, False),
    (0.0234, True, True), (0.018, True, True),
])
def test_a_motor_fits_a_mount_within_half_a_millimetre(motor_diameter_m: float, smaller_allowed: bool,
                                                       fits: bool) -> None:
    motor = MotorRecord("E30-7", [0.0, 1.2], [30.0, 30.0], total_mass_kg=0.1, propellant_mass_kg=1e-9,
                        delays_s=(7.0,), diameter_m=motor_diameter_m, length_m=0.1)
    candidate = rank(_frame(), motor, MatchSettings(allow_smaller_motors=smaller_allowed),
                     flight_settings=FLAT).candidates[0]
    assert (not any(r.startswith("does not fit") for r in candidate.reasons)) == fits
