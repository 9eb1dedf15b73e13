"""The batched flight integrator: closed forms, an independent solve_ivp reference, the vectorisation contract."""

from __future__ import annotations

import dataclasses
import math

import numpy as np
import pytest

from motorlib import MotorRecord, read_record
from motorlib.flight.airframe import Airframe, Launch, Recovery
from motorlib.flight import NO_LIFTOFF, NO_MASS, OK, STUCK_ON_RAIL, FlightSettings, MotorPack, simulate

from ..conftest import SAMPLE_DIR
from ..reference.values import BOOST_COAST_C1, RAIL_EXIT
from ..reference_flight import reference_flight
from ..synthetic import synthetic_flights

G = 9.80665
FLAT = FlightSettings(vary_gravity=False)
UNIFORM = FlightSettings(vary_gravity=False, uniform_air=True)


def constant_motor(thrust_n: float, burn_s: float, mass_kg: float, delays=(3.0, 5.0)) -> MotorRecord:
    """Constant thrust from ignition, and (nearly) constant mass: the propellant is 1 µg (2e-9 of the mass)."""
    return MotorRecord("test", [0.0, burn_s], [thrust_n, thrust_n], total_mass_kg=mass_kg, propellant_mass_kg=1e-9,
                       delays_s=delays)


def vacuum_frame(mass_kg: float, rail_m: float = 1.0, angle_deg: float = 0.0) -> Airframe:
    # a 1 µm diameter: drag about 1e-13 of the weight, i.e. vacuum
    return Airframe("vacuum", mass_kg, 1e-6, 0.5, launch=Launch(rail_length_m=rail_m,
                                                                 rail_angle_rad=math.radians(angle_deg)))


def test_vacuum_flight_with_constant_thrust_and_mass() -> None:
    # Textbook closed form: a = T/m - g; v_b = a t_b; apogee = a t_b²/2 + v_b²/(2g); t_apogee = t_b + v_b/g.
    thrust, burn, motor_mass, dry = 30.0, 1.2, 0.1, 0.4
    m = dry + motor_mass
    results = simulate(vacuum_frame(dry), [constant_motor(thrust, burn, motor_mass)], FLAT, descent=False)
    a = thrust / m - G
    v_b = a * burn
    assert results.status[0] == OK
    assert results.apogee_m[0] == pytest.approx(0.5 * a * burn**2 + v_b**2 / (2 * G), rel=2e-8)
    assert results.apogee_time_s[0] == pytest.approx(burn + v_b / G, rel=2e-8)
    assert results.max_speed_m_s[0] == pytest.approx(v_b, rel=2e-8)
    assert results.rail_exit_speed_m_s[0] == pytest.approx(math.sqrt(2 * 1.0 * a), rel=2e-8)
    assert results.optimal_delay_s[0] == pytest.approx(v_b / G, rel=2e-8)
    # ejection states at the 3 s and 5 s delays: z = h_b + v_b d - g d²/2, speed |v_b - g d|
    h_b = 0.5 * a * burn**2
    for k, d in enumerate((3.0, 5.0)):
        assert results.ejection_altitude_m[0, k] == pytest.approx(h_b + v_b * d - 0.5 * G * d**2, rel=2e-8)
        assert results.ejection_speed_m_s[0, k] == pytest.approx(abs(v_b - G * d), rel=2e-8, abs=1e-7)


@pytest.mark.parametrize(("angle", "expected"), RAIL_EXIT.rows)
def test_rail_exit_speed_on_a_tilted_rail(angle: float, expected: float) -> None:
    # tests/reference/check_values.md#rail-exit (textbook closed form): T = 20 N, m = 0.5 kg, L = 1 m,
    # v = sqrt(2 L (T/m - g cos θ)).
    results = simulate(vacuum_frame(0.4, 1.0, angle), [constant_motor(20.0, 1.0, 0.1)], FLAT, descent=False)
    assert results.rail_exit_speed_m_s[0] == pytest.approx(expected, abs=5e-7)


