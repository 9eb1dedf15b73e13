"""Launch rules of thumb: every warning fires past its limit and not at it, and the defaults carry their sources."""

from __future__ import annotations

import pytest

from motorlib.flight.rules import LaunchRules, flight_warnings

# A flight that breaks no rule; each test changes one figure.
GOOD = {"status": "ok", "message": "", "rail_exit_speed_m_s": 20.0, "apogee_m": 300.0,
        "liftoff_thrust_to_weight": 8.0, "optimal_delay_s": 5.2, "chosen_delay_s": 5.0,
        "chosen_ejection_speed_m_s": 4.0, "landing_descent_rate_m_s": 5.0, "has_recovery": True, "deploy_time_s": 8.0}


def _codes(rules: LaunchRules | None = None, wind_speed_m_s: float = 0.0, **changes: object) -> list[str]:
    return [code for code, _ in flight_warnings({**GOOD, **changes}, rules, wind_speed_m_s=wind_speed_m_s)]


def test_the_defaults_are_the_sourced_values() -> None:
    rules = LaunchRules()
    assert rules.min_rail_exit_speed_m_s == 15.0  # about 50 ft/s: common practice, no published source
    assert rules.rail_exit_wind_ratio == 4.0  # "Launching Safely in the 21st Century" (2005) 7.4.3, secondary source
    assert rules.min_liftoff_thrust_to_weight == 5.0  # common practice, no published source
    assert rules.max_delay_error_s == 2.0  # common practice, no published source
    assert rules.max_ejection_speed_m_s == 25.0  # common practice, no published source
    assert rules.max_landing_speed_m_s == 6.5  # about 21 ft/s: common practice, no published source


def test_a_good_flight_has_no_warning() -> None:
    assert _codes() == []


@pytest.mark.parametrize(("field", "at_limit", "past_limit", "code"), [
    ("rail_exit_speed_m_s", 15.0, 14.99, "rail-exit-slow"),
    ("liftoff_thrust_to_weight", 5.0, 4.99, "thrust-to-weight-low"),
    ("chosen_ejection_speed_m_s", 25.0, 25.01, "ejection-fast"),
    ("landing_descent_rate_m_s", 6.5, 6.51, "descent-fast"),
])
def test_each_rule_fires_past_its_default_limit_only(field: str, at_limit: float, past_limit: float, code: str) -> None:
    assert _codes(**{field: at_limit}) == []  # a rocket exactly at the limit passes
    assert _codes(**{field: past_limit}) == [code]


def test_the_delay_rule_fires_past_two_seconds_either_side() -> None:
    assert _codes(chosen_delay_s=7.2) == [] and _codes(chosen_delay_s=3.2) == []  # 2.0 s off: at the limit
    assert _codes(chosen_delay_s=7.3) == ["ejection-far-from-apogee"]
    late, early = (flight_warnings({**GOOD, "chosen_delay_s": d})[0][1] for d in (8.0, 2.0))
    assert "after apogee" in late and "before apogee" in early


def test_rail_exit_must_be_four_times_the_wind() -> None:
    # 20 m/s at rail exit: fine in 5 m/s of wind (4 x 5 = 20), too slow in 5.1 m/s
    assert _codes(wind_speed_m_s=5.0) == []
    assert _codes(wind_speed_m_s=5.1) == ["rail-exit-slow-for-wind"]
    assert "rail-exit-slow-for-wind" not in _codes(wind_speed_m_s=0.0)


def test_rules_are_settings() -> None:
    strict = LaunchRules(min_rail_exit_speed_m_s=25.0, rail_exit_wind_ratio=5.0, min_liftoff_thrust_to_weight=10.0,
                         max_delay_error_s=0.1, max_ejection_speed_m_s=3.0, max_landing_speed_m_s=4.0)
    assert _codes(strict, wind_speed_m_s=4.5) == ["rail-exit-slow", "rail-exit-slow-for-wind", "thrust-to-weight-low",
                                                 "ejection-far-from-apogee", "ejection-fast", "descent-fast"]


def test_failed_incomplete_and_undeployed_flights() -> None:
    failed = flight_warnings({**GOOD, "status": "failed", "message": "the motor does not lift off"})
    assert failed == [("flight-failed", "the motor does not lift off")]
    assert _codes(apogee_m=None) == ["flight-incomplete"] and _codes(rail_exit_speed_m_s=None) == ["flight-incomplete"]
    assert _codes(deploy_time_s=None) == ["no-deployment"]
    assert _codes(deploy_time_s=None, has_recovery=False) == []
    assert _codes(chosen_delay_s=None, chosen_ejection_speed_m_s=None, landing_descent_rate_m_s=None) == []


def test_a_fast_charge_that_opens_nothing_is_no_canopy_risk() -> None:
    # With electronics the motor's charge opens no device: its speed is not a deployment (each device's own
    # opening is checked as deployment-fast); the warning said "risk of a torn canopy" beside a drogue marked fine.
    opened = [{"device": "drogue", "trigger": "apogee", "speed_m_s": 30.0}]
    assert "ejection-fast" not in _codes(chosen_ejection_speed_m_s=30.3, deployments=opened)
    assert "ejection-fast" in _codes(chosen_ejection_speed_m_s=30.3)  # no device listed: the charge is all there is
