"""CSV import: separators, headers, units (checked against pint), comments, errors with line numbers."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pint
import pytest

from motorlib import CsvFormatError, CurveDataError, CurveMetadata, QuantityError, read_csv_curve, record_from_csv

UREG = pint.UnitRegistry()


def _write(tmp_path: Path, text: str, name: str = "curve.csv") -> Path:
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


@pytest.mark.parametrize("text", [
    "time_s,thrust_n\n0,0\n0.1,10\n1.0,0\n",
    "t (s);Thrust (N)\n0;0\n0,1;10\n1,0;0\n",
    "time\tthrust\n0\t0\n0.1\t10\n1.0\t0\n",
    "time\tthrust\n0\t0\n0,1\t10\n1,0\t0\n",  # a spreadsheet in a decimal-comma locale saves tabs too
    "# no header, comments\n0, 0\n0.1, 10  # peak\n\n1.0, 0\n",
    "0 0\n0.1 10\n1.0 0\n",
    "\ufefftime [s],force [N]\n0,0\n0.1,10\n1.0,0\n",
])
def test_separators_headers_and_comments(tmp_path: Path, text: str) -> None:
    curve = read_csv_curve(_write(tmp_path, text))
    np.testing.assert_array_equal(curve.time_s, [0.0, 0.1, 1.0])
    np.testing.assert_array_equal(curve.thrust_n, [0.0, 10.0, 0.0])


@pytest.mark.parametrize(("header", "time_unit", "thrust_unit", "pint_time", "pint_force"), [
    ("time_ms,thrust_lbf", "ms", "lbf", "millisecond", "force_pound"),
    ("t (ms),F (kgf)", "ms", "kgf", "millisecond", "force_kilogram"),
    ("time [s],thrust [gf]", "s", "gf", "second", "force_gram"),
    ("Time (s),Thrust (N)", "s", "N", "second", "newton"),
])
def test_units_from_the_header_match_pint(tmp_path: Path, header: str, time_unit: str, thrust_unit: str,
                                          pint_time: str, pint_force: str) -> None:
    curve = read_csv_curve(_write(tmp_path, f"{header}\n0,0\n100,2.5\n900,0\n"))
    assert (curve.time_unit, curve.thrust_unit) == (time_unit, thrust_unit)
    # Reference: pint's unit registry.
    assert curve.time_s[1] == pytest.approx(UREG.Quantity(100, pint_time).to("second").magnitude, rel=1e-12)
    assert curve.thrust_n[1] == pytest.approx(UREG.Quantity(2.5, pint_force).to("newton").magnitude, rel=1e-12)


def test_units_from_options(tmp_path: Path) -> None:
    curve = read_csv_curve(_write(tmp_path, "0,0\n100,1\n900,0\n"), time_unit="ms", thrust_unit="lbf")
    assert curve.time_s[1] == pytest.approx(0.1) and curve.thrust_n[1] == pytest.approx(4.4482216152605)


def test_conflicting_units_are_refused(tmp_path: Path) -> None:
    with pytest.raises(CsvFormatError, match="header gives time in ms but s was requested"):
        read_csv_curve(_write(tmp_path, "time_ms,thrust_n\n0,0\n1,1\n"), time_unit="s")
    with pytest.raises(QuantityError, match="unknown unit 'furlongs'"):
        read_csv_curve(_write(tmp_path, "0,0\n1,1\n"), thrust_unit="furlongs")


def test_unknown_header_unit_names_the_header(tmp_path: Path) -> None:
    with pytest.raises(CsvFormatError, match=r"curve.csv:1: header 'thrust \(stone\)': unknown force unit 'stone'"):
        read_csv_curve(_write(tmp_path, "time (s),thrust (stone)\n0,0\n1,1\n"))


def test_extra_columns_need_names(tmp_path: Path) -> None:
    curve = read_csv_curve(_write(tmp_path, "sample,time_ms,force_N,temp\n1,0,0,20\n2,50,12,20\n3,900,0,21\n"))
    np.testing.assert_allclose(curve.thrust_n, [0.0, 12.0, 0.0])
    with pytest.raises(CsvFormatError, match="no header names a time column"):
        read_csv_curve(_write(tmp_path, "a,b,c\n1,2,3\n"))
    with pytest.raises(CsvFormatError, match="expected two columns .* found 3"):
        read_csv_curve(_write(tmp_path, "1,2,3\n4,5,6\n"))


@pytest.mark.parametrize(("text", "message"), [
    ("t,thrust\n0,0\n0.1,5\n0.2\n", r":4: expected 2 columns, found 1"),
    ("t;thrust\n0;0\n0,1;abc\n", r":3: column 2 \(thrust\): expected a number, got 'abc'"),
    ("# only comments\n\n", "no data rows"),
    ("time,thrust\n", "a header but no data rows"),
])
def test_bad_rows_name_the_line(tmp_path: Path, text: str, message: str) -> None:
    with pytest.raises(CsvFormatError, match=message):
        read_csv_curve(_write(tmp_path, text))


def test_non_utf8_is_refused(tmp_path: Path) -> None:
    path = tmp_path / "latin.csv"
    path.write_bytes("t,Schub (N)\n0,0\n1,\xe9\n".encode("latin-1"))
    with pytest.raises(CsvFormatError, match="not UTF-8"):
        read_csv_curve(path)


def test_record_errors_use_csv_lines(tmp_path: Path) -> None:
    path = _write(tmp_path, "time_s,thrust_n\n0,0\n0.2,5\n0.1,5\n0.3,0\n")
    with pytest.raises(CurveDataError) as info:
        record_from_csv(path)
    assert info.value.line == 4 and "time-not-increasing" == info.value.problems[0].code


def test_record_takes_metadata_and_defaults_the_label(tmp_path: Path) -> None:
    path = _write(tmp_path, "0,0\n0.1,10\n1.0,0\n", name="stand-03.csv")
    assert record_from_csv(path).designation == "stand-03"
    record = record_from_csv(path, CurveMetadata(designation="B5-3", maker="Us", diameter_m=0.018, delays_s=(3.0,)))
    assert (record.designation, record.maker, record.diameter_m, record.delays_s) == ("B5-3", "Us", 0.018, (3.0,))
