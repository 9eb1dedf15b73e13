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
