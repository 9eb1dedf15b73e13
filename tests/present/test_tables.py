"""Renderings never print a figure that contradicts the verdict beside it (issue 14)."""

from __future__ import annotations

from hypothesis import example, given
from hypothesis import strategies as st

from motorlib import impulse_class_for
from motorlib.present.tables import impulse_text


@given(st.floats(1e-3, 40960.0, allow_nan=False))
@example(160.00000000000003)
@example(160.006)
@example(20480.006)
@example(2.5049)
@example(1.2549)
def test_the_printed_impulse_reads_back_to_the_same_class(impulse_ns: float) -> None:
    text = impulse_text(impulse_ns)
    assert impulse_class_for(float(text)).letter == impulse_class_for(impulse_ns).letter, text


def test_the_printed_impulse_stays_short_away_from_a_boundary() -> None:
    assert impulse_text(49.2137) == "49.21"
    assert impulse_text(1234.567) == "1235"
    assert impulse_text(160.006) == "160.01"  # 4 digits would print 160, a G figure beside class H
    assert impulse_text(160.00000000000003) == "160"
