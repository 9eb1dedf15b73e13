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
