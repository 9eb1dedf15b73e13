"""The path between the integrator's steps, for charts (results.dense_trajectory).

Outside references: the drag-free arc under constant gravity, z = v0·t − g·t²/2 (textbook kinematics), which a
cubic Hermite interpolant from heights and vertical speeds reproduces exactly, as it does the speed from the
(constant) acceleration.
"""

from __future__ import annotations

import numpy as np
import pytest

from motorlib import MotorRecord
from motorlib.flight import Airframe, FlightSettings, Launch, Recovery, simulate
from motorlib.flight.results import dense_trajectory
from motorlib.units import STANDARD_GRAVITY_M_S2 as G

VACUUM = FlightSettings(vary_gravity=False, uniform_air=True)


def _arc(times: np.ndarray, v0: float = 80.0) -> dict[str, np.ndarray]:
    n = times.size
    return {"time_s": times, "x_m": 3.0 * times, "y_m": np.zeros(n), "altitude_m": v0 * times - 0.5 * G * times**2,
            "vx_m_s": np.full(n, 3.0), "vy_m_s": np.zeros(n), "vz_m_s": v0 - G * times,
            "ax_m_s2": np.zeros(n), "ay_m_s2": np.zeros(n), "az_m_s2": np.full(n, -G),
            "descent": np.zeros(n, dtype=bool), "east_m": -3.0 * times, "north_m": np.zeros(n)}


def test_a_drag_free_arc_is_drawn_exactly_between_long_steps() -> None:
    steps = _arc(np.array([0.0, 1.3, 2.9, 4.0, 7.7, 8.16]))
    dense = dense_trajectory(steps, max_gap_s=0.1)
    t = dense["time_s"]
    assert list(dense) == list(steps)
    assert np.all(np.diff(t) > 0.0) and np.max(np.diff(t)) <= 0.1 + 1e-12
    exact = _arc(t)
    for name in ("altitude_m", "vz_m_s", "x_m", "east_m"):
        np.testing.assert_allclose(dense[name], exact[name], rtol=0.0, atol=1e-9)
    # the flown rows are kept as they were
    kept = np.isin(t, steps["time_s"])
    assert kept.sum() == steps["time_s"].size
    np.testing.assert_array_equal(dense["altitude_m"][kept], steps["altitude_m"])


def test_close_steps_are_left_alone() -> None:
    steps = _arc(np.linspace(0.0, 1.0, 21))
    dense = dense_trajectory(steps, max_gap_s=0.1)
    for name in steps:
        np.testing.assert_array_equal(dense[name], steps[name])


def test_a_flown_coast_between_steps_follows_the_closed_form() -> None:
    # no drag to speak of (Cd 1e-9: the model asks for a positive Cd), constant g and air: after burnout z(t) = z_b + v_b·(t − t_b) − g·(t − t_b)²/2
    frame = Airframe("vacuum", 0.5, 0.05, 1e-9, launch=Launch(rail_length_m=1.0))
    motor = MotorRecord("T", [0.0, 1.0], [40.0, 40.0], total_mass_kg=0.1, propellant_mass_kg=0.04, delays_s=(8.0,))
    res = simulate(frame, [motor], VACUUM, trajectories=True, descent=False)
    track = res.trajectories[0]
    dense = dense_trajectory(track, max_gap_s=0.02)
    coast = (dense["time_s"] > 1.0) & (dense["time_s"] <= res.apogee_time_s[0])
    i_b = int(np.searchsorted(track["time_s"], 1.0))  # the step that ends on burnout
    assert track["time_s"][i_b] == pytest.approx(1.0, abs=1e-9)
    dt = dense["time_s"][coast] - track["time_s"][i_b]
    expected = track["altitude_m"][i_b] + track["vz_m_s"][i_b] * dt - 0.5 * G * dt**2
    assert np.max(np.abs(dense["altitude_m"][coast] - expected)) < 1e-6 * res.apogee_m[0]
    assert np.max(np.diff(track["time_s"])) > 0.5  # the case: the coast's steps are long


def test_speeds_do_not_bend_toward_the_device_before_it_opens() -> None:
    # The step in which a parachute opens ends on a row that carries the parachute's drag; the speeds drawn
    # before the opening must stay between the step's end values, not dip toward that deceleration.
    chute = Recovery(device="parachute", deploy="ejection", drag_area_m2=0.3)
    frame = Airframe("chute", 0.5, 0.05, 0.5, launch=Launch(rail_length_m=1.0), recovery=chute)
    motor = MotorRecord("T", [0.0, 1.0], [40.0, 40.0], total_mass_kg=0.1, propellant_mass_kg=0.04, delays_s=(6.0,))
    res = simulate(frame, [motor], VACUUM, trajectories=True)
    track = res.trajectories[0]
    dense = dense_trajectory(track, max_gap_s=0.02)
    opening = res.deploy_time_s[0]
    before = track["time_s"][track["time_s"] < opening - 1e-9][-1]
    inside = (dense["time_s"] > before) & (dense["time_s"] < opening)
    ends = dense["vz_m_s"][np.isin(dense["time_s"], [before, opening])]
    assert inside.any()
    assert np.all(dense["vz_m_s"][inside] <= ends.max() + 1e-9)
    assert np.all(dense["vz_m_s"][inside] >= ends.min() - 1e-9)
