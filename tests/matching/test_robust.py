"""Robust ranking (issue 12): probabilities with standard errors, common random numbers, windows."""

from __future__ import annotations

import math

import numpy as np
import pytest

from motorlib.files.airframe_toml import load_airframe
from motorlib.files.curvefiles import load_curve_file
from motorlib.flight.dispersion import DispersionSettings, Uncertainty, fly_samples
from motorlib.matching.rank import MatchSettings
from motorlib.matching.robust import RobustSettings, robust_rank

from ..conftest import SAMPLE_DIR


@pytest.fixture(scope="module")
def quibble():
    return load_airframe(SAMPLE_DIR / "airframes" / "quibble-41.toml")


@pytest.fixture(scope="module")
def motors():
    return [load_curve_file(SAMPLE_DIR / f"bramblewick-propulsion_{name}.xml") for name in ("e25-7", "f29-8")]


def test_the_same_motor_twice_gets_the_same_flights(quibble, motors) -> None:
    # Common random numbers: sample j is the same draw for every candidate.
    result = robust_rank(quibble, [motors[0], motors[0]], MatchSettings(), Uncertainty(),
                         RobustSettings(n_samples=40, altitude_window_m=(250.0, 320.0)))
    a, b = result["candidates"]
    assert a["p_success"] == b["p_success"] and a["apogee_m"] == b["apogee_m"]
    assert a["p_difference_to_next_standard_error"] == 0.0


def test_probability_and_standard_error_follow_the_windows(quibble, motors) -> None:
    robust = RobustSettings(n_samples=60, altitude_window_m=(270.0, 320.0))
    result = robust_rank(quibble, motors, MatchSettings(), Uncertainty(), robust, ids=["e", "f"])
    by_id = {c["motor_id"]: c for c in result["candidates"]}
    flights = fly_samples(quibble, [motors[0]], [Uncertainty()], np.zeros(60, dtype=np.int64), np.arange(60),
                          DispersionSettings(n_samples=60), [7.0], descent=False)
    inside = (flights["apogee_m"] >= 270.0) & (flights["apogee_m"] <= 320.0)
    e = by_id["e"]
    assert e["failures"]["apogee-outside-window"] == pytest.approx(1.0 - inside.mean())
    assert e["p_success"] <= inside.mean()
    assert e["p_success_standard_error"] == pytest.approx(math.sqrt(e["p_success"] * (1 - e["p_success"]) / 60))
    assert by_id["f"]["p_success"] == 0.0  # F29 flies near 500 m, far above the window
    assert result["candidates"][0]["motor_id"] == "e"


def test_a_duration_window_flies_the_descent(quibble, motors) -> None:
    robust = RobustSettings(n_samples=20, duration_window_s=(1.0, 1000.0))
    result = robust_rank(quibble, motors[:1], MatchSettings(), Uncertainty(), robust)
    assert result["descent_flown"]
    assert result["candidates"][0]["flight_duration_s"]["p50"] > 30.0


@pytest.mark.parametrize("window", [(5.0, 5.0), (-1.0, 3.0)])
def test_bad_windows_are_refused(window) -> None:
    with pytest.raises(ValueError, match="altitude_window_m"):
        RobustSettings(altitude_window_m=window)


def test_a_candidate_fails_the_rules_fly_applies_to_its_flight(quibble, motors) -> None:
    # Issue 17: match --robust had its own flags ("rail", "T/W", "descent" on the touchdown speed). With no
    # uncertainty every sample is the nominal flight, so each candidate must fail every sample for exactly the
    # codes fly's rule evaluation gives that flight, and no sample for any other code.
    from dataclasses import replace

    from motorlib.flight.integrate import simulate
    from motorlib.flight.rulebook import evaluate_rules, flown_rule_inputs
    from motorlib.flight.rules import NOTE_CODES

    frame = replace(quibble, launch=replace(quibble.launch, wind_speed_m_s=5.5))  # asks 22 m/s at rail exit
    nominal = simulate(frame, motors, descent=False)
    delays = [nominal.chosen_delay_s(i) for i in range(len(motors))]
    res = simulate(frame, motors, deploy_delay_s=np.array(delays))
    rate, touchdown = res.landing_descent_rate_m_s, res.landing_speed_m_s
    assert np.all(touchdown > rate + 0.3)
    for limit in (float(np.max(0.5 * (rate + touchdown))), float(np.min(rate)) - 0.2):  # between; below the rate
        match = MatchSettings(ceiling_m=480.0, rules=replace(MatchSettings().rules, max_landing_speed_m_s=limit))
        fly = evaluate_rules(flown_rule_inputs(frame, res, chosen_delay_s=np.array(delays)), match.rules,
                             ceiling_m=480.0)
        result = robust_rank(frame, motors, match, Uncertainty.zero(), RobustSettings(n_samples=4), ids=["e", "f"])
        by_id = {c["motor_id"]: c for c in result["candidates"]}
        for i, motor_id in enumerate(("e", "f")):
            failures = by_id[motor_id]["failures"]
            expected = {f.code for f in fly[i]} - NOTE_CODES
            assert {code for code, share in failures.items() if share == 1.0} == expected, (motor_id, limit)
            assert all(share in (0.0, 1.0) for share in failures.values())
            assert ("descent-fast" in expected) is bool(limit < rate[i])
        assert not result["descent_flown"]  # as match: one charge-opened device, no field: the terminal estimate


