"""``motorlib descent`` through click's CliRunner: forward and inverse recovery arithmetic."""

from __future__ import annotations

import json

import pytest

from .conftest import run


def test_descent_forward_and_inverse() -> None:
    code, out = run("descent", "--mass", "1kg", "--cd", "0.75", "--diameter", "0.9", "--json")
    assert code == 0 and json.loads(out)["terminal_speed_m_s"] == pytest.approx(5.7928, abs=1e-4)
    code, out = run("descent", "--height", "82", "--fall-time", "9.5", "--mass", "15g", "--json")
    data = json.loads(out)
    assert code == 0 and data["terminal_speed_m_s"] == pytest.approx(9.2, abs=0.1) and data["drag_area_m2"] > 0
    code, out = run("descent", "--height", "82", "--fall-time", "3")
    assert code == 2 and "too short" in out
    code, out = run("descent", "--mass", "1kg")
    assert code == 2 and "give --mass with --drag-area" in out


def _strict_json(text: str):
    def no_constant(name: str):
        raise AssertionError(f"{name} is not JSON")

    return json.loads(text, parse_constant=no_constant)


def test_descent_falls_through_the_atmosphere() -> None:
    # Issue 10, defect 6: a 5 m/s (at the pad) fall from 3 km takes 558.4 s through the standard atmosphere, not the
    # 600.4 s of pad-density air held all the way down.
    area = 2 * 9.80665 / (1.225 * 5.0**2)
    code, out = run("descent", "--mass", "1kg", "--drag-area", repr(area), "--height", "3000", "--json")
    data = _strict_json(out)
    assert code == 0 and data["fall_time_s"] == pytest.approx(558.41, abs=0.01)
    assert data["terminal_speed_m_s"] == pytest.approx(5.0, rel=1e-5)  # the standard sea-level ρ is 1.224999
    assert data["landing_speed_m_s"] == pytest.approx(5.0003, abs=1e-4)
    code, out = run("descent", "--height", "3000", "--fall-time", "558.41", "--mass", "1kg", "--json")
    data = _strict_json(out)
    assert code == 0 and data["terminal_speed_m_s"] == pytest.approx(5.0, abs=1e-4)
    assert data["drag_area_m2"] == pytest.approx(area, rel=1e-4)
    code, out = run("descent", "--mass", "1kg", "--drag-area", repr(area), "--height", "3000", "--elevation", "1500")
    assert code == 0 and "1500 m" in out


def test_descent_json_has_no_infinity() -> None:
    code, out = run("descent", "--mass", "1kg", "--drag-area", "0", "--height", "100", "--json")
    data = _strict_json(out)
    assert code == 0 and data["terminal_speed_m_s"] is None
    assert data["landing_speed_m_s"] == pytest.approx((2 * 9.80665 * 100) ** 0.5, rel=1e-4)
    code, out = run("descent", "--mass", "1kg", "--drag-area", "0")
    assert code == 0 and "no drag" in out