def _boost_coast(thrust: float, mass: float, burn: float, k: float, coast_mass: float) -> tuple[float, float, float]:
    """Fehskens-Malewicki constant-mass boost and coast: apogee, v_b, t_c.

    The equations of tests/reference/check_values.md#boost-coast (secondary copies of the method).
    """
    q = math.sqrt((thrust - mass * G) / k)
    x = 2 * k * q / mass
    v_b = q * math.tanh(x * burn / 2)
    y_b = -(mass / (2 * k)) * math.log((thrust - mass * G - k * v_b**2) / (thrust - mass * G))
    y_c = (coast_mass / (2 * k)) * math.log((coast_mass * G + k * v_b**2) / (coast_mass * G))
    t_c = math.sqrt(coast_mass / (k * G)) * math.atan(v_b / math.sqrt(coast_mass * G / k))
    return y_b + y_c, v_b, t_c


def test_quadratic_drag_boost_and_coast_in_uniform_air() -> None:
    # The closed form as written above reproduces case C1 of tests/reference/check_values.md#boost-coast
    # (apogee 542.7223222368 m, v_b 169.2574910455 m/s, t_c 8.1070592639 s); the library is then checked
    # against it with the coast mass equal to the boost mass (our motor keeps its mass).
    ((*case, apogee, v_b, t_c),) = BOOST_COAST_C1.rows  # T, M, t_b, k, M_c; then the three results
    published = _boost_coast(*case)
    assert published == (pytest.approx(apogee, rel=1e-10), pytest.approx(v_b, rel=1e-10), pytest.approx(t_c, rel=1e-10))
    thrust, burn, mass = 10.0, 1.0, 0.05
    k = 1.0e-4  # = ½ ρ Cd A with ρ = 1.225 kg/m³ at the pad
    cd = 0.5
    area = k / (0.5 * 1.225 * cd)  # sea-level standard density is 1.2249991558877 kg/m³; correct for it below
    rho0 = 1.2249991558877125
    diameter = math.sqrt(4 * area / math.pi)
    frame = Airframe("drag", mass - 0.01, diameter, cd, launch=Launch(rail_length_m=0.5))
    results = simulate(frame, [constant_motor(thrust, burn, 0.01, delays=())], UNIFORM, descent=False)
    apogee, v_b, t_c = _boost_coast(thrust, mass, burn, 0.5 * rho0 * cd * area, mass)
    assert results.apogee_m[0] == pytest.approx(apogee, rel=1e-5)  # default steps: about 1.5e-6 here
    assert results.optimal_delay_s[0] == pytest.approx(t_c, rel=1e-5)
    assert results.max_speed_m_s[0] == pytest.approx(v_b, rel=1e-6)
    fine = FlightSettings(vary_gravity=False, uniform_air=True, tolerance=1e-9)
    finer = simulate(frame, [constant_motor(thrust, burn, 0.01, delays=())], fine, descent=False)
    # the integrator converges: a 300 x tighter tolerance cuts the error by far more than 30
    assert abs(finer.apogee_m[0] - apogee) < abs(results.apogee_m[0] - apogee) / 30
    assert finer.apogee_m[0] == pytest.approx(apogee, rel=1e-8)
    assert results.apogee_m[0] < 0.5 * (thrust / mass - G) * burn**2 + v_b**2 / (2 * G)  # drag must lower it


def test_against_solve_ivp_on_random_flights() -> None:
    # Reference: scipy.integrate.solve_ivp (DOP853, rtol 1e-10) on the same model, written separately
    # (tests/reference_flight.py). Goals of the flight-physics issue: apogee within 0.01 %, time to apogee
    # within 5 ms, rail exit speed within 0.01 m/s. The benchmark repeats this over 1,000 flights.
    frames, motors = synthetic_flights(120, seed=11)
    results = simulate(frames, motors, descent=False)
    checked = 0
    for i, (frame, motor) in enumerate(zip(frames, motors)):
        ref = reference_flight(frame, motor)
        if not math.isfinite(ref["apogee_m"]):
            assert results.status[i] == STUCK_ON_RAIL
            continue
        assert results.status[i] == OK
        assert results.liftoff_time_s[i] == pytest.approx(ref["liftoff_time_s"], abs=1e-9)
        assert results.apogee_m[i] == pytest.approx(ref["apogee_m"], rel=1e-4)
        assert results.apogee_time_s[i] == pytest.approx(ref["apogee_time_s"], abs=5e-3)
        assert results.rail_exit_speed_m_s[i] == pytest.approx(ref["rail_exit_speed_m_s"], abs=0.01)
        # downrange converges like the rest (4th order) but is more sensitive to the turn after rail exit
        assert results.apogee_downrange_m[i] == pytest.approx(ref["apogee_downrange_m"], rel=5e-3, abs=0.5)
        checked += 1
    assert checked >= 110