def test_stability_is_judged_on_every_sampled_flight(quibble, motors) -> None:
    # New-user trial: the robust ranking judged the stability margin on the nominal flight only, so a CG known
    # to +-50 mm never failed a motor whose nominal margin (2.1 cal for F29-8) clears 1 cal. Each sample carries
    # its own margin: the CG shift moves the loaded CG by shift x m_airframe / m_rocket (closed form, see
    # motorlib.flight.stability), and the samples below the minimum fail `stability-low`.
    n = 200
    spread = Uncertainty(cg_std_m=0.05, **{name: 0.0 for name in Uncertainty.__dataclass_fields__ if name != "cg_std_m"})
    f29 = motors[1]
    result = robust_rank(quibble, [f29], MatchSettings(), spread, RobustSettings(n_samples=n))
    c = result["candidates"][0]
    flights = fly_samples(quibble, [f29], [spread], np.zeros(n, dtype=np.int64), np.arange(n),
                          DispersionSettings(n_samples=n), [c["delay_s"]], descent=False)
    from motorlib.flight.stability import stability_for_records

    nominal = float(stability_for_records(quibble, [f29]).min_margin_cal[0])
    assert nominal > 2.0  # the nominal flight passes: only the samples can fail it
    margin = flights["sampled_margin_cal"]
    assert np.all(np.isfinite(margin)) and np.std(margin) > 0.3
    below = int(np.count_nonzero(margin < 1.0))
    assert 0 < below < n
    assert c["failures"]["stability-low"] == pytest.approx(below / n)
    assert c["n_below_min_stability"] == below
    assert c["stability_margin_cal"]["p50"] == pytest.approx(float(np.percentile(margin, 50)))
    # zero spread: every sample has the nominal flight's margin (rail exit included), as match computes it
    still = Uncertainty.zero()
    flat = fly_samples(quibble, [f29], [still], np.zeros(3, dtype=np.int64), np.arange(3),
                       DispersionSettings(n_samples=3), [c["delay_s"]], descent=False)["sampled_margin_cal"]
    from motorlib.matching.rank import rank
    from motorlib.catalog import Catalog

    cat = Catalog(SAMPLE_DIR, read_only=True)
    matched = [m for m in rank(quibble, cat, MatchSettings(allow_smaller_motors=True)).candidates
               if m.designation == "F29-8"][0]
    assert flat == pytest.approx([matched.stability_margin_cal] * 3, rel=1e-9)


def test_a_motor_that_never_flies_ranks_below_those_that_do(quibble, motors) -> None:
    # among motors that all fail (0 % success), one stuck on the rail (no apogee at all) must not rank above those
    # that fly: before, its missing apogee counted as "on target"
    a8 = load_curve_file(SAMPLE_DIR / "teakettle-thrust-co_a8-3-5.xml")
    robust = RobustSettings(n_samples=20, altitude_window_m=(250.0, 260.0))
    result = robust_rank(quibble, [a8, motors[1]], MatchSettings(), Uncertainty(), robust, ids=["a8", "f29"])
    by_id = {c["motor_id"]: c for c in result["candidates"]}
    assert by_id["a8"]["apogee_m"]["p50"] is None and by_id["f29"]["apogee_m"]["p50"] is not None
    assert by_id["a8"]["p_success"] == by_id["f29"]["p_success"] == 0.0
    assert [c["motor_id"] for c in result["candidates"]] == ["f29", "a8"]
