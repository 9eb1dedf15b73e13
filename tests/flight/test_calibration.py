"""Drag calibration (issue 12): known drags recovered from synthetic flights and a noisy synthetic log."""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest
from scipy.interpolate import CubicHermiteSpline

from motorlib.files.airframe_toml import load_airframe
from motorlib.files.curvefiles import load_curve_file
from motorlib.flight import calibration as cal
from motorlib.flight.integrate import simulate

from ..conftest import SAMPLE_DIR

AIRFRAMES = SAMPLE_DIR / "airframes"


@pytest.fixture(scope="module")
def quibble():
    return load_airframe(AIRFRAMES / "quibble-41.toml")


@pytest.fixture(scope="module")
def g59():
    return load_curve_file(SAMPLE_DIR / "bramblewick-propulsion_g59-10.xml")


def synthetic_log(frame, motor, drag: float, *, rate_hz: float = 20.0, noise_pa: float = 5.0, seed: int = 1):
    """A barometric log of a simulated flight: the site's real air, pressure noise, the altimeter's conversion.

    The heights between the flight's steps (up to 1.7 s apart in the coast) are interpolated by cubic Hermite
    from height and vertical speed, as the library locates its own events: a straight line between steps would
    cut the arc near apogee by up to g·h²/8, 3 m for h = 1.7 s, well above the noise this test is about."""
    res = simulate(cal.with_drag(frame, drag), [motor], trajectories=True)
    track = res.trajectories[0]
    t = np.arange(-2.0, float(res.apogee_time_s[0]) + 3.0, 1.0 / rate_hz)
    times, first = np.unique(track["time_s"], return_index=True)  # steps of no length leave repeated rows
    arc = CubicHermiteSpline(times, track["altitude_m"][first], track["vz_m_s"][first], extrapolate=False)
    z = np.where(t < times[0], 0.0, arc(np.clip(t, times[0], times[-1])))
    _, p, _, _ = frame.launch.site.air(z)
    p = p + np.random.default_rng(seed).normal(0.0, noise_pa, t.size)
    return t, p


def test_one_flight_recovers_its_drag_coefficient(quibble, g59) -> None:
    apogee = simulate(cal.with_drag(quibble, 0.62), [g59], descent=False).apogee_m
    fit = cal.fit_apogees([quibble], [g59], apogee)
    assert fit["method"] == "root"
    assert fit["drag_coefficient"] == pytest.approx(0.62, rel=5e-3)
    assert abs(fit["residuals_m"][0]) < 1e-3
    assert 0.0 < fit["uncertainty"] < 0.05  # 1 % of the apogee, through the apogee's sensitivity to Cd


def test_several_flights_recover_a_table_scale_by_least_squares() -> None:
    frame = load_airframe(AIRFRAMES / "tollgate-98.toml")
    motor = load_curve_file(SAMPLE_DIR / "marmalade-moon-motors_j590-p.xml")
    days = [frame, cal.flight_conditions(frame, wind_speed_m_s=7.0, temperature_k=305.0),
            cal.flight_conditions(frame, added_mass_kg=0.8, pressure_pa=95_000.0)]
    apogees = simulate([cal.with_drag(f, 1.15) for f in days], [motor] * 3, descent=False).apogee_m
    fit = cal.fit_apogees(days, [motor] * 3, apogees)
    assert fit["method"] == "least squares"
    assert fit["drag_scale"] == pytest.approx(1.15, rel=5e-3)
    assert np.max(np.abs(fit["residuals_m"])) < 0.05


def test_an_apogee_out_of_reach_is_refused(quibble, g59) -> None:
    with pytest.raises(ValueError, match="measured apogee"):
        cal.fit_apogees([quibble], [g59], [50_000.0])
    with pytest.raises(ValueError, match="same non-zero length"):
        cal.fit_apogees([quibble], [g59], [400.0, 500.0])


def test_a_noisy_20_hz_barometric_log_recovers_the_drag_within_2_percent(quibble, g59) -> None:
    t, p = synthetic_log(quibble, g59, 0.62)
    pad = float(np.median(p[:10]))
    fit = cal.fit_log(quibble, g59, t, cal.altitude_from_pressure_m(p, pad))
    assert fit["drag_coefficient"] == pytest.approx(0.62, rel=0.02)
    assert fit["uncertainty"] < 0.02
    assert fit["rms_residual_m"] < 1.0  # 5 Pa is about 0.4 m at the pad
    events = fit["events"]
    assert events["liftoff_time_s"] == pytest.approx(0.05, abs=0.15)
    assert events["apogee_time_s"] > events["burnout_time_s"] > events["liftoff_time_s"]


def test_pressure_to_altitude_matches_the_standard_atmosphere_table() -> None:
    # tests/reference/check_values.md#atm-table: p(1000.2 m geometric) = 89 874.57 Pa, p(5003.9 m) = 54 019.91 Pa
    z = cal.altitude_from_pressure_m(np.array([89_874.57, 54_019.91]), 101_325.0)
    assert z == pytest.approx([1000.2, 5003.9], abs=0.1)


def test_a_log_without_a_flight_is_refused() -> None:
    t = np.arange(0.0, 5.0, 0.05)
    with pytest.raises(ValueError, match="no flight"):
        cal.detect_events(t, np.zeros_like(t))


def test_with_drag_scales_only_the_drag(quibble) -> None:
    table = load_airframe(AIRFRAMES / "tollgate-98.toml")
    scaled = cal.with_drag(table, 1.21)
    assert scaled.reference_area_m2 == pytest.approx(1.21 * table.reference_area_m2)
    assert scaled.mass_kg == table.mass_kg and scaled.drag_table == table.drag_table
    assert cal.with_drag(quibble, 0.7).drag_coefficient == 0.7
    assert replace(quibble, geometry=None) == replace(cal.with_drag(quibble, quibble.drag_coefficient), geometry=None)
