"""The flight card (issue 15): phases in flight order, verdicts that follow the rules, absent data leave phases out."""

from __future__ import annotations

from typing import Any

import pytest

from motorlib.flight.results import OK, STUCK_ON_RAIL
from motorlib.flight.rulebook import RuleInputs, evaluate_rules
from motorlib.flight.rules import LaunchRules
from motorlib.present.flightcard import flight_card, quantity


def _summary(**changes: Any) -> dict[str, Any]:
    base = {
        "status": "ok", "message": "flight completed", "liftoff_time_s": 0.01, "rail_exit_time_s": 0.3,
        "rail_exit_speed_m_s": 18.9, "burnout_time_s": 1.79, "apogee_m": 497.9, "time_to_apogee_s": 9.95,
        "apogee_downrange_m": -34.7, "optimal_delay_s": 8.16, "chosen_delay_s": 8.0, "chosen_ejection_speed_m_s": 2.8,
        "max_speed_m_s": 115.1, "max_mach": 0.34, "max_acceleration_m_s2": 78.5, "max_dynamic_pressure_pa": 7970.0,
        "liftoff_mass_kg": 0.3773, "liftoff_thrust_to_weight": 8.37, "average_thrust_to_weight": 7.86,
        "ejections": [{"delay_s": 8.0, "altitude_m": 497.7, "speed_m_s": 2.8, "vertical_speed_m_s": 1.6}],
        "deploy_time_s": 9.79, "deploy_altitude_m": 497.7, "landing_speed_m_s": 5.5, "landing_descent_rate_m_s": 5.0,
        "descent_time_s": 99.3, "drift_m": 418.6, "has_recovery": True,
    }
    return {**base, **changes}


def _warnings(s: dict[str, Any], wind: float) -> list[tuple[str, str]]:
    """The rule book's warnings for a summary's figures (one flight; the charge opens the device, if any)."""
    def num(key: str) -> float:
        return float("nan") if s.get(key) is None else float(s[key])

    recovery = bool(s.get("has_recovery"))
    inputs = RuleInputs(
        status=OK if s["status"] == "ok" else STUCK_ON_RAIL, rail_exit_speed_m_s=num("rail_exit_speed_m_s"),
        wind_speed_m_s=wind, liftoff_thrust_to_weight=num("liftoff_thrust_to_weight"), apogee_m=num("apogee_m"),
        max_mach=num("max_mach"), burnout_time_s=num("burnout_time_s"), optimal_delay_s=num("optimal_delay_s"),
        chosen_delay_s=num("chosen_delay_s"), ejection_speed_m_s=num("chosen_ejection_speed_m_s"),
        uses_charge=recovery, devices_listed=recovery, delays_known=True, constant_drag=False,
        landing_descent_rate_m_s=num("landing_descent_rate_m_s"), landing_distance_m=float("nan"),
        deployment_time_s=[[num("deploy_time_s")]] if recovery else [],
        deployment_speed_m_s=[[num("chosen_ejection_speed_m_s")]] if recovery else [],
        opening_load_n=[[float("nan")]] if recovery else [], device_kinds=("parachute",) if recovery else ())
    return [(f.code, f.message) for f in evaluate_rules(inputs)[0]]


def _card(summary: dict[str, Any], wind: float = 3.0):
    return flight_card(summary, _warnings(summary, wind), title="t", wind_speed_m_s=wind)


def test_phases_come_in_flight_order_and_a_sound_flight_is_all_ticks() -> None:
    card = _card(_summary())
    assert [p.key for p in card.phases] == ["pad", "boost", "coast", "recovery", "landing"]
    assert card.verdict == "ok" and all(p.verdict in ("ok", "info") for p in card.phases)
    # the chosen ejection opens the device: one recovery event, not two
    assert card.phases[3].title == "Recovery: ejection, 8 s delay opens the device"


def test_a_broken_rule_marks_its_figure_and_phase_and_carries_the_warning() -> None:
    card = _card(_summary(rail_exit_speed_m_s=12.0))
    pad = card.phases[0]
    rail = next(f for f in pad.figures if f.label == "rail exit")
    assert rail.verdict == "caution" and rail.rule == ">= 15.0 m/s"
    assert pad.verdict == "caution" and [code for code, _ in pad.warnings] == ["rail-exit-slow"]
    # a broken launch rule (fly exits 1) fails the card, and its headline says not to fly it as is
    assert card.verdict == "fail" and card.broken_rules == ("rail-exit-slow",)
    assert card.headline.startswith("flight as predicted breaks 1 launch rule (rail-exit-slow)")


def test_the_wind_raises_the_rail_exit_rule() -> None:
    card = _card(_summary(rail_exit_speed_m_s=18.9), wind=6.0)  # 4 x 6 m/s = 24 m/s
    rail = next(f for f in card.phases[0].figures if f.label == "rail exit")
    assert rail.verdict == "caution" and rail.rule == ">= 24.0 m/s"


