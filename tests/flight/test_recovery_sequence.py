"""Recovery sequences (issue 10): a drogue and a main, each opening speed and load, landing time, speed and place.

The reference is written here, independently of the batched integrator: scipy's solve_ivp (DOP853, tight
tolerances) on the 3-D point mass (x east, y north, z up) with the same forces (thrust along the air-relative
velocity once off the rail, drag ½·ρ·|v_rel|·v_rel·Cd·A plus each open device's Cd·A, constant gravity), the
wind w(z) = w10·(max(z, 1 m)/10 m)^(1/7) blowing from a compass direction, air from the exact standard
atmosphere functions, and terminal events at apogee, at the main's altitude and at the ground.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from motorlib import MotorRecord
from motorlib.files.airframe_toml import airframe_from_dict
from motorlib.flight import Airframe, FlightSettings, Launch, Recovery, simulate
from motorlib.errors import SimulationInputError

G = 9.80665
FLAT = FlightSettings(vary_gravity=False)
MOTOR = MotorRecord("J", [0.0, 1.9, 2.0], [260.0, 240.0, 0.0], total_mass_kg=0.9, propellant_mass_kg=0.45,
                    delays_s=(14.0,))  # thrust above the weight from ignition: liftoff at 0
DROGUE = Recovery(device="drogue", deploy="apogee", drag_area_m2=0.12)
MAIN = Recovery(device="main", deploy="altitude", drag_area_m2=1.1, deploy_altitude_m=300.0)


def _frame(wind_m_s: float = 0.0, rail_angle_deg: float = 0.0, devices=(DROGUE, MAIN), **launch) -> Airframe:
    return Airframe("dual", 2.4, 0.054, 0.5, launch=Launch(rail_length_m=2.5, rail_angle_rad=math.radians(rail_angle_deg),
                                                            wind_speed_m_s=wind_m_s, **launch),
                    recovery_sequence=devices)


def reference(frame: Airframe, motor: MotorRecord, *, wind_from_deg: float = 270.0, rail_azimuth_deg: float = 90.0,
              devices=(("apogee", None, 0.12), ("altitude", 300.0, 1.1))) -> dict:
    """Apogee, each opening (t, z, air speed) and landing (t, speed, east, north) of one flight."""
    site = frame.launch.site
    a, phi = frame.launch.rail_angle_rad, math.radians(rail_azimuth_deg)
    u = np.array([math.sin(a) * math.sin(phi), math.sin(a) * math.cos(phi), math.cos(a)])
    theta = math.radians(wind_from_deg)
    toward = np.array([-math.sin(theta), -math.cos(theta), 0.0])  # the wind blows from theta toward theta + 180°
    burnout = float(motor.time_s[-1])
    itot = motor.total_impulse_ns

    def wind(z: float) -> np.ndarray:
        return frame.launch.wind_speed_m_s * (max(z, 1.0) / 10.0) ** (1.0 / 7.0) * toward

    def mass(t: float) -> float:
        return frame.mass_kg + motor.total_mass_kg - motor.propellant_mass_kg * float(motor.impulse_at_ns(min(t, burnout))) / itot

    def k_of(z: float, extra: float) -> float:
        _, _, rho, _ = site.air(z)
        return 0.5 * float(rho) * (frame.drag_coefficient * frame.reference_area_m2 + extra)

    def thrust(t: float) -> float:
        return float(motor.thrust_at_n(t)) if t < burnout else 0.0

    # ---- rail: distance s along u, speed v ----
    def rail(t: float, y: np.ndarray) -> list[float]:
        s, v = y
        rel = v * u - wind(s * u[2])
        return [v, (thrust(t) - k_of(s * u[2], 0.0) * np.linalg.norm(rel) * (rel @ u)) / mass(t) - G * u[2]]

    def rail_end(t: float, y: np.ndarray) -> float:
        return y[0] - frame.launch.rail_length_m

    rail_end.terminal, rail_end.direction = True, 1
    t, y = 0.0, np.array([0.0, 0.0])
    for end in (1.9, 2.0):
        sol = solve_ivp(rail, (t, end), y, method="DOP853", rtol=1e-11, atol=1e-11, events=rail_end)
        t, y = float(sol.t[-1]), sol.y[:, -1]
        if sol.status == 1:
            break
    state = np.concatenate((y[0] * u, y[1] * u))
    # ---- free flight, device after device ----
    extra, out, pending, apogee_seen = 0.0, {"openings": []}, list(devices), False

    def rhs(t: float, y: np.ndarray, extra: float) -> np.ndarray:
        rel = y[3:] - wind(y[2])
        speed = np.linalg.norm(rel)
        acc = (thrust(t) / speed - k_of(y[2], extra) * speed) * rel / mass(t)
        acc[2] -= G
        return np.concatenate((y[3:], acc))

    while True:
        kind, level, area = pending[0] if pending else (None, None, 0.0)
        events = [lambda t_, y_, e: y_[2] if t_ > 3.0 else 1.0, lambda t_, y_, e: y_[5],
                  lambda t_, y_, e: y_[2] - (level if kind == "altitude" else -1e9)]
        for ev in events:
            ev.terminal, ev.direction = True, -1
        events[1].terminal = not apogee_seen
        knots = [s for s in (1.9, 2.0) if s > t + 1e-12]
        sol = solve_ivp(rhs, (t, knots[0] if knots else t + 2000.0), state, method="DOP853", rtol=1e-11,
                        atol=1e-11, args=(extra,), events=events)
        t, state = float(sol.t[-1]), sol.y[:, -1]
        hit = [e.size > 0 for e in sol.t_events]
        if hit[1] and not apogee_seen:
            apogee_seen = True
            out["apogee_m"], out["apogee_time_s"] = float(state[2]), t
            if kind == "apogee":
                out["openings"].append((t, float(state[2]), float(np.linalg.norm(state[3:] - wind(state[2])))))
                extra += area
                pending.pop(0)
        elif hit[2]:
            out["openings"].append((t, float(state[2]), float(np.linalg.norm(state[3:] - wind(state[2])))))
            extra += area
            pending.pop(0)
        elif hit[0]:
            out.update(landing_time_s=t, landing_speed_m_s=float(np.linalg.norm(state[3:])),
                       east_m=float(state[0]), north_m=float(state[1]))
            return out


def test_dual_deploy_against_an_independent_reference() -> None:
    # Issue 10: drogue at apogee, main at 300 m, in a 5 m/s wind: landing time, speed and drift within 0.5 %,
    # opening speeds within 0.5 %.
    frame = _frame(wind_m_s=5.0)
    res = simulate(frame, [MOTOR], FLAT)
    ref = reference(frame, MOTOR)
    assert len(ref["openings"]) == 2 and ref["apogee_m"] > 600.0
    assert res.apogee_m[0] == pytest.approx(ref["apogee_m"], rel=1e-5)
    for k, (t_open, z_open, v_open) in enumerate(ref["openings"]):
        assert res.deployment_time_s[0, k] == pytest.approx(t_open, rel=5e-3)
        assert res.deployment_altitude_m[0, k] == pytest.approx(z_open, rel=5e-3)
        assert res.deployment_speed_m_s[0, k] == pytest.approx(v_open, rel=5e-3)
    assert res.landing_time_s[0] == pytest.approx(ref["landing_time_s"], rel=5e-3)
    assert res.landing_speed_m_s[0] == pytest.approx(ref["landing_speed_m_s"], rel=5e-3)
    assert res.drift_m[0] == pytest.approx(ref["east_m"], rel=5e-3)
    summary = res.summary(0)
    assert [d["device"] for d in summary["deployments"]] == ["drogue", "main"]
    assert set(summary["deployments"][0]) >= {"device", "trigger", "time_s", "altitude_m", "speed_m_s", "opening_load_n"}
    assert set(summary["landing"]) == {"time_s", "speed_m_s", "east_m", "north_m", "distance_m", "bearing_deg"}
    main = summary["deployments"][1]
    _, _, rho, _ = frame.launch.site.air(main["altitude_m"])
    assert main["opening_load_n"] == pytest.approx(0.5 * float(rho) * main["speed_m_s"] ** 2 * 1.1, rel=1e-9)


def test_a_main_that_replaces_the_drogue_falls_faster_than_one_that_adds_to_it() -> None:
    released = Recovery(device="main", deploy="altitude", drag_area_m2=1.1, deploy_altitude_m=300.0, replaces=True)
    both = simulate([_frame(), _frame(devices=(DROGUE, released))], [MOTOR, MOTOR], FLAT)
    assert both.landing_descent_rate_m_s[1] > both.landing_descent_rate_m_s[0]
    # the released main alone: its terminal speed at the pad, √(2·m·g/(ρ·(Cd·A body + Cd·A main)))
    _, _, rho0, _ = _frame().launch.site.air(0.0)
    burnt = 2.4 + 0.45
    v_t = math.sqrt(2 * burnt * G / (float(rho0) * (0.5 * _frame().reference_area_m2 + 1.1)))
    assert both.landing_descent_rate_m_s[1] == pytest.approx(v_t, rel=1e-3)  # closed form, reached before landing


def test_a_timer_after_the_drogue_opens_the_main() -> None:
    timed = Recovery(device="main", deploy="after", drag_area_m2=1.1, delay_s=5.0)
    res = simulate(_frame(devices=(DROGUE, timed)), [MOTOR], FLAT)
    assert res.deployment_time_s[0, 1] - res.deployment_time_s[0, 0] == pytest.approx(5.0, abs=1e-9)


def test_dual_deploy_is_a_few_lines_of_toml() -> None:
    data = {"airframe": {"mass": "2.4 kg", "diameter": "54 mm", "drag_coefficient": 0.5},
            "recovery": [{"device": "drogue", "trigger": "apogee", "drag_coefficient": 0.8, "diameter": "0.45 m"},
                         {"device": "main", "trigger": "altitude", "altitude": "300 m", "drag_area": "1.1 m2"}]}
    frame = airframe_from_dict(data, "dual.toml")
    assert [d.device for d in frame.recovery_devices] == ["drogue", "main"]
    assert frame.recovery_devices[0].drag_area_m2 == pytest.approx(0.8 * math.pi * 0.45**2 / 4)
    assert frame.recovery_devices[1].deploy_altitude_m == 300.0 and frame.recovery_devices[1].drag_area_m2 == 1.1
    bad = {**data, "recovery": [{"device": "main", "trigger": "altitude", "drag_area": "1 m2"}]}
    with pytest.raises(SimulationInputError, match=r"recovery\[1\]\.altitude"):
        airframe_from_dict(bad, "dual.toml")
    typo = {**data, "recovery": [{"device": "main", "trigger": "apogee", "drag_area": "1 m2", "delya": 2}]}
    with pytest.raises(SimulationInputError, match=r"recovery\[1\]\.delya"):
        airframe_from_dict(typo, "dual.toml")


def test_an_apogee_trigger_with_a_delay_opens_that_long_after_apogee() -> None:
    late = Recovery(device="drogue", deploy="apogee", drag_area_m2=0.12, delay_s=2.0)
    res = simulate(_frame(devices=(late, MAIN)), [MOTOR], FLAT)
    assert res.deployment_time_s[0, 0] == pytest.approx(res.apogee_time_s[0] + 2.0, abs=1e-9)
    assert res.deployment_altitude_m[0, 0] < res.apogee_m[0] - 15.0  # it fell for 2 s: ½·g·t² less a little drag
