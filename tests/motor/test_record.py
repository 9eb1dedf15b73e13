"""The motor record: exact integrals, burn time, average thrust, masses, invariants."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st
from scipy.optimize import brentq

from motorlib import CheckSettings, CurveDataError, FiringSpread, MotorRecord, check_record
from motorlib.units import STANDARD_GRAVITY_M_S2
from motorlib.motor.record import cumulative_impulse_ns, threshold_window_s

from ..conftest import curves
from ..reference.values import TRIANGLE


# Triangle oracle: textbook closed form, exact (tests/reference/check_values.md#curve-oracles).
def test_triangle_curve_is_exact(triangle: MotorRecord) -> None:
    ref = TRIANGLE.value
    assert triangle.total_impulse_ns == pytest.approx(ref("total_impulse_ns"), rel=1e-15)
    assert triangle.impulse_class.letter == "B"  # 5.000 N·s is the top of class B
    assert triangle.peak_thrust_n == ref("peak_thrust_n") and triangle.peak_time_s == 0.1
    start, end = triangle.burn_window_s()
    assert (start, end) == (pytest.approx(ref("burn_start_s"), abs=1e-15), pytest.approx(ref("burn_end_s"), abs=1e-15))
    assert triangle.burn_time_s() == pytest.approx(ref("burn_time_s"), abs=1e-14)
    # average thrust: the impulse inside the burn window (4.9875 N·s) over the burn time
    assert triangle.average_thrust_n() == pytest.approx(ref("average_thrust_n"), rel=1e-12)
    assert triangle.computed_designation() == "B5"


def test_triangle_cumulative_impulse_is_the_area_under_the_curve(triangle: MotorRecord) -> None:
    # tests/reference/check_values.md#curve-oracles: [0, 0.5, 5.0] N·s, the areas of the two triangles by hand
    # (0.1 x 10 / 2, then + 0.9 x 10 / 2); the rule is exact for a piecewise-linear curve.
    expected = [0.0, TRIANGLE.value("impulse_at_peak_ns"), TRIANGLE.value("total_impulse_ns")]
    np.testing.assert_allclose(triangle.cumulative_impulse_ns(), expected, rtol=1e-15)


def test_rectangle_curve_is_exact() -> None:
    # tests/reference/check_values.md#curve-oracles: 10 N from 0 to 2 s with vertical edges: 20.00 N·s, top of
    # class D; burn 2 s; 10 N.
    rect = MotorRecord("D10", [0.0, 1e-12, 2.0 - 1e-12, 2.0], [0.0, 10.0, 10.0, 0.0])
    assert rect.total_impulse_ns == pytest.approx(20.0, rel=1e-11)
    assert rect.burn_time_s() == pytest.approx(2.0, rel=1e-11)
    assert rect.average_thrust_n() == pytest.approx(10.0, rel=1e-11)
    exact = MotorRecord("D10", [0.0, 2.0], [10.0, 10.0])
    assert exact.total_impulse_ns == 20.0 and exact.impulse_class.letter == "D"
    bigger = MotorRecord("E10", [0.0, 2.0], [10.0, 10.005])  # adding 0.01 N·s moves it to E
    assert bigger.impulse_class.letter == "E"


def test_threshold_is_a_parameter(triangle: MotorRecord) -> None:
    # 10 % threshold: start 0.01 s, end 0.91 s (linear crossings of 1 N), burn 0.9 s.
    assert triangle.burn_time_s(0.10) == pytest.approx(0.9, abs=1e-14)
    with pytest.raises(ValueError, match="threshold"):
        triangle.burn_time_s(1.5)


def _simpson_area_ns(time_s: np.ndarray, thrust_n: np.ndarray, upto_s: float) -> float:
    """Area under the straight lines through the samples from the first sample to ``upto_s``.

    Simpson's rule on every segment, h/6 (f(a) + 4 f(mid) + f(b)) with the values read off the lines by
    numpy.interp: exact for a linear segment (textbook), and a different rule from the library's trapezoids.
    """
    end = float(np.clip(upto_s, time_s[0], time_s[-1]))
    knots = np.concatenate((time_s[time_s < end], [end]))
    if knots.size < 2:
        return 0.0
    a, b = knots[:-1], knots[1:]
    value = lambda x: np.interp(x, time_s, thrust_n)  # noqa: E731
    return float(np.sum((b - a) / 6.0 * (value(a) + 4.0 * value(0.5 * (a + b)) + value(b))))


@given(curves())
def test_impulse_is_the_area_under_the_curve(curve: MotorRecord) -> None:
    expected = _simpson_area_ns(curve.time_s, curve.thrust_n, curve.time_s[-1])
    assert curve.total_impulse_ns == pytest.approx(expected, rel=1e-12, abs=1e-12)


@given(curves(), st.floats(0.1, 10.0))
def test_scaling_thrust_scales_impulse(curve: MotorRecord, factor: float) -> None:
    scaled = MotorRecord(curve.designation, curve.time_s, factor * curve.thrust_n)
    assert scaled.total_impulse_ns == pytest.approx(factor * curve.total_impulse_ns, rel=1e-12, abs=1e-9)


@given(curves(), st.floats(0.0, 100.0))
def test_shifting_time_keeps_impulse_and_burn_time(curve: MotorRecord, shift: float) -> None:
    moved = MotorRecord(curve.designation, curve.time_s + shift, curve.thrust_n)
    assert moved.total_impulse_ns == pytest.approx(curve.total_impulse_ns, rel=1e-9, abs=1e-9)
    assert moved.burn_time_s() == pytest.approx(curve.burn_time_s(), rel=1e-6, abs=1e-9)


@given(curves(), st.data())
@example(MotorRecord("x", [0.0, 1.0], [0.0, 1.0]), None)
def test_inserting_collinear_points_changes_nothing(curve: MotorRecord, data: st.DataObject | None) -> None:
    i = data.draw(st.integers(0, curve.n_samples - 2)) if data else 0
    fraction = data.draw(st.floats(0.1, 0.9)) if data else 0.5
    t_new = curve.time_s[i] + fraction * (curve.time_s[i + 1] - curve.time_s[i])
    if not curve.time_s[i] < t_new < curve.time_s[i + 1]:
        return
    f_new = float(curve.thrust_at_n(t_new))
    denser = MotorRecord(curve.designation, np.insert(curve.time_s, i + 1, t_new), np.insert(curve.thrust_n, i + 1, f_new))
    assert denser.total_impulse_ns == pytest.approx(curve.total_impulse_ns, rel=1e-9, abs=1e-9)
    assert denser.peak_thrust_n == curve.peak_thrust_n


@given(curves(), st.lists(st.floats(-1.0, 50.0), min_size=1, max_size=20))
@settings(max_examples=50)
def test_impulse_at_matches_dense_integration(curve: MotorRecord, times: list[float]) -> None:
    t = np.array(times)
    got = curve.impulse_at_ns(t)
    for ti, gi in zip(t, got):
        expected = _simpson_area_ns(curve.time_s, curve.thrust_n, ti)
        assert gi == pytest.approx(expected, rel=1e-9, abs=1e-9)
    assert np.all(np.diff(curve.impulse_at_ns(np.sort(t))) >= -1e-12)  # impulse never decreases


def test_thrust_at_interpolates_and_is_zero_outside(demo_record: MotorRecord) -> None:
    np.testing.assert_allclose(demo_record.thrust_at_n([-1.0, 0.025, 0.1, 2.0]), [0.0, 7.0, 28.0, 0.0])


def test_mass_falls_in_proportion_to_impulse(demo_record: MotorRecord) -> None:
    t = np.array([0.0, demo_record.time_s[-1], 10.0])
    np.testing.assert_allclose(demo_record.mass_at_kg(t), [0.044, 0.023, 0.023], rtol=1e-14)
    half = brentq(lambda t: float(demo_record.impulse_at_ns(t)) - demo_record.total_impulse_ns / 2, 0.0, 1.45, xtol=1e-14)
    assert float(demo_record.mass_at_kg(half)) == pytest.approx(0.044 - 0.021 / 2, rel=1e-9)
    with pytest.raises(ValueError, match="total and propellant mass"):
        MotorRecord("x", [0, 1], [1, 0]).mass_at_kg(0.5)


def test_specific_impulse_and_mass_fraction(demo_record: MotorRecord) -> None:
    # Definition: Isp = I / (m_p g0) (Sutton & Biblarz ch. 2, chapter from memory;
    # tests/reference/check_values.md#specific-impulse).
    assert demo_record.specific_impulse_s == pytest.approx(demo_record.total_impulse_ns / (0.021 * STANDARD_GRAVITY_M_S2))
    assert demo_record.propellant_mass_fraction == pytest.approx(0.021 / 0.044)
    assert demo_record.burnout_mass_kg == pytest.approx(0.023)
    bare = MotorRecord("x", [0, 1], [1, 0])
    assert bare.specific_impulse_s is None and bare.propellant_mass_fraction is None


def test_tsiolkovsky_with_a_record_isp() -> None:
    # Tsiolkovsky: dv = Isp g0 ln(m0/mf); Isp 200 s, 1.0 -> 0.8 kg gives 437.65814 m/s (textbook closed form,
    # tests/reference/check_values.md#specific-impulse).
    impulse = 200.0 * 0.2 * STANDARD_GRAVITY_M_S2
    record = MotorRecord("x", [0.0, 1.0, 2.0], [0.0, impulse, 0.0], total_mass_kg=1.0, propellant_mass_kg=0.2)
    dv = record.specific_impulse_s * STANDARD_GRAVITY_M_S2 * np.log(1.0 / record.burnout_mass_kg)
    assert dv == pytest.approx(437.65814, rel=1e-7)


def test_records_are_frozen_and_compare_by_value(demo_record: MotorRecord) -> None:
    with pytest.raises(ValueError):
        demo_record.time_s[0] = 1.0
    with pytest.raises(AttributeError):
        demo_record.designation = "E"  # type: ignore[misc]
    twin = MotorRecord(**{f: getattr(demo_record, f) for f in demo_record.__dataclass_fields__})
    assert twin == demo_record
    assert MotorRecord("x", [0, 1], [1, 0]) != MotorRecord("x", [0, 1], [1, 0.5])


@pytest.mark.parametrize(("kwargs", "code"), [
    (dict(time_s=[0.0, 0.5, 0.5], thrust_n=[0, 1, 0]), "time-not-increasing"),
    (dict(time_s=[-0.1, 0.5], thrust_n=[0, 1]), "time-negative"),
    (dict(time_s=[0.0, np.nan], thrust_n=[0, 1]), "time-not-finite"),
    # two infinite times: their difference is undefined; numpy's warning about it used to escape (an error here)
    (dict(time_s=[0.0, np.inf, np.inf], thrust_n=[0, 1, 0]), "time-not-finite"),
    (dict(time_s=[0.0, 0.5], thrust_n=[0, -1]), "thrust-negative"),
    (dict(time_s=[0.0, 0.5], thrust_n=[0, np.inf]), "thrust-not-finite"),
    (dict(time_s=[0.0], thrust_n=[1.0]), "too-few-samples"),
    (dict(time_s=[0.0, 1.0], thrust_n=[0.0, 0.0]), "no-thrust"),
    (dict(time_s=[0.0, 1.0, 2.0], thrust_n=[0.0, 1.0]), "shape-mismatch"),
    (dict(diameter_m=-0.018), "hardware-not-positive"),
    (dict(total_mass_kg=0.01, propellant_mass_kg=0.02), "propellant-exceeds-total-mass"),
    (dict(delays_s=(-3.0,)), "delay-not-positive"),
    (dict(delays_s=(5.0, 5.0)), "delay-repeated"),
    # equal at the ten significant digits a catalog file keeps: the file would list one delay twice
    (dict(delays_s=(0.010000000000000002, 0.01)), "delay-repeated"),
    (dict(designation=" "), "designation-missing"),
    (dict(delays_s=(5.0,), no_ejection_charge=True), "no-charge-with-delays"),
    (dict(delay_adjustable=True, no_ejection_charge=True), "no-charge-with-delays"),
])
def test_invariants_raise_with_a_code(kwargs: dict, code: str) -> None:
    args = dict(designation="C6-5", time_s=[0.0, 0.5, 1.0], thrust_n=[0.0, 10.0, 0.0])
    args.update(kwargs)
    with pytest.raises(CurveDataError) as info:
        MotorRecord(**args)
    assert code in [p.code for p in info.value.problems]


def test_all_problems_are_listed_at_once() -> None:
    with pytest.raises(CurveDataError, match=r"and 2 more problem") as info:
        MotorRecord("C6", [0.0, 1.0, 1.0], [0.0, -1.0, 0.0], diameter_m=-1.0)
    assert [p.code for p in info.value.problems] == ["time-not-increasing", "thrust-negative", "hardware-not-positive"]


# --------------------------------------------------------------- issue 14: ejection delays, a tri-state
def test_delays_not_given_are_unknown_not_plugged() -> None:
    record = MotorRecord("E16", [0.0, 1.0, 2.0], [0.0, 32.0, 0.0])
    assert record.ejection == "unknown" and not record.no_ejection_charge


def test_the_three_ejection_states() -> None:
    args = dict(designation="E16", time_s=[0.0, 1.0, 2.0], thrust_n=[0.0, 32.0, 0.0])
    assert MotorRecord(**args, delays_s=(4.0, 6.0, 8.0)).ejection == "delays"
    assert MotorRecord(**args, no_ejection_charge=True).ejection == "no-charge"
    assert MotorRecord(**args, delay_adjustable=True).ejection == "unknown"  # drillable, delay not given
    assert MotorRecord(**args, no_ejection_charge=True) != MotorRecord(**args)


# --------------------------------------------------- issue 14: computed designation at the trade's precision
def _flat(designation: str, average_n: float, burn_s: float = 1.0) -> MotorRecord:
    # A trapezoid whose 5 % window holds almost all of the impulse; average thrust close to ``average_n``.
    return MotorRecord(designation, [0.0, 1e-4, burn_s - 1e-4, burn_s], [0.0, average_n, average_n, 0.0])


def test_a_small_motor_keeps_a_decimal_and_passes_its_own_check() -> None:
    # Issue 14: a 1.36 N motor became "1/2A1", 26 % off its own average thrust.
    record = _flat("x", 1.36)
    label = record.computed_designation()
    assert label == "A1.4"
    relabelled = MotorRecord(label, record.time_s, record.thrust_n)
    codes = {f.code for f in check_record(relabelled)}
    assert not codes & {"class-mismatch", "average-thrust-mismatch"}


@pytest.mark.parametrize(("average_n", "text"), [
    (0.052, "0.052"), (0.36, "0.36"), (1.36, "1.4"), (3.04, "3"), (4.44, "4.4"), (4.96, "5"), (5.4, "5"),
    (9.44, "9"), (12.4, "12"), (124.6, "125"),
])
def test_average_thrust_is_printed_in_whole_newtons_from_five_newtons(average_n: float, text: str) -> None:
    label = _flat("x", average_n).computed_designation()
    assert label.endswith(text) and not label[-len(text) - 1].isdigit() and label[-len(text) - 1] != "."


@given(curves(min_samples=3))
@settings(max_examples=200)
def test_the_computed_designation_passes_the_label_checks(curve: MotorRecord) -> None:
    label = curve.computed_designation()
    if label.startswith(">O"):
        return
    relabelled = MotorRecord(label, curve.time_s, curve.thrust_n)
    codes = {f.code for f in check_record(relabelled, CheckSettings())}
    assert not codes & {"class-mismatch", "average-thrust-mismatch", "designation-unreadable"}, (label, codes)


def test_a_curve_at_exactly_160_ns_is_class_g() -> None:
    # Issue 14: scaled to 160 N·s, the trapezoid sum lands one ulp above and the curve was called H.
    time_s = 2.0 * np.array([0.0, 0.05, 0.1, 0.15, 0.25, 0.5, 0.8, 1.1, 1.3, 1.4, 1.45])  # average below 80 N
    shape = 3.0 * np.array([0.0, 14.0, 28.0, 24.0, 13.0, 11.0, 10.6, 10.2, 9.0, 4.0, 0.0])
    thrust_n = shape * 160.0 / MotorRecord("x", time_s, shape).total_impulse_ns
    record = MotorRecord("G110", time_s, thrust_n)
    assert record.total_impulse_ns > 160.0  # the premise: one ulp above
    assert record.impulse_class.letter == "G"
    assert record.computed_designation().startswith("G")
    codes = {f.code for f in check_record(record)}
    assert "class-mismatch" not in codes and "high-power" not in codes


# ---------------------------------------------------------- issue 12: the measured spread of several firings
def test_firing_spread_is_an_optional_field() -> None:
    spread = FiringSpread(n_firings=3, total_impulse_mean_ns=49.0, total_impulse_std_ns=0.98,
                          burn_time_mean_s=1.6, burn_time_std_s=0.04)
    record = MotorRecord("F30", [0.0, 1.0, 2.0], [0.0, 49.0, 0.0], firing_spread=spread)
    assert record.firing_spread == spread
    assert MotorRecord("F30", [0.0, 1.0, 2.0], [0.0, 49.0, 0.0]).firing_spread is None
    assert spread.total_impulse_relative_std == pytest.approx(0.02)
    assert spread.burn_time_relative_std == pytest.approx(0.025)
    assert record != MotorRecord("F30", [0.0, 1.0, 2.0], [0.0, 49.0, 0.0])


@pytest.mark.parametrize("kwargs", [
    dict(n_firings=1), dict(total_impulse_mean_ns=0.0), dict(total_impulse_std_ns=-0.1),
    dict(burn_time_mean_s=float("nan")), dict(burn_time_std_s=float("inf")),
])
def test_firing_spread_invariants(kwargs: dict) -> None:
    args = dict(n_firings=3, total_impulse_mean_ns=49.0, total_impulse_std_ns=0.98, burn_time_mean_s=1.6,
                burn_time_std_s=0.04)
    args.update(kwargs)
    with pytest.raises(CurveDataError, match="firing_spread"):
        FiringSpread(**args)


def test_cumulative_impulse_of_a_triangle_is_the_closed_form_and_batches() -> None:
    # a triangle rising to 30 N at 1 s and back to 0 at 3 s: I(t) = 15 t² up to 1 s, 45 N·s in all (by hand)
    t = np.array([0.0, 0.5, 1.0, 2.0, 3.0])
    f = np.array([0.0, 15.0, 30.0, 15.0, 0.0])
    np.testing.assert_allclose(cumulative_impulse_ns(t, f), [0.0, 3.75, 15.0, 37.5, 45.0], rtol=1e-12)
    # k curves at once give the numbers of k single ones (the pack and the stability code pass 2-D arrays)
    both = cumulative_impulse_ns(np.stack([t, 2 * t]), np.stack([f, f]))
    np.testing.assert_allclose(both, [cumulative_impulse_ns(t, f), cumulative_impulse_ns(2 * t, f)], rtol=1e-12)


def test_threshold_window_interpolates_and_keeps_the_ends() -> None:
    # 10 N line from 0 at t = 0 to 20 N at t = 2 s, flat, down to 0 at t = 4 s: 5 N is reached at 0.5 s, left at 3.75 s
    t = np.array([0.0, 2.0, 3.0, 4.0])
    f = np.array([0.0, 20.0, 20.0, 0.0])
    assert threshold_window_s(t, f, 5.0) == pytest.approx((0.5, 3.75))
    # starting or ending above the level: the first or last sample
    assert threshold_window_s(t[1:], f[1:], 5.0) == pytest.approx((2.0, 3.75))
    assert threshold_window_s(t[:3], f[:3], 5.0) == pytest.approx((0.5, 3.0))


def _figures(record: MotorRecord, threshold: float) -> tuple:
    """Every remembered figure of ``record``, read through its public methods."""
    return (record.total_impulse_ns, record.peak_thrust_n, record.burn_window_s(threshold),
            record.average_thrust_n(threshold), record.impulse_class, record.computed_designation(threshold),
            record.cumulative_impulse_ns().tolist())


@given(curves(), st.sampled_from([0.05, 0.1, 0.3]))
def test_remembered_figures_equal_a_fresh_computation(curve: MotorRecord, threshold: float) -> None:
    # Issue 16: a record computes its figures once (catalog add and rebuild read each several times).
    first = _figures(curve, threshold)
    assert _figures(curve, threshold) == first  # read again: from the memo
    fresh = MotorRecord(curve.designation, curve.time_s, curve.thrust_n)
    assert _figures(fresh, threshold) == first
    other = 0.2
    assert curve.burn_window_s(other) == fresh.burn_window_s(other)  # one memo entry per threshold
    assert curve.burn_window_s(threshold) == first[2]


def test_remembered_figures_follow_the_samples_of_a_copy(triangle: MotorRecord) -> None:
    import copy
    import dataclasses
    import pickle

    assert triangle.total_impulse_ns == 5.0 and triangle.cumulative_impulse_ns()[-1] == 5.0
    with pytest.raises(ValueError, match="read-only"):
        triangle.cumulative_impulse_ns()[0] = 1.0  # the remembered array is shared: it refuses writes
    doubled = dataclasses.replace(triangle, designation="C10", thrust_n=2.0 * triangle.thrust_n)
    assert doubled.total_impulse_ns == 10.0 and doubled.peak_thrust_n == 20.0
    copied = copy.copy(triangle)  # shares the memo until given other samples
    object.__setattr__(copied, "thrust_n", 3.0 * triangle.thrust_n)
    assert copied.total_impulse_ns == 15.0
    assert copied.average_thrust_n() == pytest.approx(3 * triangle.average_thrust_n())
    assert triangle.total_impulse_ns == 5.0
    again = pickle.loads(pickle.dumps(triangle))
    assert again == triangle and _figures(again, 0.05) == _figures(triangle, 0.05)
    assert "_figures" not in repr(triangle) and [f.name for f in dataclasses.fields(triangle)][-1] == "firing_spread"



_awkward_floats = st.one_of(st.floats(-1.0, 2e5), st.sampled_from([0.0, -0.0, np.nan, np.inf, -np.inf, 1e5, 1e8,
                                                                   1.0000001e8, 1e5 + 1e-9]))


@given(st.lists(st.tuples(_awkward_floats, st.one_of(_awkward_floats, st.floats(0.0, 2e8))), min_size=2, max_size=8),
       st.booleans())
def test_the_quick_verdict_on_samples_agrees_with_the_detailed_check(rows: list, increasing: bool) -> None:
    # Issue 16: sound samples (the usual case) are settled in a few reductions; only others get the located check.
    from motorlib.motor.record import _problems_in_detail, _samples_are_sound

    time_s = np.array([t for t, _ in rows])
    if increasing:
        time_s = np.sort(np.abs(time_s))
    thrust_n = np.array([f for _, f in rows])
    assert _samples_are_sound(time_s, thrust_n) == (_problems_in_detail(time_s, thrust_n) == [])


def test_unwritable_character_is_exactly_what_xml_1_0_excludes():
    # Source: W3C XML 1.0 (Fifth Edition), section 2.2 "Characters": Char ::= #x9 | #xA | #xD | [#x20-#xD7FF] |
    # [#xE000-#xFFFD] | [#x10000-#x10FFFF]. The pattern names the refused characters (quicker to compile than
    # the negation of the allowed ones, issue 16); every code point is checked against the production.
    from motorlib.motor.record import UNWRITABLE_CHARACTER

    def allowed(code: int) -> bool:
        return (code in (0x9, 0xA, 0xD) or 0x20 <= code <= 0xD7FF or 0xE000 <= code <= 0xFFFD
                or 0x10000 <= code <= 0x10FFFF)

    every = "".join(map(chr, range(0x110000)))
    refused = {m.start() for m in UNWRITABLE_CHARACTER.finditer(every)}
    assert refused == {code for code in range(0x110000) if not allowed(code)}