def test_batch_equals_single_runs() -> None:
    # Vectorisation contract: k flights together give the numbers of k single runs, to the last bit (an
    # independent check found apogees 2e-16 apart: the Hermite root's Newton loop stopped when the whole batch
    # had converged, so a flight's iterations depended on its neighbours).
    frames, motors = synthetic_flights(40, seed=11)
    together = simulate(frames, motors)
    for i in range(40):
        alone = simulate(frames[i], [motors[i]])
        for name in ("apogee_m", "apogee_time_s", "rail_exit_speed_m_s", "max_mach", "liftoff_thrust_to_weight",
                     "landing_time_s", "drift_m"):
            a, b = getattr(together, name)[i], getattr(alone, name)[0]
            assert a == b or (np.isnan(a) and np.isnan(b)), (name, i, a, b)
        width = alone.ejection_altitude_m.shape[1]  # the batch pads to its widest delay list
        np.testing.assert_allclose(together.ejection_altitude_m[i, :width], alone.ejection_altitude_m[0], rtol=1e-12)


def test_fact_of_the_trade_small_model() -> None:
    # Common practice, no published source: a 14 mm, 15 g model (loaded) on a 1.1 N·s motor burning 0.36 s, with
    # drag rho·A·v² (Cd = 2 on the frontal area), reaches about 82 m at about 3.4-3.6 s, climbing ~2 m/s at 3.4 s.
    motor = read_record(SAMPLE_DIR / "teakettle-thrust-co_1-2a3-2-4.xml")  # 1.10 N·s, 0.37 s burn
    frame = Airframe("fact", 0.015 - motor.total_mass_kg, 0.014, drag_coefficient=2.0, launch=Launch(rail_length_m=0.5))
    results = simulate(frame, [motor], trajectories=True)
    assert results.apogee_m[0] == pytest.approx(82.0, rel=0.08)
    assert 3.4 <= results.apogee_time_s[0] <= 3.65
    trajectory = results.trajectories[0]
    assert 0.5 <= float(np.interp(3.4, trajectory["time_s"], trajectory["vz_m_s"])) <= 3.0


def test_liftoff_waits_for_thrust_to_exceed_weight() -> None:
    motor = MotorRecord("ramp", [0.0, 1.0, 2.0], [0.0, 20.0, 0.0], total_mass_kg=0.05, propellant_mass_kg=0.02)
    frame = vacuum_frame(0.25)
    results = simulate(frame, [motor], FLAT, descent=False)
    t0 = results.liftoff_time_s[0]
    mass = 0.3 - 0.02 * float(motor.impulse_at_ns(t0)) / motor.total_impulse_ns
    assert float(motor.thrust_at_n(t0)) == pytest.approx(mass * G, rel=1e-12)


def test_statuses() -> None:
    weak = MotorRecord("weak", [0.0, 1.0], [1.0, 1.0], total_mass_kg=0.05, propellant_mass_kg=0.02)
    unweighed = MotorRecord("no mass", [0.0, 1.0], [50.0, 50.0])
    puff = MotorRecord("puff", [0.0, 0.01, 0.02], [0.0, 500.0, 0.0], total_mass_kg=0.05, propellant_mass_kg=0.002)
    frame = Airframe("heavy", 2.0, 0.05, 0.5, launch=Launch(rail_length_m=6.0))
    results = simulate(frame, [weak, unweighed, puff], descent=False)
    assert list(results.status) == [NO_LIFTOFF, NO_MASS, STUCK_ON_RAIL]
    assert "does not lift off" in results.message(0)
    assert np.isnan(results.apogee_m).all()


