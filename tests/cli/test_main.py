"""The command line, driven through click's CliRunner: exit codes, JSON keys, import."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest
from click.testing import CliRunner

from motorlib import read_record
from motorlib.cli.main import main

from ..conftest import FIXTURE_DIR, SAMPLE_DIR

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
    for command in ([], ["check"], ["import"], ["fly"], ["descent"], ["catalog"], ["catalog", "add"],
                    ["catalog", "list"], ["catalog", "show"], ["catalog", "tag"], ["catalog", "untag"],
                    ["catalog", "remove"], ["catalog", "export"], ["catalog", "verify"], ["catalog", "reindex"],
                    ["match"], ["demo"], ["reduce"]):
        code, out = run(*command, "--help")
        assert code == 0 and "Example" in out


def test_python_dash_m_runs_the_same_group() -> None:
    result = subprocess.run([sys.executable, "-m", "motorlib", "--version"], capture_output=True, text=True,
                            check=True)
    assert "motorlib" in result.stdout


AIRFRAMES = SAMPLE_DIR / "airframes"


def test_fly_prints_the_flight_and_the_caution(tmp_path: Path) -> None:
    plot, csv_path = tmp_path / "f.png", tmp_path / "f.csv"
    code, out = run("fly", str(AIRFRAMES / "quibble-41.toml"), "--motor", "F29-8", "--plot", str(plot),
                    "--csv", str(csv_path))
    assert code == 0, out
    assert "apogee" in out and "range safety officer" in out
    assert plot.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    header = csv_path.read_text().splitlines()[0]
    assert header.startswith("time_s,x_m,altitude_m")


def test_fly_json_has_the_documented_keys() -> None:
    code, out = run("fly", str(AIRFRAMES / "quibble-41.toml"), "--motor", "bramblewick-propulsion_g59-10", "--json")
    assert code == 0, out
    data = json.loads(out)
    for key in ("apogee_m", "time_to_apogee_s", "burnout_time_s", "optimal_delay_s", "rail_exit_speed_m_s",
                "rail_exit_time_s", "max_speed_m_s", "max_mach", "max_acceleration_m_s2", "liftoff_thrust_to_weight",
                "ejections", "landing_speed_m_s", "descent_time_s", "drift_m", "warnings"):
        assert key in data, key
    assert {"delay_s", "altitude_m", "speed_m_s"} <= set(data["ejections"][0])
    assert data["landing_speed_m_s"] > 0


def test_fly_every_bundled_motor_that_fits() -> None:
    # Done-means of the flight issue: fly works on the bundled airframes with every motor that fits.
    from motorlib import read_record
    from motorlib.files.airframe_toml import load_airframe

    flown = 0
    for frame_path in sorted(AIRFRAMES.glob("*.toml")):
        frame = load_airframe(frame_path)
        for path in sorted(SAMPLE_DIR.glob("*.xml")):
            motor = read_record(path)
            if abs(motor.diameter_m - frame.mount_diameter_m) > 1e-4 or motor.length_m > frame.mount_length_m:
                continue
            code, out = run("fly", str(frame_path), "--motor", str(path), "--json")
            assert code == 0, (frame_path.name, path.name, out)
            assert json.loads(out)["status"] in ("ok", "failed")
            flown += 1
    assert flown >= 10


def test_fly_errors_are_clear() -> None:
    code, out = run("fly", str(AIRFRAMES / "quibble-41.toml"), "--motor", "Z99")
    assert code == 1 and "no motor with that id, handle or designation" in out
    code, out = run("fly", str(AIRFRAMES / "quibble-41.toml"), "--motor", "F29-8", "--delay", "20")
    assert code == 2 and "can only be shortened" in out


def test_descent_forward_and_inverse() -> None:
    code, out = run("descent", "--mass", "1kg", "--cd", "0.75", "--diameter", "0.9", "--json")
    assert code == 0 and json.loads(out)["terminal_speed_m_s"] == pytest.approx(5.7928, abs=1e-4)
    code, out = run("descent", "--height", "82", "--fall-time", "9.5", "--mass", "15g", "--json")
    data = json.loads(out)
    assert code == 0 and data["terminal_speed_m_s"] == pytest.approx(9.2, abs=0.1) and data["drag_area_m2"] > 0
    code, out = run("descent", "--height", "82", "--fall-time", "3")
    assert code == 2 and "too short" in out
    code, out = run("descent", "--mass", "1kg")
    assert code == 2 and "give --mass with --drag-area" in out



def _strict_json(text: str):
    def no_constant(name: str):
        raise AssertionError(f"{name} is not JSON")

    return json.loads(text, parse_constant=no_constant)


def test_descent_falls_through_the_atmosphere() -> None:
    # Issue 10, defect 6: a 5 m/s (at the pad) fall from 3 km takes 558.4 s through the standard atmosphere, not the
    # 600.4 s of pad-density air held all the way down.
    area = 2 * 9.80665 / (1.225 * 5.0**2)
    code, out = run("descent", "--mass", "1kg", "--drag-area", repr(area), "--height", "3000", "--json")
    data = _strict_json(out)
    assert code == 0 and data["fall_time_s"] == pytest.approx(558.41, abs=0.01)
    assert data["terminal_speed_m_s"] == pytest.approx(5.0, rel=1e-5)  # the standard sea-level ρ is 1.224999
    assert data["landing_speed_m_s"] == pytest.approx(5.0003, abs=1e-4)
    code, out = run("descent", "--height", "3000", "--fall-time", "558.41", "--mass", "1kg", "--json")
    data = _strict_json(out)
    assert code == 0 and data["terminal_speed_m_s"] == pytest.approx(5.0, abs=1e-4)
    assert data["drag_area_m2"] == pytest.approx(area, rel=1e-4)
    code, out = run("descent", "--mass", "1kg", "--drag-area", repr(area), "--height", "3000", "--elevation", "1500")
    assert code == 0 and "1500 m" in out


def test_descent_json_has_no_infinity() -> None:
    code, out = run("descent", "--mass", "1kg", "--drag-area", "0", "--height", "100", "--json")
    data = _strict_json(out)
    assert code == 0 and data["terminal_speed_m_s"] is None
    assert data["landing_speed_m_s"] == pytest.approx((2 * 9.80665 * 100) ** 0.5, rel=1e-4)
    code, out = run("descent", "--mass", "1kg", "--drag-area", "0")
    assert code == 0 and "no drag" in out

def test_catalog_commands_end_to_end(tmp_path: Path) -> None:
    cat = str(tmp_path / "motors")
    code, out = run("catalog", "add", "--catalog", cat, str(SAMPLE_DIR))
    assert code == 0 and "27 added" in out
    # a test-stand CSV, then finding it again (the README tour)
    code, out = run("catalog", "add", "--catalog", cat, str(FIXTURE_DIR / "sound_d12.csv"), "--designation", "D12-5",
                    "--maker", "Stand team (fictional)", "--diameter", "24", "--length", "70", "--total-mass", "44g",
                    "--propellant-mass", "21g", "--delays", "5", "--source-kind", "static-test")
    assert code == 0 and "1 added" in out
    code, out = run("catalog", "list", "--catalog", cat, "--maker", "stand", "--json")
    rows = json.loads(out)
    assert code == 0 and [r["designation"] for r in rows] == ["D12-5"] and rows[0]["provenance_kind"] == "static-test"
    code, out = run("catalog", "list", "--catalog", cat, "--class", "D..G", "--diameter", "29mm")
    assert code == 0 and "G59-10" in out and "F29-8" not in out
    code, out = run("catalog", "list", "--catalog", cat, "--impulse", "100..", "--burn", "..2", "--csv")
    lines = out.strip().splitlines()
    assert code == 0 and lines[0].startswith("motor_id,") and len(lines) == 4  # G59-10, G99-14, 235H157-14
    code, out = run("catalog", "tag", "--catalog", cat, "G59-10", "F51-10", "in-stock")
    assert code == 0
    code, out = run("catalog", "list", "--catalog", cat, "--tag", "in-stock", "--json")
    assert sorted(r["designation"] for r in json.loads(out)) == ["F51-10", "G59-10"]
    plot = tmp_path / "cmp.png"
    code, out = run("catalog", "show", "--catalog", cat, "G59-10", "F51-10", "--plot", str(plot))
    assert code == 0 and "Comparison" in out and plot.exists()
    for fmt in ("xml", "csv", "json"):
        code, out = run("catalog", "export", "--catalog", cat, "--tag", "in-stock", "--to", str(tmp_path / fmt),
                        "--format", fmt)
        assert code == 0 and "Exported 2 motor(s)" in out
    assert read_record(next((tmp_path / "xml").glob("*g59*.xml"))).designation == "G59-10"
    code, out = run("catalog", "verify", "--catalog", cat)
    assert code == 0 and "28 curve(s) verified: 0 with errors" in out
    code, out = run("catalog", "reindex", "--catalog", cat)
    assert code == 0 and "28 motor(s)" in out
    code, out = run("catalog", "remove", "--catalog", cat, "G59-10")
    assert code == 0
    code, out = run("catalog", "show", "--catalog", cat, "G59-10")
    assert code == 1 and "no motor with that id" in out
    code, out = run("catalog", "add", "--catalog", cat, str(FIXTURE_DIR / "class_mismatch.xml"))
    assert code == 1 and "refused" in out


def test_catalog_from_the_environment(tmp_path: Path) -> None:
    result = CliRunner().invoke(main, ["catalog", "add", str(SAMPLE_DIR / "bramblewick-propulsion_g59-10.xml")],
                                env={"MOTORLIB_CATALOG": str(tmp_path / "env-cat")})
    assert result.exit_code == 0 and (tmp_path / "env-cat").is_dir()
