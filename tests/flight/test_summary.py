"""The airframe summary behind ``motorlib airframe`` (issue 11): figures agree with the modules they come from."""

from __future__ import annotations

import numpy as np
import pytest

from motorlib import MotorRecord
from motorlib.files.airframe_toml import load_airframe
from motorlib.flight.airframe import Airframe
from motorlib.flight.drag import drag_breakdown, drag_components, drag_table_for
from motorlib.flight.stability import stability_for
from motorlib.flight.summary import DEFAULT_TABLE_MACHS, airframe_summary

from ..conftest import SAMPLE_DIR

FRAME = load_airframe(SAMPLE_DIR / "airframes" / "quibble-41.toml")


def _motor(total_kg: float, prop_kg: float, length_m: float | None = 0.2) -> MotorRecord:
    return MotorRecord("T", np.array([0.0, 0.05, 1.95, 2.0]), np.array([0.0, 200.0, 200.0, 0.0]), diameter_m=0.029,
                       length_m=length_m, total_mass_kg=total_kg, propellant_mass_kg=prop_kg)


def test_drag_figures_match_the_drag_module() -> None:
    s = airframe_summary(FRAME, mach=0.7)
    g, d = FRAME.geometry, FRAME.diameter_m
    breakdown = drag_breakdown(g, d, 0.7, altitude_m=120.0, exhaust_diameter_m=0.029)
    assert s["drag"]["cd_coasting"] == breakdown["total, coasting"] and s["drag"]["altitude_m"] == 120.0
    parts = drag_components(g, d, np.array(DEFAULT_TABLE_MACHS), altitude_m=120.0, exhaust_diameter_m=0.029)
    assert [row["cd_powered"] for row in s["drag_table"]] == parts.cd_powered.tolist()
    # the table agrees with the curve the flight would use, at its grid points
    mach, powered, _ = drag_table_for(FRAME)
    assert s["drag_table"][3]["cd_powered"] == pytest.approx(powered[70], rel=1e-12)  # Mach 0.7
    assert s["drag_given"] == {"drag_coefficient": 0.55, "drag_table": None, "cd_at_mach": 0.55}
    assert s["motor"] is None and s["stability"] is None and s["warnings"] == []


def test_nose_weight_restores_the_margin() -> None:
    s = airframe_summary(FRAME, _motor(0.8, 0.4), required_margin_cal=1.5)
    w, x_w = s["nose_weight_for_stability_kg"], s["nose_weight_position_m"]
    assert s["stability"]["min_margin_cal"] < 0.0 and w > 0.0
    after = stability_for(FRAME, 0.8, 0.4, 0.2, added_mass_kg=w, added_mass_position_m=x_w)
    assert float(after.min_margin_cal[()]) == pytest.approx(1.5, rel=1e-12)


def test_unknown_motor_length_and_bad_mach() -> None:
    s = airframe_summary(FRAME, _motor(0.2, 0.1, length_m=None))
    assert s["stability"]["min_margin_cal"] is None and s["warnings"][0]["code"] == "stability-unknown"
    assert s["nose_weight_for_stability_kg"] is None
    with pytest.raises(ValueError, match="mach"):
        airframe_summary(FRAME, mach=-0.1)
    with pytest.raises(ValueError, match="has no geometry"):
        airframe_summary(Airframe("bare", 0.3, 0.04))


@pytest.mark.parametrize("mach", [-0.1, float("nan")])
def test_a_negative_or_undefined_mach_number_is_refused(mach: float) -> None:
    with pytest.raises(ValueError, match="must be >= 0"):
        airframe_summary(FRAME, mach=mach)
    with pytest.raises(ValueError, match="must be >= 0"):
        airframe_summary(FRAME, table_machs=(0.0, mach))