def test_ballast_lowers_apogee() -> None:
    frames, motors = synthetic_flights(1, seed=5)
    apogees = [simulate(frames[0], motors, added_mass_kg=m, descent=False).apogee_m[0] for m in (0.0, 0.01, 0.05, 0.2)]
    assert apogees == sorted(apogees, reverse=True)


def test_descent_reaches_terminal_speed_and_drifts_with_the_wind() -> None:
    chute = Recovery(device="parachute", deploy="apogee", drag_area_m2=0.8 * math.pi * 0.6**2 / 4)
    calm = Airframe("chute", 0.4, 0.05, 0.5, launch=Launch(rail_length_m=1.5), recovery=chute)
    windy = Airframe("chute", 0.4, 0.05, 0.5, launch=Launch(rail_length_m=1.5, wind_speed_m_s=4.0), recovery=chute)
    motor = constant_motor(40.0, 1.5, 0.08, delays=())
    results = simulate([calm, windy], [motor, motor], UNIFORM)
    dry_mass = 0.4 + 0.08 - 1e-9
    rho0 = 1.2249991558877125
    v_t = math.sqrt(2 * dry_mass * G / (rho0 * (chute.drag_area_m2 + 0.5 * calm.reference_area_m2)))
    assert results.landing_descent_rate_m_s[0] == pytest.approx(v_t, rel=1e-4)
    assert results.deploy_time_s[0] == pytest.approx(results.apogee_time_s[0])
    assert results.descent_time_s[0] > results.apogee_m[0] / v_t  # it starts at rest, so a little longer
    assert abs(results.drift_m[0] - results.apogee_downrange_m[0]) < 1e-6
    assert results.drift_m[1] - results.apogee_downrange_m[1] > 0.8 * 4.0 * results.descent_time_s[1] * 0.7


def test_ejection_deploys_at_the_delay_closest_to_optimal() -> None:
    chute = Recovery(device="parachute", deploy="ejection", drag_area_m2=0.2)
    frame = Airframe("chute", 0.3, 0.04, 0.5, launch=Launch(rail_length_m=1.5), recovery=chute)
    motor = MotorRecord("F", [0.0, 0.05, 1.5, 1.6], [0.0, 40.0, 30.0, 0.0], total_mass_kg=0.08,
                        propellant_mass_kg=0.03, delays_s=(2.0, 6.0, 10.0))
    results = simulate(frame, [motor])
    optimal = results.optimal_delay_s[0]
    best = min((2.0, 6.0, 10.0), key=lambda d: abs(d - optimal))
    assert results.deploy_delay_s[0] == best
    assert results.deploy_time_s[0] == pytest.approx(1.6 + best)
    forced = simulate(frame, [motor], deploy_delay_s=np.array([2.0]))
    assert forced.deploy_delay_s[0] == 2.0 and forced.ejection_speed_m_s[0, 0] > 20.0


def test_adjustable_delays_are_reported_per_drill_step() -> None:
    motor = MotorRecord("G", [0.0, 0.05, 1.5, 1.6], [0.0, 80.0, 60.0, 0.0], total_mass_kg=0.12,
                        propellant_mass_kg=0.06, delays_s=(8.0,), delay_adjustable=True)
    pack = MotorPack.from_records([motor])
    np.testing.assert_array_equal(pack.delays_s[0], [1, 2, 3, 4, 5, 6, 7, 8])


def test_mach_table_flat_equals_constant_cd() -> None:
    frames, motors = synthetic_flights(3, seed=9)
    tabled = [Airframe(f.name, f.mass_kg, f.diameter_m, drag_table=((0.0, f.drag_coefficient), (3.0, f.drag_coefficient)),
                       launch=f.launch) for f in frames]
    a = simulate(frames, motors, descent=False)
    b = simulate(tabled, motors, descent=False)
    np.testing.assert_allclose(a.apogee_m, b.apogee_m, rtol=1e-12)


def test_pack_matches_records() -> None:
    frames, motors = synthetic_flights(20, seed=2)
    pack = MotorPack.from_records(motors)
    np.testing.assert_allclose(pack.total_impulse_ns, [m.total_impulse_ns for m in motors], rtol=1e-12)
    burnouts = [m.time_s[-1] for m in motors]
    np.testing.assert_allclose(pack.burnout_s, burnouts)


