"""Quadratic-drag fall: closed forms against published values, and the exact inverse."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy.integrate import solve_ivp

from motorlib.flight import descent as recovery

G = 9.80665


# Fall from rest with v_t = 50 m/s: check-values.md 6.2 (V: closed form checked against solve_ivp DOP853).
@pytest.mark.parametrize(("t", "v", "x"), [(1, 9.6828073444, 4.8722067898), (2, 18.6656040785, 19.1300291159),
                                           (5, 37.6676816872, 106.8496081241), (10, 48.0595594336, 328.2920166520)])
def test_fall_from_rest_table(t: float, v: float, x: float) -> None:
    assert float(recovery.fall_speed_m_s(t, 50.0)) == pytest.approx(v, rel=1e-10)
    assert float(recovery.fall_distance_m(t, 50.0)) == pytest.approx(x, rel=1e-10)
    assert float(recovery.fall_time_s(x, 50.0)) == pytest.approx(t, rel=1e-9)


def test_ninety_nine_percent_of_terminal_speed() -> None:
    # check-values.md 6.2: 99 % of v_t at 13.4941718750 s after 499.2830818 m; after 100 m, 36.8668816 m/s.
    assert float(recovery.fall_time_s(499.2830818, 50.0)) == pytest.approx(13.4941718750, rel=1e-8)
    t100 = float(recovery.fall_time_s(100.0, 50.0))
    assert float(recovery.fall_speed_m_s(t100, 50.0)) == pytest.approx(36.8668816, rel=1e-8)


def test_descent_rate_oracle() -> None:
    # check-values.md 4.3 (D): m = 1 kg, D = 0.9 m flat canopy, Cd = 0.75, rho = 1.225 -> 5.7928 m/s.
    area = 0.75 * math.pi * 0.9**2 / 4
    assert float(recovery.terminal_speed_m_s(1.0, area, 1.225)) == pytest.approx(5.7928, abs=5e-5)
    assert float(recovery.drag_area_m2(1.0, 5.7928, 1.225)) == pytest.approx(area, rel=1e-4)


@pytest.mark.parametrize(("time", "speed"), [(9.5, 9.2), (18.2, 4.6)])
def test_observed_fall_fact_of_the_trade(time: float, speed: float) -> None:
    # Common practice, no published source: 82 m in 9.5 s lands at about 9.2 m/s; in 18.2 s at about 4.6 m/s.
    v_t = float(recovery.terminal_speed_from_fall_m_s(82.0, time))
    assert float(recovery.fall_speed_m_s(time, v_t)) == pytest.approx(speed, abs=0.1)


@given(st.floats(1.0, 3000.0), st.floats(1.0, 80.0))
def test_inverse_recovers_the_terminal_speed(height: float, v_t: float) -> None:
    t = float(recovery.fall_time_s(height, v_t))
    found = float(recovery.terminal_speed_from_fall_m_s(height, t))
    assert float(recovery.fall_time_s(height, found)) == pytest.approx(t, rel=1e-10)  # it is the inverse
    if t > 1.01 * math.sqrt(2 * height / G):  # where drag shows in the fall time, v_t is well determined
        assert found == pytest.approx(v_t, rel=1e-6)


def test_inverse_is_not_the_shortcut() -> None:
    v_t = float(recovery.terminal_speed_from_fall_m_s(20.0, 3.0))
    assert v_t > 20.0 / 3.0 * 1.05  # the rocket spent time accelerating; h/t underestimates
    with pytest.raises(ValueError, match="too short"):
        recovery.terminal_speed_from_fall_m_s(82.0, 4.0)  # faster than vacuum (4.09 s)


def test_closed_form_matches_solve_ivp() -> None:
    v_t = 7.0
    sol = solve_ivp(lambda t, y: [y[1], G - G * y[1] ** 2 / v_t**2], (0, 12), [0.0, 0.0], method="DOP853",
                    rtol=1e-12, atol=1e-12, dense_output=True)
    for t in (0.5, 3.0, 12.0):
        x, v = sol.sol(t)
        assert float(recovery.fall_distance_m(t, v_t)) == pytest.approx(x, rel=1e-9)
        assert float(recovery.fall_speed_m_s(t, v_t)) == pytest.approx(v, rel=1e-9)
    assert np.isfinite(recovery.fall_time_s(1e5, 5.0))  # stable for long falls
