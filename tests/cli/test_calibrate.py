"""``motorlib calibrate`` through click's CliRunner: the JSON contract, logs, --write with a backup, errors."""

from __future__ import annotations

import json
import shutil
from pathlib import Path

from ..flight.test_calibration import synthetic_log
from .conftest import AIRFRAMES, run

QUIBBLE = AIRFRAMES / "quibble-41.toml"


def test_calibrate_json_follows_the_contract() -> None:
    code, out = run("calibrate", str(QUIBBLE), "--motor", "F29-8", "--apogee", "480m",
                    "--flight", "apogee=470m,wind=5m/s,label=windy", "--json")
    assert code == 0, out
    data = json.loads(out)
    assert {"drag_coefficient", "uncertainty", "residuals_m"} <= set(data)
    assert len(data["residuals_m"]) == 2 and data["labels"] == ["flight 1", "windy"]
    code, out = run("calibrate", str(AIRFRAMES / "tollgate-98.toml"), "--motor", "J590", "--apogee", "450m", "--json")
    assert code == 0, out
    assert {"drag_scale", "uncertainty", "residuals_m"} <= set(json.loads(out))


def test_calibrate_from_a_log_writes_the_airframe_and_a_plot(tmp_path: Path) -> None:
    from motorlib.files.airframe_toml import load_airframe
    from motorlib.files.curvefiles import load_curve_file

    from ..conftest import SAMPLE_DIR

    frame = tmp_path / "q.toml"
    shutil.copy(QUIBBLE, frame)
    t, p = synthetic_log(load_airframe(frame), load_curve_file(SAMPLE_DIR / "bramblewick-propulsion_g59-10.xml"), 0.62)
    log = tmp_path / "log.csv"
    log.write_text("time (s),pressure (Pa)\n" + "".join(f"{a:.3f},{b:.2f}\n" for a, b in zip(t, p)))
    plot = tmp_path / "fit.png"
    code, out = run("calibrate", str(frame), "--motor", "G59-10", "--log", str(log), "--plot", str(plot), "--write")
    assert code == 0, out
    assert "Drag coefficient" in out and "Liftoff" in out
    assert plot.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert abs(load_airframe(frame).drag_coefficient - 0.62) < 0.0124
    assert (tmp_path / "q.toml.bak").read_text() == QUIBBLE.read_text()


def test_calibrate_usage_errors() -> None:
    code, out = run("calibrate", str(QUIBBLE), "--motor", "F29-8")
    assert code == 2 and "--apogee" in out
    code, out = run("calibrate", str(QUIBBLE), "--motor", "F29-8", "--flight", "wind=3m/s")
    assert code == 2 and "apogee=" in out
    code, out = run("calibrate", str(QUIBBLE), "--motor", "F29-8", "--apogee", "60km")
    assert code == 2 and "measured apogee" in out


def test_an_implausible_fit_is_flagged_and_not_written_without_force(tmp_path: Path) -> None:
    # 250 m for a rocket that flies about 500 m on an F29-8 needs Cd about 2.3: far outside 0.3-1.0 (common
    # practice, no published source); a feet/metres slip is likelier than such drag.
    frame = tmp_path / "q.toml"
    shutil.copy(QUIBBLE, frame)
    before = frame.read_bytes()
    code, out = run("calibrate", str(frame), "--motor", "F29-8", "--apogee", "250m", "--write")
    assert code == 2 and "--force" in out and "outside the usual" in " ".join(out.split())
    assert frame.read_bytes() == before
    code, out = run("calibrate", str(frame), "--motor", "F29-8", "--apogee", "250m")
    assert code == 0 and "Warning" in out and "the file gives 0.55" in out
    code, out = run("calibrate", str(frame), "--motor", "F29-8", "--apogee", "250m", "--write", "--force")
    assert code == 0 and frame.read_bytes() != before
