"""The 3-D point mass (issue 10): wind from a compass direction, a rail leaning toward an azimuth, measured winds.

References: the independent 3-D solve_ivp flight written in tests/flight/test_recovery_sequence.py, and the
2-D model itself (with no crosswind the 3-D flight must give today's 2-D numbers).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from motorlib.flight import Airframe, FlightSettings, Launch, simulate
from motorlib.flight.wind import MeasuredWind

from .test_recovery_sequence import DROGUE, FLAT, MAIN, MOTOR, reference


def _frame(wind_m_s: float, wind_from_deg: float, rail_angle_deg: float = 5.0,
           rail_azimuth_deg: float | None = None, **launch) -> Airframe:
    return Airframe("dual", 2.4, 0.054, 0.5, launch=Launch(
        rail_length_m=2.5, rail_angle_rad=math.radians(rail_angle_deg), wind_speed_m_s=wind_m_s,
        wind_direction_rad=math.radians(wind_from_deg),
        rail_azimuth_rad=None if rail_azimuth_deg is None else math.radians(rail_azimuth_deg), **launch),
        recovery_sequence=(DROGUE, MAIN))


def test_a_crosswind_drifts_the_rocket_sideways_as_the_reference_does() -> None:
    # the rail leans east, the wind blows from the north: the rocket goes east off the rail, then drifts south
    frame = _frame(6.0, 0.0, rail_angle_deg=8.0, rail_azimuth_deg=90.0)
    res = simulate(frame, [MOTOR], FLAT)
    ref = reference(frame, MOTOR, wind_from_deg=0.0, rail_azimuth_deg=90.0)
    assert ref["north_m"] < -100.0 and abs(ref["east_m"]) > 10.0  # the case: lateral drift both ways
    assert res.apogee_m[0] == pytest.approx(ref["apogee_m"], rel=1e-5)
    assert res.landing_time_s[0] == pytest.approx(ref["landing_time_s"], rel=5e-3)
    assert res.landing_speed_m_s[0] == pytest.approx(ref["landing_speed_m_s"], rel=5e-3)
    land = res.summary(0)["landing"]
    assert land["north_m"] == pytest.approx(ref["north_m"], rel=5e-3)
    assert land["east_m"] == pytest.approx(ref["east_m"], rel=5e-3, abs=0.5)
    for k, (_, _, v_open) in enumerate(ref["openings"]):
        assert res.deployment_speed_m_s[0, k] == pytest.approx(v_open, rel=5e-3)


def test_a_rail_leaned_into_the_wind_as_the_reference_does() -> None:
    into = _frame(7.0, 270.0, rail_angle_deg=10.0, rail_azimuth_deg=270.0)  # wind from the west, rail leans west
    downwind = _frame(7.0, 270.0, rail_angle_deg=10.0)
    res = simulate([into, downwind], [MOTOR, MOTOR], FLAT)
    ref = reference(into, MOTOR, wind_from_deg=270.0, rail_azimuth_deg=270.0)
    assert res.apogee_m[0] == pytest.approx(ref["apogee_m"], rel=1e-5)
    assert res.apogee_east_m[0] < res.apogee_east_m[1]  # leaning into the wind keeps the apogee upwind
    assert res.landing_east_m[0] == pytest.approx(ref["east_m"], rel=5e-3)
    assert res.landing_time_s[0] == pytest.approx(ref["landing_time_s"], rel=5e-3)


def test_without_crosswind_the_3d_flight_equals_the_2d_one() -> None:
    # the same flight turned to another compass direction: the same figures, the positions turned with it;
    # and the 3-D integration (forced by a rail 1e-9 rad across the wind) equals the planar one
    base = _frame(5.0, 270.0)
    turned = _frame(5.0, 30.0)
    forced = _frame(5.0, 270.0, rail_azimuth_deg=90.0 + math.degrees(1e-9))
    res = simulate([base, turned, forced], [MOTOR] * 3, FLAT, trajectories=True)
    for name in ("apogee_m", "apogee_time_s", "max_speed_m_s", "landing_time_s", "landing_speed_m_s", "drift_m"):
        values = getattr(res, name)
        assert values[1] == pytest.approx(values[0], rel=1e-12), name
        assert values[2] == pytest.approx(values[0], rel=1e-7), name
    assert res.landing_north_m[0] == pytest.approx(0.0, abs=1e-9)
    downwind = math.radians(30.0 + 180.0)
    assert res.landing_east_m[1] == pytest.approx(res.drift_m[0] * math.sin(downwind), rel=1e-9)
    assert res.landing_north_m[1] == pytest.approx(res.drift_m[0] * math.cos(downwind), rel=1e-9)
    assert res.summary(1)["landing"]["bearing_deg"] == pytest.approx(210.0, abs=1e-6)
    # the default launch (no direction given) is the 2-D model's: wind toward +east, rail leaning downwind
    default = Airframe("dual", 2.4, 0.054, 0.5, launch=Launch(rail_length_m=2.5, rail_angle_rad=math.radians(5.0),
                                                              wind_speed_m_s=5.0), recovery_sequence=(DROGUE, MAIN))
    plain = simulate(default, [MOTOR], FLAT)
    assert plain.landing_east_m[0] == res.landing_east_m[0] and plain.apogee_m[0] == res.apogee_m[0]
    path = res.trajectories[1]
    assert np.all(np.diff(path["time_s"]) > 0) and path["east_m"][-1] == pytest.approx(res.landing_east_m[1])


def test_a_measured_profile_of_one_wind_equals_that_wind_everywhere() -> None:
    steady = MeasuredWind.from_rows([[0.0, 6.0, 300.0], [3000.0, 6.0, 300.0]])
    measured = _frame(6.0, 300.0, wind_profile=steady)
    uniform = _frame(6.0, 300.0)
    a = simulate(measured, [MOTOR], FLAT)
    b = simulate(uniform, [MOTOR], FlightSettings(vary_gravity=False, wind_exponent=0.0))
    for name in ("apogee_m", "landing_time_s", "landing_east_m", "landing_north_m"):
        assert getattr(a, name)[0] == pytest.approx(getattr(b, name)[0], rel=1e-9, abs=1e-6), name


def test_launch_keys_in_the_airframe_file() -> None:
    from motorlib.errors import SimulationInputError
    from motorlib.files.airframe_toml import airframe_from_dict

    data = {"airframe": {"mass": "2.4 kg", "diameter": "54 mm", "drag_coefficient": 0.5},
            "launch": {"wind_speed": "5 m/s", "wind_direction": 300, "rail_angle": "5 deg", "rail_azimuth": "300 deg",
                       "wind_profile": [[0, 4, 290], ["500 m", "9 m/s", 250], [1500, 14, 240]]}}
    frame = airframe_from_dict(data, "day.toml")
    assert frame.launch.wind_direction_rad == pytest.approx(math.radians(300.0))
    assert frame.launch.rail_azimuth_rad == pytest.approx(math.radians(300.0))
    assert frame.launch.wind_profile.heights_m.tolist() == [0.0, 500.0, 1500.0]
    bad = {**data, "launch": {"wind_profile": [[0, 4, 290], [0, 5, 250]]}}
    with pytest.raises(SimulationInputError, match=r"wind_profile\[1\]\.height"):
        airframe_from_dict(bad, "day.toml")
    with pytest.raises(SimulationInputError, match="launch.wind_direction"):
        airframe_from_dict({**data, "launch": {"wind_direction": 400}}, "day.toml")