def test_no_recovery_data_leaves_the_recovery_and_landing_phases_out() -> None:
    summary = _summary(ejections=[], chosen_delay_s=None, deploy_time_s=None, landing_speed_m_s=None, has_recovery=False)
    phases = _card(summary).phases
    # the no-recovery finding is the recovery phase's (a phase of its own, failing), not the landing's
    assert [p.key for p in phases] == ["pad", "boost", "coast", "recovery"]
    assert phases[-1].verdict == "fail" and [code for code, _ in phases[-1].warnings] == ["no-recovery"]


def test_a_failed_flight_is_one_line_with_a_cross() -> None:
    card = _card(_summary(status="failed", message="the rocket stops and slides back before leaving the rail"))
    assert card.phases == () and card.verdict == "fail" and not card.completed


def test_three_d_deployments_and_landing_slot_in() -> None:
    summary = _summary(deployments=[{"name": "drogue", "time_s": 9.9, "altitude_m": 497.0, "speed_m_s": 3.0},
                                    {"name": "main", "time_s": 40.0, "altitude_m": 150.0, "speed_m_s": 30.0}],
                       landing={"time_s": 70.0, "speed_m_s": 5.0, "distance_m": 323.0, "bearing_deg": 112.0},
                       stability={"margin_rail_exit_cal": 0.6, "min_margin_cal": 0.5})
    card = flight_card(summary, [], title="t")
    assert [p.title for p in card.phases][3:] == ["Recovery: drogue", "Recovery: main", "Landing"]
    assert card.phases[4].verdict == "caution"  # 30 m/s at the main's opening, above 25 m/s
    assert "323 m from the pad toward 112°" in card.phases[5].figures[-1].value  # words, not signs
    stability = card.phases[0].figures[-1]
    assert stability.label == "stability" and stability.verdict == "caution"


@pytest.mark.parametrize(("value", "kind", "units", "text"), [
    (497.87, "length", "si", "498 m"), (152.4, "length", "imperial", "500 ft"), (0.3773, "mass", "si", "377 g"),
    (2.5, "mass", "si", "2.50 kg"), (None, "speed", "si", "-"), (-0.04, "speed", "si", "0.0 m/s"),
])
def test_quantities_show_in_the_chosen_units(value: float | None, kind: str, units: str, text: str) -> None:
    assert quantity(value, kind, units) == text


def test_rules_come_from_the_settings() -> None:
    card = flight_card(_summary(), [], title="t", rules=LaunchRules(min_rail_exit_speed_m_s=20.0))
    assert next(f for f in card.phases[0].figures if f.label == "rail exit").verdict == "caution"


def test_positions_read_in_words_not_signs() -> None:
    # Issue 10: "246 m upwind", "lands 2,211 m from the pad toward 063°"
    s = _summary(apogee_downrange_m=-246.0, apogee_east_m=-246.0, apogee_north_m=0.0,
                 landing={"time_s": 80.0, "speed_m_s": 5.0, "east_m": 1970.0, "north_m": 1004.0,
                          "distance_m": 2211.0, "bearing_deg": 63.0})
    card = _card(s)
    coast = next(p for p in card.phases if p.key == "coast")
    assert any(f.value.startswith("246 m upwind of the pad") and "toward 270°" in f.value for f in coast.figures)
    landing = next(p for p in card.phases if p.key == "landing")
    assert any(f.label == "lands" and f.value == "2,211 m from the pad toward 063°" for f in landing.figures)


def test_a_long_title_never_splits_the_verdict_at_80_columns() -> None:
    # new-user trial: "Quibble 41 (demo) with E9-4,6,8 (Teakettle Thrust Co. (fictional))  ! flight" / "completed"
    from rich.console import Console

    from motorlib.present.tables import flight_card_table

    summary = _summary()
    card = flight_card(summary, _warnings(summary, 3.0), title="Quibble 41 (demo) with E9-4,6,8 (Teakettle Thrust "
                       "Co. (fictional))", wind_speed_m_s=3.0)
    console = Console(width=80, record=True, color_system=None)
    console.print(flight_card_table(card))
    lines = console.export_text().splitlines()
    assert any("flight completed" in line for line in lines), lines[:3]
    assert all(len(line.rstrip()) <= 80 for line in lines)


def test_an_apogee_before_burnout_has_no_optimal_delay() -> None:
    # new-user trial: a heavy rocket tops out 1.85 s before its motor burns out; the card printed "optimal delay
    # -1.85 s", a delay no motor has. No delay fires at apogee: the card says so, and marks it
    card = _card(_summary(burnout_time_s=4.95, time_to_apogee_s=3.10, optimal_delay_s=-1.85, chosen_delay_s=10.0))
    optimal = next(f for f in card.phases[2].figures if f.label == "optimal delay")
    assert optimal.value == "none: apogee 1.9 s before burnout" and optimal.verdict == "caution"


