"""CSV tables for people: the trajectory writer converts each column and names the unit it holds."""

from __future__ import annotations

import numpy as np
import pytest

from motorlib.present.csvout import TRAJECTORY_COLUMNS, trajectory_csv
from motorlib.present.display import DisplayUnits


def _trajectory() -> dict[str, np.ndarray]:
    values = {name: np.array([0.0, 1.0]) for name in TRAJECTORY_COLUMNS}
    values["altitude_m"] = np.array([0.0, 100.0])
    values["time_s"] = np.array([0.0, 2.5])
    return {**values, "descent": np.array([False, True])}


def test_trajectory_csv_keeps_si_under_metric_units() -> None:
    lines = trajectory_csv(_trajectory(), DisplayUnits("metric")).splitlines()
    assert lines[0].split(",") == [*TRAJECTORY_COLUMNS, "phase"]
    assert lines[2].split(",")[0] == "2.5" and lines[2].split(",")[3] == "100.0" and lines[2].endswith(",descent")
    assert lines[1].endswith(",ascent")


def test_trajectory_csv_converts_lengths_to_feet() -> None:
    lines = trajectory_csv(_trajectory(), DisplayUnits("imperial")).splitlines()
    header = lines[0].split(",")
    # 1 ft = 0.3048 m exactly (international yard and pound, 1959): 100 m = 328.0839895 ft
    assert header[3] == "altitude_ft" and float(lines[2].split(",")[3]) == pytest.approx(328.0839895, rel=1e-9)
    assert header[0] == "time_s"  # times stay in s


def _phases(text: str) -> list[str]:
    return [line.rsplit(",", 1)[1] for line in text.splitlines()[1:]]


def test_a_fall_with_no_device_open_is_freefall_not_ascent() -> None:
    # new-user trial: with no recovery device open every row said "ascent", the ballistic fall after apogee too.
    # Up to apogee (the highest row) is the ascent; after it, the fall before a device opens is "freefall", the
    # rows under a device stay "descent"
    values = {name: np.zeros(6) for name in TRAJECTORY_COLUMNS}
    values["time_s"] = np.arange(6.0)
    values["altitude_m"] = np.array([0.0, 60.0, 90.0, 80.0, 50.0, 0.0])
    with_device = {**values, "descent": np.array([False, False, False, False, True, True])}
    assert _phases(trajectory_csv(with_device, DisplayUnits("metric"))) == [
        "ascent", "ascent", "ascent", "freefall", "descent", "descent"]
    ballistic = {**values, "descent": np.zeros(6, dtype=bool)}
    assert _phases(trajectory_csv(ballistic, DisplayUnits("metric"))) == [
        "ascent", "ascent", "ascent", "freefall", "freefall", "freefall"]


def test_a_rocket_that_never_climbs_is_not_said_to_fall() -> None:
    values = {name: np.zeros(3) for name in TRAJECTORY_COLUMNS}
    values["time_s"] = np.arange(3.0)
    assert _phases(trajectory_csv({**values, "descent": np.zeros(3, dtype=bool)}, DisplayUnits("metric"))) == [
        "ascent"] * 3
