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
