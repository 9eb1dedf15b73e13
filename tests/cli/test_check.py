"""``motorlib check`` through click's CliRunner: exit codes, JSON keys, metadata options."""

from __future__ import annotations

import json

from ..conftest import FIXTURE_DIR, SAMPLE_DIR
from .conftest import run

JSON_KEYS = {"total_impulse_ns", "impulse_class", "class_percent", "average_thrust_n", "peak_thrust_n",
             "burn_time_s", "designation", "findings", "ok"}


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
                    "--thrust-unit", "lbf", "--diameter", "24mm", "--length", "70mm", "--total-mass", "44g",
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


def test_thrust_tolerance_is_a_percentage(tmp_path) -> None:
    # 1 % = 0.01 (ISO 80000-1). A 9 N flat curve (about 8.9 N·s, class C) labelled C10: the label is 11 % above
    # the computed average thrust, inside a 15 % tolerance and outside a 5 % one.
    curve = tmp_path / "flat.csv"
    curve.write_text("time_s,thrust_n\n0,0\n0.01,9\n0.99,9\n1.0,0\n", encoding="utf-8")

    def codes(tolerance: str) -> list[str]:
        code, out = run("check", "--json", str(curve), "--designation", "C10-5", "--thrust-tolerance", tolerance)
        return [f["code"] for f in json.loads(out)[0]["findings"]]

    assert "average-thrust-mismatch" not in codes("15")
    assert "average-thrust-mismatch" in codes("5")
