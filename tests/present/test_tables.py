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


def _drawn(renderable: object, width: int, terminal: bool) -> str:
    import io

    from motorlib.cli.output import _console

    console = _console()
    console.file = io.StringIO()
    console.width = width
    if terminal:  # with the styles' escape codes, which must match too
        console._force_terminal, console._color_system = True, "truecolor"
    console.print(renderable)
    return console.file.getvalue()


def test_a_long_catalog_table_is_drawn_as_rich_draws_the_table() -> None:
    # LongTable draws each row as one line of text (a catalog list of 3,000 motors took 1.1 s in rich's per-cell
    # rendering); the output must be the table's own, byte for byte: narrow and wide terminals (a maker cut with
    # an ellipsis), a table wider than the terminal, metric and imperial, with and without styles
    import numpy as np

    from motorlib import MotorRecord
    from motorlib.matching.rank import candidate_rows
    from motorlib.present.display import DisplayUnits
    from motorlib.present.tables import LongTable, catalog_table

    records = []
    for k in range(30):
        impulse = 0.6 * 1.45 ** k
        t = np.array([0.0, 0.05, 0.6, 1.0]) * (0.4 + 0.1 * k)
        f = np.array([0.0, 1.0, 0.8, 0.0])
        f *= impulse / np.trapezoid(f, t)
        records.append(MotorRecord(f"X{k}-{4 + k % 3},{9 + k % 5},14", t, f, maker=["Zorblat Aerospace (fictional)",
                                   "Quokka Thrust Works (fictional)", "Q"][k % 3],
                                   diameter_m=0.013 + 0.001 * k, length_m=0.07 + 0.01 * k,
                                   total_mass_kg=0.01 + 0.02 * k, propellant_mass_kg=0.005 + 0.01 * k,
                                   delays_s=(4.0 + k % 3, 9.0 + k % 5, 14.0), delay_adjustable=k % 4 == 0))
    rows = candidate_rows(records)
    for width in (60, 80, 112, 125, 200):
        for units in (DisplayUnits(), DisplayUnits("imperial")):
            for terminal in (False, True):
                table = catalog_table(rows, "Thirty invented motors", units, width)
                expected = _drawn(table, width, terminal)
                assert _drawn(LongTable(catalog_table(rows, "Thirty invented motors", units, width)), width,
                              terminal) == expected, (width, units, terminal)
