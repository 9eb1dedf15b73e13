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


def test_one_designation_from_several_makers_is_told_apart_even_when_one_is_shown() -> None:
    # Two makers whose names share their first word both showed as "F23-6 Invented"; under --top only one of
    # a pair was shown, and it lost its maker tag altogether.
    from motorlib.present.messages import motor_names as _motor_names

    pairs = [("F23-6", "Invented Maker U"), ("F23-6", "Invented Maker P"), ("G40-7", "Invented Maker U"),
             ("E12-4", "Orbweaver Rocket Works"), ("E12-4", "Quillfeather")]
    names = _motor_names(pairs, False)
    assert names == ["F23-6 Invented Maker U", "F23-6 Invented Maker P", "G40-7", "E12-4 Orbweaver",
                     "E12-4 Quillfeather"]
    assert _motor_names(pairs[:1], False, among=pairs) == ["F23-6 Invented Maker U"]
    assert _motor_names(pairs, True) == [d for d, _ in pairs]  # a maker column says it already
