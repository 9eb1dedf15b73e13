"""Issue 13, class 3: units in CSV headers are read or refused, never ignored."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from motorlib.errors import CsvFormatError
from motorlib.files.motor_csv import read_csv_curve

from .conftest import run

# 1 ozf = 1/16 lb x g0 = 0.45359237 / 16 x 9.80665 N (exact by definition; NIST SP 811 appendix B.8 lists
# ounce-force as 2.780139e-1 N)
OZF_N = 0.45359237 / 16 * 9.80665


def _csv(tmp: Path, header: str, name: str = "curve.csv") -> Path:
    path = tmp / name
    path.write_text(f"{header}\n0,0\n100,2.5\n900,0\n")
    return path


def test_ounce_force_is_read_as_ounce_force(tmp_path: Path) -> None:
    curve = read_csv_curve(_csv(tmp_path, "time_ms,thrust_ozf"))
    assert curve.thrust_n[1] == pytest.approx(2.5 * OZF_N, rel=1e-12)
    assert abs(2.5 * OZF_N - 0.6950347) < 1e-6  # NIST SP 811: 2.780139e-1 N per ozf


def test_microseconds_are_read_as_microseconds(tmp_path: Path) -> None:
    curve = read_csv_curve(_csv(tmp_path, "time_us,thrust_n"))
    np.testing.assert_allclose(curve.time_s, [0.0, 100e-6, 900e-6], rtol=1e-12)


@pytest.mark.parametrize("header,column", [
    ("time_s,thrust_furlongs", "thrust_furlongs"),
    ("time_fortnights,thrust_n", "time_fortnights"),
    ("t_s,force_stone", "force_stone"),
])
def test_an_unknown_unit_names_file_line_column_and_the_units_known(tmp_path: Path, header: str,
                                                                     column: str) -> None:
    with pytest.raises(CsvFormatError) as info:
        read_csv_curve(_csv(tmp_path, header))
    text = str(info.value)
    assert "curve.csv:1" in text and column in text
    assert ("lbf" in text and "ozf" in text) or ("ms" in text and "us" in text)


def test_the_cli_refuses_an_unknown_unit_cleanly(tmp_path: Path) -> None:
    result = run("check", _csv(tmp_path, "time_s,thrust_furlongs"), "--designation", "A1")
    assert result.exit_code == 2, result.output
    assert "furlongs" in result.output and "expected one of" in result.output


def _raw_log(tmp: Path) -> Path:
    t = np.arange(-0.3, 1.5, 1e-3)
    counts = np.where((t > 0) & (t < 1.0), 3000.0, 0.0) + 500.0
    path = tmp / "raw.csv"
    path.write_text("time_s,counts\n" + "".join(f"{a:.4f},{b:.1f}\n" for a, b in zip(t, counts)))
    return path


def test_reduce_refuses_a_counts_column_without_a_scale(tmp_path: Path) -> None:
    result = run("reduce", _raw_log(tmp_path), "--designation", "E30")
    assert result.exit_code in (1, 2), result.output
    assert "--scale" in result.output or "scale" in result.output


def test_reduce_reads_a_counts_column_with_a_scale(tmp_path: Path) -> None:
    result = run("reduce", _raw_log(tmp_path), "--designation", "E30", "--scale", "0.01", "--offset", "500", "--json")
    assert result.exit_code in (0, 1), result.output
    assert "total_impulse_ns" in result.output


@pytest.mark.parametrize("header", ["", "time,thrust\n", "t,force\n"])
def test_a_header_without_units_gives_a_stated_assumption(tmp_path: Path, header: str) -> None:
    import json

    path = tmp_path / "plain.csv"
    path.write_text(header + "0,0\n0.1,30\n0.9,25\n1.0,0\n")
    result = run("check", path, "--designation", "E25", "--json")
    codes = [f["code"] for f in json.loads(result.stdout)[0]["findings"]]
    assert "units-assumed" in codes
    text = run("check", path, "--designation", "E25").output
    assert "read as s and N" in text.replace("\n", " ")


def test_reduce_states_the_units_it_assumed(tmp_path: Path) -> None:
    import json

    t = np.arange(-0.3, 1.5, 1e-3)
    f = np.where((t > 0) & (t < 1.0), 30.0, 0.0) + 5.0
    log = tmp_path / "plain.csv"
    log.write_text("time,force\n" + "".join(f"{a:.4f},{b:.3f}\n" for a, b in zip(t, f)))
    result = run("reduce", log, "--designation", "E30", "--json")
    codes = [f["code"] for f in json.loads(result.stdout)["findings"]]
    assert "units-assumed" in codes


def test_units_given_are_not_an_assumption(tmp_path: Path) -> None:
    import json

    result = run("check", _csv(tmp_path, "time_ms,thrust_n"), "--designation", "A1", "--json")
    codes = [f["code"] for f in json.loads(result.stdout)[0]["findings"]]
    assert "units-assumed" not in codes
