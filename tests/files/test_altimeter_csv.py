"""Altimeter logs (issue 12): columns and units from the header, pressures to heights, clear errors."""

from __future__ import annotations

from pathlib import Path

import pytest

from motorlib.errors import CsvFormatError
from motorlib.files.altimeter_csv import read_altimeter_csv


def _write(tmp_path: Path, text: str) -> Path:
    path = tmp_path / "log.csv"
    path.write_text(text)
    return path


def test_altitude_in_feet_and_time_in_ms(tmp_path: Path) -> None:
    log = read_altimeter_csv(_write(tmp_path, "# my altimeter\ntime (ms),altitude (ft),temp\n0,0,20\n50,10,20\n100,20,20\n"))
    assert log.time_s == pytest.approx([0.0, 0.05, 0.1])
    assert log.altitude_m == pytest.approx([0.0, 3.048, 6.096])
    assert log.pad_pressure_pa is None


def test_pressure_becomes_height_above_the_pad(tmp_path: Path) -> None:
    rows = "\n".join(f"{0.1 * i:.1f},{1013.25 if i < 10 else 898.7457}" for i in range(20))
    log = read_altimeter_csv(_write(tmp_path, "time_s,pressure_hPa\n" + rows + "\n"))
    assert log.pad_pressure_pa == pytest.approx(101_325.0)
    assert log.altitude_m[0] == pytest.approx(0.0, abs=1e-6)
    assert log.altitude_m[-1] == pytest.approx(1000.2, abs=0.1)  # tests/reference/check_values.md#atm-table


@pytest.mark.parametrize(("text", "match"), [
    ("speed,altitude\n1,2\n2,3\n", "no time column"),
    ("time,voltage\n1,2\n2,3\n", "no altitude or pressure"),
    ("time,altitude (yd)\n1,2\n2,3\n", "unknown unit"),
    ("time,altitude\n1,2\n2,x\n", ":3: "),
    ("time,altitude\n1,2\n1,3\n", "times must increase"),
])
def test_bad_logs_name_the_column_and_line(tmp_path: Path, text: str, match: str) -> None:
    with pytest.raises(CsvFormatError, match=match):
        read_altimeter_csv(_write(tmp_path, text))
