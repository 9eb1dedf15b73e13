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
    assert e["failures"]["altitude window"] == pytest.approx(1.0 - inside.mean())
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
