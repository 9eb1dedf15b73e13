"""The launch rules' thresholds: the defaults carry their sources, the limits are checked, one place for all."""

from __future__ import annotations

import pytest

from motorlib.flight.rules import NOTE_CODES, RULE_CODES, LaunchRules


def test_the_defaults_are_the_sourced_values() -> None:
    rules = LaunchRules()
    assert rules.min_rail_exit_speed_m_s == 15.0  # about 50 ft/s: common practice, no published source
    assert rules.rail_exit_wind_ratio == 4.0  # "Launching Safely in the 21st Century" (2005) 7.4.3, secondary source
    assert rules.min_liftoff_thrust_to_weight == 5.0  # common practice, no published source
    assert rules.max_delay_error_s == 2.0  # common practice, no published source
    assert rules.max_ejection_speed_m_s == 25.0  # common practice, no published source
    assert rules.max_landing_speed_m_s == 6.5  # about 21 ft/s: common practice, no published source
    assert rules.max_constant_cd_mach == 0.8  # where the transonic drag rise starts: common practice
    assert dict(rules.max_deployment_speed_m_s) == {"parachute": 25.0, "main": 25.0, "drogue": 45.0, "streamer": 45.0}


@pytest.mark.parametrize(("wind_m_s", "needed_m_s"), [(0.0, 15.0), (3.75, 15.0), (5.0, 20.0), (-3.0, 15.0),
                                                      (float("nan"), 15.0)])
def test_the_rail_exit_needed_is_the_minimum_or_four_times_the_wind(wind_m_s: float, needed_m_s: float) -> None:
    # 4 x 3.75 m/s = 15 m/s: the two limits meet; a negative or unknown wind counts as calm
    assert LaunchRules().rail_exit_needed_m_s(wind_m_s) == needed_m_s


def test_each_device_kind_has_its_limit_and_an_unknown_kind_gets_the_parachutes() -> None:
    rules = LaunchRules(max_deployment_speed_m_s=(("parachute", 20.0), ("drogue", 40.0)))
    assert rules.deployment_limit_m_s("drogue") == 40.0 and rules.deployment_limit_m_s("sail") == 20.0


def test_the_conditions_name_the_limits_as_match_reports_them() -> None:
    rules = LaunchRules(max_delay_error_s=1.5, field_radius_m=400.0)
    conditions = rules.conditions(6.0)
    assert conditions["delay_slack_s"] == 1.5 and conditions["field_radius_m"] == 400.0
    assert conditions["rail_exit_needed_m_s"] == 24.0 and conditions["wind_m_s"] == 6.0


@pytest.mark.parametrize("name", ["min_rail_exit_speed_m_s", "max_delay_error_s", "max_landing_speed_m_s"])
@pytest.mark.parametrize("value", [-1.0, float("nan"), float("inf")])
def test_a_limit_that_cannot_be_met_is_refused(name: str, value: float) -> None:
    with pytest.raises(ValueError, match=name):
        LaunchRules(**{name: value})


def test_every_code_is_kebab_case_and_the_notes_are_codes() -> None:
    assert all(code == code.lower() and " " not in code and "/" not in code for code in RULE_CODES)
    assert NOTE_CODES <= set(RULE_CODES)


def test_the_command_line_takes_its_defaults_from_the_rules() -> None:
    # Issue 17: rule defaults in one place; match's options leave a rule unset unless the user gives it
    from motorlib.cli.match import match_settings

    opts = {"min_thrust_to_weight": None, "min_rail_exit": None, "delay_slack": None, "target_m": None,
            "ceiling_m": None, "max_class": None, "allow_smaller_motors": False}
    assert match_settings(opts).rules == LaunchRules()
    assert match_settings({**opts, "delay_slack": 0.5}).rules.max_delay_error_s == 0.5
