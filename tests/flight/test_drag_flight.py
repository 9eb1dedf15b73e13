"""The drag estimated from the shape, flown (issue 11): where the drag comes from, the tables the flight
reads, and apogees against an independent solve_ivp oracle written here.

The oracle flies the same model in one dimension (a vertical rail and no wind keep the flight on the
vertical): scipy's DOP853 between thrust-curve samples, the powered Cd(Mach) while the motor burns and the
coasting one after, air from the exact standard-atmosphere functions (not the integrator's 5 m table).
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np
import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

from motorlib import MotorRecord, SimulationInputError
from motorlib.files.airframe_toml import airframe_from_dict, load_airframe
from motorlib.flight.airframe import ESTIMATE_MACH_STEP, Airframe, Launch
from motorlib.flight.atmosphere import EARTH_RADIUS_M
from motorlib.flight.drag import drag_components, drag_curves
from motorlib.flight.geometry import Body, Fins, Geometry, Nose
from motorlib.flight.integrate import FlightSettings, simulate
from motorlib.flight.summary import drag_summary
from motorlib.units import STANDARD_GRAVITY_M_S2 as G0

from ..conftest import SAMPLE_DIR

QUIBBLE = SAMPLE_DIR / "airframes" / "quibble-41.toml"
GEOMETRY = Geometry(0.58, Nose("ogive", 0.16), Body(0.74), Fins(3, 0.09, 0.04, 0.05, 0.06, 0.003))


def _estimated_quibble() -> Airframe:
    """The sample airframe with its drag left to the shape, a vertical rail and no wind, no recovery."""
    frame = load_airframe(QUIBBLE)
    return dataclasses.replace(frame, drag_coefficient=None, drag_table=(), drag_table_powered=(), drag_source=None,
                               recovery=None, launch=dataclasses.replace(frame.launch, rail_angle_rad=0.0,
                                                                         wind_speed_m_s=0.0))


def _motor(impulse_ns: float, burn_s: float) -> MotorRecord:
    """An invented 29 mm motor with a neutral curve (specific impulse 190 s, propellant half its mass)."""
    t = np.array([0.0, 0.04, 0.4, 0.88, 0.95, 1.0]) * burn_s
    f = np.array([0.0, 0.95, 1.0, 0.92, 0.3, 0.0])
    f = f * impulse_ns / np.trapezoid(f, t)
    propellant = impulse_ns / (190.0 * G0)
    return MotorRecord(designation="T", maker="Test (fictional)", time_s=t, thrust_n=f, diameter_m=0.029,
                       length_m=0.2, total_mass_kg=2.0 * propellant, propellant_mass_kg=propellant)


def _oracle_apogee_m(frame: Airframe, motor: MotorRecord) -> float:
    """Apogee [m] of a vertical flight by solve_ivp (DOP853): powered Cd(M) until burnout, coasting after."""
    site = frame.launch.site
    area = math.pi * frame.diameter_m**2 / 4.0
    machs = np.array(frame.drag_machs)
    coasting = np.array(frame.drag_cds)
    powered = np.array(frame.drag_cds_powered)
    burnout = float(motor.time_s[-1])
    dry = frame.mass_kg

    def mass(t: float) -> float:
        return dry + motor.total_mass_kg - motor.propellant_mass_kg * float(motor.impulse_at_ns(t)) / motor.total_impulse_ns

    def rhs(t: float, y: np.ndarray) -> list[float]:
        z, v = y
        _, _, rho, sound = site.air(z)
        table = powered if t < burnout else coasting
        cd = np.interp(abs(v) / float(sound), machs, table)
        drag = 0.5 * float(rho) * v * abs(v) * cd * area
        thrust = float(motor.thrust_at_n(t)) if t < burnout else 0.0
        gravity = G0 * (EARTH_RADIUS_M / (EARTH_RADIUS_M + site.elevation_m + z)) ** 2
        return [v, (thrust - drag) / mass(t) - gravity]

    def apogee(t: float, y: np.ndarray) -> float:
        return y[1]

    apogee.terminal, apogee.direction = True, -1
    t0 = brentq(lambda t: float(motor.thrust_at_n(t)) - mass(t) * G0, motor.time_s[0], motor.time_s[2], xtol=1e-14)
    y = np.array([0.0, 0.0])
    knots = [t0] + [float(t) for t in motor.time_s if t > t0]
    for a, b in zip(knots, knots[1:]):  # restart at each sample: no kink of the thrust inside a step
        y = solve_ivp(rhs, (a, b), y, method="DOP853", rtol=1e-10, atol=1e-8).y[:, -1]
    coast = solve_ivp(rhs, (burnout, burnout + 200.0), y, method="DOP853", rtol=1e-10, atol=1e-8, events=apogee)
    return float(coast.y_events[0][0][0])


# ----------------------------------------------------------------------------- where the drag comes from
def test_geometry_without_a_cd_flies_the_estimate() -> None:
    frame = Airframe("a", 0.3, 0.0416, geometry=GEOMETRY, mount_diameter_m=0.029)
    assert frame.drag_source == "estimated"
    mach, powered, coasting = drag_curves(GEOMETRY, 0.0416, max_mach=4.0, mach_step=ESTIMATE_MACH_STEP,
                                          exhaust_diameter_m=0.029)
    assert frame.drag_machs == tuple(mach.tolist())
    assert frame.drag_cds == tuple(coasting.tolist()) and frame.drag_cds_powered == tuple(powered.tolist())
    assert all(p < c for p, c in zip(frame.drag_cds_powered, frame.drag_cds))  # the exhaust fills part of the base


def test_an_explicit_cd_or_table_wins_and_the_plain_record_keeps_its_default() -> None:
    assert Airframe("a", 0.3, 0.0416, drag_coefficient=0.6, geometry=GEOMETRY).drag_source == "given"
    table = Airframe("a", 0.3, 0.0416, drag_table=((0.0, 0.5), (1.0, 0.7)), geometry=GEOMETRY)
    assert table.drag_source == "given" and table.drag_cds_powered == table.drag_cds == (0.5, 0.7)
    plain = Airframe("a", 0.3, 0.0416)
    assert plain.drag_coefficient == 0.5 and plain.drag_source == "given"


def test_the_airframe_file_may_leave_the_drag_to_the_geometry() -> None:
    import tomllib

    data = tomllib.loads(QUIBBLE.read_text())
    del data["airframe"]["drag_coefficient"]
    assert airframe_from_dict(data, "q.toml").drag_source == "estimated"
    del data["geometry"]
    with pytest.raises(SimulationInputError, match=r"q\.toml: airframe\.drag_coefficient: missing; give "
                                                   r"drag_coefficient or drag_table, or a \[geometry\]"):
        airframe_from_dict(data, "q.toml")


def test_a_powered_table_must_share_the_machs() -> None:
    with pytest.raises(SimulationInputError, match=r"airframe\.drag_table_powered: must have the Mach numbers"):
        Airframe("a", 0.3, 0.04, drag_table=((0.0, 0.5), (1.0, 0.7)), drag_table_powered=((0.0, 0.4), (2.0, 0.6)))


def test_drag_summary_shows_the_estimate_beside_a_given_cd() -> None:
    given_cd = drag_summary(load_airframe(QUIBBLE))
    assert given_cd["drag_source"] == "given" and given_cd["cd_flown"] == 0.55
    shape = load_airframe(QUIBBLE).geometry
    parts = drag_components(shape, 0.0416, 0.3, altitude_m=120.0, exhaust_diameter_m=0.029)
    assert given_cd["cd_estimated"] == pytest.approx(float(parts.cd_coasting[0]), rel=1e-12)
    estimated = drag_summary(_estimated_quibble())
    assert estimated["drag_source"] == "estimated"
    assert estimated["cd_flown"] == pytest.approx(estimated["cd_estimated"], rel=3e-3)  # the table at 0.02 spacing


@settings(max_examples=60, deadline=None)
@given(st.floats(0.0, 4.0))
@example(1.40625)  # found by hypothesis: the powered table's largest error, 0.51 %
@example(1.4059)
def test_the_flown_table_follows_the_build_up_closely(mach: float) -> None:
    # linear interpolation on the 0.02 Mach grid against the build-up itself at that Mach number; the build-up
    # has a cusp near Mach 1.406 (measured on a 1e-4 Mach grid over 0-4: the largest interpolation error sits
    # there, 0.46 % coasting and 0.52 % powered), far inside the estimate's own 10-20 % uncertainty
    frame = _estimated_quibble()
    exact = drag_components(frame.geometry, frame.diameter_m, mach, altitude_m=120.0, exhaust_diameter_m=0.029)
    assert np.interp(mach, frame.drag_machs, frame.drag_cds) == pytest.approx(float(exact.cd_coasting[0]), rel=6e-3)
    assert np.interp(mach, frame.drag_machs, frame.drag_cds_powered) == pytest.approx(float(exact.cd_powered[0]), rel=6e-3)


# ----------------------------------------------------------------------------- flown against the oracle
# With the default steps a fast, draggy supersonic coast errs by up to ~2e-3 (the coast step is a fraction
# of v/g, long where drag decelerates at several g; a constant Cd errs 2e-4 on the same flight; measured,
# not this issue's to fix), so the default-step check is 2e-3 and the converged run (finer steps) must
# agree to 2e-5.
_FINE = FlightSettings(tolerance=1e-9)


@pytest.mark.parametrize(("impulse_ns", "burn_s", "default_rel"), [(60.0, 1.5, 1e-4), (450.0, 1.6, 2e-3)])
def test_powered_and_coasting_drag_fly_as_the_oracle(impulse_ns: float, burn_s: float, default_rel: float) -> None:
    frame = _estimated_quibble()
    motor = _motor(impulse_ns, burn_s)
    oracle = _oracle_apogee_m(frame, motor)
    assert float(simulate(frame, [motor], descent=False).apogee_m[0]) == pytest.approx(oracle, rel=default_rel)
    assert float(simulate(frame, [motor], _FINE, descent=False).apogee_m[0]) == pytest.approx(oracle, rel=2e-5)
    coasting_only = dataclasses.replace(frame, drag_table_powered=())  # the powered table matters: it is flown
    assert float(simulate(coasting_only, [motor], _FINE, descent=False).apogee_m[0]) < oracle * (1 - 1e-3)


def test_issue_figures_constant_cd_and_base_drag_rise_at_mach_1_3_to_2_1() -> None:
    # Issue 11 states, as measured by its author (not a published source): a constant Cd overstates a
    # Mach 1.3-2.1 apogee by 13-34 %, and the power-off base-drag rise lowers apogee a further 6-9 %.
    # Read here as: the subsonic Cd (Mach 0.3, coasting) held constant against the full estimate (powered
    # Cd(M) while burning, coasting after); and the full estimate against the powered Cd(M) all the way.
    # Measured with this oracle: this small model (a 29 mm motor in a 41.6 mm body) gives 21 and 23 %, and
    # 6.9 and 7.2 %; the 98 mm sample airframe's shape (a 98 mm motor fills most of its 102 mm base) gives
    # 10-12 % and 13-17 % at Mach 1.3-1.9: the base-drag rise depends on how much of the base the motor fills.
    full = _estimated_quibble()
    constant = dataclasses.replace(full, drag_table=(), drag_table_powered=(),
                                   drag_coefficient=float(np.interp(0.3, full.drag_machs, full.drag_cds)))
    powered_only = dataclasses.replace(full, drag_table=full.drag_table_powered, drag_table_powered=())
    for impulse_ns, burn_s in ((450.0, 1.6), (640.0, 1.6)):
        motor = _motor(impulse_ns, burn_s)
        assert 1.3 <= float(simulate(full, [motor], descent=False).max_mach[0]) <= 2.1
        apogee = {name: _oracle_apogee_m(frame, motor)
                  for name, frame in (("full", full), ("constant", constant), ("powered", powered_only))}
        assert 0.13 <= apogee["constant"] / apogee["full"] - 1.0 <= 0.34
        assert 0.06 <= 1.0 - apogee["full"] / apogee["powered"] <= 0.09
        ours = {name: float(simulate(frame, [motor], descent=False).apogee_m[0])
                for name, frame in (("full", full), ("constant", constant), ("powered", powered_only))}
        for name in ours:
            assert ours[name] == pytest.approx(apogee[name], rel=2e-3)  # default steps: see _FINE above


def test_a_batch_mixing_given_and_estimated_drag_equals_single_flights() -> None:
    estimated = _estimated_quibble()
    given_cd = dataclasses.replace(estimated, drag_table=(), drag_table_powered=(), drag_coefficient=0.55,
                                   drag_source="given")
    motor = _motor(120.0, 1.2)
    together = simulate([estimated, given_cd], [motor, motor], descent=False).apogee_m
    alone = [float(simulate(f, [motor], descent=False).apogee_m[0]) for f in (estimated, given_cd)]
    assert together.tolist() == pytest.approx(alone, rel=1e-12)
    assert together[0] != together[1]


def test_launch_record_is_untouched_by_the_estimate() -> None:
    frame = Airframe("a", 0.3, 0.0416, geometry=GEOMETRY, launch=Launch(rail_length_m=2.0))
    assert frame.launch.rail_length_m == 2.0 and frame.drag_coefficient == pytest.approx(frame.drag_cds[0])

