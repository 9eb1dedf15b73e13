"""The reduced curve keeps the peak thrust of the filtered burn, however few points it may use."""

from __future__ import annotations

import numpy as np
import pytest

from motorlib import read_record
from motorlib.motor.reduction import ReductionSettings, reduce_log

from ..conftest import SAMPLE_DIR


@pytest.mark.parametrize("name", ["bramblewick-propulsion_g59-10.xml", "teakettle-thrust-co_c6-3-5-7.xml",
                                  "marmalade-moon-motors_1800k694-14.xml"])
@pytest.mark.parametrize("max_points", [8, 12, 48])
def test_the_peak_sample_is_kept(name: str, max_points: int) -> None:
    # The module's step 5 promises the peak is always kept: maximum thrust is one of the figures a motor's data
    # sheet gives (from memory), and a reduced curve that cut it would understate it. A noise-free log at 1 kHz.
    known = read_record(SAMPLE_DIR / name)
    t = np.arange(-0.5, known.time_s[-1] + 0.6, 1e-3)
    f = known.thrust_at_n(t) + 3.0
    reduction = reduce_log(t, f, ReductionSettings(max_points=max_points))
    peak = int(np.argmax(reduction.filtered_thrust_n))
    assert reduction.thrust_n.size <= max_points
    assert np.max(reduction.thrust_n) == reduction.filtered_thrust_n[peak]
    assert reduction.filtered_time_s[peak] in reduction.time_s
    assert reduction.peak_error == 0.0


def _log(name: str = "bramblewick-propulsion_g59-10.xml", rate_hz: float = 1000.0) -> tuple[np.ndarray, np.ndarray]:
    known = read_record(SAMPLE_DIR / name)
    t = np.arange(-0.5, known.time_s[-1] + 0.6, 1.0 / rate_hz)
    rng = np.random.default_rng(4)
    return t, known.thrust_at_n(t) + 3.0 + rng.normal(0.0, 0.05, t.size)


def test_clipping_counts_the_readings_at_full_scale() -> None:
    # exactly n consecutive readings at the maximum: 3 or more is clipping (the module's rule), 2 is not
    t, f = _log()
    peak = int(np.argmax(f))
    for n, clipped in ((2, False), (3, True), (7, True)):
        g = f.copy()
        g[peak + 1: peak + n] = g[peak]  # n readings equal to the top value
        g[peak + n:] = np.minimum(g[peak + n:], g[peak] - 1.0)
        findings = [x for x in reduce_log(t, g).findings if x.code == "log-clipped"]
        assert bool(findings) == clipped
        if clipped:
            assert findings[0].message.startswith(f"{n} consecutive readings")


def test_a_log_that_ends_while_burning_is_reported() -> None:
    t, f = _log()
    burning = t < 1.0  # the G59 burns about 1.9 s
    reduction = reduce_log(t[burning], f[burning])
    assert "log-ends-burning" in [x.code for x in reduction.findings]
    assert "log-ends-burning" not in [x.code for x in reduce_log(t, f).findings]


def test_one_firing_has_no_spread() -> None:
    from motorlib.motor.reduction import combine_reductions

    t, f = _log()
    reduction = reduce_log(t, f)
    _, _, spread = combine_reductions([reduction])
    assert spread["n_firings"] == 1
    assert spread["total_impulse_ns"]["std"] == 0.0 and spread["event_burn_time_s"]["std"] == 0.0
    assert spread["total_impulse_ns"]["mean"] == reduction.filtered_impulse_ns


def test_a_reduction_is_a_record_with_read_only_arrays() -> None:
    t, f = _log()
    reduction = reduce_log(t, f)
    for name in ("time_s", "thrust_n", "raw_time_s", "raw_thrust_n", "filtered_time_s", "filtered_thrust_n"):
        with pytest.raises(ValueError, match="read-only"):
            getattr(reduction, name)[0] = 1.0


def test_ignition_and_burnout_on_straight_ramps() -> None:
    # A noise-free log of straight ramps (0 -> 100 N over 1 s, 0.5 s hold, 100 -> 0 N over 1 s) on a 3 N
    # offset at 1 kHz. The events are where thrust crosses 2 % of peak (the default event fraction): 2 N, i.e.
    # 0.02 s and 2.48 s by hand; the area under the ramps is 150 N·s (three pieces of 50 N·s).
    t = np.arange(-0.5, 3.0, 1e-3)
    f = np.interp(t, [0.0, 1.0, 1.5, 2.5], [0.0, 100.0, 100.0, 0.0]) + 3.0
    reduction = reduce_log(t, f)
    assert reduction.baseline_n == pytest.approx(3.0, abs=1e-12)
    assert reduction.ignition_time_s == pytest.approx(0.02, abs=1e-4)  # a sample is 1e-3 s
    assert reduction.burnout_time_s == pytest.approx(2.48, abs=1e-4)
    assert reduction.filtered_impulse_ns == pytest.approx(150.0 - 2 * 0.02, rel=1e-4)  # minus the corners below 2 N
    assert reduction.time_s[0] == 0.0 and reduction.time_s[-1] == pytest.approx(2.46, abs=1e-4)