def test_descent_from_apogee_follows_the_closed_form_fall() -> None:
    # Vertical flight, no wind, uniform air, constant g: after deployment at apogee the rocket falls from rest
    # under quadratic drag, y(t) = (v_t²/g) ln cosh(g t / v_t) (tests/reference/check_values.md#fall-from-rest),
    # so it lands after (v_t/g) arccosh(exp(g h / v_t²)) at v_t tanh(g t / v_t).
    from motorlib.flight.descent import fall_speed_m_s, fall_time_s

    chute = Recovery(device="parachute", deploy="apogee", drag_area_m2=0.25)
    frame = Airframe("drop", 0.4, 0.05, 0.5, launch=Launch(rail_length_m=1.5), recovery=chute)
    motor = constant_motor(40.0, 1.5, 0.08, delays=())
    results = simulate(frame, [motor], UNIFORM)
    rho0 = 1.2249991558877125
    mass = 0.4 + 0.08 - 1e-9
    v_t = math.sqrt(2 * mass * G / (rho0 * (0.25 + 0.5 * frame.reference_area_m2)))
    expected = float(fall_time_s(results.apogee_m[0], v_t))
    assert results.descent_time_s[0] == pytest.approx(expected, rel=1e-4)
    assert results.landing_descent_rate_m_s[0] == pytest.approx(float(fall_speed_m_s(expected, v_t)), rel=1e-4)
    assert abs(results.drift_m[0]) < 1e-9


def test_results_have_a_short_repr_and_a_data_frame() -> None:
    # Issue 14: pd.DataFrame(results) raised and the repr dumped every trajectory array.
    motors = [constant_motor(50.0, 1.0, 0.1), constant_motor(80.0, 1.0, 0.1)]
    results = simulate(vacuum_frame(0.4), motors, FLAT, trajectories=True)
    text = repr(results)
    assert text.startswith("FlightResults(2 flights, 2 ok") and "apogee_m" in text and len(text) < 300
    frame = results.to_frame(index=["A", "B"])
    assert list(frame.index) == ["A", "B"] and frame.loc["B", "apogee_m"] == results.apogee_m[1]
    assert {"status", "message", "optimal_delay_s", "rail_exit_speed_m_s"} <= set(frame.columns)
    assert frame.loc["A", "message"] == "flight completed"


def test_results_are_a_record_with_read_only_arrays() -> None:
    # Issue 17: a caller could overwrite a flight's figures (results.apogee_m[0] = ...) after the rules read them.
    results = simulate(vacuum_frame(0.4), [constant_motor(50.0, 1.0, 0.1)], FLAT, trajectories=True)
    for name in ("status", "apogee_m", "rail_exit_speed_m_s", "ejection_altitude_m", "deployment_time_s"):
        with pytest.raises(ValueError, match="read-only"):
            getattr(results, name).flat[0] = 1.0
    with pytest.raises(ValueError, match="read-only"):
        results.trajectories[0]["altitude_m"][0] = 1.0
    with pytest.raises(TypeError):
        results.trajectories[0]["altitude_m"] = np.zeros(3)  # type: ignore[index]


def test_a_single_record_is_accepted_where_a_list_is_expected() -> None:
    motor = constant_motor(50.0, 1.0, 0.1)
    one = simulate(vacuum_frame(0.4), motor, FLAT)
    assert one.n_flights == 1 and one.apogee_m[0] == simulate(vacuum_frame(0.4), [motor], FLAT).apogee_m[0]
    assert MotorPack.from_records(motor).n_motors == 1


