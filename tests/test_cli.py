"""The command line, driven through click's CliRunner: exit codes, JSON keys, import."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

from click.testing import CliRunner

from motorlib import read_record
from motorlib.cli import main

from .conftest import FIXTURE_DIR, SAMPLE_DIR

JSON_KEYS = {"total_impulse_ns", "impulse_class", "class_percent", "average_thrust_n", "peak_thrust_n",
             "burn_time_s", "designation", "findings", "ok"}


def run(*args: str) -> tuple[int, str]:
    result = CliRunner().invoke(main, list(args))
    return result.exit_code, result.output


def test_check_samples_all_sound() -> None:
    code, out = run("check", str(SAMPLE_DIR))
    assert code == 0, out
    assert "27 file(s) checked: 27 sound, 0 with errors." in out


def test_check_json_has_the_documented_keys() -> None:
    code, out = run("check", "--json", str(SAMPLE_DIR))
    assert code == 0
    objects = json.loads(out)
    assert len(objects) == 27
    for obj in objects:
        assert JSON_KEYS <= set(obj)
        assert obj["ok"] is True and obj["impulse_class"] is not None
        for finding in obj["findings"]:
            assert {"severity", "code", "message"} <= set(finding)


def test_exit_status_1_for_errors_and_2_for_unreadable() -> None:
    code, out = run("check", str(FIXTURE_DIR / "class_mismatch.xml"))
    assert code == 1 and "class-mismatch" in out
    code, out = run("check", str(FIXTURE_DIR / "class_mismatch.xml"), str(FIXTURE_DIR / "billion_laughs.xml"))
    assert code == 2 and "not allowed" in out
    code, out = run("check", "--json", str(FIXTURE_DIR / "not_well_formed.xml"))
    assert code == 2 and json.loads(out)[0]["readable"] is False


def test_single_file_shows_details() -> None:
    code, out = run("check", str(SAMPLE_DIR / "teakettle-thrust-co_c6-3-5-7.xml"))
    assert code == 0
    assert "computed designation" in out and "C6" in out and "into class" in out


def test_check_csv_with_metadata_options() -> None:
    code, out = run("check", "--json", str(FIXTURE_DIR / "unit_mix_up_lbf.csv"), "--designation", "D12-5",
                    "--thrust-unit", "lbf", "--diameter", "24", "--length", "70mm", "--total-mass", "44g",
                    "--propellant-mass", "0.74 oz", "--delays", "5")
    obj = json.loads(out)[0]
    assert code == 0, out
    assert obj["impulse_class"] == "D" and obj["diameter_m"] == 0.024
    assert obj["propellant_mass_kg"] == 0.74 * 0.028349523125


def test_bad_option_values_are_explained() -> None:
    code, out = run("check", str(FIXTURE_DIR / "sound_d12.csv"), "--diameter", "3 kg")
    assert code == 2 and "expected a length" in out
    code, out = run("check", str(FIXTURE_DIR / "sound_d12.csv"), "--delays", "3,x")
    assert code == 2 and "delays in seconds" in out
    code, out = run("check", str(FIXTURE_DIR / "sound_d12.csv"), "--delays", "3", "--plugged")
    assert code == 2 and "exclude each other" in out


def test_import_writes_a_checked_record(tmp_path: Path) -> None:
    out_path = tmp_path / "d12.xml"
    code, out = run("import", str(FIXTURE_DIR / "sound_d12.csv"), "-o", str(out_path), "--designation", "D12-5",
                    "--maker", "Stand team (fictional)", "--diameter", "24", "--length", "70", "--total-mass", "44",
                    "--propellant-mass", "21", "--delays", "5", "--source-kind", "static-test",
                    "--test-date", "2026-11-14")
    assert code == 0, out
    record = read_record(out_path)
    assert record.designation == "D12-5" and record.provenance.kind == "static-test"
    assert str(record.provenance.date) == "2026-11-14"
    code, out = run("check", str(out_path))
    assert code == 0 and "No findings." in out
    code, out = run("import", str(FIXTURE_DIR / "sound_d12.csv"), "-o", str(out_path), "--designation", "D12-5")
    assert code == 1 and "--overwrite" in out


def test_import_refuses_errors_unless_forced(tmp_path: Path) -> None:
    out_path = tmp_path / "x.xml"
    code, out = run("import", str(FIXTURE_DIR / "sound_d12.csv"), "-o", str(out_path), "--designation", "E12-5")
    assert code == 1 and "nothing was written" in out and not out_path.exists()
    code, out = run("import", str(FIXTURE_DIR / "sound_d12.csv"), "-o", str(out_path), "--designation", "E12-5",
                    "--force")
    assert code == 0 and out_path.exists()


def test_import_of_broken_csv_names_the_line(tmp_path: Path) -> None:
    code, out = run("import", str(FIXTURE_DIR / "ragged_row.csv"), "-o", str(tmp_path / "x.xml"))
    assert code == 1 and "ragged_row.csv:4" in out


def test_every_command_has_help_with_an_example() -> None:
    for command in ([], ["check"], ["import"]):
        code, out = run(*command, "--help")
        assert code == 0 and "Example" in out


def test_python_dash_m_runs_the_same_group() -> None:
    result = subprocess.run([sys.executable, "-m", "motorlib", "--version"], capture_output=True, text=True,
                            check=True)
    assert "motorlib" in result.stdout