def _titles(card) -> list[str]:
    return [p.title for p in card.phases]


def _burning_at_apogee(apogee_s: float, optimal_delay_s: float, landing: dict) -> dict:
    """A G25-4-like flight (burnout 4.95 s) that tops out under thrust: its 4 s delay fires nothing in flight."""
    return _summary(burnout_time_s=4.95, time_to_apogee_s=apogee_s, optimal_delay_s=optimal_delay_s, chosen_delay_s=4.0,
                    ejections=[{"delay_s": 4.0, "altitude_m": None, "speed_m_s": None, "vertical_speed_m_s": None}],
                    deploy_time_s=None, deploy_altitude_m=None, landing=landing)


def test_an_apogee_under_thrust_is_told_in_time_order_without_a_coast() -> None:
    # new-user trial: G25-4 on a heavier quibble-41 tops out at 4.16 s, 0.8 s before its motor burns out (4.95 s),
    # and lands at 6.65 s. The card showed burnout 4.95 s under "Boost", then apogee 4.16 s under "Coast to
    # apogee": out of time order, and a coast that never happened.
    s = _burning_at_apogee(4.16, -0.79, {"time_s": 6.65, "speed_m_s": 44.6, "distance_m": 145.0, "bearing_deg": 270.0})
    card = _card(s)
    titles = _titles(card)
    assert not any("coast" in t.lower() and "no coast" not in t.lower() for t in titles), titles
    apogee = next(p for p in card.phases if any(f.label == "apogee" for f in p.figures))
    assert "before burnout" in apogee.title and "no coast" in apogee.title, apogee.title
    boost = next(p for p in card.phases if p.key == "boost")
    assert not any(f.label == "burnout" for f in boost.figures)  # burnout comes after apogee, not before it
    burnout = next(p for p in card.phases if p.key == "burnout")
    assert "after apogee" in burnout.title and burnout.figures[0].value == "4.95 s"
    keys = [p.key for p in card.phases]
    assert keys.index("coast") < keys.index("burnout") < keys.index("landing"), keys


def test_a_device_opened_under_thrust_comes_before_burnout_on_the_card() -> None:
    # electronics open a drogue at apogee (4.2 s) while the motor still burns (burnout 4.95 s): the drogue's
    # event comes before burnout, the main's after it
    s = _summary(burnout_time_s=4.95, time_to_apogee_s=4.16, optimal_delay_s=-0.79, chosen_delay_s=None,
                 deployments=[{"name": "drogue", "time_s": 4.2, "altitude_m": 30.0, "speed_m_s": 3.0},
                              {"name": "main", "time_s": 8.0, "altitude_m": 15.0, "speed_m_s": 10.0}],
                 landing={"time_s": 12.0, "speed_m_s": 5.0, "distance_m": 40.0, "bearing_deg": 90.0})
    titles = _titles(flight_card(s, [], title="t"))
    assert titles[2:] == ["Apogee before burnout (no coast)", "Recovery: drogue", "Burnout, 0.8 s after apogee",
                          "Recovery: main", "Landing"], titles


def test_a_motor_still_burning_at_touchdown_is_said_at_landing_not_before_apogee() -> None:
    # new-user trial: G25-4 on quibble-41 with 2 kg of ballast tops out 6 m up at 2.31 s and lands at 3.35 s;
    # its motor burns to 4.95 s. The card listed "burnout 4.95 s" first, before apogee and landing.
    s = _burning_at_apogee(2.31, -2.64, {"time_s": 3.35, "speed_m_s": 24.3, "distance_m": 22.0, "bearing_deg": 270.0})
    card = _card(s)
    assert "burnout" not in [p.key for p in card.phases]
    assert not any(f.label == "burnout" for f in card.phases[1].figures)
    landing = card.phases[-1]
    assert landing.key == "landing"
    motor = next(f for f in landing.figures if f.label == "motor")
    assert motor.value == "still burning at touchdown (burnout due at 4.95 s, 1.6 s later)"
    assert motor.verdict == "caution"


def test_with_electronics_the_motor_delay_is_a_backup_and_unmarked_unless_it_fires_before_apogee() -> None:
    # new-user trial: deploy = "apogee" marked "! chosen delay 4 s (4.8 s late)" with no warning to explain it
    from motorlib.flight.rules import LaunchRules

    def delay_figure(chosen_s: float, optimal_s: float):
        summary = _summary(chosen_delay_s=chosen_s, optimal_delay_s=optimal_s)
        card = flight_card(summary, [], title="t", wind_speed_m_s=3.0, charge_deploys=False)
        return next(f for f in card.phases[2].figures if f.label == "chosen delay")

    late = delay_figure(12.96, 8.16)
    assert late.verdict == "info" and "a backup: electronics open the recovery" in late.value
    early = delay_figure(8.16 - LaunchRules().max_delay_error_s - 0.1, 8.16)  # live-charge-before-apogee (a note)
    assert early.verdict == "caution"