def test_fast_draggy_coasts_are_resolved() -> None:
    # Issue 10 defect 7: the coast step ignored the drag time scale; Mach 2.4-3.2 darts erred up to 7.5e-3 in
    # apogee against the solve_ivp reference (tests/reference_flight.py, DOP853 rtol 1e-10). Goal: 1e-4.
    cases = []
    for thrust, burn, total, prop, dry, diameter, cd in [(2500, 1.0, 1.5, 1.0, 2.0, 0.038, 0.35),
                                                         (1500, 1.5, 1.5, 1.0, 1.5, 0.054, 0.5),
                                                         (2500, 1.2, 1.5, 1.0, 1.5, 0.054, 0.5),
                                                         (2000, 1.0, 1.5, 1.0, 1.0, 0.054, 0.6)]:
        motor = MotorRecord("D", [0.0, burn, burn + 0.01], [thrust, thrust, 0.0], total_mass_kg=total,
                            propellant_mass_kg=prop, delays_s=())
        cases.append((Airframe("dart", dry, diameter, cd, launch=Launch(rail_length_m=6.0)), motor))
    frames, motors = zip(*cases)
    results = simulate(list(frames), list(motors), descent=False)
    assert np.all(results.max_mach > 2.3)
    for i, (frame, motor) in enumerate(cases):
        assert results.apogee_m[i] == pytest.approx(reference_flight(frame, motor)["apogee_m"], rel=1e-4)


def test_kinks_of_a_peaked_drag_table_are_stepped_onto() -> None:
    # Issue 10 defect 7: a step across a point of a Cd(Mach) table (a kink of the drag) cost up to 1.1e-3 in
    # apogee with a table peaking at twice its subsonic Cd; steps now end on the points. Reference as above.
    table = ((0.0, 0.4), (0.8, 0.42), (1.0, 0.85), (1.2, 0.7), (2.0, 0.5), (3.0, 0.45))
    cases = []
    for thrust, burn, total, prop, dry, diameter in [(2500, 1.0, 1.5, 1.0, 2.0, 0.038), (1500, 1.5, 1.5, 1.0, 1.5, 0.054),
                                                     (900, 1.2, 1.0, 0.6, 1.5, 0.054), (600, 1.5, 0.8, 0.5, 1.2, 0.041)]:
        motor = MotorRecord("D", [0.0, burn, burn + 0.01], [thrust, thrust, 0.0], total_mass_kg=total,
                            propellant_mass_kg=prop, delays_s=())
        cases.append((Airframe("dart", dry, diameter, drag_table=table, launch=Launch(rail_length_m=6.0)), motor))
    frames, motors = zip(*cases)
    results = simulate(list(frames), list(motors), descent=False)
    assert np.all(results.max_mach > 1.3)
    for i, (frame, motor) in enumerate(cases):
        assert results.apogee_m[i] == pytest.approx(reference_flight(frame, motor)["apogee_m"], rel=1e-4)


def test_a_calm_flight_flies_the_same_alone_and_beside_a_windy_one() -> None:
    """A group with no wind skips the wind altogether; flown in a windy group, the calm flight takes the wind
    path with zero wind. Both must give the same numbers (each flight's steps depend on its own state only)."""
    frames, motors = synthetic_flights(2, seed=3)
    calm = dataclasses.replace(frames[0], launch=dataclasses.replace(frames[0].launch, wind_speed_m_s=0.0))
    windy = dataclasses.replace(frames[1], launch=dataclasses.replace(frames[1].launch, wind_speed_m_s=6.0,
                                                                      site=calm.launch.site))
    alone = simulate(calm, [motors[0]], descent=False)
    together = simulate([calm, windy], motors, descent=False)
    assert together.apogee_m[0] == alone.apogee_m[0]
    assert together.rail_exit_speed_m_s[0] == alone.rail_exit_speed_m_s[0]
    assert together.apogee_m[1] != alone.apogee_m[0]


def test_a_flight_crossing_the_wind_floor_just_off_the_rail_keeps_its_accuracy() -> None:
    """The power-law wind is held below its 1 m floor, so its slope jumps there. Synthetic flight 918 (seed 7)
    leaves a 0.91 m rail at 0.91 m and meets the floor at 9.9 m/s in a 5.6 m/s wind; a step across the kink
    erred 1.3e-4 in apogee against the independent reference (solve_ivp DOP853, rtol 1e-10, which steps
    through the kink finely), ten times the worst of the other flights."""
    frames, motors = synthetic_flights(919, seed=7)
    frame, motor = frames[918], motors[918]
    assert frame.launch.rail_length_m * math.cos(frame.launch.rail_angle_rad) < 1.0  # the case: exit below 1 m
    ref = reference_flight(frame, motor)
    result = simulate(frame, [motor], descent=False)
    assert result.apogee_m[0] == pytest.approx(ref["apogee_m"], rel=3e-5)