def test_the_raw_log_is_kept_with_a_fifth_of_the_burn_either_side() -> None:
    t = np.arange(-0.5, 3.0, 1e-3)
    f = np.interp(t, [0.0, 1.0, 1.5, 2.5], [0.0, 100.0, 100.0, 0.0]) + 3.0
    reduction = reduce_log(t, f)
    burn = reduction.burnout_time_s - reduction.ignition_time_s  # 2.46 s: ramps crossing 2 N, by hand above
    assert reduction.raw_time_s[0] == pytest.approx(-0.2 * burn, abs=1e-3)
    assert reduction.raw_time_s[-1] == pytest.approx(1.2 * burn, abs=1e-3)
    assert np.all(reduction.raw_thrust_n == f[(t >= reduction.ignition_time_s - 0.2 * burn)
                                             & (t <= reduction.burnout_time_s + 0.2 * burn)] - 3.0)


def _ramps(rate_hz: float = 1000.0) -> tuple[np.ndarray, np.ndarray]:
    t = np.arange(-0.5, 3.0, 1.0 / rate_hz)
    return t, np.interp(t, [0.0, 1.0, 1.5, 2.5], [0.0, 100.0, 100.0, 0.0]) + 3.0


@pytest.mark.parametrize("fraction", [0.0, 0.5, -0.1])
def test_the_event_fraction_must_lie_between_zero_and_a_half(fraction: float) -> None:
    with pytest.raises(ValueError, match="event_fraction"):
        ReductionSettings(event_fraction=fraction)


def test_a_reduction_is_frozen() -> None:
    import dataclasses

    with pytest.raises(dataclasses.FrozenInstanceError):
        reduce_log(*_ramps()).noise_n = 1.0  # type: ignore[misc]


@pytest.mark.parametrize(("column", "row"), [(0, 7), (1, 12), (1, 900)])
def test_a_non_numeric_reading_names_its_row(column: int, row: int) -> None:
    from motorlib import CurveDataError

    data = list(_ramps())
    data[column] = data[column].copy()
    data[column][row - 1] = np.nan  # rows are numbered from 1 without ``lines``
    with pytest.raises(CurveDataError, match=f"row {row}") as caught:
        reduce_log(*data)
    assert [p.code for p in caught.value.problems] == ["log-not-finite"]


@pytest.mark.parametrize(("rate_hz", "cutoff_hz"), [(1000.0, 100.0), (200.0, 50.0)])
def test_the_default_cut_off_is_100_hz_or_a_quarter_of_the_rate(rate_hz: float, cutoff_hz: float) -> None:
    # ReductionSettings: min(100 Hz, rate / 4), common practice, no published source
    assert reduce_log(*_ramps(rate_hz)).cutoff_hz == pytest.approx(cutoff_hz, rel=1e-9)  # rate from time stamps


def test_a_cut_off_near_nyquist_leaves_the_log_unfiltered_with_a_warning() -> None:
    t, f = _ramps(1000.0)
    reduction = reduce_log(t, f, ReductionSettings(cutoff_hz=495.0))
    assert reduction.cutoff_hz is None
    assert "log-filter-skipped" in [x.code for x in reduction.findings]
    assert reduce_log(t, f, ReductionSettings(cutoff_hz=0.0)).cutoff_hz is None  # 0: no filter, no warning


def test_two_firings_give_the_sample_standard_deviation() -> None:
    import statistics

    from motorlib.motor.reduction import combine_reductions

    t, f = _ramps()
    slower = np.interp(t, [0.0, 1.1, 1.65, 2.75], [0.0, 110.0, 110.0, 0.0]) + 3.0  # 10 % longer and stronger
    reductions = [reduce_log(t, f), reduce_log(t, slower)]
    _, _, spread = combine_reductions(reductions)
    impulses = [r.filtered_impulse_ns for r in reductions]
    # Python's statistics.stdev: the sample standard deviation (n - 1 in the denominator)
    assert spread["total_impulse_ns"]["std"] == pytest.approx(statistics.stdev(impulses), rel=1e-12)
    assert spread["total_impulse_ns"]["std"] > 0.0
    burns = [r.burnout_time_s - r.ignition_time_s for r in reductions]
    assert spread["event_burn_time_s"]["std"] == pytest.approx(statistics.stdev(burns), rel=1e-9)
    assert spread["event_burn_time_s"]["std"] > 0.1  # 2.46 s and 2.706 s by hand: 0.17 s
