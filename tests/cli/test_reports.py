"""``--report FILE.html`` on fly, match and reduce (issue 15): written, traced, never over a file without leave."""

from __future__ import annotations

import hashlib
from pathlib import Path

import numpy as np

from ..conftest import SAMPLE_DIR
from .conftest import AIRFRAMES, run

MOTOR = SAMPLE_DIR / "bramblewick-propulsion_f29-8.xml"


def test_fly_writes_a_report_that_names_its_inputs_by_digest(tmp_path: Path) -> None:
    report = tmp_path / "preflight.html"
    code, out = run("fly", str(AIRFRAMES / "quibble-41.toml"), "--motor", str(MOTOR), "--report", str(report))
    assert code == 0, out
    assert f"Wrote {report}" in out.replace("\n", "")
    html = report.read_text()
    for path in (AIRFRAMES / "quibble-41.toml", MOTOR):
        assert hashlib.sha256(path.read_bytes()).hexdigest() in html
    assert "Flight card" in html and "Pad and rail" in html and "demo: invented for demonstration" in html


def test_fly_traces_a_catalog_motor_by_its_file(tmp_path: Path) -> None:
    report = tmp_path / "r.html"
    code, out = run("fly", str(AIRFRAMES / "quibble-41.toml"), "--motor", "F29-8", "--catalog", str(SAMPLE_DIR),
                    "--report", str(report))
    assert code == 0, out
    assert hashlib.sha256(MOTOR.read_bytes()).hexdigest() in report.read_text()


def test_a_report_never_replaces_a_file_without_overwrite(tmp_path: Path) -> None:
    report = tmp_path / "r.html"
    report.write_text("keep me")
    args = ["fly", str(AIRFRAMES / "quibble-41.toml"), "--motor", str(MOTOR), "--report", str(report)]
    code, out = run(*args)
    assert code == 2 and "use --overwrite" in out and report.read_text() == "keep me"
    code, out = run(*args, "--overwrite")
    assert code == 0 and report.read_text().startswith("<!DOCTYPE html>")


def test_a_report_never_replaces_an_input_even_with_overwrite(tmp_path: Path) -> None:
    airframe = tmp_path / "rocket.toml"
    airframe.write_bytes((AIRFRAMES / "quibble-41.toml").read_bytes())
    code, out = run("fly", str(airframe), "--motor", str(MOTOR), "--report", str(airframe), "--overwrite")
    assert code == 2 and "is an input of this" in out
    assert airframe.read_bytes() == (AIRFRAMES / "quibble-41.toml").read_bytes()


def test_match_writes_its_ranking_report(tmp_path: Path) -> None:
    report = tmp_path / "m.html"
    code, out = run("match", str(AIRFRAMES / "quibble-41.toml"), "--catalog", str(SAMPLE_DIR), "--target", "400",
                    "--report", str(report))
    assert code == 0, out
    html = report.read_text()
    assert "Ranking:" in html and "in rank order" in html and "range safety officer decides" in html


def test_reduce_refuses_a_report_over_a_log_before_writing_anything(tmp_path: Path) -> None:
    log = tmp_path / "firing.csv"
    t = np.arange(-0.3, 1.5, 1e-3)
    f = np.where((t > 0) & (t < 1.0), 30.0, 0.0) + 5.0
    log.write_text("time_s,force_N\n" + "".join(f"{a:.4f},{b:.3f}\n" for a, b in zip(t, f)))
    before = log.read_bytes()
    out_xml = tmp_path / "out.xml"
    code, out = run("reduce", str(log), "-o", str(out_xml), "--designation", "F30", "--report", str(log), "--overwrite")
    assert code == 2 and "is an input of this" in out
    assert log.read_bytes() == before and not out_xml.exists()
    report = tmp_path / "series.html"
    code, out = run("reduce", str(log), "--designation", "F30", "--report", str(report))
    # The 30 N·s curve under an F label is a class-mismatch error: the report is written, the status says so
    # (issue 14: errors used to leave the exit status at 0).
    assert code == 1 and "class-mismatch" in out, out
    assert "Raw, filtered and reduced thrust" in report.read_text()
