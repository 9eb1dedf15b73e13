"""``motorlib fly`` through click's CliRunner: table, JSON keys, every bundled motor, clear errors."""

from __future__ import annotations

import json
from pathlib import Path

from ..conftest import SAMPLE_DIR
from .conftest import AIRFRAMES, run


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
            flight = json.loads(out)
            # every bundled pairing lifts off, leaves the rail and reaches apogee: a failure here is a defect
            assert flight["status"] == "ok" and flight["apogee_m"] > 0, (frame_path.name, path.name)
            flown += 1
    assert flown >= 10


def test_fly_errors_are_clear() -> None:
    code, out = run("fly", str(AIRFRAMES / "quibble-41.toml"), "--motor", "Z99")
    assert code == 1 and "no motor with that id, handle or designation" in out
    code, out = run("fly", str(AIRFRAMES / "quibble-41.toml"), "--motor", "F29-8", "--delay", "20")
    assert code == 2 and "can only be shortened" in out
