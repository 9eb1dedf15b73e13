"""Winds aloft (issue 10): the capped power law from a 10 m reading and a measured table, as east/north components."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from motorlib.errors import SimulationInputError
from motorlib.flight.wind import MeasuredWind, PowerLawWind, wind_components_m_s


def test_a_west_wind_blows_toward_east() -> None:
    # meteorological convention: the direction the wind blows FROM, degrees clockwise from north
    east, north = wind_components_m_s(10.0, 270.0)
    assert float(east) == pytest.approx(10.0) and float(north) == pytest.approx(0.0, abs=1e-12)
    east, north = wind_components_m_s(4.0, 0.0)  # a north wind blows toward the south
    assert float(east) == pytest.approx(0.0, abs=1e-12) and float(north) == pytest.approx(-4.0)
    east, north = wind_components_m_s(2.0, 45.0)  # from the north-east, toward the south-west
    assert float(east) == pytest.approx(-math.sqrt(2.0)) and float(north) == pytest.approx(-math.sqrt(2.0))


def test_power_law_from_the_10_m_reading() -> None:
    wind = PowerLawWind(speed_10m_m_s=5.0, direction_from_deg=270.0)
    east, north = wind.velocity_m_s(np.array([10.0, 100.0, 640.0]))
    np.testing.assert_allclose(east, 5.0 * (np.array([10.0, 100.0, 640.0]) / 10.0) ** (1 / 7), rtol=1e-14)
    np.testing.assert_allclose(north, 0.0, atol=1e-12)


def test_power_law_floor_and_cap_hold() -> None:
    wind = PowerLawWind(speed_10m_m_s=5.0, direction_from_deg=180.0, floor_m=1.0, cap_m=1000.0)
    heights = np.array([-5.0, 0.0, 0.5, 1.0, 1000.0, 1500.0, 30_000.0])
    speed = wind.speed_m_s(heights)
    assert speed[0] == speed[1] == speed[2] == speed[3] == pytest.approx(5.0 * 0.1 ** (1 / 7))
    assert speed[4] == speed[5] == speed[6] == pytest.approx(5.0 * 100.0 ** (1 / 7))  # held above the cap
    _, north = wind.velocity_m_s(heights)
    np.testing.assert_allclose(north, speed, rtol=1e-14)  # a south wind blows toward the north
    uncapped = PowerLawWind(speed_10m_m_s=5.0, cap_m=math.inf)  # today's 2-D profile: no cap
    assert float(uncapped.speed_m_s(30_000.0)) == pytest.approx(5.0 * 3000.0 ** (1 / 7))


def test_default_power_law_blows_downrange_as_today() -> None:
    # the 2-D integrator's wind blows toward +x; with x east that is a west wind, the default direction
    east, north = PowerLawWind(speed_10m_m_s=3.0).velocity_m_s(10.0)
    assert float(east) == pytest.approx(3.0) and float(north) == pytest.approx(0.0, abs=1e-12)


def test_measured_table_interpolates_the_components_not_the_angle() -> None:
    # 10 m/s from the north at 0 m, 10 m/s from the east at 1000 m: half way the components average to
    # (-5, -5), a 7.07 m/s wind from the north-east, not a 10 m/s wind from 045 as angle interpolation gives
    wind = MeasuredWind.from_rows([[0.0, 10.0, 0.0], [1000.0, 10.0, 90.0]])
    east, north = wind.velocity_m_s(np.array([0.0, 500.0, 250.0, 1000.0]))
    np.testing.assert_allclose(east, [0.0, -5.0, -2.5, -10.0], atol=1e-12)
    np.testing.assert_allclose(north, [-10.0, -5.0, -7.5, 0.0], atol=1e-12)
    assert float(wind.speed_m_s(500.0)) == pytest.approx(math.sqrt(50.0))


def test_measured_table_across_north_takes_the_short_way() -> None:
    # from 350° to 010°: the components pass through "from 000°", never through "from 180°"
    wind = MeasuredWind.from_rows([[0.0, 8.0, 350.0], [200.0, 8.0, 10.0]])
    east, north = wind.velocity_m_s(100.0)
    assert float(east) == pytest.approx(0.0, abs=1e-12) and float(north) < -7.8


def test_measured_table_held_constant_beyond_its_ends() -> None:
    wind = MeasuredWind.from_rows([[50.0, 4.0, 270.0], [300.0, 12.0, 270.0], [2000.0, 20.0, 250.0]])
    east, north = wind.velocity_m_s(np.array([0.0, 10.0, 50.0, 5000.0]))
    np.testing.assert_allclose(east[:3], 4.0, rtol=1e-14)
    np.testing.assert_allclose(north[:3], 0.0, atol=1e-12)
    e_top, n_top = wind_components_m_s(20.0, 250.0)
    assert east[3] == pytest.approx(float(e_top)) and north[3] == pytest.approx(float(n_top))
    one_row = MeasuredWind.from_rows([[100.0, 6.0, 90.0]])
    east, north = one_row.velocity_m_s(np.array([0.0, 100.0, 1e4]))
    np.testing.assert_allclose(east, -6.0, rtol=1e-14)


@given(st.lists(st.tuples(st.floats(0.0, 30.0), st.floats(0.0, 360.0)), min_size=1, max_size=6),
       st.floats(-100.0, 3000.0))
def test_measured_table_is_vectorised_and_bounded(rows, height) -> None:
    table = [[100.0 * i, speed, direction] for i, (speed, direction) in enumerate(rows)]
    wind = MeasuredWind.from_rows(table)
    heights = np.array([[height, 0.0], [50.0, 1e5]])
    east, north = wind.velocity_m_s(heights)
    assert east.shape == north.shape == heights.shape
    for index in np.ndindex(heights.shape):
        e1, n1 = wind.velocity_m_s(heights[index])
        assert float(e1) == east[index] and float(n1) == north[index]
    # linear interpolation of the components never exceeds the fastest reading
    assert np.all(np.hypot(east, north) <= max(speed for speed, _ in rows) + 1e-9)


@pytest.mark.parametrize(("rows", "field"), [
    ([], "launch.wind_profile: needs at least one row"),
    ([[0.0, 5.0]], r"launch.wind_profile\[0\]: must be \[height, speed, direction\]"),
    ([[0.0, 5.0, 90.0], [0.0, 6.0, 90.0]], r"launch.wind_profile\[1\].height"),
    ([[0.0, 5.0, 90.0], [-10.0, 6.0, 90.0]], r"launch.wind_profile\[1\].height"),
    ([[-1.0, 5.0, 90.0]], r"launch.wind_profile\[0\].height"),
    ([[0.0, -5.0, 90.0]], r"launch.wind_profile\[0\].speed"),
    ([[0.0, 5.0, 90.0], [100.0, math.nan, 90.0]], r"launch.wind_profile\[1\].speed"),
    ([[0.0, 5.0, 400.0]], r"launch.wind_profile\[0\].direction"),
    ([[0.0, 5.0, -1.0]], r"launch.wind_profile\[0\].direction"),
])
def test_table_validation_names_the_field(rows, field) -> None:
    with pytest.raises(SimulationInputError, match=field) as caught:
        MeasuredWind.from_rows(rows)
    assert isinstance(caught.value, ValueError)


@pytest.mark.parametrize(("kwargs", "field"), [
    ({"speed_10m_m_s": -1.0}, "launch.wind_speed"),
    ({"speed_10m_m_s": 3.0, "direction_from_deg": 361.0}, "launch.wind_direction"),
    ({"speed_10m_m_s": 3.0, "cap_m": 5.0}, "cap_m"),
    ({"speed_10m_m_s": 3.0, "floor_m": 0.0}, "floor_m"),
    ({"speed_10m_m_s": 3.0, "exponent": 1.5}, "exponent"),
])
def test_power_law_validation_names_the_field(kwargs, field) -> None:
    with pytest.raises(SimulationInputError, match=field):
        PowerLawWind(**kwargs)


def test_records_are_frozen() -> None:
    wind = MeasuredWind.from_rows([[0.0, 5.0, 90.0], [100.0, 6.0, 90.0]])
    with pytest.raises(ValueError):
        wind.heights_m[0] = 3.0
    with pytest.raises(AttributeError):
        wind.heights_m = np.zeros(2)  # type: ignore[misc]
